/* The results: the report laid out in cards of labelled <output>s
 * (operating point, small-signal model, midband, bandwidth, swing,
 * dissipation), the ratings and requirement checks, the cautions with the
 * deferral to local practice, and the summary announced after each
 * recompute. Methods of the element. */

import { h, setText, sym, symNodes, syncChildren } from "./dom.js";

export const DEFERRAL =
  "These figures come from simplified device models. Confirm them by measurement, " +
  "check them against the data of the parts actually used, and follow the codes, " +
  "standards and licensed practice that apply where the design will be built.";

/** The result cards, in the order they are laid out (the checks card
 * comes first): the report section each one shows and its title. Their
 * rows are the core's figures of that section (the engine's tables()),
 * so the page keeps no copy of a label, a symbol or a unit. */
const SECTIONS = [
  ["operating_point", "Operating point"],
  ["midband", "Midband"],
  ["bandwidth", "Bandwidth"],
  ["swing", "Output swing"],
  ["dissipation", "Dissipation and temperature"],
  ["small_signal", "Small-signal model"],
];

/** A ratio the page shows with its decibels beside it. */
const isGain = (key, unit) => unit === "" && /(^|_)gain(_from_source)?$/.test(key);

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

/** The value shown for a corner requirement whose corner was not found
 * (the report's bandwidth.low_edge / high_edge say why), else "". */
function cornerValue(report, id) {
  const b = report.bandwidth || {};
  const edge = id === "max_f_low" ? b.low_edge : id === "min_f_high" ? b.high_edge : "corner";
  if (edge === "none" || edge === "no-passband") return "none";
  if (edge === "beyond-search") return id === "max_f_low" ? "< 1 mHz" : "> 1 THz";
  return "";
}

function pct(x) {
  return `${(x * 100).toFixed(x < 0.1 ? 1 : 0)} %`;
}

