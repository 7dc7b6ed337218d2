/* The circuit diagram: each stage drawn in SVG (NPN and the PNP mirror
 * image), parts named as in the design file and clickable, values updated
 * in place; and the element's diagram methods (values, node voltages). */

import { getPath, own } from "./design.js";
import { sv } from "./dom.js";
import { STAGE_PARTS, schemaReady } from "./schema.js";

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

/** The diagram's methods, mixed into the element (element.js): the part
 * values shown, a redraw only when the stage or polarity changes, the
 * node voltages of the report. */
export const withDiagram = (Base) => class extends Base {
  _renderDiagram() {
    // The stage's parts come from the engine's schema.
    if (!schemaReady()) return;
    const d = this._design;
    const api = this._api;
    const values = {};
    for (const f of this._fields.values()) {
      if (!f.spec.series) continue;
      const raw = getPath(d, f.spec.path);
      let text = raw === undefined ? "" : String(raw);
      // The engine's echo of the field (kept by the form), else as typed.
      if (text && this._echo.has(f.spec.key)) text = this._echo.get(f.spec.key);
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
};
