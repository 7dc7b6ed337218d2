/* Stagewright: the <stagewright-calc> element.
 *
 * Plain script, no framework, no bundler. www/build.mjs puts this file in
 * one function scope together with:
 *   STAGEWRIGHT_VERSION            the version string
 *   STAGEWRIGHT_CSS                www/styles.css as text (shadow root styles)
 *   STAGEWRIGHT_WASM_LZMA_BASE64   the wasm module, LZMA-compressed, base64
 *   STAGEWRIGHT_UNLZMA             the LZMA decoder (npm lzma1, bundled)
 *   STAGEWRIGHT_SCRIPT_URL         where the script was loaded from, if known
 *   wasm_bindgen                   the wasm-bindgen "no-modules" glue
 * so nothing here becomes a global; the page sees only the custom element.
 *
 * House rules: user text reaches the DOM only through textContent, .value
 * and setAttribute on non-event attributes, never as HTML; no inline event
 * handlers; no eval or new Function (the page must run under
 * `script-src 'self' 'wasm-unsafe-eval'`). Every engineering number shown
 * comes from the wasm engine (the core crate); this file lays numbers out.
 */

/* ------------------------------------------------------------------ */
/* Small DOM helpers                                                   */
/* ------------------------------------------------------------------ */

const SVG_NS = "http://www.w3.org/2000/svg";

/** Creates an element; `attrs` values are set with setAttribute, children
 * that are strings become text nodes. */
function h(tag, attrs, ...children) {
  const el = document.createElement(tag);
  if (attrs) {
    for (const [k, v] of Object.entries(attrs)) {
      if (v === false || v === null || v === undefined) continue;
      el.setAttribute(k, v === true ? "" : String(v));
    }
  }
  for (const c of children.flat()) {
    if (c === null || c === undefined || c === false) continue;
    el.append(typeof c === "string" ? document.createTextNode(c) : c);
  }
  return el;
}

/** Creates an SVG element under `parent`. */
function sv(tag, attrs, parent) {
  const el = document.createElementNS(SVG_NS, tag);
  if (attrs) {
    for (const [k, v] of Object.entries(attrs)) {
      if (v !== null && v !== undefined) el.setAttribute(k, String(v));
    }
  }
  if (parent) parent.appendChild(el);
  return el;
}

/** A quantity symbol with a subscript, sym("I", "C") for I<sub>C</sub>;
 * kept as data, made into nodes per element by symNodes. */
function sym(main, sub) {
  return [main, sub || ""];
}

function symNodes([main, sub]) {
  return sub ? [main, h("sub", null, sub)] : [main];
}

/* ------------------------------------------------------------------ */
/* What the design file holds, field by field                          */
/* ------------------------------------------------------------------ */

const FORMAT = "stagewright/1";

const STAGES = [
  ["common-emitter", "common emitter"],
  ["common-collector", "common collector (emitter follower)"],
  ["common-base", "common base"],
];

/** `obj[key]` when `key` is the object's own property, else undefined: a
 * key that comes from a design ("constructor", "__proto__") never reaches
 * a prototype's member. */
function own(obj, key) {
  return typeof key === "string" && Object.prototype.hasOwnProperty.call(obj, key) ? obj[key] : undefined;
}

/** Which parts each stage uses (the rest are hidden and left out). */
const STAGE_PARTS = {
  "common-emitter": ["r1", "r2", "rc", "re", "re_bypassed", "c_emitter", "rs", "rl", "c_in", "c_out"],
  "common-collector": ["r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out"],
  "common-base": ["r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out", "c_base"],
};

/* A field: path in the design file, unit for the parser, label text,
 * optional kind ("text", "textarea", "select"), E-series family ("R"/"C"). */
function F(path, unit, desc, extra) {
  return Object.assign({ path, key: path[path.length - 1], unit, desc, kind: "value" }, extra || {});
}

const GROUPS = [
  {
    id: "stage",
    legend: "Stage and supply",
    fields: [
      // The lengths the design file allows (README: title 200, notes 20 000).
      F(["title"], "", "title of this design", { kind: "text", maxlength: 200 }),
      F(["notes"], "", "notes for reviewers", { kind: "textarea", maxlength: 20000 }),
      F(["stage"], "", "configuration", { kind: "select", options: STAGES }),
      F(["supply"], "V", "supply voltage"),
      F(["ambient"], "°C", "ambient temperature", { placeholder: "25" }),
    ],
  },
  {
    id: "transistor",
    legend: "Transistor",
    fields: [
      F(["transistor", "preset"], "", "device class", { kind: "select", options: null }),
      F(["transistor", "polarity"], "", "polarity", {
        kind: "select",
        options: [["", "from the class"], ["npn", "NPN"], ["pnp", "PNP"]],
      }),
      F(["transistor", "hfe"], "", "typical current gain"),
      F(["transistor", "hfe_min"], "", "lowest current gain"),
      F(["transistor", "hfe_max"], "", "highest current gain"),
      F(["transistor", "vbe"], "V", "base-emitter voltage"),
      F(["transistor", "vbe_at_ic"], "A", "collector current of that vbe"),
      F(["transistor", "early_voltage"], "V", "Early voltage"),
      F(["transistor", "ft"], "Hz", "transition frequency"),
      F(["transistor", "cob"], "F", "output capacitance"),
      F(["transistor", "rbb"], "Ω", "base spreading resistance"),
      F(["transistor", "vce_sat"], "V", "saturation voltage"),
      F(["transistor", "vceo_max"], "V", "collector-emitter rating"),
      F(["transistor", "ic_max"], "A", "collector current rating"),
      F(["transistor", "ptot_max"], "W", "dissipation rating"),
      F(["transistor", "rth_ja"], "K/W", "thermal resistance, junction to air"),
      F(["transistor", "tj_max"], "°C", "junction temperature rating"),
    ],
  },
  {
    id: "parts",
    legend: "Parts",
    fields: [
      F(["parts", "r1"], "Ω", "bias, supply to base", { series: "R" }),
      F(["parts", "r2"], "Ω", "bias, base to ground", { series: "R" }),
      F(["parts", "rc"], "Ω", "collector resistor", { series: "R" }),
      F(["parts", "re"], "Ω", "emitter resistor, unbypassed", { series: "R" }),
      F(["parts", "re_bypassed"], "Ω", "emitter resistor, bypassed", { series: "R" }),
      F(["parts", "c_emitter"], "F", "emitter bypass capacitor", { series: "C" }),
      F(["parts", "c_base"], "F", "base decoupling capacitor", { series: "C" }),
      F(["parts", "rs"], "Ω", "source resistance", { series: "R" }),
      F(["parts", "rl"], "Ω", "load resistance", { series: "R" }),
      F(["parts", "c_in"], "F", "input coupling capacitor", { series: "C" }),
      F(["parts", "c_out"], "F", "output coupling capacitor", { series: "C" }),
      F(["parts", "resistor_rating"], "W", "resistor power rating"),
    ],
  },
  {
    id: "requirements",
    legend: "Requirements",
    fields: [
      F(["requirements", "min_voltage_gain_db"], "dB", "voltage gain at least"),
      F(["requirements", "max_voltage_gain_db"], "dB", "voltage gain at most"),
      F(["requirements", "min_input_impedance"], "Ω", "input impedance at least"),
      F(["requirements", "max_output_impedance"], "Ω", "output impedance at most"),
      F(["requirements", "min_swing"], "V", "output swing at least (peak)"),
      F(["requirements", "max_f_low"], "Hz", "lower corner at most"),
      F(["requirements", "min_f_high"], "Hz", "upper corner at least"),
      F(["requirements", "max_supply_current"], "A", "supply current at most"),
      F(["requirements", "max_junction_temperature"], "°C", "junction temperature at most"),
    ],
  },
];

const ALL_FIELDS = GROUPS.flatMap((g) => g.fields);
const FIELD_BY_KEY = new Map(ALL_FIELDS.map((f) => [f.key, f]));
const TOP_ORDER = ["format", "title", "notes", "stage", "supply", "ambient", "transistor", "parts", "requirements"];

/** Units and names of the checks that mirror requirements. */
const CHECK_INFO = {
  min_voltage_gain_db: ["voltage gain", "dB", "≥"],
  max_voltage_gain_db: ["voltage gain", "dB", "≤"],
  min_input_impedance: ["input impedance", "Ω", "≥"],
  max_output_impedance: ["output impedance", "Ω", "≤"],
  min_swing: ["output swing (peak)", "V", "≥"],
  max_f_low: ["lower corner", "Hz", "≤"],
  min_f_high: ["upper corner", "Hz", "≥"],
  max_supply_current: ["supply current", "A", "≤"],
  max_junction_temperature: ["junction temperature", "°C", "≤"],
  vceo: ["VCEO rating", "V", ""],
  ic_max: ["collector current rating", "A", ""],
  ptot: ["dissipation rating", "W", ""],
  tj_max: ["junction temperature rating", "°C", ""],
};

const SERIES_CHOICES = ["E3", "E6", "E12", "E24", "E48", "E96", "E192"];

const DEFERRAL =
  "These figures come from simplified device models. Confirm them by measurement, " +
  "check them against the data of the parts actually used, and follow the codes, " +
  "standards and licensed practice that apply where the design will be built.";

/** The design shown when none is given. */
const EXAMPLE_DESIGN = {
  format: FORMAT,
  title: "Example: small-signal common-emitter stage",
  stage: "common-emitter",
  supply: 12,
  ambient: 25,
  transistor: { preset: "general-purpose-npn" },
  parts: {
    r1: "47k",
    r2: "10k",
    rc: "3k9",
    re: "220",
    re_bypassed: "680",
    c_emitter: "100u",
    rs: "600",
    rl: "10k",
    c_in: "1u",
    c_out: "4u7",
    resistor_rating: 0.25,
  },
  requirements: { min_voltage_gain_db: 20, min_input_impedance: "2k", max_f_low: 100, min_f_high: "100k" },
};

/* ------------------------------------------------------------------ */
/* Design documents: paths, order, text encodings                       */
/* ------------------------------------------------------------------ */

function getPath(obj, path) {
  let o = obj;
  for (const k of path) {
    if (o === null || typeof o !== "object") return undefined;
    o = o[k];
  }
  return o;
}

function setPath(obj, path, value) {
  let o = obj;
  for (const k of path.slice(0, -1)) {
    if (o[k] === null || typeof o[k] !== "object" || Array.isArray(o[k])) o[k] = {};
    o = o[k];
  }
  const last = path[path.length - 1];
  if (value === undefined) delete o[last];
  else o[last] = value;
}

function clone(v) {
  return v === undefined ? undefined : JSON.parse(JSON.stringify(v));
}

/** Plain numbers are stored as numbers, anything else as the text typed. */
function storedValue(text) {
  return /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(text) ? Number(text) : text;
}

/** The design with its keys in the documented order, empty blocks dropped. */
function ordered(design) {
  const out = { format: FORMAT };
  for (const k of TOP_ORDER) {
    if (k === "format" || design[k] === undefined) continue;
    const v = design[k];
    if (v && typeof v === "object" && !Array.isArray(v) && Object.keys(v).length === 0) continue;
    out[k] = v;
  }
  for (const k of Object.keys(design)) if (!(k in out) && k !== "format") out[k] = design[k];
  return out;
}

function utf8ToBase64Url(text) {
  const bytes = new TextEncoder().encode(text);
  let bin = "";
  for (let i = 0; i < bytes.length; i += 0x8000) {
    bin += String.fromCharCode.apply(null, bytes.subarray(i, i + 0x8000));
  }
  return btoa(bin).replace(/\+/g, "-").replace(/\//g, "_").replace(/=+$/, "");
}

function base64UrlToUtf8(text) {
  const b64 = text.replace(/-/g, "+").replace(/_/g, "/").replace(/\s+/g, "");
  const bin = atob(b64 + "===".slice((b64.length + 3) % 4));
  const bytes = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) bytes[i] = bin.charCodeAt(i);
  return new TextDecoder().decode(bytes);
}

/** Encodes a design for a `#design=` fragment. */
function encodeDesign(design) {
  return utf8ToBase64Url(JSON.stringify(ordered(design)));
}

/** The JSON text of a design given as JSON text, as a `#design=` link code
 * (base64url of the JSON) or as an object (serialised). The text is read
 * by the engine, the command line's own reader, before anything uses it
 * (see `_loadText`); this only turns the source into text. Throws an Error
 * with a message fit to show. */
