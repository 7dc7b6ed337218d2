/* The plots: the theme read from the CSS custom properties (as colours the
 * wasm plotter reads), the plot descriptions made from an analysis, the
 * canvases drawn by the engine (gain and phase, impedances, load lines)
 * and the numbers behind each plot as a table. Methods of the element. */

import { h } from "./dom.js";
import { asFieldError, mark } from "./engine.js";

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

/** The readout's text while the pointer is elsewhere. */
const CURSOR_HINT = "Point at the plot to read its values.";

/** The plots' methods, mixed into the element (element.js). */
export const withPlots = (Base) => class extends Base {
  _buildPlots() {
    const id = this._id;
    const plot = (key, title, desc, tall) => {
      const canvas = h("canvas", { class: "plot" + (tall ? " tall" : ""), role: "img", "aria-label": `${title}: ${desc}` });
      const table = h("div", { class: "table-wrap" });
      const numbers = h("details", { class: "plot-numbers" }, h("summary", null, "Show numbers"), table);
      numbers.addEventListener("toggle", () => {
        if (numbers.open) this._fillPlotTable(key);
      });
      // The value under the pointer: a line over the canvas and a readout.
      const line = h("div", { class: "cursor-line", hidden: true, "aria-hidden": "true" });
      const readout = h("output", { class: "cursor-readout" }, CURSOR_HINT);
      const stack = h("div", { class: "plot-stack" }, canvas, line, readout);
      const png = h("button", { type: "button", class: "small", "data-action": "plot-png", title: `Save the plot as a PNG image` }, "PNG");
      const csv = h("button", { type: "button", class: "small", "data-action": "plot-csv", title: `Save the plot's numbers as CSV` }, "CSV");
      png.addEventListener("click", () => this.exportPlot(key, "png"));
      csv.addEventListener("click", () => this.exportPlot(key, "csv"));
      const fig = h("figure", { class: "card plot-card", "data-plot": key },
        h("figcaption", null, h("h3", { id: id("h-" + key) }, title), h("span", { class: "hint" }, desc),
          h("span", { class: "plot-tools" }, png, csv)),
        stack, numbers);
      const part = { key, fig, canvas, table, numbers, line, readout };
      canvas.addEventListener("pointermove", (e) => this._showCursor(part, e));
      canvas.addEventListener("pointerleave", () => {
        line.hidden = true;
        readout.textContent = CURSOR_HINT;
      });
      return part;
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

  /** Draws the plots in the next frame; with `afterPaint`, once that
   * frame has been painted (the first results show before the plots). */
  _schedulePlots(afterPaint) {
    // A draw already asked for (a resize, say) waits for the paint too
    // when this call asks it to.
    if (afterPaint) this._plotAfterPaint = true;
    if (this._plotFrame) return;
    this._plotFrame = requestAnimationFrame(() => {
      const draw = () => {
        this._plotFrame = 0;
        this._drawPlots();
      };
      const after = this._plotAfterPaint;
      this._plotAfterPaint = false;
      if (after) setTimeout(draw, 0);
      else draw();
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
      // Drawn on a canvas outside the document, then copied: a canvas in
      // the page resolves each label's font against the page's styles,
      // which after an edit first restyles and lays out the element (about
      // 5 ms of a 9 ms edit); a detached one has no styles to bring up to
      // date.
      if (!p.work) p.work = document.createElement("canvas");
      try {
        const drawn = fn(p.work, Object.assign({}, spec || Object.assign({ empty_text: empty, theme: specs.theme.theme }, emptySpec), sized));
        p.frame = drawn && spec ? drawn : null;
        if (p.canvas.width !== p.work.width) p.canvas.width = p.work.width;
        if (p.canvas.height !== p.work.height) p.canvas.height = p.work.height;
        const ctx = p.canvas.getContext("2d");
        ctx.globalCompositeOperation = "copy";
        ctx.drawImage(p.work, 0, 0);
        ctx.globalCompositeOperation = "source-over";
        p.canvas.removeAttribute("data-error");
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
    if (a && !this._plotted) {
      this._plotted = true;
      mark("stagewright:first-plots");
    }
  }

  /** The data value under a pointer event on a plot, or null: the panel
   * it is over (index), and x and y in the axes' units. */
  _plotValueAt(p, e) {
    const f = p.frame;
    if (!f || !p.canvas.clientWidth) return null;
    const rect = p.canvas.getBoundingClientRect();
    const sx = p.canvas.width / rect.width;
    const sy = p.canvas.height / rect.height;
    const px = (e.clientX - rect.left) * sx;
    const py = (e.clientY - rect.top) * sy;
    const at = (lo, hi, log, t) => (log ? Math.exp(Math.log(lo) + t * (Math.log(hi) - Math.log(lo))) : lo + t * (hi - lo));
    for (let i = 0; i < f.panels.length; i++) {
      const q = f.panels[i];
      if (px < q.left || px > q.left + q.width || py < q.top || py > q.top + q.height) continue;
      const tx = (px - q.left) / q.width;
      const ty = 1 - (py - q.top) / q.height;
      return { panel: i, x: at(q.x[0], q.x[1], q.x_log, tx), y: at(q.y[0], q.y[1], q.y_log, ty), cssX: px / sx };
    }
    return null;
  }

  /** The cursor readout: on a frequency plot, the frequency under the
   * pointer and every trace's value at the nearest computed point; on
   * the load lines, VCE and IC under the pointer. */
  _showCursor(p, e) {
    const api = this._api;
    const spec = this._specs && this._specs[p.key];
    const v = api && spec ? this._plotValueAt(p, e) : null;
    if (!v) {
      p.line.hidden = true;
      p.readout.textContent = CURSOR_HINT;
      return;
    }
    const f = (x, unit) => (typeof x === "number" && Number.isFinite(x) ? api.format_si(x, unit) : "—");
    let text;
    if (p.key === "loadlines") {
      text = `VCE ${f(v.x, "V")} · IC ${f(v.y, "A")}`;
    } else {
      // The computed point nearest the pointer, on the log frequency axis.
      let best = -1;
      let dist = Infinity;
      const lx = Math.log(v.x);
      spec.freq.forEach((fr, i) => {
        const d = Math.abs(Math.log(fr) - lx);
        if (fr > 0 && d < dist) {
          dist = d;
          best = i;
        }
      });
      if (best < 0) return;
      const parts = [f(spec.freq[best], "Hz")];
      for (const s of spec.series) parts.push(`${s.name} ${f(s.values[best], spec.y_unit)}`);
      if (spec.phase) parts.push(`${spec.phase.name} ${f(spec.phase.values[best], "°")}`);
      text = parts.join(" · ");
    }
    p.readout.textContent = text;
    p.line.hidden = false;
    // CSSOM positions (allowed under a strict style-src, unlike style="").
    p.line.style.left = `${v.cssX}px`;
    p.line.style.height = `${p.canvas.clientHeight}px`;
  }

  /** Saves a plot ("gain", "impedance", "loadlines", or the tolerance
   * view's "histogram") as a PNG image of
   * its canvas or its numbers as CSV; returns the CSV text (or null). */
  exportPlot(key, kind) {
    const p = key === "histogram"
      ? (this._histogramCanvas && this._histogramCanvas() ? { canvas: this._histogramCanvas() } : null)
      : this._plotParts && this._plotParts[key];
    if (!p) return null;
    const name = `${this._slug()}-${key}`;
    if (kind === "png") {
      p.canvas.toBlob((blob) => {
        if (blob) this._saveBlob(blob, `${name}.png`);
      }, "image/png");
      this._status.textContent = "Plot saved as PNG.";
      return null;
    }
    const csv = this.plotCsv(key);
    if (csv) {
      this._saveBlob(new Blob([csv], { type: "text/csv" }), `${name}.csv`);
      this._status.textContent = "Plot numbers saved as CSV.";
    }
    return csv;
  }

  /** A plot's numbers as CSV (RFC 4180: a header row, comma-separated,
   * fields quoted where needed), SI units in the header, full precision. */
  plotCsv(key) {
    if (key === "histogram") return this._histogramCsv ? this._histogramCsv() : null;
    const spec = this._specs && this._specs[key];
    if (!spec) return null;
    const q = (s) => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
    const n = (x) => (typeof x === "number" && Number.isFinite(x) ? String(x) : "");
    const rows = [];
    if (key === "gain" || key === "impedance") {
      const cols = spec.series.map((c) => [`${c.name} (${spec.y_unit})`, c.values]);
      if (spec.phase) cols.push([`${spec.phase.name} (°)`, spec.phase.values]);
      rows.push(["frequency (Hz)", ...cols.map(([h]) => h)].map(q).join(","));
      for (let i = 0; i < spec.freq.length; i++) rows.push([n(spec.freq[i]), ...cols.map(([, vs]) => n(vs[i]))].join(","));
    } else {
      rows.push(["curve or point", "VCE (V)", "IC (A)"].join(","));
      for (const m of spec.markers) if (m.shape !== "none") rows.push([q(m.label || "point"), n(m.x), n(m.y)].join(","));
      const chars = spec.markers.filter((m) => m.shape === "none");
      let k = 0;
      for (const c of spec.curves) {
        const label = c.name || (chars[k] ? chars[k].label : `curve ${k + 1}`);
        if (!c.name) k++;
        for (let i = 0; i < c.x.length; i++) rows.push([q(label), n(c.x[i]), n(c.y[i])].join(","));
      }
    }
    return rows.join("\r\n") + "\r\n";
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
};
