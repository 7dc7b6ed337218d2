/* The engine: the wasm module, unpacked and started once per page and
 * shared by every element (loadEngine), and the small wrappers over its
 * exports. The wasm-bindgen "no-modules" glue and the LZMA-packed base64
 * of the wasm are modules that www/build.mjs makes (stagewright:glue,
 * stagewright:wasm); lzma1's decoder unpacks the bytes. */

import wasm_bindgen from "stagewright:glue";
import WASM_LZMA_BASE64 from "stagewright:wasm";
import { Decoder } from "lzma1/lib/decoder.js";
import { InputBuffer, OutputBuffer } from "lzma1/lib/streams.js";

let enginePromise = null;

function base64ToBytes(b64) {
  const bin = atob(b64);
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}

/** The bytes of an "lzma alone" stream (properties, size, data). */
function unlzma(bytes) {
  const out = new OutputBuffer(bytes.length * 4);
  new Decoder().decompress(new InputBuffer(bytes), out);
  return out.buf.subarray(0, out.count);
}

export function loadEngine() {
  if (!enginePromise) {
    enginePromise = (async () => {
      const bytes = unlzma(base64ToBytes(WASM_LZMA_BASE64));
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

export function hasAnalysis(api) {
  return !!api && typeof api.compute === "function";
}

/** Runs the analysis of `design` once. Returns {report, sweep, curves} or
 * null when the engine has no analysis; throws {field, message}. */
export function runAnalysis(api, design) {
  return hasAnalysis(api) ? api.compute(JSON.stringify(design), SWEEP_PER_DECADE) : null;
}

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
