/* What the design file holds: the format, the engine's schema of fields
 * (groups, stages and their parts), the documented key order, the series
 * choices and the example design shown when none is given. */

export const FORMAT = "stagewright/1";

/* The design file's fields, groups, stages and the parts each stage
 * uses come from the core's tables (the engine's fields(), see
 * wasm/src/analysis.rs), filled in once the engine has started
 * (setSchema); until then they are empty and the form is not built. */

/** [[name, words]] of the stages. */
export let STAGES = [];
/** Which parts each stage uses (the rest are hidden and left out). */
export let STAGE_PARTS = {};
/** The form's groups: {id, legend, fields: [{path, key, unit, desc, kind, series?, options?, maxlength?}]}. */
export let GROUPS = [];
/** Each field by its key ("rc", "supply", "resistor_tolerance"). */
export let FIELD_BY_KEY = new Map();
/** The specification form's fields, with their defaults. */
export let SPEC = [];

/** Whether the engine's schema has been read. */
export function schemaReady() {
  return GROUPS.length > 0;
}

/** Takes the engine's schema (fields()), once per page. */
export function setSchema(schema) {
  if (schemaReady() || !schema || !Array.isArray(schema.groups)) return;
  STAGES = schema.stages;
  STAGE_PARTS = schema.stage_parts;
  GROUPS = schema.groups;
  SPEC = schema.spec || [];
  FIELD_BY_KEY = new Map(GROUPS.flatMap((g) => g.fields).map((f) => [f.key, f]));
}

export const TOP_ORDER = ["format", "title", "notes", "stage", "supply", "ambient", "transistor", "parts", "requirements", "tolerances"];

export const SERIES_CHOICES = ["E3", "E6", "E12", "E24", "E48", "E96", "E192"];

/** The design shown when none is given. */
export const EXAMPLE_DESIGN = {
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