function designText(source) {
  if (typeof source === "string") {
    const text = source.trim();
    if (text.startsWith("{") || text === "") return text;
    try {
      return base64UrlToUtf8(text);
    } catch (e) {
      throw new Error("the design text is neither JSON nor a design link code");
    }
  }
  if (source === null || typeof source !== "object" || Array.isArray(source)) {
    throw new Error("a design must be a JSON object, or its text");
  }
  try {
    return JSON.stringify(source);
  } catch (e) {
    throw new Error("the design object cannot be written as JSON: " + e.message);
  }
}

/** JSON for inside an HTML <script> element: no "</" or "<!--". */
function jsonForScript(design) {
  return JSON.stringify(ordered(design), null, 2).replace(/</g, "\\u003c");
}

function escapeAttr(text) {
  return String(text).replace(/&/g, "&amp;").replace(/"/g, "&quot;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}

/* ------------------------------------------------------------------ */
/* The engine: one wasm instance shared by every element on the page    */
/* ------------------------------------------------------------------ */

let enginePromise = null;

function base64ToBytes(b64) {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}


function loadEngine() {
  if (!enginePromise) {
    enginePromise = (async () => {
      const bytes = STAGEWRIGHT_UNLZMA.unlzma(base64ToBytes(STAGEWRIGHT_WASM_LZMA_BASE64));
      await wasm_bindgen({ module_or_path: bytes });
      return wasm_bindgen;
    })();
    enginePromise.catch(() => {});
  }
  return enginePromise;
}

/* ---- The analysis ------------------------------------------------
 * The wasm exports (see wasm/src/analysis.rs):
 *
 *   api.compute(designJson: string, pointsPerDecade: number) ->
 *       {report, sweep, curves}: one analysis, everything the page shows.
 *   api.analyze(designJson: string) -> report object, the very document of
 *       `stagewright analyze FILE --json`; throws {field, message}.
 *   compute(…).sweep: {freq, voltage_gain_db, voltage_gain_from_source_db,
 *        current_gain_db, power_gain_db, phase_deg, input_impedance,
 *        output_impedance} (Float64Arrays, one entry per freq).
 *   compute(…).curves: {characteristics: [{label, ib, vce, ic}],
 *        dc_load_line: {vce, ic}, ac_load_line: {vce, ic},
 *        quiescent: {vce, ic}, swing_limits: [{label, vce, ic}]}.
 *   api.presets() -> [{name, label}];  api.preset_data(name) -> {hfe, …}.
 */

/** Points a decade of the plotted sweep. */
const SWEEP_PER_DECADE = 20;

function hasAnalysis(api) {
  return !!api && typeof api.compute === "function";
}

/** Runs the analysis of `design` once. Returns {report, sweep, curves} or
 * null when the engine has no analysis; throws {field, message}. */
function runAnalysis(api, design) {
  return hasAnalysis(api) ? api.compute(JSON.stringify(design), SWEEP_PER_DECADE) : null;
}

function enginePresets(api) {
  if (api && typeof api.presets === "function") {
    try {
      const list = api.presets();
      if (Array.isArray(list) && list.length) return list.map((p) => [p.name, p.label || p.name]);
    } catch (e) {
      /* fall back to the built-in list */
    }
  }
  return [];
}

function presetData(api, name) {
  if (!name || typeof name !== "string" || !api || typeof api.preset_data !== "function") return null;
  try {
    return api.preset_data(name) || null;
  } catch (e) {
    return null;
  }
}

/** An error thrown by the engine as {field, message}, or anything else. */
function asFieldError(err) {
  if (err && typeof err === "object" && typeof err.message === "string") {
    return { field: typeof err.field === "string" ? err.field : "", message: err.message };
  }
  return { field: "", message: String(err) };
}

/* ------------------------------------------------------------------ */
/* Colours for canvases, from CSS custom properties                     */
/* ------------------------------------------------------------------ */

let colorProbe = null;

/** Any CSS colour as "#rrggbb" or "#rrggbbaa", which the plotter reads
 * (a canvas gives back "#rrggbb" or "rgba(r, g, b, a)"). */
function cssColor(value, fallback) {
  if (!colorProbe) colorProbe = document.createElement("canvas").getContext("2d");
  if (!colorProbe) return fallback;
  colorProbe.fillStyle = fallback;
  if (value) colorProbe.fillStyle = value;
  const c = String(colorProbe.fillStyle);
  const m = /^rgba?\((\d+), (\d+), (\d+)(?:, ([\d.]+))?\)$/.exec(c);
  if (!m) return c;
  const hex = (n) => Math.round(n).toString(16).padStart(2, "0");
  return "#" + hex(m[1]) + hex(m[2]) + hex(m[3]) + hex(255 * (m[4] === undefined ? 1 : Number(m[4])));
}

/* ------------------------------------------------------------------ */
/* The circuit diagram                                                 */
/* ------------------------------------------------------------------ */

/** Draws one stage into an <svg>, parts named as in the design file. */
class Sketch {
  constructor(svg, values, onPick) {
    this.svg = svg;
    this.values = values; // key -> {text, present}
    this.onPick = onPick;
    this.wires = sv("g", { class: "wires" }, svg);
    this.parts = sv("g", { class: "parts" }, svg);
    this.notes = sv("g", { class: "notes" }, svg);
  }

  wire(...pts) {
    sv("polyline", { points: pts.map((p) => p.join(",")).join(" "), class: "wire" }, this.wires);
  }

  dot(x, y) {
    sv("circle", { cx: x, cy: y, r: 3, class: "junction" }, this.wires);
  }

  text(x, y, str, cls, anchor) {
    const t = sv("text", { x, y, class: cls || "note", "text-anchor": anchor || "start" }, this.notes);
    t.textContent = str;
    return t;
  }

  /** A clickable group for part `key` (focuses its input). */
  group(key, desc, cls) {
    const v = this.values[key] || {};
    const g = sv("g", {
      class: "part " + (cls || "") + (v.present ? "" : " absent"),
      "data-part": key,
      tabindex: 0,
      role: "button",
    }, this.parts);
    g.setAttribute("data-desc", desc);
    g.setAttribute("aria-label", partLabel(key, desc, v));
    const title = sv("title", null, g);
    title.textContent = `${key}: ${desc}`;
    return g;
  }

  label(g, key, x, y, side) {
    const v = this.values[key] || {};
    const anchor = side === "left" ? "end" : side === "right" ? "start" : "middle";
    const name = sv("text", { x, y, class: "pname", "text-anchor": anchor }, g);
    name.textContent = key;
    const val = sv("text", { x, y: y + 13, class: "pval", "text-anchor": anchor, "data-val": key }, g);
    val.textContent = v.present ? v.text : "not fitted";
  }

  /** Places a label beside a body of half-width `half` centred at (cx, cy). */
  labelAt(g, key, cx, cy, side, vertical, half) {
    if (vertical) {
      if (side === "left") this.label(g, key, cx - half - 7, cy - 2, "left");
      else this.label(g, key, cx + half + 7, cy - 2, "right");
    } else {
      this.label(g, key, cx, cy - half - 19, "middle");
    }
  }

  resistor(key, desc, x1, y1, x2, y2, side) {
    const g = this.group(key, desc, "resistor");
    const vertical = x1 === x2;
    const cx = (x1 + x2) / 2;
    const cy = (y1 + y2) / 2;
    const L = 17;
    const W = 6;
    if (vertical) {
      sv("line", { x1, y1, x2: x1, y2: cy - L, class: "lead" }, g);
      sv("line", { x1, y1: cy + L, x2, y2, class: "lead" }, g);
      sv("rect", { x: cx - W, y: cy - L, width: 2 * W, height: 2 * L, class: "body" }, g);
      sv("rect", { x: cx - 16, y: cy - L - 4, width: 32, height: 2 * L + 8, class: "hit" }, g);
    } else {
      sv("line", { x1, y1, x2: cx - L, y2: y1, class: "lead" }, g);
      sv("line", { x1: cx + L, y1, x2, y2, class: "lead" }, g);
      sv("rect", { x: cx - L, y: cy - W, width: 2 * L, height: 2 * W, class: "body" }, g);
      sv("rect", { x: cx - L - 4, y: cy - 16, width: 2 * L + 8, height: 32, class: "hit" }, g);
    }
    this.labelAt(g, key, cx, cy, side, vertical, W);
    return g;
  }

  capacitor(key, desc, x1, y1, x2, y2, side) {
    const g = this.group(key, desc, "capacitor");
    const vertical = x1 === x2;
    const cx = (x1 + x2) / 2;
    const cy = (y1 + y2) / 2;
    const G = 4;
    const P = 12;
    if (vertical) {
      sv("line", { x1, y1, x2: x1, y2: cy - G, class: "lead" }, g);
      sv("line", { x1, y1: cy + G, x2, y2, class: "lead" }, g);
      sv("line", { x1: cx - P, y1: cy - G, x2: cx + P, y2: cy - G, class: "plate" }, g);
      sv("line", { x1: cx - P, y1: cy + G, x2: cx + P, y2: cy + G, class: "plate" }, g);
      sv("rect", { x: cx - 16, y: cy - 14, width: 32, height: 28, class: "hit" }, g);
    } else {
      sv("line", { x1, y1, x2: cx - G, y2: y1, class: "lead" }, g);
      sv("line", { x1: cx + G, y1, x2, y2, class: "lead" }, g);
      sv("line", { x1: cx - G, y1: cy - P, x2: cx - G, y2: cy + P, class: "plate" }, g);
      sv("line", { x1: cx + G, y1: cy - P, x2: cx + G, y2: cy + P, class: "plate" }, g);
      sv("rect", { x: cx - 14, y: cy - 16, width: 28, height: 32, class: "hit" }, g);
    }
    this.labelAt(g, key, cx, cy, side, vertical, P);
    return g;
  }

  /** The transistor with its base at (bx, by); returns lead ends. */
  transistor(bx, by, polarity, target) {
    const g = sv("g", { class: "part device", "data-part": target, tabindex: 0, role: "button" }, this.parts);
    g.setAttribute("aria-label", `transistor, ${polarity.toUpperCase()}; edit its data`);
    const title = sv("title", null, g);
    title.textContent = `transistor (${polarity.toUpperCase()})`;
    sv("circle", { cx: bx + 16, cy: by, r: 29, class: "envelope" }, g);
    sv("line", { x1: bx, y1: by - 17, x2: bx, y2: by + 17, class: "bar" }, g);
    sv("line", { x1: bx, y1: by - 7, x2: bx + 30, y2: by - 30, class: "lead" }, g);
    sv("line", { x1: bx, y1: by + 7, x2: bx + 30, y2: by + 30, class: "lead" }, g);
    // Emitter arrow: NPN has its emitter at the bottom, arrow pointing out
    // (away from the base); PNP is drawn the other way up, emitter on top,
    // arrow pointing in (toward the base).
    const pnp = polarity === "pnp";
    const [ax, ay] = pnp ? [bx + 11, by - 15.5] : [bx + 25, by + 26];
    const ux = pnp ? -0.79 : 0.79;
    const uy = 0.61;
    const tip = [ax + ux * 5, ay + uy * 5];
    const back = [ax - ux * 5, ay - uy * 5];
    const p1 = [back[0] - uy * 4.5, back[1] + ux * 4.5];
    const p2 = [back[0] + uy * 4.5, back[1] - ux * 4.5];
    sv("polygon", { points: [tip, p1, p2].map((p) => p.map((n) => n.toFixed(1)).join(",")).join(" "), class: "arrow" }, g);
    sv("rect", { x: bx - 14, y: by - 32, width: 62, height: 64, class: "hit" }, g);
    const t = sv("text", { x: bx + 50, y: by + 4, class: "pname" }, g);
    t.textContent = polarity.toUpperCase();
    if (pnp) return { c: [bx + 30, by + 30], e: [bx + 30, by - 30], b: [bx, by] };
    return { c: [bx + 30, by - 30], e: [bx + 30, by + 30], b: [bx, by] };
  }

  source(x, cy) {
    const g = sv("g", { class: "part source", "data-part": "rs", tabindex: 0, role: "button" }, this.parts);
    g.setAttribute("aria-label", "signal source; edit its resistance rs");
    const title = sv("title", null, g);
    title.textContent = "signal source";
    sv("circle", { cx: x, cy, r: 16, class: "envelope" }, g);
    sv("path", { d: `M${x - 9},${cy} q4.5,-9 9,0 t9,0`, class: "sine" }, g);
    sv("rect", { x: x - 20, y: cy - 20, width: 40, height: 40, class: "hit" }, g);
    const t = sv("text", { x, y: cy + 32, class: "note", "text-anchor": "middle" }, g);
    t.textContent = "source";
  }

  rail(x1, x2, y, text) {
    const g = sv("g", { class: "part rail", "data-part": "supply", tabindex: 0, role: "button" }, this.parts);
    g.setAttribute("aria-label", `supply rail, ${text}; edit`);
    sv("line", { x1, y1: y, x2, y2: y, class: "railline" }, g);
    sv("rect", { x: x1 - 70, y: y - 12, width: x2 - x1 + 76, height: 24, class: "hit" }, g);
    const t = sv("text", { x: x1 - 8, y: y + 4, class: "pname", "text-anchor": "end", "data-rail": "" }, g);
    t.textContent = text;
  }

  ground(x1, x2, y, gx) {
    sv("line", { x1, y1: y, x2, y2: y, class: "railline" }, this.wires);
    sv("line", { x1: gx, y1: y, x2: gx, y2: y + 8, class: "wire" }, this.wires);
    sv("line", { x1: gx - 11, y1: y + 8, x2: gx + 11, y2: y + 8, class: "gnd" }, this.wires);
    sv("line", { x1: gx - 7, y1: y + 12, x2: gx + 7, y2: y + 12, class: "gnd" }, this.wires);
    sv("line", { x1: gx - 3, y1: y + 16, x2: gx + 3, y2: y + 16, class: "gnd" }, this.wires);
  }

  nodeVoltage(id, x, y, anchor) {
    const t = sv("text", { x, y, class: "nodev", "text-anchor": anchor || "start", "data-node": id }, this.notes);
    return t;
  }
}

function partLabel(key, desc, v) {
  return `${key}, ${desc}, ${v.present ? v.text : "not fitted"}; edit`;
}

/** Updates the values shown on a drawn stage without redrawing it. */
function updateStage(svg, values, supplyText) {
  for (const g of svg.querySelectorAll("g.part[data-desc]")) {
    const key = g.getAttribute("data-part");
    const v = values[key] || {};
    g.classList.toggle("absent", !v.present);
    g.setAttribute("aria-label", partLabel(key, g.getAttribute("data-desc"), v));
    const val = g.querySelector("[data-val]");
    const text = v.present ? v.text : "not fitted";
    if (val && val.textContent !== text) val.textContent = text;
  }
  const rail = svg.querySelector("[data-rail]");
  if (rail && rail.textContent !== supplyText) {
    rail.textContent = supplyText;
    rail.parentNode.setAttribute("aria-label", `supply rail, ${supplyText}; edit`);
  }
}

/** Draws the stage; returns the <svg>. `values` maps part keys to
 * {text, present}; `supplyText` labels the rail. */
function drawStage(stage, polarity, values, supplyText) {
  const width = stage === "common-base" ? 600 : 545;
  const svg = sv("svg", { viewBox: `0 0 ${width} 430`, class: "schematic", role: "group" });
  svg.setAttribute("aria-label", `${stage.replace("-", " ")} stage; choose a part to edit it`);
  const k = new Sketch(svg, values);
  const RAIL = 40;
  const BUS = 400;
  const BX = 290;
  const BY = 230;
  const CX = 320;
  if (polarity === "pnp") {
    drawPnpStage(k, stage, supplyText, { RAIL, BUS, BX, BY, CX });
    return svg;
  }
  if (stage === "common-base") {
    k.rail(240, CX, RAIL, supplyText);
    k.resistor("r1", "bias, supply to base", 240, RAIL, 240, BY, "right");
    k.resistor("r2", "bias, base to ground", 240, BY, 240, BUS, "right");
    k.wire([240, BY], [190, BY]);
    k.capacitor("c_base", "base decoupling", 190, BY, 190, BUS, "left");
    k.dot(240, BY);
    k.wire([240, BY], [BX, BY]);
    const q = k.transistor(BX, BY, polarity, "transistor");
    k.wire(q.c, [CX, 160]);
    k.resistor("rc", "collector resistor", CX, RAIL, CX, 160, "right");
    k.dot(CX, 160);
    k.wire([CX, 160], [360, 160]);
    k.capacitor("c_out", "output coupling", 360, 160, 410, 160, "above");
    k.wire([410, 160], [540, 160]);
    k.dot(540, 160);
    k.text(540, 148, "out", "note", "middle");
    k.resistor("rl", "load", 540, 160, 540, BUS, "right");
    k.wire(q.e, [CX, 300]);
    k.dot(CX, 300);
    k.resistor("re", "emitter resistor", CX, 300, CX, BUS, "left");
    k.wire([CX, 300], [350, 300]);
    k.capacitor("c_in", "input coupling", 350, 300, 400, 300, "above");
    k.wire([400, 300], [410, 300]);
    k.resistor("rs", "source resistance", 410, 300, 470, 300, "above");
    k.wire([470, 300], [490, 300], [490, 324]);
    k.source(490, 340);
    k.wire([490, 356], [490, BUS]);
    k.ground(190, 540, BUS, 365);
    k.nodeVoltage("vb", 236, BY - 8, "end");
    k.nodeVoltage("vc", CX - 8, 182, "end");
    k.nodeVoltage("ve", CX - 8, 292, "end");
    return svg;
  }
  // Common emitter and common collector share the input side.
  k.rail(215, CX, RAIL, supplyText);
  k.wire([50, 324], [50, BY], [70, BY]);
  k.source(50, 340);
  k.wire([50, 356], [50, BUS]);
  k.resistor("rs", "source resistance", 70, BY, 140, BY, "above");
  k.wire([140, BY], [150, BY]);
  k.capacitor("c_in", "input coupling", 150, BY, 200, BY, "above");
  k.wire([200, BY], [BX, BY]);
  k.dot(215, BY);
  k.resistor("r1", "bias, supply to base", 215, RAIL, 215, BY, "right");
  k.resistor("r2", "bias, base to ground", 215, BY, 215, BUS, "left");
  const q = k.transistor(BX, BY, polarity, "transistor");
  if (stage === "common-collector") {
    k.resistor("rc", "collector resistor (optional)", CX, RAIL, CX, q.c[1], "right");
    k.wire(q.e, [CX, 300]);
    k.dot(CX, 300);
    k.resistor("re", "emitter resistor", CX, 300, CX, BUS, "left");
    k.wire([CX, 300], [360, 300]);
    k.capacitor("c_out", "output coupling", 360, 300, 410, 300, "above");
    k.wire([410, 300], [480, 300]);
    k.dot(480, 300);
    k.text(480, 288, "out", "note", "middle");
    k.resistor("rl", "load", 480, 300, 480, BUS, "right");
    k.ground(50, 480, BUS, 150);
    k.nodeVoltage("vb", 221, BY + 20, "start");
    k.nodeVoltage("vc", CX - 8, 182, "end");
    k.nodeVoltage("ve", CX - 8, 318, "end");
    return svg;
  }
  k.wire(q.c, [CX, 160]);
  k.resistor("rc", "collector resistor", CX, RAIL, CX, 160, "right");
  k.dot(CX, 160);
  k.wire([CX, 160], [360, 160]);
  k.capacitor("c_out", "output coupling", 360, 160, 410, 160, "above");
  k.wire([410, 160], [480, 160]);
  k.dot(480, 160);
  k.text(480, 148, "out", "note", "middle");
  k.resistor("rl", "load", 480, 160, 480, BUS, "right");
  k.wire(q.e, [CX, 280]);
  k.resistor("re", "emitter resistor, unbypassed", CX, 280, CX, 330, "left");
  k.dot(CX, 330);
  k.resistor("re_bypassed", "emitter resistor, bypassed", CX, 330, CX, BUS, "left");
  k.wire([CX, 330], [385, 330]);
  k.capacitor("c_emitter", "emitter bypass", 385, 330, 385, BUS, "right");
  k.ground(50, 480, BUS, 150);
  k.nodeVoltage("vb", 221, BY + 20, "start");
  k.nodeVoltage("vc", CX - 8, 182, "end");
  k.nodeVoltage("ve", CX + 8, 292);
  return svg;
}

/** The PNP stages: the mirror image of the NPN ones on the same positive
 * supply (core/src/stage.rs). The emitter resistance hangs from the supply
 * rail down to the emitter (on top), `rc` runs from the collector (at the
 * bottom) down to ground; `r1` stays supply to base, `r2` base to ground,
 * and the source and load return to the ground bus. */
function drawPnpStage(k, stage, supplyText, { RAIL, BUS, BX, BY, CX }) {
  const EN = 160; // emitter node (below the emitter resistance)
  const CN = 290; // collector node (above rc)
  if (stage === "common-base") {
    k.rail(240, CX, RAIL, supplyText);
    k.resistor("r1", "bias, supply to base", 240, RAIL, 240, BY, "right");
    k.resistor("r2", "bias, base to ground", 240, BY, 240, BUS, "right");
    k.wire([240, BY], [190, BY]);
    k.capacitor("c_base", "base decoupling", 190, BY, 190, BUS, "left");
    k.dot(240, BY);
    k.wire([240, BY], [BX, BY]);
    const q = k.transistor(BX, BY, "pnp", "transistor");
    // Input into the emitter, the source returning to ground at the right.
    k.resistor("re", "emitter resistor", CX, RAIL, CX, EN, "left");
    k.wire(q.e, [CX, EN]);
    k.dot(CX, EN);
    k.wire([CX, EN], [350, EN]);
    k.capacitor("c_in", "input coupling", 350, EN, 400, EN, "above");
    k.wire([400, EN], [410, EN]);
    k.resistor("rs", "source resistance", 410, EN, 470, EN, "above");
    k.wire([470, EN], [565, EN], [565, 324]);
    k.source(565, 340);
    k.wire([565, 356], [565, BUS]);
    // Output from the collector.
    k.wire(q.c, [CX, CN]);
    k.dot(CX, CN);
    k.resistor("rc", "collector resistor", CX, CN, CX, BUS, "right");
    k.wire([CX, CN], [360, CN]);
    k.capacitor("c_out", "output coupling", 360, CN, 410, CN, "above");
    k.wire([410, CN], [470, CN]);
    k.dot(470, CN);
    k.text(470, CN - 12, "out", "note", "middle");
    k.resistor("rl", "load", 470, CN, 470, BUS, "right");
    k.ground(190, 565, BUS, 365);
    k.nodeVoltage("vb", 236, BY - 8, "end");
    k.nodeVoltage("ve", CX - 8, 182, "end");
    k.nodeVoltage("vc", CX - 8, 282, "end");
    return;
  }
  // Common emitter and common collector: the input side as for NPN.
  k.rail(240, stage === "common-emitter" ? 445 : CX, RAIL, supplyText);
  k.wire([50, 324], [50, BY], [70, BY]);
  k.source(50, 340);
  k.wire([50, 356], [50, BUS]);
  k.resistor("rs", "source resistance", 70, BY, 140, BY, "above");
  k.wire([140, BY], [150, BY]);
  k.capacitor("c_in", "input coupling", 150, BY, 200, BY, "above");
  k.wire([200, BY], [BX, BY]);
  k.dot(240, BY);
  k.resistor("r1", "bias, supply to base", 240, RAIL, 240, BY, "right");
  k.resistor("r2", "bias, base to ground", 240, BY, 240, BUS, "left");
  const q = k.transistor(BX, BY, "pnp", "transistor");
  if (stage === "common-collector") {
    // Output from the emitter; rc (optional) from the collector to ground.
    k.resistor("re", "emitter resistor", CX, RAIL, CX, EN, "left");
    k.wire(q.e, [CX, EN]);
    k.dot(CX, EN);
    k.wire([CX, EN], [360, EN]);
    k.capacitor("c_out", "output coupling", 360, EN, 410, EN, "above");
    k.wire([410, EN], [480, EN]);
    k.dot(480, EN);
    k.text(480, EN - 12, "out", "note", "middle");
    k.resistor("rl", "load", 480, EN, 480, BUS, "right");
    k.resistor("rc", "collector resistor (optional)", CX, q.c[1], CX, BUS, "right");
    k.ground(50, 480, BUS, 150);
    // Below the wire: above it, the label would run into c_in's value.
    k.nodeVoltage("vb", 234, BY + 26, "end");
    k.nodeVoltage("ve", CX - 8, 182, "end");
    k.nodeVoltage("vc", CX - 8, 282, "end");
    return;
  }
  // Common emitter: re_bypassed (c_emitter across it) from the rail, then re
  // down to the emitter; output from the collector, rc to ground.
  const EB = 120; // between re_bypassed and re
  k.resistor("re_bypassed", "emitter resistor, bypassed", CX, RAIL, CX, EB, "right");
  k.dot(CX, EB);
  k.wire([CX, EB], [445, EB]);
  k.capacitor("c_emitter", "emitter bypass", 445, RAIL, 445, EB, "right");
  k.resistor("re", "emitter resistor, unbypassed", CX, EB, CX, 170, "right");
  k.wire([CX, 170], q.e);
  k.wire(q.c, [CX, CN]);
  k.dot(CX, CN);
  k.resistor("rc", "collector resistor", CX, CN, CX, BUS, "right");
  k.wire([CX, CN], [360, CN]);
  k.capacitor("c_out", "output coupling", 360, CN, 410, CN, "above");
  k.wire([410, CN], [480, CN]);
  k.dot(480, CN);
  k.text(480, CN - 12, "out", "note", "middle");
  k.resistor("rl", "load", 480, CN, 480, BUS, "right");
  k.ground(50, 480, BUS, 150);
  k.nodeVoltage("vb", 234, BY + 26, "end");
  k.nodeVoltage("ve", CX + 8, 190);
  k.nodeVoltage("vc", CX - 8, 282, "end");
}

/* ------------------------------------------------------------------ */
/* Results: the report laid out                                        */
/* ------------------------------------------------------------------ */

const OP_ROWS = [
  ["ic", sym("I", "C"), "A", "collector current"],
  ["ib", sym("I", "B"), "A", "base current"],
  ["ie", sym("I", "E"), "A", "emitter current"],
  ["vce", sym("V", "CE"), "V", "collector-emitter voltage"],
  ["vbe", sym("V", "BE"), "V", "base-emitter voltage"],
  ["vb", sym("V", "B"), "V", "base voltage"],
  ["ve", sym("V", "E"), "V", "emitter voltage"],
  ["vc", sym("V", "C"), "V", "collector voltage"],
];
const SMALL_ROWS = [
  ["gm", sym("g", "m"), "S", "transconductance"],
  ["r_pi", sym("r", "π"), "Ω", "base input resistance"],
  ["r_o", sym("r", "o"), "Ω", "output resistance"],
  ["c_pi", sym("C", "π"), "F", "base-emitter capacitance"],
  ["c_mu", sym("C", "μ"), "F", "base-collector capacitance"],
];
const MID_ROWS = [
  ["voltage_gain", sym("A", "v"), "gain", "voltage gain"],
  ["voltage_gain_from_source", sym("A", "vs"), "gain", "voltage gain from the source"],
  ["current_gain", sym("A", "i"), "gain", "current gain"],
  ["power_gain_db", sym("G", "p"), "dB", "power gain"],
  ["input_impedance", sym("Z", "in"), "Ω", "input impedance"],
  ["output_impedance", sym("Z", "out"), "Ω", "output impedance"],
];
const BW_ROWS = [
  ["f_low", sym("f", "L"), "Hz", "lower corner (−3 dB)"],
  ["f_high", sym("f", "H"), "Hz", "upper corner (−3 dB)"],
  ["f_unity_current_gain", sym("f", "T"), "Hz", "unity current gain"],
  ["f_unity_power_gain", sym("f", "max"), "Hz", "unity power gain"],
];
const SWING_ROWS = [
  ["positive", sym("+"), "V", "positive peak at the load"],
  ["negative", sym("−"), "V", "negative peak at the load"],
  ["symmetric", sym("±"), "V", "peak of the largest undistorted sine"],
];
const DISS_ROWS = [
  ["transistor", sym("P", "D"), "W", "transistor dissipation"],
  ["ptot_available", sym("P", "tot"), "W", "dissipation rating at this ambient"],
  ["junction_temperature", sym("T", "J"), "°C", "junction temperature"],
  ["supply_current", sym("I", "S"), "A", "supply current"],
];

/** A card of labelled <output>s; returns {card, outputs: key -> output}. */
function quantityCard(id, title, rows, extra) {
  const outputs = {};
  const dl = h("dl", { class: "quantities" });
  for (const [key, symbol, , desc] of rows) {
    const out = h("output", { "data-key": `${id}.${key}` }, "—");
    outputs[key] = out;
    dl.append(
      h("div", { class: "q" },
        h("dt", null, h("span", { class: "sym" }, symNodes(symbol)), h("span", { class: "desc" }, desc)),
        h("dd", null, out)),
    );
  }
  const card = h("section", { class: `card card-${id}`, "aria-labelledby": `h-${id}` },
    h("h3", { id: `h-${id}` }, title), extra || null, dl);
  return { card, outputs };
}

/* ------------------------------------------------------------------ */
/* The element                                                          */
/* ------------------------------------------------------------------ */

let stylesheet = null;

function adoptStyles(root) {
  try {
    if (!stylesheet && typeof CSSStyleSheet === "function" && "replaceSync" in CSSStyleSheet.prototype) {
      stylesheet = new CSSStyleSheet();
      stylesheet.replaceSync(STAGEWRIGHT_CSS);
    }
    if (stylesheet && "adoptedStyleSheets" in root) {
      root.adoptedStyleSheets = [stylesheet];
      return;
    }
  } catch (e) {
    /* fall through to a <style> element */
  }
  root.append(h("style", null, STAGEWRIGHT_CSS));
}

let uid = 0;

class StagewrightCalc extends HTMLElement {
  static get observedAttributes() {
    return ["readonly", "compact", "src", "theme"];
  }

  constructor() {
    super();
    this._uid = ++uid;
    this._design = null;
    this._report = null;
    this._analysis = null;
    this._api = null;
    this._built = false;
    this._fields = new Map(); // key -> {spec, input, understood, snap, error, row}
    this._invalid = new Map(); // key -> message
    this._series = { R: "E24", C: "E6" };
    this._plotFrame = 0;
    this._announceTimer = 0;
    this._sourceLoaded = false;
    this._canvasSize = new WeakMap(); // canvas -> {w, h, ratio} in device pixels
    this._onResize = (entries) => {
      for (const e of entries || []) {
        const css = e.contentBoxSize && e.contentBoxSize[0];
        const dev = e.devicePixelContentBoxSize && e.devicePixelContentBoxSize[0];
        const cssW = css ? css.inlineSize : e.contentRect.width;
        const cssH = css ? css.blockSize : e.contentRect.height;
        const ratio = window.devicePixelRatio || 1;
        const w = dev ? dev.inlineSize : Math.round(cssW * ratio);
        const h = dev ? dev.blockSize : Math.round(cssH * ratio);
        this._canvasSize.set(e.target, { w, h, ratio: cssW > 0 ? w / cssW : ratio });
      }
      this._themeCache = null;
      this._schedulePlots();
    };
    this._resizeObserver = typeof ResizeObserver === "function" ? new ResizeObserver(this._onResize) : null;
    this._onScheme = () => {
      this._themeCache = null;
      this._schedulePlots();
    };
    this._onBeforePrint = () => this._openAllForPrint(true);
    this._onAfterPrint = () => this._openAllForPrint(false);
    // A design set as a property before this element was upgraded.
    if (Object.prototype.hasOwnProperty.call(this, "design")) {
      const pending = this.design;
      delete this.design;
      this._pendingDesign = pending;
    }
  }

  /* ---------------- public API ---------------- */

  /** The current design (as valid as the last good edit), ordered. */
  get design() {
    return this._design ? this._exportDesign() : null;
  }

  set design(value) {
    if (!this._built) {
      this._pendingDesign = value;
      return;
    }
    let text;
    try {
      text = designText(value);
    } catch (e) {
      this._showLoadError(e.message);
      return;
    }
    this._loadText(text);
  }

  /** The last report computed (null before the first one). */
  get report() {
    return this._report ? clone(this._report) : null;
  }

  /** Reads the design again from the inline JSON or `src`. */
  reload() {
    this._sourceLoaded = false;
    this._readSource();
  }

  /* ---------------- lifecycle ---------------- */

  connectedCallback() {
    if (!this._built) this._build();
    if (this._resizeObserver) {
      for (const c of this._canvases()) {
        try {
          this._resizeObserver.observe(c, { box: "device-pixel-content-box" });
        } catch (e) {
          this._resizeObserver.observe(c);
        }
      }
    }
    this._scheme = window.matchMedia ? window.matchMedia("(prefers-color-scheme: dark)") : null;
    if (this._scheme && this._scheme.addEventListener) this._scheme.addEventListener("change", this._onScheme);
    window.addEventListener("beforeprint", this._onBeforePrint);
    window.addEventListener("afterprint", this._onAfterPrint);
    if (!this._sourceLoaded) this._readSource();
    loadEngine().then(
      (api) => this._engineReady(api),
      (err) => this._engineFailed(err),
    );
  }

  disconnectedCallback() {
    if (this._resizeObserver) this._resizeObserver.disconnect();
    if (this._scheme && this._scheme.removeEventListener) this._scheme.removeEventListener("change", this._onScheme);
    window.removeEventListener("beforeprint", this._onBeforePrint);
    window.removeEventListener("afterprint", this._onAfterPrint);
  }

  attributeChangedCallback(name, oldValue, newValue) {
    if (!this._built || oldValue === newValue) return;
    if (name === "readonly") this._applyReadonly();
    if (name === "compact") this._applyCompact();
    if (name === "theme") this._onScheme();
    if (name === "src" && newValue) {
      this._sourceLoaded = false;
      this._readSource();
    }
  }

  /* ---------------- reading the design ---------------- */

  _readSource() {
    this._sourceLoaded = true;
    if (this._pendingDesign !== undefined) {
      const d = this._pendingDesign;
      this._pendingDesign = undefined;
      this.design = d;
      return;
    }
    const script = this.querySelector('script[type="application/json"]');
    if (script) {
      this._loadText(script.textContent);
      return;
    }
    const src = this.getAttribute("src");
    if (src) {
      this._setBanner("Loading the design…", "info");
      fetch(src, { credentials: "same-origin" })
        .then((r) => {
          if (!r.ok) throw new Error(`the design file could not be loaded (${r.status})`);
          return r.text();
        })
        .then((text) => {
          this._setBanner("");
          this._loadText(text);
        })
        .catch((e) => {
          this._showLoadError(e.message);
          if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
        });
      return;
    }
    if (document.readyState === "loading") {
      // Children may still be arriving from the parser.
      document.addEventListener("DOMContentLoaded", () => {
        if (!this.querySelector('script[type="application/json"]')) {
          if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
          return;
        }
        this.reload();
      }, { once: true });
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
  }

  /** Loads a design from its JSON text once the engine has read it with
   * the command line's reader: a text it refuses (bad JSON, a key given
   * twice, nesting too deep, an unknown key, a value out of range) shows
   * the command line's message, and the last good design stays. Before
   * the engine is ready the text waits (the last one given wins). */
  _loadText(text) {
    const api = this._api;
    if (!api || typeof api.read_design !== "function") {
      this._pendingText = text;
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    this._pendingText = undefined;
    try {
      api.read_design(text);
    } catch (err) {
      this._showLoadError(asFieldError(err).message);
      if (!this._design) this._loadDesign(clone(EXAMPLE_DESIGN), true);
      return;
    }
    // Read by the core: JSON.parse sees the same document (no key twice,
    // no unknown key, at most 16 levels).
    this._loadDesign(JSON.parse(text));
  }

  _loadDesign(design, isExample) {
    const d = clone(design);
    d.format = FORMAT;
    if (!own(STAGE_PARTS, d.stage)) d.stage = "common-emitter";
    this._design = d;
    this._isExample = !!isExample;
    this._invalid.clear();
    this._report = null;
    this._analysis = null;
    this._clearResults();
    this._setBanner("");
    this._fillForm();
    this._recompute();
  }

  _showLoadError(message) {
    this._setBanner(message, "error");
  }

  /** The design as it goes out: documented order, only the parts the
   * chosen stage uses. */
  _exportDesign() {
    const d = clone(this._design);
    const used = own(STAGE_PARTS, d.stage);
    if (used && d.parts && typeof d.parts === "object") {
      for (const k of Object.keys(d.parts)) {
        const spec = FIELD_BY_KEY.get(k);
        if (spec && spec.series && !used.includes(k)) delete d.parts[k];
      }
    }
    return ordered(d);
  }

  /* ---------------- building the shadow DOM ---------------- */

  _build() {
    this._built = true;
    const root = this.shadowRoot || this.attachShadow({ mode: "open" });
    root.textContent = "";
    adoptStyles(root);
    const id = (s) => `sw${this._uid}-${s}`;
    this._id = id;

    // Header: title, share tools.
    this._titleEl = h("h2", { class: "title", id: id("title") });
    this._stageEl = h("p", { class: "subtitle" });
    this._banner = h("p", { class: "banner", hidden: true, role: "alert" });
    this._status = h("p", { class: "visually-hidden", role: "status", "aria-live": "polite" });
    const header = h("header", { class: "head" },
      h("div", { class: "brand", "aria-hidden": "true" }, this._mark(), h("span", null, "Stagewright")),
      h("div", { class: "heading" }, this._titleEl, this._stageEl),
      this._buildShare());

    // The form.
    this._form = h("form", { class: "design", novalidate: true, "aria-labelledby": id("title") });
    this._form.addEventListener("submit", (e) => e.preventDefault());
    this._seriesR = this._seriesSelect("R", "resistor series");
    this._seriesC = this._seriesSelect("C", "capacitor series");
    for (const g of GROUPS) this._form.append(this._buildGroup(g));
    this._formBox = h("details", { class: "design-box", open: true },
      h("summary", null, "Design values"), this._form);

    // Diagram.
    this._diagram = h("div", { class: "diagram" });
    const diagramCard = h("section", { class: "card card-diagram", "aria-labelledby": id("h-diagram") },
      h("h3", { id: id("h-diagram") }, "Circuit"),
      h("p", { class: "hint" }, "Choose a part to edit its value."),
      this._diagram);

    // Results.
    this._results = this._buildResults();

    // Plots.
    this._plots = this._buildPlots();

    const footer = h("footer", { class: "foot" },
      h("p", { class: "deferral" }, DEFERRAL),
      h("p", { class: "version" }, `Stagewright ${STAGEWRIGHT_VERSION}`));

    this._main = h("div", { class: "layout" },
      h("div", { class: "col-form" }, this._formBox),
      h("div", { class: "col-out" }, diagramCard, this._results, this._plots));
    // The views of a build with the engine's extras (www/views.js).
    if (this._buildViews) this._buildViews(this._main.lastChild);
    this._frame = h("div", { class: "frame", part: "frame" }, header, this._banner, this._status, this._main, footer);
    root.append(this._frame);

    // Diagram: choose a part → focus its input.
    this._diagram.addEventListener("click", (e) => {
      const g = e.target.closest("[data-part]");
      if (g) this._focusField(g.getAttribute("data-part"));
    });
    this._diagram.addEventListener("keydown", (e) => {
      if (e.key !== "Enter" && e.key !== " ") return;
      const g = e.target.closest("[data-part]");
      if (!g) return;
      e.preventDefault();
      this._focusField(g.getAttribute("data-part"));
    });

    // Files dropped on the element open as designs.
    this._frame.addEventListener("dragover", (e) => {
      if (this.hasAttribute("readonly")) return;
      if (e.dataTransfer && Array.from(e.dataTransfer.types || []).includes("Files")) e.preventDefault();
    });
    this._frame.addEventListener("drop", (e) => {
      if (this.hasAttribute("readonly")) return;
      const file = e.dataTransfer && e.dataTransfer.files && e.dataTransfer.files[0];
      if (!file) return;
      e.preventDefault();
      this._openFile(file);
    });

    this._applyReadonly();
    this._applyCompact();
  }

  _mark() {
    const svg = sv("svg", { viewBox: "0 0 24 24", class: "mark", width: 22, height: 22 });
    sv("path", { d: "M3 17 L9 17 L12 7 L15 17 L21 17", class: "mark-line" }, svg);
    sv("circle", { cx: 12, cy: 7, r: 2.2, class: "mark-dot" }, svg);
    return svg;
  }

  _seriesSelect(family, label) {
    const sel = h("select", { "aria-label": label, class: "series" },
      SERIES_CHOICES.map((s) => h("option", { value: s }, s)));
    sel.value = this._series[family];
    sel.addEventListener("change", () => {
      this._series[family] = sel.value;
      for (const f of this._fields.values()) if (f.spec.series === family) this._refreshField(f);
    });
    return sel;
  }

  _buildGroup(group) {
    const id = this._id;
    const fs = h("fieldset", { class: `group group-${group.id}`, "data-group": group.id });
    fs.append(h("legend", null, group.legend));
    if (group.id === "parts") {
      fs.append(h("div", { class: "series-row" },
        h("span", null, "Standard values:"),
        h("label", null, "resistors ", this._seriesR),
        h("label", null, "capacitors ", this._seriesC)));
      this._partsNote = h("p", { class: "note", hidden: true });
      fs.append(this._partsNote);
    }
    if (group.id === "transistor") {
      this._presetNote = h("p", { class: "note" });
      fs.append(this._presetNote);
    }
    for (const spec of group.fields) {
      const fid = id("f-" + spec.key);
      const label = h("label", { for: fid },
        h("span", { class: "name" }, spec.key),
        h("span", { class: "desc" }, spec.desc));
      let input;
      if (spec.kind === "select") {
        input = h("select", { id: fid, name: spec.key });
        if (spec.options) for (const [v, t] of spec.options) input.append(h("option", { value: v }, t));
      } else if (spec.kind === "textarea") {
        input = h("textarea", { id: fid, name: spec.key, rows: 2, spellcheck: "true", maxlength: spec.maxlength });
      } else {
        input = h("input", {
          id: fid,
          name: spec.key,
          type: "text",
          autocomplete: "off",
          spellcheck: "false",
          autocapitalize: "off",
          maxlength: spec.maxlength,
        });
      }
      const understood = h("output", { id: id("u-" + spec.key), class: "understood", for: fid });
      const error = h("p", { id: id("e-" + spec.key), class: "error", hidden: true });
      const snap = h("button", { type: "button", class: "snap", hidden: true });
      const std = h("span", { class: "std", hidden: true });
      if (spec.kind === "value") {
        input.setAttribute("aria-describedby", `${understood.id} ${error.id}`);
      }
      const unit = spec.kind === "value" ? h("span", { class: "unit", "aria-hidden": "true" }, spec.unit) : null;
      const row = h("div", { class: `field field-${spec.kind}`, "data-key": spec.key },
        label,
        h("div", { class: "entry" }, input, unit),
        spec.kind === "value" ? h("div", { class: "aside" }, understood, std, snap) : null,
        error);
      fs.append(row);
      const f = { spec, input, understood, error, snap, std, row };
      this._fields.set(spec.key, f);
      const handler = () => this._onEdit(f);
      input.addEventListener(spec.kind === "select" ? "change" : "input", handler);
      snap.addEventListener("click", () => this._snap(f));
    }
    return fs;
  }

  _buildShare() {
    const id = this._id;
    const linkBox = h("input", { type: "text", readonly: true, class: "link-box", "aria-label": "link to this design" });
    const fileInput = h("input", { type: "file", accept: ".json,application/json", hidden: true });
    fileInput.addEventListener("change", () => {
      const file = fileInput.files && fileInput.files[0];
      if (file) this._openFile(file);
      fileInput.value = "";
    });
    const btn = (text, cls, fn) => {
      const b = h("button", { type: "button", class: cls }, text);
      b.addEventListener("click", fn);
      return b;
    };
    const snippets = {};
    const snippetBlock = (key, title, help) => {
      const ta = h("textarea", { readonly: true, rows: 4, class: "snippet", id: id("s-" + key), spellcheck: "false" });
      snippets[key] = ta;
      return h("div", { class: "recipe" },
        h("label", { for: ta.id }, h("strong", null, title), " ", help),
        ta,
        btn("Copy", "small", () => this._copy(ta.value, ta, "Snippet copied.")));
    };
    this._snippets = snippets;
    this._linkBox = linkBox;
    this._fileInput = fileInput;
    const copyLink = btn("Copy link", "linking", () => this._copy(this._shareLink(), linkBox, "Link copied."));
    const panel = h("div", { class: "share-panel" },
      h("div", { class: "share-row" },
        copyLink,
        btn("Download design", "", () => this._download()),
        btn("Open design file…", "editing", () => fileInput.click()),
        btn("Print", "", () => window.print())),
      linkBox,
      fileInput,
      h("h4", null, "Put this calculator in a wiki page"),
      h("p", { class: "hint" }, "Replace the file locations with wherever you keep stagewright.js or stagewright.html."),
      snippetBlock("script", "1. Script and element.", "Load the script once per page, then place elements."),
      snippetBlock("iframe", "2. Frame.", "Shows the standalone page; no script on your page."),
      snippetBlock("div", "3. Placeholder.", "For wikis that remove unknown tags: the script turns each such div into a calculator."),
      h("p", { class: "hint" }, "A page with a Content-Security-Policy needs this in its policy for ways 1 and 3:"),
      h("code", { class: "csp" }, "Content-Security-Policy: script-src 'self' 'wasm-unsafe-eval'"));
    const details = h("details", { class: "share" }, h("summary", null, "Share"), panel);
    details.addEventListener("toggle", () => {
      if (details.open) this._refreshShare();
    });
    this._shareDetails = details;
    return details;
  }

  _buildResults() {
    const id = this._id;
    this._resultNotice = h("p", { class: "notice", hidden: true });
    this._cautions = h("section", { class: "cautions", hidden: true, role: "note", "aria-labelledby": id("h-cautions") },
      h("h3", { id: id("h-cautions") }, "Cautions"),
      h("ul", null),
      h("p", { class: "deferral" }, DEFERRAL));

    const region = h("span", { class: "region", "data-region": "" }, "—");
    const op = quantityCard("operating_point", "Operating point", OP_ROWS, h("p", { class: "region-line" }, "Region: ", region));
    const small = quantityCard("small_signal", "Small-signal model", SMALL_ROWS);
    const mid = quantityCard("midband", "Midband", MID_ROWS);
    const bw = quantityCard("bandwidth", "Bandwidth", BW_ROWS);
    const swing = quantityCard("swing", "Output swing", SWING_ROWS);
    const resistorTable = h("table", { class: "numbers resistors" },
      h("caption", null, "Resistors"),
      h("thead", null, h("tr", null, h("th", { scope: "col" }, "part"), h("th", { scope: "col" }, "dissipation"),
        h("th", { scope: "col" }, "of limit"))),
      h("tbody", null));
    const diss = quantityCard("dissipation", "Dissipation and temperature", DISS_ROWS);
    diss.card.append(resistorTable);

    const checksBody = h("tbody", null);
    const checks = h("section", { class: "card card-checks", "aria-labelledby": id("h-checks") },
      h("h3", { id: id("h-checks") }, "Ratings and requirements"),
      h("p", { class: "checks-summary" }, "No checks."),
      h("table", { class: "numbers checks" },
        h("thead", null, h("tr", null,
          h("th", { scope: "col" }, "result"), h("th", { scope: "col" }, "check"),
          h("th", { scope: "col" }, "value"), h("th", { scope: "col" }, "limit"),
          h("th", { scope: "col" }, "note"))),
        checksBody));

    this._out = {
      region,
      operating_point: op.outputs,
      small_signal: small.outputs,
      midband: mid.outputs,
      bandwidth: bw.outputs,
      swing: swing.outputs,
      dissipation: diss.outputs,
      resistors: resistorTable.tBodies[0],
      checks: checksBody,
      checksSummary: checks.querySelector(".checks-summary"),
      checksCard: checks,
    };
    this._resultsBody = h("div", { class: "result-grid" },
      checks, op.card, mid.card, bw.card, swing.card, diss.card, small.card);
    return h("section", { class: "results", "aria-labelledby": id("h-results") },
      h("h3", { id: id("h-results"), class: "visually-hidden" }, "Results"),
      this._resultNotice, this._cautions, this._resultsBody);
  }

  _buildPlots() {
    const id = this._id;
    const plot = (key, title, desc, tall) => {
      const canvas = h("canvas", { class: "plot" + (tall ? " tall" : ""), role: "img", "aria-label": `${title}: ${desc}` });
      const table = h("div", { class: "table-wrap" });
      const numbers = h("details", { class: "plot-numbers" }, h("summary", null, "Show numbers"), table);
      numbers.addEventListener("toggle", () => {
        if (numbers.open) this._fillPlotTable(key);
      });
      const fig = h("figure", { class: "card plot-card", "data-plot": key },
        h("figcaption", null, h("h3", { id: id("h-" + key) }, title), h("span", { class: "hint" }, desc)),
        canvas, numbers);
      return { fig, canvas, table, numbers };
    };
    this._plotParts = {
      gain: plot("gain", "Gain and phase", "voltage, current and power gain in dB, and phase, against frequency", true),
      impedance: plot("impedance", "Impedances", "input and output impedance magnitude against frequency"),
      loadlines: plot("loadlines", "Load lines", "DC and AC load lines over the output characteristics, with the quiescent point and swing limits"),
    };
    return h("section", { class: "plots", "aria-label": "Plots" },
      ...Object.values(this._plotParts).map((p) => p.fig));
  }

  _canvases() {
    return this._plotParts ? Object.values(this._plotParts).map((p) => p.canvas) : [];
  }

  /* ---------------- attributes ---------------- */

  _applyReadonly() {
    const ro = this.hasAttribute("readonly");
    for (const f of this._fields.values()) {
      if (f.input.tagName === "SELECT") f.input.disabled = ro;
      else f.input.readOnly = ro;
    }
    this._seriesR.disabled = ro;
    this._seriesC.disabled = ro;
    this._frame.classList.toggle("is-readonly", ro);
    // Snapping to a standard value is an edit: hide the offers, or show them again.
    if (this._design && this._api) this._refreshAllFields();
  }

  _applyCompact() {
    const compact = this.hasAttribute("compact");
    this._frame.classList.toggle("is-compact", compact);
    this._formBox.open = !compact;
  }

  /* ---------------- the form ---------------- */

  _fillForm() {
    const d = this._design;
    for (const f of this._fields.values()) {
      const v = getPath(d, f.spec.path);
      const text = v === undefined || v === null ? "" : String(v);
      if (f.spec.kind === "select") {
        if (text && !Array.from(f.input.options).some((o) => o.value === text)) {
          f.input.append(h("option", { value: text }, text));
        }
        f.input.value = text;
      } else {
        f.input.value = text;
      }
      this._setFieldError(f, "");
    }
    this._refreshAllFields();
    this._refreshHeading();
    this._applyStage();
  }

  _refreshAllFields() {
    for (const f of this._fields.values()) this._refreshField(f);
    this._refreshPresetNote();
  }

  /** Re-reads one field's text: understood value, standard value, error. */
  _refreshField(f) {
    const spec = f.spec;
    if (spec.kind !== "value") return;
    const text = f.input.value.trim();
    f.snap.hidden = true;
    f.std.hidden = true;
    const api = this._api;
    if (!text) {
      f.understood.textContent = this._placeholderText(spec);
      f.understood.classList.add("muted");
      f.input.placeholder = this._placeholderValue(spec);
      this._setFieldError(f, "");
      return { ok: true, empty: true };
    }
    f.understood.classList.remove("muted");
    if (!api) {
      f.understood.textContent = "";
      return { ok: true };
    }
    let value;
    try {
      value = api.parse_value(spec.key, text, spec.unit);
    } catch (err) {
      const e = asFieldError(err);
      f.understood.textContent = "";
      this._setFieldError(f, e.message);
      return { ok: false, message: e.message };
    }
    this._setFieldError(f, "");
    f.understood.textContent = "= " + api.format_si(value, spec.unit);
    if (spec.series && value > 0 && !this.hasAttribute("readonly")) this._showSeries(f, value);
    return { ok: true, value };
  }

  _showSeries(f, value) {
    const api = this._api;
    const name = this._series[f.spec.series];
    let look = null;
    try {
      look = api.series_lookup(name, value);
    } catch (e) {
      look = null;
    }
    if (!look) return;
    if (Math.abs(look.error) < 1e-6) {
      f.std.textContent = `${name} value`;
      f.std.hidden = false;
      return;
    }
    const target = api.format_si(look.nearest, f.spec.unit);
    f.snap.textContent = "";
    f.snap.append(h("span", { class: "snap-series" }, name), " ", target);
    f.snap.setAttribute("aria-label", `Use the nearest ${name} value, ${target}, for ${f.spec.key}`);
    f.snap.title = `Nearest ${name} value (${(look.error * 100).toFixed(1)} % away)`;
    f.snap.dataset.value = String(look.nearest);
    f.snap.hidden = false;
  }

  _placeholderValue(spec) {
    if (spec.key === "ambient") return "25";
    const preset = this._presetValues();
    if (preset && spec.path[0] === "transistor" && preset[spec.key] !== undefined && this._api) {
      const v = preset[spec.key];
      return typeof v === "number" ? this._api.format_si(v, spec.unit) : String(v);
    }
    return "";
  }

  _placeholderText(spec) {
    if (spec.key === "ambient") return "default 25 °C";
    if (spec.path[0] === "transistor") {
      return getPath(this._design, ["transistor", "preset"]) ? "from the class" : "not given";
    }
    if (spec.path[0] === "requirements") return "no requirement";
    if (spec.path[0] === "parts" && spec.key !== "resistor_rating") return "not fitted";
    return "not given";
  }

  _presetValues() {
    const name = getPath(this._design, ["transistor", "preset"]);
    return presetData(this._api, name);
  }

  _refreshPresetNote() {
    if (!this._presetNote) return;
    const name = getPath(this._design, ["transistor", "preset"]);
    this._presetNote.textContent = name
      ? "Empty fields take the class's typical values; type a value to override it with your device's data."
      : "Choose a device class, or enter the device's data below.";
  }

  _setFieldError(f, message) {
    f.error.textContent = message;
    f.error.hidden = !message;
    if (message) {
      f.input.setAttribute("aria-invalid", "true");
      f.row.classList.add("invalid");
    } else {
      f.input.removeAttribute("aria-invalid");
      f.row.classList.remove("invalid");
    }
  }

  _onEdit(f) {
    const spec = f.spec;
    const raw = f.input.value;
    const text = spec.kind === "textarea" || spec.kind === "text" ? raw : raw.trim();
    if (spec.kind === "value") {
      const r = this._refreshField(f);
      if (!r || !r.ok) {
        this._invalid.set(spec.key, r ? r.message : "");
        this._markStale(true);
        this._announce(r && r.message ? r.message : "");
        return;
      }
      this._invalid.delete(spec.key);
      setPath(this._design, spec.path, r.empty ? undefined : storedValue(text));
    } else {
      setPath(this._design, spec.path, text === "" ? undefined : text);
      if (spec.key === "preset") {
        this._refreshAllFields();
      }
    }
    if (spec.key === "title" || spec.key === "stage" || spec.key === "supply") this._refreshHeading();
    if (spec.key === "stage") this._applyStage();
    this._isExample = false;
    this._recompute();
  }

  _snap(f) {
    const v = Number(f.snap.dataset.value);
    if (!Number.isFinite(v) || !this._api) return;
    // "4.7 kΩ" is written "4.7k": the unit stands beside the field.
    const unit = f.spec.unit;
    let text = this._api.format_si(v, unit);
    if (unit && text.endsWith(unit)) text = text.slice(0, -unit.length);
    text = text.replace(/\s+/g, "").replace(/µ/g, "u");
    try {
      const back = this._api.parse_value(f.spec.key, text, f.spec.unit);
      if (Math.abs(back - v) > 1e-9 * Math.abs(v)) text = String(v);
    } catch (e) {
      text = String(v);
    }
    f.input.value = text;
    this._onEdit(f);
    f.input.focus();
  }

  _applyStage() {
    const stage = this._design.stage;
    const used = own(STAGE_PARTS, stage) || STAGE_PARTS["common-emitter"];
    const unused = [];
    for (const f of this._fields.values()) {
      if (!f.spec.series) continue;
      const on = used.includes(f.spec.key);
      f.row.hidden = !on;
      const v = getPath(this._design, f.spec.path);
      if (!on && v !== undefined && v !== "") unused.push(f.spec.key);
    }
    if (this._partsNote) {
      this._partsNote.hidden = unused.length === 0;
      this._partsNote.textContent = unused.length
        ? `Kept but not used by this stage: ${unused.join(", ")}.`
        : "";
    }
  }

  _refreshHeading() {
    const d = this._design;
    const title = typeof d.title === "string" && d.title.trim() ? d.title : "Untitled stage";
    this._titleEl.textContent = title;
    const stage = STAGES.find(([v]) => v === d.stage);
    const supply = getPath(d, ["supply"]);
    const parts = [stage ? stage[1] : String(d.stage || "")];
    if (supply !== undefined && this._api) {
      try {
        parts.push(this._api.format_si(this._api.parse_value("supply", String(supply), "V"), "V") + " supply");
      } catch (e) {
        /* shown at the field */
      }
    }
    this._stageEl.textContent = parts.filter(Boolean).join(" · ");
  }

  _focusField(key) {
    if (key === "transistor") key = "preset";
    const f = this._fields.get(key);
    if (!f) return;
    if (!this._formBox.open) this._formBox.open = true;
    f.row.hidden = false;
    f.input.focus({ preventScroll: true });
    f.row.scrollIntoView({ block: "nearest", behavior: "smooth" });
    f.row.classList.remove("flash");
    void f.row.offsetWidth;
    f.row.classList.add("flash");
  }

  /* ---------------- diagram ---------------- */

  _renderDiagram() {
    const d = this._design;
    const api = this._api;
    const values = {};
    for (const f of this._fields.values()) {
      if (!f.spec.series) continue;
      const raw = getPath(d, f.spec.path);
      let text = raw === undefined ? "" : String(raw);
      if (text && api) {
        try {
          text = api.format_si(api.parse_value(f.spec.key, text, f.spec.unit), f.spec.unit);
        } catch (e) {
          /* keep the text as typed */
        }
      }
      values[f.spec.key] = { present: text !== "", text };
    }
    const polarity = this._polarity();
    let supplyText = "supply";
    const supply = getPath(d, ["supply"]);
    if (supply !== undefined && api) {
      try {
        supplyText = api.format_si(api.parse_value("supply", String(supply), "V"), "V");
      } catch (e) {
        /* keep the word */
      }
    }
    const stage = own(STAGE_PARTS, d.stage) ? d.stage : "common-emitter";
    const shape = `${stage}|${polarity}`;
    if (this._svg && this._svgShape === shape) {
      updateStage(this._svg, values, supplyText);
      return;
    }
    const svg = drawStage(stage, polarity, values, supplyText);
    this._diagram.textContent = "";
    this._diagram.append(svg);
    this._svg = svg;
    this._svgShape = shape;
    if (this._report) this._annotateDiagram(this._report);
  }

  _polarity() {
    const p = getPath(this._design, ["transistor", "polarity"]);
    if (p === "npn" || p === "pnp") return p;
    const preset = String(getPath(this._design, ["transistor", "preset"]) || "");
    return /pnp/.test(preset) ? "pnp" : "npn";
  }

  _annotateDiagram(report) {
    if (!this._svg || !this._api) return;
    const op = (report && report.operating_point) || {};
    for (const t of this._svg.querySelectorAll("[data-node]")) {
      const key = t.getAttribute("data-node");
      const v = op[key];
      t.textContent = typeof v === "number" ? `${key.toUpperCase()} ${this._api.format_si(v, "V")}` : "";
    }
  }

  /* ---------------- engine ---------------- */

  _engineReady(api) {
    if (this._api === api) return;
    this._api = api;
    const presetField = this._fields.get("preset");
    if (presetField) {
      const sel = presetField.input;
      const current = getPath(this._design, ["transistor", "preset"]) || "";
      sel.textContent = "";
      sel.append(h("option", { value: "" }, "none: enter the data below"));
      for (const [v, t] of enginePresets(api)) sel.append(h("option", { value: v }, t));
      if (current && !Array.from(sel.options).some((o) => o.value === current)) {
        sel.append(h("option", { value: current }, current));
      }
      sel.value = current;
    }
    if (this._fillSpecPresets && this._specInputs) this._fillSpecPresets(api);
    if (this._pendingText !== undefined) {
      this._loadText(this._pendingText);
      return;
    }
    if (this._design) {
      this._refreshAllFields();
      this._refreshHeading();
      this._recompute();
    }
  }

  _engineFailed(err) {
    const msg = err && err.message ? err.message : String(err);
    this._setBanner(
      `The calculator engine could not start: ${msg}. If this page sets a Content-Security-Policy, ` +
        "its script-src must include 'wasm-unsafe-eval'.",
      "error",
    );
  }

  /* ---------------- computing ---------------- */

  _recompute() {
    if (!this._design) return;
    this._renderDiagram();
    const design = this._exportDesign();
    this._emit("stagewright-design", { design });
    const api = this._api;
    if (!api) return;
    this._clearAnalysisErrors();
    if (!hasAnalysis(api)) return;
    let out;
    try {
      out = runAnalysis(api, design);
    } catch (err) {
      const e = asFieldError(err);
      this._showAnalysisError(e);
      this._markStale(true);
      this._announce(e.message);
      return;
    }
    this._analysis = out;
    this._report = out.report;
    this._markStale(this._invalid.size > 0);
    this.renderReport(out.report);
    this._annotateDiagram(out.report);
    this._drawPlots();
    this._announce(this._summary(out.report));
    this._emit("stagewright-report", { report: clone(out.report), design });
  }

  _emit(type, detail) {
    this.dispatchEvent(new CustomEvent(type, { bubbles: true, composed: true, detail }));
  }

  _showAnalysisError(e) {
    const f = this._fieldForError(e.field);
    if (f) {
      this._setFieldError(f, e.message);
      f.row.classList.add("from-analysis");
      this._analysisErrorField = f;
    }
    this._resultNotice.textContent = this._report
      ? `Not computed: ${e.message}. The results below are for the last design that could be computed.`
      : `Not computed: ${e.message}.`;
    this._resultNotice.hidden = false;
  }

  _clearAnalysisErrors() {
    const f = this._analysisErrorField;
    if (f) {
      f.row.classList.remove("from-analysis");
      if (!this._invalid.has(f.spec.key)) this._setFieldError(f, "");
      this._analysisErrorField = null;
    }
    this._resultNotice.hidden = true;
  }

  _fieldForError(field) {
    if (!field) return null;
    if (FIELD_BY_KEY.has(field)) return this._fields.get(field);
    const parts = String(field).split(".");
    for (let i = parts.length - 1; i >= 0; i--) {
      if (this._fields.has(parts[i])) return this._fields.get(parts[i]);
    }
    return null;
  }

  _markStale(stale) {
    this._results.classList.toggle("stale", stale && !!this._report);
    if (stale && this._report && this._resultNotice.hidden) {
      const keys = Array.from(this._invalid.keys());
      this._resultNotice.textContent = keys.length
        ? `Not understood: ${keys.join(", ")}. The results below use the last values that were understood.`
        : "The results below are for the last design that could be computed.";
      this._resultNotice.hidden = false;
    } else if (!stale && this._invalid.size === 0) {
      this._resultNotice.hidden = true;
    }
  }

  _announce(text) {
    clearTimeout(this._announceTimer);
    this._announceTimer = setTimeout(() => {
      this._status.textContent = text;
    }, 500);
  }

  _setBanner(text, kind) {
    this._banner.textContent = text || "";
    this._banner.hidden = !text;
    this._banner.className = "banner" + (kind ? " " + kind : "");
  }

  _clearResults() {
    if (!this._out) return;
    for (const group of ["operating_point", "small_signal", "midband", "bandwidth", "swing", "dissipation"]) {
      for (const out of Object.values(this._out[group])) out.textContent = "—";
    }
    this._out.region.textContent = "—";
    this._out.region.setAttribute("data-region", "");
    this._out.resistors.textContent = "";
    this._out.checks.textContent = "";
    this._cautions.hidden = true;
    this._results.classList.remove("stale");
  }

  /* ---------------- the report ---------------- */

  /** Lays a report (format "stagewright-report/1") out in the results
   * area. Missing blocks and null values show as "—" or "none". */
  renderReport(report) {
    if (!report || typeof report !== "object") return;
    const api = this._api;
    const fmt = (v, unit) => {
      if (v === null || v === undefined) return "none";
      if (typeof v !== "number" || !Number.isFinite(v)) return "—";
      return api ? api.format_si(v, unit) : String(v);
    };
    const fill = (group, rows, values, custom) => {
      const outs = this._out[group];
      for (const [key, , unit] of rows) {
        const v = values ? values[key] : undefined;
        outs[key].textContent = custom ? custom(key, v, unit) : v === undefined ? "—" : fmt(v, unit);
      }
    };

    const op = report.operating_point || {};
    fill("operating_point", OP_ROWS, op);
    const region = typeof op.region === "string" ? op.region : "";
    this._out.region.textContent = region || "—";
    this._out.region.setAttribute("data-region", region);

    fill("small_signal", SMALL_ROWS, report.small_signal || {});

    fill("midband", MID_ROWS, report.midband || {}, (key, v, unit) => {
      if (v === undefined) return "—";
      if (unit !== "gain") return fmt(v, unit);
      if (typeof v !== "number" || !Number.isFinite(v)) return fmt(v, "");
      const db = v === 0 ? "−∞" : api ? api.format_si(20 * Math.log10(Math.abs(v)), "dB") : "";
      return `${fmt(v, "")} (${db})`;
    });

    fill("bandwidth", BW_ROWS, report.bandwidth || {});

    const swing = report.swing || {};
    fill("swing", SWING_ROWS, swing);

    const diss = report.dissipation || {};
    fill("dissipation", DISS_ROWS, diss);
    // Each resistor against the limit of its rating check.
    const checks = Array.isArray(report.checks) ? report.checks : [];
    const limits = {};
    for (const c of checks) {
      if (typeof c.id === "string" && c.id.startsWith("resistor_power.")) limits[c.id.slice(15)] = c.limit;
    }
    const tbody = this._out.resistors;
    tbody.textContent = "";
    const resistors = diss.resistors && typeof diss.resistors === "object" ? diss.resistors : {};
    for (const [name, watts] of Object.entries(resistors)) {
      const share = limits[name] > 0 && typeof watts === "number" ? watts / limits[name] : null;
      const tr = h("tr", { class: share !== null && share > 1 ? "over" : share !== null && share > 0.5 ? "near" : "" },
        h("th", { scope: "row" }, name),
        h("td", null, fmt(watts, "W")),
        h("td", null, share === null ? "—" : pct(share)));
      tbody.append(tr);
    }

    // Ratings and requirement checks.
    const cbody = this._out.checks;
    cbody.textContent = "";
    let passed = 0;
    for (const c of checks) {
      const id = String(c.id || "check");
      const info = CHECK_INFO[id] ||
        (id.startsWith("resistor_power.") ? [`${id.slice(15)} power rating`, "W", ""] : null) ||
        [id.replace(/_/g, " "), typeof c.unit === "string" ? c.unit : "", ""];
      const [name, unit, rel] = info;
      if (c.pass) passed++;
      cbody.append(h("tr", { class: c.pass ? "pass" : "fail" },
        h("td", null, h("span", { class: "verdict" }, c.pass ? "✓ met" : "✗ not met")),
        h("th", { scope: "row" }, name, rel ? h("span", { class: "rel" }, " " + rel) : null),
        h("td", null, cornerValue(report, id) || fmt(c.value, unit)),
        h("td", null, fmt(c.limit, unit)),
        h("td", { class: "msg" }, typeof c.message === "string" ? c.message : "")));
    }
    this._out.checksSummary.textContent = checks.length
      ? `${passed} of ${checks.length} checks met: ratings first, then the design's requirements.`
      : "No checks.";
    this._out.checksCard.classList.toggle("has-fail", passed < checks.length);

    // Cautions, prominently, with the deferral to local practice.
    const cautions = Array.isArray(report.cautions) ? report.cautions : [];
    const ul = this._cautions.querySelector("ul");
    ul.textContent = "";
    // The deferral to local codes and licensed practice, once under the
    // list; marked when a caution is about harm (the engine's `safety`).
    for (const c of cautions) {
      ul.append(h("li", { "data-id": String(c.id || "") }, typeof c.message === "string" ? c.message : String(c.id)));
    }
    const deferral = this._cautions.querySelector(".deferral");
    deferral.classList.toggle("safety", cautions.some((c) => c.safety === true));
    this._cautions.hidden = cautions.length === 0;
  }

  _summary(report) {
    const api = this._api;
    const op = report.operating_point || {};
    const mid = report.midband || {};
    const bits = [];
    if (op.region) bits.push(`${op.region} region`);
    if (typeof op.ic === "number") bits.push(`collector current ${api.format_si(op.ic, "A")}`);
    if (typeof mid.voltage_gain === "number" && mid.voltage_gain !== 0) {
      bits.push(`voltage gain ${api.format_si(20 * Math.log10(Math.abs(mid.voltage_gain)), "dB")}`);
    }
    const checks = Array.isArray(report.checks) ? report.checks : [];
    if (checks.length) bits.push(`${checks.filter((c) => c.pass).length} of ${checks.length} checks met`);
    const cautions = Array.isArray(report.cautions) ? report.cautions.length : 0;
    if (cautions) bits.push(`${cautions} caution${cautions === 1 ? "" : "s"}`);
    return "Results: " + bits.join(", ") + ".";
  }

  /* ---------------- plots ---------------- */

  _schedulePlots() {
    if (this._plotFrame) return;
    this._plotFrame = requestAnimationFrame(() => {
      this._plotFrame = 0;
      this._drawPlots();
    });
  }

  /** Plot colours and type from the CSS custom properties; read once and
   * again after a resize, a colour-scheme change or a theme attribute. */
  _theme() {
    if (!this._themeCache) this._themeCache = this._readTheme();
    return this._themeCache;
  }

  _readTheme() {
    const cs = getComputedStyle(this);
    const get = (name, fb) => cssColor(cs.getPropertyValue(name).trim(), fb);
    return {
      theme: {
        background: get("--sw-plot-bg", "#ffffff"),
        foreground: get("--sw-ink", "#202020"),
        grid: get("--sw-grid", "#dddddd"),
        // A short family list: the canvas parses it on every label.
        font_family: cs.getPropertyValue("--sw-plot-font").trim() || "system-ui, sans-serif",
        font_size: 11.5,
      },
      traces: [1, 2, 3, 4].map((i) => get(`--sw-trace-${i}`, "#000000")),
      muted: get("--sw-ink-soft", "#666666"),
      marker: get("--sw-marker", "#aa3300"),
    };
  }

  /** Turns the analysis into the plot descriptions the wasm plotter takes.
   * Returns {gain, impedance, loadlines} specs (null where no data). */
  _plotSpecs(analysis) {
    const t = this._theme();
    const sweep = analysis && analysis.sweep;
    const curves = analysis && analysis.curves;
    const report = analysis && analysis.report;
    const bw = (report && report.bandwidth) || {};
    const markers = [];
    if (typeof bw.f_low === "number") markers.push({ x: bw.f_low, label: "fL", color: t.muted });
    if (typeof bw.f_high === "number") markers.push({ x: bw.f_high, label: "fH", color: t.muted });
    const specs = { gain: null, impedance: null, loadlines: null, theme: t };
    if (sweep && sweep.freq) {
      specs.gain = {
        freq: sweep.freq,
        series: [
          { name: "voltage gain", values: sweep.voltage_gain_db, color: t.traces[0] },
          { name: "current gain", values: sweep.current_gain_db, color: t.traces[1] },
          { name: "power gain", values: sweep.power_gain_db, color: t.traces[2], dashed: true },
        ].filter((s) => s.values),
        y_unit: "dB",
        phase: sweep.phase_deg ? { name: "phase of voltage gain", values: unwrapDegrees(sweep.phase_deg), color: t.traces[0] } : null,
        x_markers: markers,
        theme: t.theme,
      };
      specs.impedance = {
        freq: sweep.freq,
        series: [
          { name: "|Zin|", values: sweep.input_impedance, color: t.traces[0] },
          { name: "|Zout|", values: sweep.output_impedance, color: t.traces[1] },
        ].filter((s) => s.values),
        y_unit: "Ω",
        y_log: true,
        x_markers: markers,
        theme: t.theme,
      };
    }
    if (curves) {
      const list = [];
      const labels = [];
      let right = 0;
      for (const c of curves.characteristics || []) {
        list.push({ name: "", x: c.vce, y: c.ic, color: t.muted, width: 1 });
        const n = c.vce ? c.vce.length : 0;
        if (n) right = Math.max(right, c.vce[n - 1]);
        if (n && c.label) labels.push({ x: c.vce[n - 1], y: c.ic[n - 1], label: c.label, color: t.muted, shape: "none" });
      }
      if (curves.dc_load_line) list.push({ name: "DC load line", x: curves.dc_load_line.vce, y: curves.dc_load_line.ic, color: t.traces[0], width: 2 });
      if (curves.ac_load_line) list.push({ name: "AC load line", x: curves.ac_load_line.vce, y: curves.ac_load_line.ic, color: t.traces[1], width: 2, dashed: true });
      const marks = labels.slice();
      if (curves.quiescent) marks.push({ x: curves.quiescent.vce, y: curves.quiescent.ic, label: "Q", color: t.marker, shape: "dot" });
      for (const s of curves.swing_limits || []) marks.push({ x: s.vce, y: s.ic, label: s.label || "", color: t.marker, shape: "cross" });
      specs.loadlines = {
        curves: list, markers: marks, x_name: "VCE", y_name: "IC", x_unit: "V", y_unit: "A", theme: t.theme,
      };
      // Room on the right for the base-current labels at the curve ends.
      if (right > 0) specs.loadlines.x_range = new Float64Array([0, right * 1.3]);
    }
    return specs;
  }

  /** Draws every plot from the current analysis (or `analysis` if given). */
  _drawPlots(analysis) {
    const api = this._api;
    if (!api || !this._plotParts) return;
    const a = analysis || this._analysis;
    const specs = this._plotSpecs(a);
    this._specs = specs;
    const empty = "no data for this design";
    const draw = (key, fn, spec, emptySpec) => {
      const p = this._plotParts[key];
      // The size the ResizeObserver saw, or else the CSS box × devicePixelRatio.
      let size = this._canvasSize.get(p.canvas);
      if (!size) {
        const ratio = window.devicePixelRatio || 1;
        size = { w: Math.round(p.canvas.clientWidth * ratio), h: Math.round(p.canvas.clientHeight * ratio), ratio };
      }
      const sized = { pixel_size: new Float64Array([size.w, size.h]), pixel_ratio: size.ratio };
      try {
        fn(p.canvas, Object.assign({}, spec || Object.assign({ empty_text: empty, theme: specs.theme.theme }, emptySpec), sized));
      } catch (err) {
        p.canvas.setAttribute("data-error", asFieldError(err).message);
      }
      // An open table follows a moment later, not on every keystroke.
      if (p.numbers.open) {
        clearTimeout(p.tableTimer);
        p.tableTimer = setTimeout(() => this._fillPlotTable(key), 250);
      }
    };
    draw("gain", api.plot_frequency, specs.gain, { series: [] });
    draw("impedance", api.plot_frequency, specs.impedance, { series: [] });
    draw("loadlines", api.plot_xy, specs.loadlines, { curves: [] });
  }

  /** The numbers behind a plot, as a table (built only when shown). */
  _fillPlotTable(key) {
    const p = this._plotParts[key];
    const api = this._api;
    const spec = this._specs && this._specs[key];
    p.table.textContent = "";
    if (!spec || !api) {
      p.table.append(h("p", { class: "hint" }, "No numbers yet."));
      return;
    }
    const f = (v, unit) => (typeof v === "number" && Number.isFinite(v) ? api.format_si(v, unit) : "—");
    const table = h("table", { class: "numbers" });
    if (key === "gain" || key === "impedance") {
      const cols = spec.series.slice();
      if (spec.phase) cols.push(Object.assign({}, spec.phase, { unit: "°" }));
      table.append(h("thead", null, h("tr", null,
        h("th", { scope: "col" }, "frequency"),
        ...cols.map((c) => h("th", { scope: "col" }, c.name)))));
      const body = h("tbody", null);
      const n = spec.freq.length;
      for (let i = 0; i < n; i++) {
        body.append(h("tr", null,
          h("th", { scope: "row" }, f(spec.freq[i], "Hz")),
          ...cols.map((c) => h("td", null, f(c.values[i], c.unit || spec.y_unit)))));
      }
      table.append(body);
    } else {
      table.append(h("thead", null, h("tr", null,
        h("th", { scope: "col" }, "curve or point"), h("th", { scope: "col" }, "VCE"), h("th", { scope: "col" }, "IC"))));
      const body = h("tbody", null);
      for (const m of spec.markers) {
        if (m.shape === "none") continue;
        body.append(h("tr", null, h("th", { scope: "row" }, m.label || "point"), h("td", null, f(m.x, "V")), h("td", null, f(m.y, "A"))));
      }
      const named = spec.curves.filter((c) => c.name);
      for (const c of named) {
        for (let i = 0; i < c.x.length; i++) {
          body.append(h("tr", null, h("th", { scope: "row" }, c.name), h("td", null, f(c.x[i], "V")), h("td", null, f(c.y[i], "A"))));
        }
      }
      const chars = spec.markers.filter((m) => m.shape === "none");
      const unnamed = spec.curves.filter((c) => !c.name);
      unnamed.forEach((c, k) => {
        const label = chars[k] ? chars[k].label : `curve ${k + 1}`;
        const step = Math.max(1, Math.ceil(c.x.length / 8));
        for (let i = 0; i < c.x.length; i += step) {
          body.append(h("tr", null, h("th", { scope: "row" }, label), h("td", null, f(c.x[i], "V")), h("td", null, f(c.y[i], "A"))));
        }
      });
      table.append(body);
    }
    p.table.append(table);
  }

  _openAllForPrint(opening) {
    if (opening) {
      this._printState = { form: this._formBox.open, share: this._shareDetails.open };
      this._formBox.open = true;
      this._shareDetails.open = false;
      this._schedulePlots();
    } else if (this._printState) {
      this._formBox.open = this._printState.form;
      this._printState = null;
    }
  }

  /* ---------------- sharing ---------------- */

  _shareLink() {
    const base = this.getAttribute("share-url") || (location.href.split("#")[0]);
    return `${base}#design=${encodeDesign(this._exportDesign())}`;
  }

  _refreshShare() {
    const design = this._exportDesign();
    // A link reopens the design only on the standalone page (or a page
    // named by share-url), which reads the #design= fragment.
    const linkable = this.hasAttribute("page") || this.hasAttribute("share-url");
    this._frame.classList.toggle("no-link", !linkable);
    this._linkBox.value = linkable ? this._shareLink() : "";
    const scriptUrl = this.getAttribute("script-url") || STAGEWRIGHT_SCRIPT_URL || "stagewright.js";
    const pageUrl = this.getAttribute("share-url") || (this.hasAttribute("page") ? location.href.split("#")[0] : "stagewright.html");
    const title = typeof design.title === "string" && design.title ? design.title : "amplifier stage";
    this._snippets.script.value =
      `<script src="${escapeAttr(scriptUrl)}"></script>\n` +
      `<stagewright-calc>\n<script type="application/json">\n${jsonForScript(design)}\n</script>\n</stagewright-calc>`;
    this._snippets.iframe.value =
      `<iframe src="${escapeAttr(pageUrl)}#design=${encodeDesign(design)}" title="Stagewright: ${escapeAttr(title)}" ` +
      `width="100%" height="1500" loading="lazy" style="border:0"></iframe>`;
    this._snippets.div.value =
      `<div data-stagewright data-design="${encodeDesign(design)}"></div>\n` +
      `<script src="${escapeAttr(scriptUrl)}"></script>`;
  }

  async _copy(text, box, done) {
    let ok = false;
    try {
      if (navigator.clipboard && window.isSecureContext) {
        await navigator.clipboard.writeText(text);
        ok = true;
      }
    } catch (e) {
      ok = false;
    }
    if (!ok && box) {
      box.value = text;
      box.focus();
      box.select();
      try {
        ok = document.execCommand("copy");
      } catch (e) {
        ok = false;
      }
    }
    if (box && box === this._linkBox) box.value = text;
    this._status.textContent = ok ? done : "Copying was refused; the text is selected so you can copy it yourself.";
  }

  _download() {
    const design = this._exportDesign();
    const json = JSON.stringify(design, null, 2) + "\n";
    const blob = new Blob([json], { type: "application/json" });
    const url = URL.createObjectURL(blob);
    const slug = (typeof design.title === "string" ? design.title : "")
      .toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "stage";
    const a = h("a", { href: url, download: `${slug}.stagewright.json` });
    this.shadowRoot.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 10000);
    this._status.textContent = "Design file saved.";
  }

  _openFile(file) {
    const reader = new FileReader();
    reader.onload = () => {
      const api = this._api;
      let text;
      try {
        // The engine checks the bytes are UTF-8, with the command line's message.
        const bytes = new Uint8Array(reader.result);
        text = api && typeof api.utf8_text === "function"
          ? api.utf8_text(bytes)
          : new TextDecoder("utf-8", { fatal: true }).decode(bytes);
      } catch (err) {
        this._showLoadError(`${file.name}: ${asFieldError(err).message}`);
        return;
      }
      const before = this._design;
      this._loadText(text);
      if (this._design !== before) this._status.textContent = `Opened ${file.name}.`;
    };
    reader.onerror = () => this._showLoadError(`${file.name} could not be read`);
    reader.readAsArrayBuffer(file);
  }
}

/** The value shown for a corner requirement whose corner was not found
 * (the report's bandwidth.low_edge / high_edge say why), else "". */
function cornerValue(report, id) {
  const b = report.bandwidth || {};
  const edge = id === "max_f_low" ? b.low_edge : id === "min_f_high" ? b.high_edge : "corner";
  if (edge === "none" || edge === "no-passband") return "none";
  if (edge === "beyond-search") return id === "max_f_low" ? "< 1 mHz" : "> 1 THz";
  return "";
}

/** Phase in degrees made continuous (no jump between −180° and 180°), for
 * the plot; the report and the sweep keep the principal value. */
function unwrapDegrees(values) {
  const out = new Float64Array(values.length);
  let shift = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (i > 0 && Number.isFinite(v) && Number.isFinite(values[i - 1])) {
      const step = v - values[i - 1];
      if (step > 180) shift -= 360;
      else if (step < -180) shift += 360;
    }
    out[i] = v + shift;
  }
  return out;
}

function pct(x) {
  return `${(x * 100).toFixed(x < 0.1 ? 1 : 0)} %`;
}

/* ------------------------------------------------------------------ */
/* <div data-stagewright> placeholders (wikis that drop unknown tags)   */
/* ------------------------------------------------------------------ */

function upgradePlaceholders(root) {
  const scope = root || document;
  if (!scope.querySelectorAll) return;
  for (const div of scope.querySelectorAll("div[data-stagewright]:not([data-stagewright-ready])")) {
    div.setAttribute("data-stagewright-ready", "");
    const el = document.createElement("stagewright-calc");
    for (const a of ["readonly", "compact"]) {
      if (div.hasAttribute("data-" + a)) el.setAttribute(a, "");
    }
    const src = div.getAttribute("data-src");
    const raw = div.getAttribute("data-design") || div.getAttribute("data-stagewright");
    const text = raw ? raw : div.textContent.trim();
    div.textContent = "";
    if (src && !text) el.setAttribute("src", src);
    div.append(el);
    if (text) el.design = text;
  }
}

StagewrightCalc.upgradePlaceholders = upgradePlaceholders;
StagewrightCalc.encodeDesign = encodeDesign;
StagewrightCalc.designText = designText;
StagewrightCalc.version = STAGEWRIGHT_VERSION;

customElements.define("stagewright-calc", StagewrightCalc);

function watchPlaceholders() {
  upgradePlaceholders(document);
  if (typeof MutationObserver !== "function" || !document.documentElement) return;
  const mo = new MutationObserver((records) => {
    for (const r of records) {
      for (const n of r.addedNodes) {
        if (n.nodeType !== 1) continue;
        if ((n.matches && n.matches("div[data-stagewright]")) || (n.querySelector && n.querySelector("div[data-stagewright]"))) {
          upgradePlaceholders(document);
          return;
        }
      }
    }
  });
  mo.observe(document.documentElement, { childList: true, subtree: true });
}

if (document.readyState === "loading") {
  document.addEventListener("DOMContentLoaded", watchPlaceholders, { once: true });
} else {
  watchPlaceholders();
}
