/* What the design file holds, field by field: the format, the stages and
 * the parts each one uses, the form's groups of fields (path, unit, label,
 * kind, E-series family), the documented key order, the series choices
 * and the example design shown when none is given. */

export const FORMAT = "stagewright/1";

export const STAGES = [
  ["common-emitter", "common emitter"],
  ["common-collector", "common collector (emitter follower)"],
  ["common-base", "common base"],
];

/** Which parts each stage uses (the rest are hidden and left out). */
export const STAGE_PARTS = {
  "common-emitter": ["r1", "r2", "rc", "re", "re_bypassed", "c_emitter", "rs", "rl", "c_in", "c_out"],
  "common-collector": ["r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out"],
  "common-base": ["r1", "r2", "rc", "re", "rs", "rl", "c_in", "c_out", "c_base"],
};

/* A field: path in the design file, unit for the parser, label text,
 * optional kind ("text", "textarea", "select"), E-series family ("R"/"C"). */
function F(path, unit, desc, extra) {
  return Object.assign({ path, key: path[path.length - 1], unit, desc, kind: "value" }, extra || {});
}

export const GROUPS = [
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
export const FIELD_BY_KEY = new Map(ALL_FIELDS.map((f) => [f.key, f]));
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
