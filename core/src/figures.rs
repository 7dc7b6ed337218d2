//! The one table of the figures a report shows: where each sits in the
//! report's JSON, its name, its symbol and its unit.
//!
//! Every place that names a figure reads it here: the readable report's
//! rows, the requirements (each reads one figure), the tolerance
//! analysis' results ([`crate::Quantity`]) and the checks' messages. A
//! symbol is written as its letter and its subscript, `("I", "C")` for IC,
//! so that text can show `IC` and a page `I` with a subscript `C`.

/// One figure of the report.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Figure {
    /// Where it sits in the report's JSON, as a dotted path:
    /// `operating_point.ic`.
    pub key: &'static str,
    /// Its name, complete enough to stand alone: "collector current".
    pub label: &'static str,
    /// Its name in its section of the readable report, where the heading
    /// says the rest ("base" under "Operating point"); empty when it is
    /// the label.
    pub row: &'static str,
    /// Its symbol, letter and subscript: `("I", "C")`; empty when it has
    /// none.
    pub symbol: (&'static str, &'static str),
    /// The unit symbol of its value (empty for a plain ratio).
    pub unit: &'static str,
}

impl Figure {
    /// The name a readable report's row shows.
    pub fn row_label(&self) -> &'static str {
        if self.row.is_empty() {
            self.label
        } else {
            self.row
        }
    }
}

const fn f(
    key: &'static str,
    label: &'static str,
    row: &'static str,
    symbol: (&'static str, &'static str),
    unit: &'static str,
) -> Figure {
    Figure {
        key,
        label,
        row,
        symbol,
        unit,
    }
}

/// No symbol.
const NONE: (&str, &str) = ("", "");

/// `operating_point.ic`.
pub const OP_IC: Figure = f(
    "operating_point.ic",
    "collector current",
    "",
    ("I", "C"),
    "A",
);
/// `operating_point.ib`.
pub const OP_IB: Figure = f("operating_point.ib", "base current", "", ("I", "B"), "A");
/// `operating_point.ie`.
pub const OP_IE: Figure = f("operating_point.ie", "emitter current", "", ("I", "E"), "A");
/// `operating_point.vce`.
pub const OP_VCE: Figure = f(
    "operating_point.vce",
    "collector–emitter voltage",
    "",
    ("V", "CE"),
    "V",
);
/// `operating_point.vbe`.
pub const OP_VBE: Figure = f(
    "operating_point.vbe",
    "base–emitter voltage",
    "",
    ("V", "BE"),
    "V",
);
/// `operating_point.vb`.
pub const OP_VB: Figure = f(
    "operating_point.vb",
    "base voltage",
    "base",
    ("V", "B"),
    "V",
);
/// `operating_point.ve`.
pub const OP_VE: Figure = f(
    "operating_point.ve",
    "emitter voltage",
    "emitter",
    ("V", "E"),
    "V",
);
/// `operating_point.vc`.
pub const OP_VC: Figure = f(
    "operating_point.vc",
    "collector voltage",
    "collector",
    ("V", "C"),
    "V",
);
/// `small_signal.gm`.
pub const SS_GM: Figure = f("small_signal.gm", "transconductance", "", ("g", "m"), "S");
/// `small_signal.r_pi`.
pub const SS_R_PI: Figure = f("small_signal.r_pi", "input resistance", "", ("r", "π"), "Ω");
/// `small_signal.r_o`.
pub const SS_R_O: Figure = f("small_signal.r_o", "output resistance", "", ("r", "o"), "Ω");
/// `small_signal.c_pi`.
pub const SS_C_PI: Figure = f(
    "small_signal.c_pi",
    "base–emitter capacitance",
    "",
    ("C", "π"),
    "F",
);
/// `small_signal.c_mu`.
pub const SS_C_MU: Figure = f(
    "small_signal.c_mu",
    "base–collector capacitance",
    "",
    ("C", "μ"),
    "F",
);
/// `small_signal.beta0`.
pub const SS_BETA0: Figure = f(
    "small_signal.beta0",
    "small-signal current gain",
    "current gain",
    ("β", "0"),
    "",
);
/// `midband.voltage_gain`.
pub const MID_VOLTAGE_GAIN: Figure = f("midband.voltage_gain", "voltage gain", "", ("A", "v"), "");
/// `midband.voltage_gain_from_source`.
pub const MID_VOLTAGE_GAIN_FROM_SOURCE: Figure = f(
    "midband.voltage_gain_from_source",
    "voltage gain from source",
    "",
    ("A", "vs"),
    "",
);
/// `midband.current_gain`.
pub const MID_CURRENT_GAIN: Figure = f("midband.current_gain", "current gain", "", ("A", "i"), "");
/// `midband.power_gain_db`.
pub const MID_POWER_GAIN_DB: Figure =
    f("midband.power_gain_db", "power gain", "", ("A", "p"), "dB");
