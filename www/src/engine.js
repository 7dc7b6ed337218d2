/* The engine: the wasm module, unpacked and compiled once per page and
 * shared by every element (loadEngine), and the small wrappers over its
 * exports. The wasm-bindgen "no-modules" glue and the gzip-packed base64
 * of the wasm are modules that www/build.mjs makes (stagewright:glue,
 * stagewright:wasm). The browser's own DecompressionStream unpacks the
 * bytes as they stream into WebAssembly.compileStreaming: no decoder
 * runs in JavaScript. */

import wasm_bindgen from "stagewright:glue";
import WASM_GZIP_BASE64 from "stagewright:wasm";

let enginePromise = null;

function base64ToBytes(b64) {
  if (typeof Uint8Array.fromBase64 === "function") return Uint8Array.fromBase64(b64);
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

/** What this browser lacks to start the engine, in words, or "". */
export function missingFeature() {
  if (typeof WebAssembly !== "object" || typeof WebAssembly.compile !== "function") return "WebAssembly";
  if (typeof DecompressionStream !== "function") return "DecompressionStream (Chromium 80, Firefox 113, Safari 16.4 or later)";
  if (typeof Response !== "function" || typeof Blob !== "function") return "the Fetch API's Response and Blob";
  return "";
}

/** Compiles the engine's module: gzip → DecompressionStream → compile,
 * streaming where the browser can. */
async function compileEngine() {
  const missing = missingFeature();
  if (missing) throw new Error(`this browser lacks ${missing}`);
  const packed = new Blob([base64ToBytes(WASM_GZIP_BASE64)]);
  const stream = packed.stream().pipeThrough(new DecompressionStream("gzip"));
  const response = new Response(stream, { headers: { "content-type": "application/wasm" } });
  if (typeof WebAssembly.compileStreaming === "function") {
    return WebAssembly.compileStreaming(response);
  }
  return WebAssembly.compile(await response.arrayBuffer());
}

/** A User Timing mark (the timing script reads them), where there is one. */
export function mark(name) {
  try {
    if (typeof performance === "object" && performance.mark) performance.mark(name);
  } catch (e) {
    /* no timing marks here */
  }
}

/** The engine, started once per page (the first call starts it; main.js
 * calls it as the script runs) and shared by every element. */
export function loadEngine() {
  if (!enginePromise) {
    enginePromise = (async () => {
      mark("stagewright:engine-start");
      const module = await compileEngine();
      mark("stagewright:engine-compiled");
      await wasm_bindgen({ module_or_path: module });
      mark("stagewright:engine-ready");
      return wasm_bindgen;
    })();
    enginePromise.catch(() => {});
  }
  return enginePromise;
}

/* ---- The analysis ------------------------------------------------
 * The wasm exports (see wasm/src/analysis.rs):
 *
 *   new api.Session(designJson) holds a design; session.set(path, text,
 *       series) takes one field; session.compute(pointsPerDecade) ->
 *       {report, sweep, curves}: one analysis, everything the page shows
 *       (also api.compute(designJson, pointsPerDecade), for scripts).
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
export const SWEEP_PER_DECADE = 20;

export function enginePresets(api) {
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

export function presetData(api, name) {
  if (!name || typeof name !== "string" || !api || typeof api.preset_data !== "function") return null;
  try {
    return api.preset_data(name) || null;
  } catch (e) {
    return null;
  }
}

/** An error thrown by the engine as {field, message}, or anything else. */
export function asFieldError(err) {
  if (err && typeof err === "object" && typeof err.message === "string") {
    return { field: typeof err.field === "string" ? err.field : "", message: err.message };
  }
  return { field: "", message: String(err) };
}