/** The results' methods, mixed into the element (element.js). */
export const withResults = (Base) => class extends Base {
  _buildResults() {
    const id = this._id;
    this._resultNotice = h("p", { class: "notice", hidden: true });
    this._cautions = h("section", { class: "cautions", hidden: true, role: "note", "aria-labelledby": id("h-cautions") },
      h("h3", { id: id("h-cautions") }, "Cautions"),
      h("ul", null),
      h("p", { class: "deferral" }, DEFERRAL));

    const region = h("span", { class: "region", "data-region": "" }, "—");
    this._resistorTable = h("table", { class: "numbers resistors" },
      h("caption", null, "Resistors"),
      h("thead", null, h("tr", null, h("th", { scope: "col" }, "part"), h("th", { scope: "col" }, "dissipation"),
        h("th", { scope: "col" }, "of limit"))),
      h("tbody", null));
    this._regionLine = h("p", { class: "region-line" }, "Region: ", region);

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
      resistors: this._resistorTable.tBodies[0],
      checks: checksBody,
      checksSummary: checks.querySelector(".checks-summary"),
      checksCard: checks,
    };
    for (const [section] of SECTIONS) this._out[section] = {};
    this._resultsBody = h("div", { class: "result-grid" }, checks);
    return h("section", { class: "results", "aria-labelledby": id("h-results") },
      h("h3", { id: id("h-results"), class: "visually-hidden" }, "Results"),
      this._resultNotice, this._cautions, this._resultsBody);
  }

  /** The result cards, once the engine has given its tables: a row per
   * figure of each section, and the names of the checks. */
  _buildResultCards(tables) {
    if (this._cardsBuilt || !tables) return;
    this._cardsBuilt = true;
    this._tables = tables;
    const names = {};
    for (const r of tables.requirements) names[r.key] = [r.label, r.unit, r.bound === "at least" ? "≥" : "≤"];
    for (const r of tables.ratings) names[r.id] = [r.label, r.unit, ""];
    this._checkNames = names;
    for (const [section, title] of SECTIONS) {
      const rows = tables.figures.filter((f) => f.key.startsWith(section + "."))
        .map((f) => [f.key.slice(section.length + 1), f.symbol, isGain(f.key.slice(section.length + 1), f.unit) ? "gain" : f.unit, f.label]);
      this._rows = this._rows || {};
      this._rows[section] = rows;
      const card = quantityCard(section, title, rows, section === "operating_point" ? this._regionLine : null);
      if (section === "dissipation") card.card.append(this._resistorTable);
      this._out[section] = card.outputs;
      this._resultsBody.append(card.card);
    }
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
    if (!this._rows) return;
    const fill = (group, values, custom) => {
      const outs = this._out[group];
      for (const [key, , unit] of this._rows[group]) {
        const v = values ? values[key] : undefined;
        setText(outs[key], custom ? custom(key, v, unit) : v === undefined ? "—" : fmt(v, unit));
      }
    };

    const op = report.operating_point || {};
    fill("operating_point", op);
    const region = typeof op.region === "string" ? op.region : "";
    setText(this._out.region, region || "—");
    if (this._out.region.getAttribute("data-region") !== region) this._out.region.setAttribute("data-region", region);

    // ro with no Early effect is the core's open circuit.
    const open = this._tables ? this._tables.open_resistance : Infinity;
    fill("small_signal", report.small_signal || {}, (key, v, unit) => {
      if (key === "r_o" && typeof v === "number" && v >= open) return "∞ (no Early effect)";
      return v === undefined ? "—" : fmt(v, unit);
    });

    fill("midband", report.midband || {}, (key, v, unit) => {
      if (v === undefined) return "—";
      if (unit !== "gain") return fmt(v, unit);
      if (typeof v !== "number" || !Number.isFinite(v)) return fmt(v, "");
      const db = v === 0 ? "−∞" : api ? api.format_si(20 * Math.log10(Math.abs(v)), "dB") : "";
      return `${fmt(v, "")} (${db})`;
    });

    fill("bandwidth", report.bandwidth || {});

    const swing = report.swing || {};
    fill("swing", swing);

    const diss = report.dissipation || {};
    fill("dissipation", diss);
    // Each resistor against the limit of its rating check.
    const checks = Array.isArray(report.checks) ? report.checks : [];
    const limits = {};
    for (const c of checks) {
      if (typeof c.id === "string" && c.id.startsWith("resistor_power.")) limits[c.id.slice(15)] = c.limit;
    }
    const tbody = this._out.resistors;
    const resistorRows = [];
    const resistors = diss.resistors && typeof diss.resistors === "object" ? diss.resistors : {};
    for (const [name, watts] of Object.entries(resistors)) {
      const share = limits[name] > 0 && typeof watts === "number" ? watts / limits[name] : null;
      const tr = h("tr", { class: share !== null && share > 1 ? "over" : share !== null && share > 0.5 ? "near" : "" },
        h("th", { scope: "row" }, name),
        h("td", null, fmt(watts, "W")),
        h("td", null, share === null ? "—" : pct(share)));
      resistorRows.push(tr);
    }
    syncChildren(tbody, resistorRows);

    // Ratings and requirement checks.
    const cbody = this._out.checks;
    const checkRows = [];
    let passed = 0;
    for (const c of checks) {
      const id = String(c.id || "check");
      const info = this._checkNames[id] ||
        (id.startsWith("resistor_power.") ? [`${id.slice(15)} power rating`, "W", ""] : null) ||
        [id.replace(/_/g, " "), typeof c.unit === "string" ? c.unit : "", ""];
      const [name, unit, rel] = info;
      if (c.pass) passed++;
      checkRows.push(h("tr", { class: c.pass ? "pass" : "fail" },
        h("td", null, h("span", { class: "verdict" }, c.pass ? "✓ met" : "✗ not met")),
        h("th", { scope: "row" }, name, rel ? h("span", { class: "rel" }, "\u00a0" + rel) : null),
        h("td", null, cornerValue(report, id) || fmt(c.value, unit)),
        h("td", null, fmt(c.limit, unit)),
        h("td", { class: "msg" }, typeof c.message === "string" ? c.message : "")));
    }
    syncChildren(cbody, checkRows);
    setText(this._out.checksSummary, checks.length
      ? `${passed} of ${checks.length} checks met: ratings first, then the design's requirements.`
      : "No checks.");
    this._out.checksCard.classList.toggle("has-fail", passed < checks.length);

    // Cautions, prominently, with the deferral to local practice.
    const cautions = Array.isArray(report.cautions) ? report.cautions : [];
    const ul = this._cautions.querySelector("ul");
    const items = [];
    // The deferral to local codes and licensed practice, once under the
    // list; marked when a caution is about harm (the engine's `safety`).
    for (const c of cautions) {
      items.push(h("li", { "data-id": String(c.id || "") }, typeof c.message === "string" ? c.message : String(c.id)));
    }
    syncChildren(ul, items);
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
};
