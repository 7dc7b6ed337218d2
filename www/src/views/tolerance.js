/* The tolerance view: the worst case over the tolerance box,
 * each requirement at its worst vertex, the sensitivities, and a seeded
 * Monte Carlo run in chunks between frames (yield, percentiles, a
 * histogram with its numbers), as `stagewright check --worst-case
 * --monte-carlo N --seed S` gives them. */

import { clone, getPath, setPath, storedValue } from "../design.js";
import { h } from "../dom.js";
import { asFieldError } from "../engine.js";
import { GROUPS, STAGES } from "../schema.js";

/** The design file's `tolerances` block, field by field, from the
 * engine's schema: [key, label, unit, default]. */
function boxFields() {
  const g = GROUPS.find((x) => x.id === "tolerances");
  return g ? g.fields.map((f) => [f.key, f.desc, f.unit, f.default || ""]) : [];
}

/** A yield as the command line prints it: never rounded up to 100 %. */
function yieldText(y) {
  return y >= 1 ? "100 %" : `${(Math.floor(y * 1e4) / 100).toFixed(2)} %`;
}

/** The histogram's readout while the pointer is elsewhere. */
const HIST_HINT = "Point at the histogram to read its bins.";

/** The view's methods; views/index.js mixes them into the element. */
export const withToleranceView = (Base) => class extends Base {
  _buildToleranceView() {
    const id = this._id;
    this._tolTrials = h("input", { type: "number", id: id("tol-n"), value: "10000", min: "1", max: "1000000", step: "1" });
    this._tolSeed = h("input", { type: "text", id: id("tol-seed"), value: "1", inputmode: "numeric", autocomplete: "off" });
    const run = h("button", { type: "button", class: "primary", "data-action": "run-tolerance" }, "Run");
    run.addEventListener("click", () => this.runTolerance());
    // Stops a run between chunks; the trials done so far are summarised.
    this._tolCancel = h("button", { type: "button", "data-action": "cancel-tolerance", hidden: true }, "Cancel");
    this._tolCancel.addEventListener("click", () => {
      this._tolCancelled = true;
    });
    this._tolProgress = h("progress", { max: "1", value: "0", hidden: true, "aria-label": "Monte Carlo progress" });
    this._tolError = h("p", { class: "spec-error", role: "alert", hidden: true });
    this._tolOut = h("div", { class: "tol-out" });
    this._tolHist = h("canvas", { class: "plot hist", role: "img", "aria-label": "Histogram of the chosen result over the Monte Carlo trials" });
    this._tolHistPick = h("select", { id: id("tol-hist"), "aria-label": "result shown in the histogram" });
    this._tolHistPick.addEventListener("change", () => this._drawHistogram());
    this._tolHistTable = h("div", { class: "table-wrap" });
    const png = h("button", { type: "button", class: "small", "data-action": "plot-png", title: "Save the histogram as a PNG image" }, "PNG");
    const csv = h("button", { type: "button", class: "small", "data-action": "plot-csv", title: "Save the histogram's bins as CSV" }, "CSV");
    png.addEventListener("click", () => this.exportPlot("histogram", "png"));
    csv.addEventListener("click", () => this.exportPlot("histogram", "csv"));
    // The value under the pointer and its bin, as on the other plots.
    this._tolHistLine = h("div", { class: "cursor-line", hidden: true, "aria-hidden": "true" });
    this._tolHistReadout = h("output", { class: "cursor-readout" }, HIST_HINT);
    this._tolHist.addEventListener("pointermove", (e) => this._histogramCursor(e));
    this._tolHist.addEventListener("pointerleave", () => {
      this._tolHistLine.hidden = true;
      this._tolHistReadout.textContent = HIST_HINT;
    });
    this._tolHistBox = h("figure", { class: "hist-box", hidden: true, "data-plot": "histogram" },
      h("figcaption", null, h("label", { for: id("tol-hist") }, "Histogram of "), this._tolHistPick,
        h("span", { class: "plot-tools" }, png, csv)),
      h("div", { class: "plot-stack" }, this._tolHist, this._tolHistLine, this._tolHistReadout),
      h("details", { class: "plot-numbers" }, h("summary", null, "Show numbers"), this._tolHistTable));
    // The tolerance box: the design file's tolerances block, edited here.
    this._boxInputs = {};
    this._boxErrors = {};
    const box = h("fieldset", { class: "tol-box" }, h("legend", null, "Tolerance box (the design's tolerances block)"));
    for (const [key, label, unit, dflt] of boxFields()) {
      const fid = id("tol-" + key);
      const input = h("input", { type: "text", id: fid, "data-key": key, placeholder: dflt, autocomplete: "off", spellcheck: "false" });
      const error = h("p", { class: "error", hidden: true, id: id("tol-e-" + key) });
      input.setAttribute("aria-describedby", error.id);
      input.addEventListener("input", () => this._boxEdited(key));
      this._boxInputs[key] = input;
      this._boxErrors[key] = error;
      box.append(h("div", { class: "tol-box-field" },
        h("label", { for: fid }, label), input, h("span", { class: "unit" }, unit === "%" ? "" : unit), error));
    }
    box.append(h("p", { class: "hint" }, "A share is a fraction (0.01) or a percentage (1 %); empty fields take the default shown. hFE runs over the transistor's own hfe_min to hfe_max (Calculator view)."));
    this._tolStale = h("p", { class: "tol-stale", role: "status", hidden: true });
    this._fillBox();
    return h("section", { class: "card view-tol", "aria-labelledby": id("h-tol") },
      h("h3", { id: id("h-tol") }, "Tolerances"),
      box,
      h("p", { class: "hint" }, "Worst case over the tolerance box (the design's tolerances block, or the defaults), the sensitivities and a seeded Monte Carlo run, as stagewright check --worst-case --monte-carlo N --seed S gives them."),
      h("p", { class: "tol-inputs" },
        h("label", { for: id("tol-n") }, "trials N "), this._tolTrials,
        h("label", { for: id("tol-seed") }, " seed "), this._tolSeed, " ", run, " ", this._tolProgress, " ", this._tolCancel),
      this._tolError, this._tolStale, this._tolOut, this._tolHistBox);
  }

  /** The unit of a Monte Carlo result (the core's Quantity table; the
   * gain is in V/V). */
  _quantityUnit(key) {
    const q = this._tables && this._tables.quantities.find((x) => x.key === key);
    return q ? q.unit : "";
  }

  /** The readout under the histogram: the value under the pointer, and
   * the bin it falls in with its count of trials. */
  _histogramCursor(e) {
    const api = this._api;
    const s = this._tolSummary;
    const d = s && s.distributions.find((x) => x.quantity === this._tolHistPick.value);
    const v = api && d ? this._plotValueAt({ frame: this._tolHistFrame, canvas: this._tolHist }, e) : null;
    if (!v) {
      this._tolHistLine.hidden = true;
      this._tolHistReadout.textContent = HIST_HINT;
      return;
    }
    const unit = this._quantityUnit(d.quantity);
    const f = (x) => api.format_si(x, unit);
    const bins = d.histogram.counts.length;
    const width = (d.histogram.to - d.histogram.from) / bins;
    const i = Math.floor((v.x - d.histogram.from) / width);
    const bin = i >= 0 && i < bins
      ? ` · bin ${f(d.histogram.from + i * width)} to ${f(d.histogram.from + (i + 1) * width)}: ${d.histogram.counts[i]} trials`
      : " · outside the trials";
    this._tolHistReadout.textContent = `${f(v.x)}${bin}`;
    this._tolHistLine.hidden = false;
    this._tolHistLine.style.left = `${v.cssX}px`;
    this._tolHistLine.style.height = `${this._tolHist.clientHeight}px`;
  }

  /** The histogram's canvas (for exportPlot). */
  _histogramCanvas() {
    return this._tolHist || null;
  }

  /** The histogram on screen as CSV: one row per bin, its ends in the
   * result's unit and its count of trials. */
  _histogramCsv() {
    const s = this._tolSummary;
    const d = s && this._tolHistPick && s.distributions.find((x) => x.quantity === this._tolHistPick.value);
    if (!d) return null;
    const unit = this._quantityUnit(d.quantity);
    const u = unit ? ` (${unit})` : "";
    const bins = d.histogram.counts.length;
    const width = (d.histogram.to - d.histogram.from) / bins;
    const rows = [`${d.quantity} from${u},${d.quantity} to${u},trials`];
    d.histogram.counts.forEach((n, i) => {
      rows.push(`${d.histogram.from + i * width},${d.histogram.from + (i + 1) * width},${n}`);
    });
    return rows.join("\r\n") + "\r\n";
  }

  /** The box's fields from the design's tolerances block. */
  _fillBox() {
    if (!this._boxInputs) return;
    for (const [key] of boxFields()) {
      const v = getPath(this._design || {}, ["tolerances", key]);
      this._boxInputs[key].value = v === undefined || v === null ? "" : String(v);
      this._boxErrors[key].hidden = true;
      this._boxInputs[key].removeAttribute("aria-invalid");
    }
  }

  /** A box edit: read by the core with the rest of the design (its own
   * message beside the field when refused), then kept in the design. */
  _boxEdited(key) {
    const input = this._boxInputs[key];
    const error = this._boxErrors[key];
    const text = input.value.trim();
    const api = this._api;
    const trial = clone(this._exportDesign());
    setPath(trial, ["tolerances", key], text === "" ? undefined : storedValue(text));
    if (trial.tolerances && !Object.keys(trial.tolerances).length) delete trial.tolerances;
    let message = "";
    if (api && typeof api.read_design === "function") {
      try {
        api.read_design(JSON.stringify(trial));
      } catch (err) {
        const e = asFieldError(err);
        // Only this field's message: the calculator view shows the others.
        if (e.field.startsWith("tolerances")) message = e.message;
      }
    }
    error.textContent = message;
    error.hidden = !message;
    if (message) {
      input.setAttribute("aria-invalid", "true");
      return;
    }
    input.removeAttribute("aria-invalid");
    setPath(this._design, ["tolerances", key], text === "" ? undefined : storedValue(text));
    this._sessionStale = true;
    if (this._design.tolerances && !Object.keys(this._design.tolerances).length) delete this._design.tolerances;
    this._isExample = false;
    this._recompute();
  }

  _onDesignLoaded() {
    super._onDesignLoaded();
    this._fillBox();
  }

  /** Marks the last run stale when the design differs from the one it
   * ran on (or fresh again when an edit is undone). */
  _onDesignChanged(design) {
    super._onDesignChanged(design);
    const run = this.toleranceResult;
    if (!run || !this._tolStale) return;
    const stale = JSON.stringify(design) !== run.designText;
    run.stale = stale;
    this._tolOut.classList.toggle("stale", stale);
    this._tolHistBox.classList.toggle("stale", stale);
    this._tolStale.hidden = !stale;
    if (stale) {
      this._tolStale.textContent = "";
      const again = h("button", { type: "button", class: "primary small", "data-action": "rerun-tolerance" }, "Run again");
      again.addEventListener("click", () => this.runTolerance());
      this._tolStale.append(`The design has changed since this run: the results below are for “${run.title}” as it was. `, again);
    }
  }

  /** "For “title” (stage), with the tolerance box: …", from the report's
   * tolerances (the ones used: the design's block or the defaults). */
  _runHeading(design, report) {
    const api = this._api;
    const t = report.tolerances || {};
    const pct = (v) => (typeof v === "number" ? `±${+(v * 100).toFixed(3)} %` : "—");
    const num = (v, unit) => (typeof v === "number" ? api.format_si(v, unit) : "—");
    const stage = STAGES.find(([v]) => v === design.stage);
    const title = typeof design.title === "string" && design.title.trim() ? design.title : "Untitled stage";
    return h("p", { class: "tol-for" },
      h("strong", null, `For “${title}”`), ` (${stage ? stage[1] : design.stage}), with the tolerance box: resistors ${pct(t.resistor_tolerance)}, ` +
      `capacitors ${pct(t.capacitor_tolerance)}, supply ${pct(t.supply_tolerance)}, VBE ±${num(t.vbe_spread, "V")}, ` +
      `ambient ${num(t.ambient_min, "°C")} to ${num(t.ambient_max, "°C")}, hFE ${t.hfe_min ?? "—"} to ${t.hfe_max ?? "—"}.`);
  }

  /** Runs the tolerance analysis of the current design: the worst case at
   * once, the Monte Carlo trials in chunks between frames. Resolves to
   * {report, summary, ms, timing} (also kept as `toleranceResult`), or
   * null. `ms` is the whole run, drawing included; `timing` the engine's
   * share in ms: `setup` (the vertices and sensitivities), `trials` (the
   * run_chunk calls summed), `summary`, `chunks` (how many calls). */
  runTolerance(trials, seed) {
    if (!this._tolOut) this._viewPanel("tolerances");
    const api = this._api;
    if (trials !== undefined) this._tolTrials.value = String(trials);
    if (seed !== undefined) this._tolSeed.value = String(seed);
    if (this._tolRun) this._tolRun.free();
    this._tolRun = null;
    const token = (this._tolToken = (this._tolToken || 0) + 1);
    this._tolOut.textContent = "";
    this._tolError.hidden = true;
    this._tolHistBox.hidden = true;
    this.toleranceResult = null;
    this._tolCancelled = false;
    const fail = (msg) => {
      this._tolError.textContent = msg;
      this._tolError.hidden = false;
      this._tolProgress.hidden = true;
      this._tolCancel.hidden = true;
      return Promise.resolve(null);
    };
    if (!api || typeof api.Tolerance !== "function" || !this._design) return fail("The engine is not ready yet.");
    let t;
    const started = performance.now();
    const design = this._exportDesign();
    const designText = JSON.stringify(design);
    this._tolStale.hidden = true;
    this._tolOut.classList.remove("stale");
    this._tolHistBox.classList.remove("stale");
    try {
      t = new api.Tolerance(designText, Number(this._tolTrials.value), this._tolSeed.value);
    } catch (err) {
      const e = asFieldError(err);
      return fail(e.message);
    }
    this._tolRun = t;
    const timing = { setup: performance.now() - started, trials: 0, summary: 0, chunks: 0 };
    const report = t.report();
    this._tolOut.append(this._runHeading(design, report));
    this._renderWorst(report);
    const n = Number(this._tolTrials.value) | 0;
    let next = 0;
    let chunk = 200;
    return new Promise((resolve) => {
      const step = () => {
        if (token !== this._tolToken) return resolve(null);
        const t0 = performance.now();
        // About 12 ms of trials a turn, so the page keeps answering.
        const cancelled = this._tolCancelled;
        while (!cancelled && next < n && performance.now() - t0 < 12) {
          const c0 = performance.now();
          next += t.run_chunk(next, chunk);
          timing.trials += performance.now() - c0;
          timing.chunks++;
          const spent = performance.now() - t0;
          if (spent < 4) chunk = Math.min(chunk * 2, 5000);
        }
        if (next < n && !cancelled) {
          if (performance.now() - started > 200) {
            this._tolProgress.hidden = false;
            this._tolCancel.hidden = false;
            this._tolProgress.value = next / n;
          }
          setTimeout(step, 0);
          return;
        }
        this._tolProgress.hidden = true;
        this._tolCancel.hidden = true;
        const s0 = performance.now();
        const summary = t.summary();
        timing.summary = performance.now() - s0;
        this._renderMonteCarlo(summary);
        const title = typeof design.title === "string" && design.title.trim() ? design.title : "Untitled stage";
        this.toleranceResult = { report, summary, ms: performance.now() - started, timing, cancelled, designText, title, stale: false };
        // An edit made while the trials ran.
        this._onDesignChanged(this._exportDesign());
        const note = cancelled ? ` Cancelled after ${summary.completed} of ${n} trials.` : "";
        if (cancelled) {
          this._tolOut.prepend(h("p", { class: "tol-cancelled", role: "status" }, `Cancelled after ${summary.completed} of ${n} trials: the figures below are for those.`));
        }
        this._announce(`Monte Carlo yield ${yieldText(summary.yield)} of ${summary.completed} trials.${note}`);
        resolve(this.toleranceResult);
      };
      setTimeout(step, 0);
    });
  }

  _renderWorst(r) {
    const api = this._api;
    const f = (v, unit) => (typeof v === "number" && Number.isFinite(v) ? api.format_si(v, unit) : "—");
    // A vertex as the engine writes it, {"r1": "max", "hfe": "min", …}.
    const corner = (c) => {
      if (!c) return "—";
      const s = Object.entries(c).filter(([, level]) => level !== "nominal").map(([p, level]) => (level === "max" ? "+" : "−") + p);
      return s.length ? s.join(" ") : "nominal";
    };
    // The THD is a share: shown in percent, "unbounded" where a vertex
    // does not deliver its output peak (a null max).
    const g = (q, v, unit) => (q !== "thd" ? f(v, unit)
      : typeof v === "number" && Number.isFinite(v) ? api.format_si(100 * v, "%") : "unbounded");
    const w = r.worst_case;
    const worst = h("table", { class: "numbers tol-worst" },
      h("caption", null, `Worst case over ${w.vertices} vertices` + (w.inactive_vertices ? ` (${w.inactive_vertices} not in the active region: vertex extremes only)` : "")),
      h("thead", null, h("tr", null, ...["result", "nominal", "min", "max", "min at", "max at"].map((c) => h("th", { scope: "col" }, c)))),
      h("tbody", null, ...Object.entries(r.corners).map(([q, e]) => h("tr", null, h("th", { scope: "row" }, q.replace(/_/g, " ")),
        h("td", null, g(q, e.nominal, e.unit)), h("td", null, g(q, e.min, e.unit)), h("td", null, g(q, e.max, e.unit)),
        h("td", { class: "corner" }, corner(e.corner.min)), h("td", { class: "corner" }, corner(e.corner.max))))));
    const checks = w.checks.length
      ? h("table", { class: "numbers tol-checks" },
        h("caption", null, "Requirements at their worst vertex (+ at max, − at min, others nominal)"),
        h("thead", null, h("tr", null, ...["", "requirement", "value", "limit", "at"].map((c) => h("th", { scope: "col" }, c)))),
        h("tbody", null, ...w.checks.map((c) => h("tr", { class: c.pass ? "pass" : "fail" },
          h("td", null, c.pass ? "pass" : "FAIL"), h("th", { scope: "row" }, c.id),
          h("td", null, f(c.value, c.unit)), h("td", null, f(c.limit, c.unit)), h("td", { class: "corner" }, corner(c.corner))))))
      : h("p", { class: "hint" }, "No requirements set: nothing to judge at the vertices.");
    const sens = h("table", { class: "numbers tol-sens" },
      h("caption", null, "Sensitivity: % change of the result per % change of the parameter, largest first"),
      h("thead", null, h("tr", null, ...["result", "parameter", "%/%"].map((c) => h("th", { scope: "col" }, c)))),
      h("tbody", null, ...r.sensitivity.map((s) => h("tr", null, h("th", { scope: "row" }, s.quantity.replace(/_/g, " ")),
        h("td", null, s.parameter), h("td", null, (s.percent_per_percent >= 0 ? "+" : "") + s.percent_per_percent.toFixed(3))))));
    this._tolOut.append(h("div", { class: "tol-tables" }, worst, checks),
      h("details", { class: "tol-sens-box" }, h("summary", null, `Sensitivity (${r.sensitivity.length} entries)`), sens));
  }

  _renderMonteCarlo(s) {
    const api = this._api;
    const f = (v, unit) => (typeof v === "number" && Number.isFinite(v) ? api.format_si(v, unit) : "—");
    const extra = s.no_solution || s.not_active ? `; ${s.no_solution} without an operating point, ${s.not_active} saturated or cut off` : "";
    const each = s.requirements.map((r) => `${r.requirement} ${yieldText(r.yield)}`).join(", ");
    const dist = h("table", { class: "numbers tol-mc" },
      h("caption", null, "Percentiles over the trials"),
      h("thead", null, h("tr", null, ...["result", "p1", "p50", "p99", "mean"].map((c) => h("th", { scope: "col" }, c)))),
      h("tbody", null, ...s.distributions.map((d) => {
        const unit = this._quantityUnit(d.quantity);
        // The THD, a share, in percent.
        const k = d.quantity === "thd" ? 100 : 1;
        const u = d.quantity === "thd" ? "%" : unit;
        return h("tr", null, h("th", { scope: "row" }, d.quantity.replace(/_db$/, " (dB)").replace(/_/g, " ")),
          h("td", null, f(k * d.p1, u)), h("td", null, f(k * d.p50, u)), h("td", null, f(k * d.p99, u)), h("td", null, f(k * d.mean, u)));
      })));
    this._tolOut.append(
      h("p", { class: "tol-yield" }, h("strong", null, `Yield ${yieldText(s.yield)}`), ` of ${s.completed} trials, seed ${s.seed}${extra}.`, each ? ` Each requirement: ${each}.` : ""),
      h("div", { class: "tol-tables" }, dist));
    this._tolSummary = s;
    const pick = this._tolHistPick;
    const prior = pick.value;
    pick.textContent = "";
    for (const d of s.distributions) pick.append(h("option", { value: d.quantity }, d.quantity.replace(/_/g, " ")));
    if (prior && s.distributions.some((d) => d.quantity === prior)) pick.value = prior;
    this._tolHistBox.hidden = !s.distributions.length;
    this._drawHistogram();
  }

  /** The chosen result's histogram: a step outline on the wasm plotter,
   * its bins in a table beside it. */
  _drawHistogram() {
    const api = this._api;
    const s = this._tolSummary;
    const d = s && s.distributions.find((x) => x.quantity === this._tolHistPick.value);
    if (!api || !d) return;
    const unit = this._quantityUnit(d.quantity);
    const bins = d.histogram.counts.length;
    const width = (d.histogram.to - d.histogram.from) / bins;
    const x = [];
    const y = [];
    let top = 0;
    d.histogram.counts.forEach((c, i) => {
      const lo = d.histogram.from + i * width;
      x.push(lo, lo, lo + width, lo + width);
      y.push(0, c, c, 0);
      top = Math.max(top, c);
    });
    const t = this._theme();
    const ratio = window.devicePixelRatio || 1;
    const c = this._tolHist;
    const pad = width > 0 ? width : Math.abs(d.histogram.from) * 0.01 || 1;
    try {
      this._tolHistFrame = api.plot_xy(c, {
        curves: [{ name: d.quantity.replace(/_/g, " "), x: new Float64Array(x), y: new Float64Array(y), color: t.traces[0], width: 2 }],
        markers: [
          { x: d.p1, y: 0, label: "p1", color: t.marker, shape: "cross" },
          { x: d.p50, y: 0, label: "p50", color: t.marker, shape: "dot" },
          { x: d.p99, y: 0, label: "p99", color: t.marker, shape: "cross" },
        ],
        x_name: d.quantity.replace(/_/g, " "), y_name: "trials", x_unit: unit, y_unit: "",
        x_range: new Float64Array([d.histogram.from - pad, d.histogram.to + pad]),
        y_range: new Float64Array([0, Math.max(1, top * 1.1)]),
        theme: t.theme,
        pixel_size: new Float64Array([Math.round(c.clientWidth * ratio), Math.round(c.clientHeight * ratio)]),
        pixel_ratio: ratio,
      });
    } catch (err) {
      c.setAttribute("data-error", asFieldError(err).message);
    }
    const f = (v) => api.format_si(v, unit);
    this._tolHistTable.textContent = "";
    this._tolHistTable.append(h("table", { class: "numbers" },
      h("thead", null, h("tr", null, h("th", { scope: "col" }, "from"), h("th", { scope: "col" }, "to"), h("th", { scope: "col" }, "trials"))),
      h("tbody", null, ...d.histogram.counts.map((n, i) => h("tr", null,
        h("td", null, f(d.histogram.from + i * width)), h("td", null, f(d.histogram.from + (i + 1) * width)), h("td", null, String(n)))))));
  }
};