/// `midband.input_impedance`.
pub const MID_INPUT_IMPEDANCE: Figure = f(
    "midband.input_impedance",
    "input impedance",
    "",
    ("Z", "in"),
    "Ω",
);
/// `midband.output_impedance`.
pub const MID_OUTPUT_IMPEDANCE: Figure = f(
    "midband.output_impedance",
    "output impedance",
    "",
    ("Z", "out"),
    "Ω",
);
/// `bandwidth.f_low`.
pub const BW_F_LOW: Figure = f("bandwidth.f_low", "lower corner", "", ("f", "L"), "Hz");
/// `bandwidth.f_high`.
pub const BW_F_HIGH: Figure = f("bandwidth.f_high", "upper corner", "", ("f", "H"), "Hz");
/// `bandwidth.f_unity_current_gain`.
pub const BW_F_UNITY_CURRENT_GAIN: Figure = f(
    "bandwidth.f_unity_current_gain",
    "unity current gain",
    "",
    NONE,
    "Hz",
);
/// `bandwidth.f_unity_power_gain`.
pub const BW_F_UNITY_POWER_GAIN: Figure = f(
    "bandwidth.f_unity_power_gain",
    "unity power gain",
    "",
    NONE,
    "Hz",
);
/// `swing.positive`.
pub const SWING_POSITIVE: Figure = f(
    "swing.positive",
    "positive output swing (peak)",
    "positive",
    NONE,
    "V",
);
/// `swing.negative`.
pub const SWING_NEGATIVE: Figure = f(
    "swing.negative",
    "negative output swing (peak)",
    "negative",
    NONE,
    "V",
);
/// `swing.symmetric`.
pub const SWING_SYMMETRIC: Figure = f(
    "swing.symmetric",
    "symmetric output swing (peak)",
    "symmetric",
    NONE,
    "V",
);
/// `swing.centred_swing`.
pub const SWING_CENTRED_SWING: Figure = f(
    "swing.centred_swing",
    "swing at the centred quiescent point",
    "centred Q would give",
    NONE,
    "V",
);
/// `dissipation.transistor`.
pub const DISS_TRANSISTOR: Figure = f(
    "dissipation.transistor",
    "transistor dissipation",
    "transistor",
    NONE,
    "W",
);
/// `dissipation.ptot_available`.
pub const DISS_PTOT_AVAILABLE: Figure = f(
    "dissipation.ptot_available",
    "dissipation rating at this ambient",
    "",
    ("P", "tot"),
    "W",
);
/// `dissipation.junction_temperature`.
pub const DISS_JUNCTION_TEMPERATURE: Figure = f(
    "dissipation.junction_temperature",
    "junction temperature",
    "",
    ("T", "j"),
    "°C",
);
/// `dissipation.supply_current`.
pub const DISS_SUPPLY_CURRENT: Figure = f(
    "dissipation.supply_current",
    "supply current",
    "",
    NONE,
    "A",
);

/// Every figure, in the order of the report.
pub const FIGURES: &[Figure] = &[
    OP_IC,
    OP_IB,
    OP_IE,
    OP_VCE,
    OP_VBE,
    OP_VB,
    OP_VE,
    OP_VC,
    SS_GM,
    SS_R_PI,
    SS_R_O,
    SS_C_PI,
    SS_C_MU,
    SS_BETA0,
    MID_VOLTAGE_GAIN,
    MID_VOLTAGE_GAIN_FROM_SOURCE,
    MID_CURRENT_GAIN,
    MID_POWER_GAIN_DB,
    MID_INPUT_IMPEDANCE,
    MID_OUTPUT_IMPEDANCE,
    BW_F_LOW,
    BW_F_HIGH,
    BW_F_UNITY_CURRENT_GAIN,
    BW_F_UNITY_POWER_GAIN,
    SWING_POSITIVE,
    SWING_NEGATIVE,
    SWING_SYMMETRIC,
    SWING_CENTRED_SWING,
    DISS_TRANSISTOR,
    DISS_PTOT_AVAILABLE,
    DISS_JUNCTION_TEMPERATURE,
    DISS_SUPPLY_CURRENT,
];

