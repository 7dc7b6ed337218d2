//! Coverage of the core's public items by reference checks, in the manner
//! of a libm-style coverage check: every name that `core/src/lib.rs`
//! exports must be listed below with the test that checks it.
//!
//! - [`Covered::Reference`]: an equation, a model or a constant, checked
//!   against an outside reference (a standard, a book, an independent
//!   computation) by the named test in `tests/tests/<file>.rs`.
//! - [`Covered::Api`]: not an equation (input data, names, errors, options,
//!   limits of the implementation), checked by the named test of the
//!   integration binary `core/tests/engine.rs`.
//! - [`Covered::Format`]: the design-file and specification-file readers
//!   and the report, which hold no equation of their own (they call the
//!   items above); the command-line tests exercise them.
//!
//! The test fails when lib.rs exports a name that is not listed, when a
//! listed name is no longer exported, and when a named test function does
//! not exist in its file.

use std::collections::BTreeSet;

/// How a public item is covered.
#[derive(Debug, Clone, Copy)]
enum Covered {
    /// (file in `tests/tests/`, without `.rs`; test function).
    Reference(&'static str, &'static str),
    /// Test function in `core/tests/engine.rs`.
    Api(&'static str),
    /// Why the item holds no equation.
    Format(&'static str),
    /// (module in `core/src/`, without `.rs`; unit test function there): the
    /// design-to-requirement and tolerance items, whose checks (the
    /// synthesised grid re-analysed, Malvino & Bates' centred point, samples
    /// inside the worst-case bounds, seeds) live beside the code.
    Unit(&'static str, &'static str),
}

use Covered::{Api, Format, Reference, Unit};

const DESIGN_FILE: &str =
    "design-file reader: reads values and calls the checked items; no equation";
const REPORT: &str = "report writer: formats an Analysis; no equation";
const SPEC_FILE: &str =
    "specification-file reader: reads values into a Spec for synthesize; no equation";

/// Every public item of the core and the test that covers it.
const COVERAGE: &[(&str, Covered)] = &[
    // analysis
    (
        "analyze",
        Reference("textbook", "malvino_bates_8_3_divider_bias"),
    ),
    (
        "analyze_with",
        Api("options_leave_out_bandwidth_and_stability"),
    ),
    (
        "Analysis",
        Reference("textbook", "boylestad_nashelsky_5_2_bypassed_ce"),
    ),
    ("Options", Api("options_leave_out_bandwidth_and_stability")),
    // design to a requirement, tolerance analysis (unit tests beside the code)
    (
        "synthesize",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    ("Bias", Unit("synthesis", "a_given_current_is_centred")),
    (
        "Difference",
        Unit("synthesis", "snapped_design_reports_its_differences"),
    ),
    (
        "PartChoice",
        Unit("synthesis", "snapped_design_reports_its_differences"),
    ),
    (
        "PinnedParts",
        Unit(
            "synthesis",
            "pinned_parts_are_kept_and_the_rest_is_solved_around_them",
        ),
    ),
    (
        "Series",
        Unit("synthesis", "the_tolerances_follow_the_series"),
    ),
    (
        "Spec",
        Unit("synthesis", "specification_errors_name_the_field"),
    ),
    (
        "Synthesis",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    (
        "Target",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    (
        "DEFAULT_EMITTER_FRACTION",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    (
        "DEFAULT_F_LOW",
        Unit("synthesis", "the_capacitors_share_the_lower_corner"),
    ),
    (
        "DEFAULT_SATURATION_RESERVE",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    (
        "DEFAULT_STIFFNESS",
        Unit("synthesis", "every_design_of_a_grid_meets_its_requirements"),
    ),
    (
        "sensitivity",
        Unit("tolerance", "emitter_resistance_sets_the_collector_current"),
    ),
    (
        "tolerance_analysis",
        Unit("tolerance", "the_tolerance_analysis_is_its_parts"),
    ),
    (
        "worst_case_with",
        Unit(
            "tolerance",
            "the_thd_search_finds_the_extremes_of_every_vertex",
        ),
    ),
    (
        "ThdSearch",
        Unit(
            "tolerance",
            "the_thd_search_finds_the_extremes_of_every_vertex",
        ),
    ),
    (
        "thd_check",
        Unit(
            "tolerance",
            "the_nominal_thd_of_the_tolerance_analysis_is_the_checks",
        ),
    ),
    (
        "ThdCondition",
        Unit(
            "design_file",
            "the_thd_requirement_reads_as_a_share_with_its_conditions",
        ),
    ),
    (
        "CONDITIONS",
        Unit(
            "design_file",
            "the_thd_requirement_reads_as_a_share_with_its_conditions",
        ),
    ),
    (
        "Condition",
        Unit(
            "design_file",
            "the_thd_requirement_reads_as_a_share_with_its_conditions",
        ),
    ),
    (
        "worst_checks",
        Unit(
            "tolerance",
            "worst_checks_take_the_extreme_on_the_requirements_side",
        ),
    ),
    (
        "WorstCheck",
        Unit(
            "tolerance",
            "worst_checks_take_the_extreme_on_the_requirements_side",
        ),
    ),
    (
        "worst_case",
        Unit("tolerance", "worst_case_corners_point_the_right_way"),
    ),
    (
        "Corner",
        Unit("tolerance", "worst_case_corners_point_the_right_way"),
    ),
    (
        "Distribution",
        Unit(
            "tolerance",
            "log_uniform_hfe_has_its_median_at_the_geometric_middle",
        ),
    ),
    (
        "Extreme",
        Unit(
            "tolerance",
            "monte_carlo_samples_lie_inside_the_worst_case_bounds",
        ),
    ),
    (
        "Histogram",
        Unit(
            "tolerance",
            "percentiles_interpolate_between_order_statistics",
        ),
    ),
    (
        "Level",
        Unit("tolerance", "worst_case_corners_point_the_right_way"),
    ),
    (
        "MonteCarlo",
        Unit("tolerance", "the_same_seed_gives_the_same_numbers"),
    ),
    (
        "MonteCarloSummary",
        Unit(
            "tolerance",
            "yield_counts_the_trials_that_meet_every_requirement",
        ),
    ),
    (
        "Parameter",
        Unit("tolerance", "emitter_resistance_sets_the_collector_current"),
    ),
    (
        "Quantity",
        Unit(
            "tolerance",
            "monte_carlo_samples_lie_inside_the_worst_case_bounds",
        ),
    ),
    (
        "RequirementYield",
        Unit(
            "tolerance",
            "yield_counts_the_trials_that_meet_every_requirement",
        ),
    ),
    (
        "Sensitivity",
        Unit("tolerance", "emitter_resistance_sets_the_collector_current"),
    ),
    (
        "Setting",
        Unit("tolerance", "worst_case_corners_point_the_right_way"),
    ),
    (
        "ToleranceDocument",
        Unit("tolerance", "the_tolerance_analysis_is_its_parts"),
    ),
    (
        "Tolerances",
        Unit("tolerance", "tolerance_errors_name_the_field"),
    ),
    (
        "WorstCase",
        Unit(
            "tolerance",
            "worst_case_ic_spread_of_a_stiff_divider_is_modest",
        ),
    ),
    (
        "DEFAULT_TRIALS",
        Unit("tolerance", "the_same_seed_gives_the_same_numbers"),
    ),
    // load lines
    (
        "load_lines",
        Reference("textbook", "malvino_bates_12_1_to_12_4_ac_load_line"),
    ),
    (
        "LoadLines",
        Reference("textbook", "malvino_bates_12_1_to_12_4_ac_load_line"),
    ),
    (
        "Characteristic",
        Api("load_line_quiescent_curve_passes_through_q"),
    ),
    // constants
    (
        "thermal_voltage",
        Reference("constants", "thermal_voltage_is_kt_over_q"),
    ),
    (
        "Temperature",
        Reference("constants", "celsius_and_kelvin_convert_by_273_15"),
    ),
    (
        "BOLTZMANN",
        Reference("constants", "si_defining_constants_are_exact"),
    ),
    (
        "DATASHEET_TEMPERATURE",
        Reference("constants", "si_defining_constants_are_exact"),
    ),
    (
        "ELEMENTARY_CHARGE",
        Reference("constants", "si_defining_constants_are_exact"),
    ),
    (
        "ZERO_CELSIUS",
        Reference("constants", "si_defining_constants_are_exact"),
    ),
    // errors
    ("Error", Api("errors_each_bad_part_is_named")),
    ("ErrorKind", Api("errors_negative_load_names_rl")),
    ("Result", Api("errors_convert_to_strings_and_nest")),
    // preferred numbers, values and their printing
    (
        "ESeries",
        Reference("eseries", "every_table_entry_matches_the_typed_copy"),
    ),
    (
        "SeriesLookup",
        Reference("eseries", "lookups_land_on_standard_values"),
    ),
    (
        "format_si",
        Reference("practice", "engineering_notation_follows_the_si_brochure"),
    ),
    (
        "format_value",
        Reference("practice", "engineering_notation_follows_the_si_brochure"),
    ),
    (
        "format_exact",
        Unit("format", "exact_values_read_back_bit_for_bit"),
    ),
    (
        "parse_value",
        Reference("eseries", "rkm_codes_read_as_the_standard_says"),
    ),
    (
        "parse_value_field",
        Reference("eseries", "rkm_codes_read_as_the_standard_says"),
    ),
    // small signal, midband, nodal analysis
    ("SmallSignal", Reference("device", "hybrid_pi_relations")),
    (
        "OPEN_RESISTANCE",
        Api("limits_no_early_effect_means_an_open_ro"),
    ),
    (
        "Midband",
        Reference(
            "nodal",
            "closed_form_matches_nodal_midband_without_early_effect",
        ),
    ),
    (
        "db10",
        Reference(
            "practice",
            "decibels_follow_the_field_and_power_definitions",
        ),
    ),
    (
        "db20",
        Reference(
            "practice",
            "decibels_follow_the_field_and_power_definitions",
        ),
    ),
    (
        "AcNetwork",
        Reference("nodal", "sweep_matches_independent_nodal_solve"),
    ),
    ("Band", Api("network_midband_solve_is_the_reported_midband")),
    (
        "FrequencyPoint",
        Reference("nodal", "sweep_matches_independent_nodal_solve"),
    ),
    // operating point
    (
        "OperatingPoint",
        Reference("textbook", "boylestad_nashelsky_4_7_exact_divider_analysis"),
    ),
    (
        "Region",
        Api("region_saturating_divider_reports_saturation"),
    ),
    // presets
    ("preset", Api("presets_all_resolve_and_validate")),
    ("Preset", Api("presets_all_resolve_and_validate")),
    ("PRESETS", Api("presets_all_resolve_and_validate")),
    // ratings and cautions
    (
        "BiasStability",
        Reference("practice", "stiff_divider_keeps_the_bias_across_hfe"),
    ),
    (
        "Caution",
        Reference("practice", "es1_and_hot_surface_cautions"),
    ),
    (
        "Check",
        Reference("practice", "resistor_derating_and_junction_temperature"),
    ),
    (
        "Dissipation",
        Reference("textbook", "malvino_bates_12_1_to_12_4_ac_load_line"),
    ),
    (
        "BIAS_STABILITY_LIMIT",
        Reference("practice", "stiff_divider_keeps_the_bias_across_hfe"),
    ),
    (
        "DEFERRAL",
        Reference("practice", "es1_and_hot_surface_cautions"),
    ),
    (
        "ES1_DC_LIMIT",
        Reference("practice", "es1_and_hot_surface_cautions"),
    ),
    (
        "HOT_SURFACE_CELSIUS",
        Reference("practice", "es1_and_hot_surface_cautions"),
    ),
    (
        "RATING_MARGIN",
        Reference("practice", "resistor_derating_and_junction_temperature"),
    ),
    (
        "RESISTOR_DERATING",
        Reference("practice", "resistor_derating_and_junction_temperature"),
    ),
    ("Requirements", Api("requirements_pass_and_fail")),
    // frequency response
    (
        "log_frequencies",
        Reference("practice", "sweep_frequencies_are_log_spaced"),
    ),
    (
        "Bandwidth",
        Reference("textbook", "kumar_jain_10_7_high_frequency_ce"),
    ),
    (
        "Response",
        Reference("textbook", "boylestad_nashelsky_low_frequency_corners"),
    ),
    (
        "SEARCH_FROM",
        Api("limits_ideal_capacitors_give_no_lower_corner"),
    ),
    (
        "SEARCH_TO",
        Api("limits_ideal_capacitors_give_no_lower_corner"),
    ),
    // the stage
    ("Parts", Api("topology_parts_that_do_not_belong")),
    ("Stage", Api("topology_common_emitter_needs_rc")),
    ("StageKind", Api("names_parse_back")),
    (
        "DEFAULT_RESISTOR_RATING",
        Reference("practice", "resistor_derating_and_junction_temperature"),
    ),
    ("MAX_SUPPLY", Api("errors_each_bad_part_is_named")),
    (
        "MIN_SUPPLY",
        Api("limits_part_and_device_bounds_name_the_field"),
    ),
    (
        "unusual",
        Unit("stage", "values_far_from_usual_are_flagged"),
    ),
    (
        "USUAL_RANGES",
        Unit("stage", "values_far_from_usual_are_flagged"),
    ),
    (
        "MIN_RESISTANCE",
        Api("limits_part_and_device_bounds_name_the_field"),
    ),
    (
        "MAX_RESISTANCE",
        Api("limits_part_and_device_bounds_name_the_field"),
    ),
    (
        "MIN_CAPACITANCE",
        Api("limits_part_and_device_bounds_name_the_field"),
    ),
    (
        "MAX_CAPACITANCE",
        Api("limits_part_and_device_bounds_name_the_field"),
    ),
    ("MAX_DEPTH", Api("limits_documents_and_monte_carlo")),
    ("MAX_ECHO", Api("limits_documents_and_monte_carlo")),
    ("MAX_NOTES", Api("limits_documents_and_monte_carlo")),
    ("MAX_TITLE", Api("limits_documents_and_monte_carlo")),
    ("MAX_TRIALS", Api("limits_documents_and_monte_carlo")),
    ("utf8_text", Api("limits_documents_and_monte_carlo")),
    (
        "Figure",
        Api("names_every_figure_is_a_number_of_the_report"),
    ),
    (
        "FIGURES",
        Api("names_every_figure_is_a_number_of_the_report"),
    ),
    (
        "field",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    (
        "Family",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    (
        "Field",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    (
        "FieldKind",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    (
        "Group",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    (
        "dc_netlist",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "solve_dc",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "DcSolution",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "Element",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "Netlist",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "Node",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "StageNodes",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "GROUND",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "MAX_UNKNOWNS",
        Reference("textbook", "circuit_engine_meets_the_divider_bias_examples"),
    ),
    (
        "collector_junction",
        Unit(
            "circuit_charges",
            "the_bias_point_capacitances_are_the_small_signal_model_s",
        ),
    ),
    (
        "Charges",
        Unit(
            "circuit_charges",
            "the_bias_point_capacitances_are_the_small_signal_model_s",
        ),
    ),
    (
        "Depletion",
        Unit(
            "circuit_charges",
            "the_charge_is_the_integral_of_the_capacitance",
        ),
    ),
    (
        "FORWARD_COEFFICIENT",
        Unit(
            "circuit_charges",
            "the_charge_is_the_integral_of_the_capacitance",
        ),
    ),
    (
        "periodic_steady_state",
        Unit(
            "circuit_transient",
            "a_long_transient_settles_onto_the_shooting_steady_state",
        ),
    ),
    (
        "periodic_steady_state_from",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "Periodic",
        Unit(
            "large_signal",
            "in_steady_state_no_capacitor_carries_a_mean_current",
        ),
    ),
    (
        "transient",
        Unit(
            "circuit_transient",
            "fixed_steps_converge_to_the_rc_response_at_second_order",
        ),
    ),
    (
        "TransientOptions",
        Unit("circuit_transient", "the_chosen_step_follows_the_tolerance"),
    ),
    (
        "TransientRun",
        Unit("circuit_transient", "the_chosen_step_follows_the_tolerance"),
    ),
    (
        "stage_netlist",
        Unit(
            "circuit_transient",
            "a_long_transient_settles_onto_the_shooting_steady_state",
        ),
    ),
    (
        "SignalNodes",
        Unit(
            "circuit_transient",
            "a_long_transient_settles_onto_the_shooting_steady_state",
        ),
    ),
    (
        "harmonics",
        Unit(
            "large_signal",
            "the_exponential_law_sets_the_harmonics_of_an_undegenerated_stage",
        ),
    ),
    (
        "Harmonic",
        Unit(
            "large_signal",
            "the_exponential_law_sets_the_harmonics_of_an_undegenerated_stage",
        ),
    ),
    (
        "HARMONICS",
        Unit(
            "large_signal",
            "the_exponential_law_sets_the_harmonics_of_an_undegenerated_stage",
        ),
    ),
    (
        "thd",
        Unit(
            "large_signal",
            "halving_the_step_moves_thd_by_under_one_percent_of_itself",
        ),
    ),
    (
        "SAMPLES",
        Unit(
            "large_signal",
            "halving_the_step_moves_thd_by_under_one_percent_of_itself",
        ),
    ),
    (
        "LargeSignal",
        Unit(
            "large_signal",
            "at_small_drive_the_gain_is_the_small_signal_gain",
        ),
    ),
    (
        "Waveform",
        Unit(
            "large_signal",
            "at_small_drive_the_gain_is_the_small_signal_gain",
        ),
    ),
    (
        "Clip",
        Unit(
            "large_signal",
            "with_ideal_coupling_the_clip_levels_are_the_load_line_limits",
        ),
    ),
    (
        "Half",
        Unit(
            "large_signal",
            "with_ideal_coupling_the_clip_levels_are_the_load_line_limits",
        ),
    ),
    (
        "Mechanism",
        Unit(
            "large_signal",
            "with_ideal_coupling_the_clip_levels_are_the_load_line_limits",
        ),
    ),
    (
        "LimitedSwing",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "ThdPoint",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "CURVE_POINTS",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "CURVE_SPAN",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "DEFAULT_MAX_THD",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "DEFAULT_FREQUENCY",
        Unit(
            "large_signal",
            "the_limited_swing_sits_where_the_curve_crosses_the_limit",
        ),
    ),
    (
        "solve_ac",
        Unit(
            "circuit_stages",
            "an_rc_low_pass_is_one_over_one_plus_j_omega_rc",
        ),
    ),
    (
        "AcSolution",
        Unit(
            "circuit_stages",
            "an_rc_low_pass_is_one_over_one_plus_j_omega_rc",
        ),
    ),
    (
        "ac_netlist",
        Unit(
            "circuit_stages",
            "the_example_stages_small_signal_netlists_give_the_stage_network",
        ),
    ),
    (
        "AcNodes",
        Unit(
            "circuit_stages",
            "the_example_stages_small_signal_netlists_give_the_stage_network",
        ),
    ),
    (
        "SpecField",
        Unit(
            "fields",
            "spec_fields_are_the_spec_files_keys_with_the_cores_defaults",
        ),
    ),
    (
        "SPEC_FIELDS",
        Unit(
            "fields",
            "spec_fields_are_the_spec_files_keys_with_the_cores_defaults",
        ),
    ),
    (
        "FIELDS",
        Unit(
            "fields",
            "fields_and_requirements_are_the_design_files_keys",
        ),
    ),
    ("Rating", Api("ratings_table_names_every_rating_check")),
    ("RATINGS", Api("ratings_table_names_every_rating_check")),
    ("Bound", Api("requirements_table_is_the_file_format")),
    ("Requirement", Api("requirements_table_is_the_file_format")),
    ("REQUIREMENTS", Api("requirements_table_is_the_file_format")),
    (
        "Edge",
        Reference("nodal", "no_passband_agrees_with_independent_nodal_solve"),
    ),
    // swing
    (
        "Swing",
        Reference("textbook", "malvino_bates_12_1_to_12_4_ac_load_line"),
    ),
    // the device
    (
        "Currents",
        Reference("device", "ebers_moll_derivatives_match_central_differences"),
    ),
    (
        "Device",
        Reference("device", "ebers_moll_transport_equations"),
    ),
    ("Polarity", Api("mirror_pnp_has_equal_magnitudes_and_gains")),
    (
        "TransistorData",
        Reference("device", "gummel_poon_temperature_laws"),
    ),
    (
        "CJC_BUILT_IN",
        Reference("device", "junction_capacitance_law"),
    ),
    (
        "CJC_GRADING",
        Reference("device", "junction_capacitance_law"),
    ),
    (
        "DEFAULT_BETA_REVERSE",
        Reference("practice", "device_defaults_from_memory"),
    ),
    (
        "DEFAULT_XTB",
        Reference("practice", "device_defaults_from_memory"),
    ),
    (
        "SILICON_EG",
        Reference("device", "gummel_poon_temperature_laws"),
    ),
    (
        "SILICON_XTI",
        Reference("device", "gummel_poon_temperature_laws"),
    ),
    (
        "TEST_VCE",
        Reference(
            "device",
            "saturation_current_is_referred_from_the_datasheet_vbe",
        ),
    ),
    // design file and report (feature "serde")
    ("Design", Format(DESIGN_FILE)),
    ("DesignDocument", Format(DESIGN_FILE)),
    ("PartsDocument", Format(DESIGN_FILE)),
    ("RequirementsDocument", Format(DESIGN_FILE)),
    ("TransistorDocument", Format(DESIGN_FILE)),
    ("TolerancesDocument", Format(DESIGN_FILE)),
    ("Typed", Format(DESIGN_FILE)),
    ("DEFAULT_AMBIENT_CELSIUS", Format(DESIGN_FILE)),
    ("DESIGN_FORMAT", Format(DESIGN_FILE)),
    ("DESIGN_FORMATS", Format(DESIGN_FILE)),
    ("Report", Format(REPORT)),
    ("SweepRow", Format(REPORT)),
    ("SweepTable", Format(REPORT)),
    ("Entries", Format(REPORT)),
    ("TOLERANCE_FORMAT", Format(REPORT)),
    ("REPORT_FORMAT", Format(REPORT)),
    ("SWEEP_FORMAT", Format(REPORT)),
    // specification file (feature "serde")
    ("SpecFile", Format(SPEC_FILE)),
    ("SpecDocument", Format(SPEC_FILE)),
    ("SeriesDocument", Format(SPEC_FILE)),
    ("PinnedPartsDocument", Format(SPEC_FILE)),
    ("BiasDocument", Format(SPEC_FILE)),
    ("BiasPointDocument", Format(SPEC_FILE)),
    ("SPEC_FORMAT", Format(SPEC_FILE)),
    ("DesignResult", Format(SPEC_FILE)),
    ("PartEntry", Format(SPEC_FILE)),
    ("DESIGN_RESULT_FORMAT", Format(SPEC_FILE)),
    ("SPEC_FORMATS", Format(SPEC_FILE)),
];

/// The core's lib.rs as it is now.
const LIB_RS: &str = include_str!("../../core/src/lib.rs");

/// The test files the coverage names, by name.
const TEST_FILES: &[(&str, &str)] = &[
    ("constants", include_str!("constants.rs")),
    ("device", include_str!("device.rs")),
    ("eseries", include_str!("eseries.rs")),
    ("nodal", include_str!("nodal.rs")),
    ("practice", include_str!("practice.rs")),
    ("textbook", include_str!("textbook.rs")),
];

/// The integration binary of the core.
const ENGINE_RS: &str = include_str!("../../core/tests/engine.rs");

/// The core modules whose unit tests cover exported items.
const CORE_MODULES: &[(&str, &str)] = &[
    ("stage", include_str!("../../core/src/stage.rs")),
    ("format", include_str!("../../core/src/format.rs")),
    ("synthesis", include_str!("../../core/src/synthesis/mod.rs")),
    ("tolerance", include_str!("../../core/src/tolerance/mod.rs")),
    ("fields", include_str!("../../core/src/fields.rs")),
    ("design_file", include_str!("../../core/src/design_file.rs")),
    (
        "circuit_stages",
        include_str!("../../core/src/circuit/stages.rs"),
    ),
    (
        "circuit_charges",
        include_str!("../../core/src/circuit/charges.rs"),
    ),
    (
        "circuit_transient",
        include_str!("../../core/src/circuit/transient.rs"),
    ),
    (
        "large_signal",
        include_str!("../../core/src/large_signal.rs"),
    ),
];

/// The names of every `pub use` item of `lib`: `pub use a::{B, c};` and
/// `pub use a::b;` and `pub use a::b as c;`, over any number of lines.
fn exported_names(lib: &str) -> BTreeSet<String> {
    let mut names = BTreeSet::new();
    let mut rest = lib;
    while let Some(at) = rest.find("pub use ") {
        let after = &rest[at + "pub use ".len()..];
        let end = after.find(';').expect("a pub use ends with ';'");
        let path = &after[..end];
        let items = match (path.find('{'), path.rfind('}')) {
            (Some(open), Some(close)) => path[open + 1..close].to_string(),
            _ => path.rsplit("::").next().unwrap_or(path).to_string(),
        };
        for item in items.split(',') {
            let item = item.trim();
            if item.is_empty() {
                continue;
            }
            let name = match item.split_once(" as ") {
                Some((_, alias)) => alias.trim(),
                None => item,
            };
            names.insert(name.to_string());
        }
        rest = &after[end..];
    }
    names
}

/// Whether `source` defines a function `name` (as `fn name(`).
fn defines(source: &str, name: &str) -> bool {
    source.contains(&format!("fn {name}("))
}

#[test]
fn every_public_item_has_a_reference_check() {
    let exported = exported_names(LIB_RS);
    // The parser must see the whole list (the core exported 66 items when
    // this test was written); a broken parser must not pass by seeing none.
    assert!(
        exported.len() >= 60,
        "only {} names parsed from lib.rs: {exported:?}",
        exported.len()
    );
    let listed: BTreeSet<String> = COVERAGE.iter().map(|(n, _)| n.to_string()).collect();
    assert_eq!(listed.len(), COVERAGE.len(), "a name is listed twice");
    let missing: Vec<_> = exported.difference(&listed).collect();
    assert!(
        missing.is_empty(),
        "exported by core/src/lib.rs but with no reference check listed in tests/tests/coverage.rs: {missing:?}"
    );
    let stale: Vec<_> = listed.difference(&exported).collect();
    assert!(
        stale.is_empty(),
        "listed in coverage.rs but no longer exported by lib.rs: {stale:?}"
    );
}

#[test]
fn every_named_test_exists() {
    let mut references = 0;
    for &(name, covered) in COVERAGE {
        match covered {
            Reference(file, test) => {
                let source = TEST_FILES
                    .iter()
                    .find(|(f, _)| *f == file)
                    .unwrap_or_else(|| panic!("{name}: no test file {file}.rs"))
                    .1;
                assert!(
                    defines(source, test),
                    "{name}: tests/tests/{file}.rs has no fn {test}"
                );
                references += 1;
            }
            Api(test) => assert!(
                defines(ENGINE_RS, test),
                "{name}: core/tests/engine.rs has no fn {test}"
            ),
            Format(why) => assert!(!why.is_empty(), "{name}: say why it holds no equation"),
            Unit(module, test) => {
                let source = CORE_MODULES
                    .iter()
                    .find(|(m, _)| *m == module)
                    .unwrap_or_else(|| panic!("{name}: no core module {module}.rs listed"))
                    .1;
                assert!(
                    defines(source, test),
                    "{name}: core/src/{module}.rs has no fn {test}"
                );
            }
        }
    }
    // Most of the core is equations: at least 40 items have an outside
    // reference (46 when this test was written).
    assert!(references >= 40, "only {references} reference checks");
}

#[test]
fn the_parser_reads_every_form_of_pub_use() {
    // The forms lib.rs uses, and the two it might: exact sets, no tolerance.
    let text = "pub use a::{B, c,\n    D};\n#[cfg(x)]\npub use e::f;\npub use g::h as i;";
    let want: BTreeSet<String> = ["B", "c", "D", "f", "i"]
        .iter()
        .map(|s| s.to_string())
        .collect();
    assert_eq!(exported_names(text), want);
}