/// `large_signal.at_required_swing.thd`: the THD at the output peak of
/// the `max_thd` requirement. It is not in [`FIGURES`], the small-signal
/// report's table: the large-signal section is written by the command
/// line's `analyze`, from [`crate::LargeSignal`].
pub const LS_THD: Figure = f(
    "large_signal.at_required_swing.thd",
    "THD at the required swing",
    "",
    NONE,
    "",
);

/// A result of the analysis that the tolerance analysis follows.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
#[cfg_attr(feature = "serde", derive(serde::Serialize))]
#[cfg_attr(feature = "serde", serde(rename_all = "snake_case"))]
pub enum Quantity {
    /// Collector current, A.
    Ic,
    /// |VCE|, V.
    Vce,
    /// |midband terminal voltage gain|, V/V.
    VoltageGain,
    /// Midband input impedance, Ω.
    InputImpedance,
    /// Midband output impedance, Ω.
    OutputImpedance,
    /// Symmetric peak swing at the load, V.
    Swing,
    /// Lower −3 dB corner of the gain from the source, Hz.
    FLow,
    /// Upper −3 dB corner of the gain from the source, Hz.
    FHigh,
    /// Junction temperature at the quiescent point, °C.
    JunctionTemperature,
    /// Current drawn from the supply, A.
    SupplyCurrent,
    /// Total harmonic distortion at the load (a share) at the output peak
    /// and frequency of the `max_thd` requirement, from the periodic
    /// steady state ([`crate::LargeSignal::at_output`]). It is followed
    /// only when that requirement is set (NaN otherwise).
    Thd,
}

impl Quantity {
    /// Every quantity, in report order.
    pub const ALL: [Quantity; 11] = [
        Quantity::Ic,
        Quantity::Vce,
        Quantity::VoltageGain,
        Quantity::InputImpedance,
        Quantity::OutputImpedance,
        Quantity::Swing,
        Quantity::FLow,
        Quantity::FHigh,
        Quantity::JunctionTemperature,
        Quantity::SupplyCurrent,
        Quantity::Thd,
    ];

    /// The report key: `ic`, `vce`, `voltage_gain`, ...
    pub fn name(self) -> &'static str {
        match self {
            Quantity::Ic => "ic",
            Quantity::Vce => "vce",
            Quantity::VoltageGain => "voltage_gain",
            Quantity::InputImpedance => "input_impedance",
            Quantity::OutputImpedance => "output_impedance",
            Quantity::Swing => "swing",
            Quantity::FLow => "f_low",
            Quantity::FHigh => "f_high",
            Quantity::JunctionTemperature => "junction_temperature",
            Quantity::SupplyCurrent => "supply_current",
            Quantity::Thd => "thd",
        }
    }

    /// The figure of the report it is (its label and symbol): the
    /// voltage gain is the magnitude of `midband.voltage_gain`, |VCE| that
    /// of `operating_point.vce`.
    pub fn figure(self) -> &'static Figure {
        match self {
            Quantity::Ic => &OP_IC,
            Quantity::Vce => &OP_VCE,
            Quantity::VoltageGain => &MID_VOLTAGE_GAIN,
            Quantity::InputImpedance => &MID_INPUT_IMPEDANCE,
            Quantity::OutputImpedance => &MID_OUTPUT_IMPEDANCE,
            Quantity::Swing => &SWING_SYMMETRIC,
            Quantity::FLow => &BW_F_LOW,
            Quantity::FHigh => &BW_F_HIGH,
            Quantity::JunctionTemperature => &DISS_JUNCTION_TEMPERATURE,
            Quantity::SupplyCurrent => &DISS_SUPPLY_CURRENT,
            Quantity::Thd => &LS_THD,
        }
    }

    /// The unit symbol of the values (empty for the gain in V/V).
    pub fn unit(self) -> &'static str {
        self.figure().unit
    }

    pub(crate) fn index(self) -> usize {
        self as usize
    }
}

#[cfg(test)]
mod tests {
    use super::FIGURES;

    #[test]
    fn keys_are_unique_and_name_report_sections() {
        for (i, a) in FIGURES.iter().enumerate() {
            assert!(a.key.contains('.'), "{} is a dotted path", a.key);
            assert!(!a.label.is_empty());
            for b in &FIGURES[i + 1..] {
                assert_ne!(a.key, b.key);
            }
        }
    }
}
