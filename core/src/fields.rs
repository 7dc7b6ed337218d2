//! The one table of the design file's fields: where each sits in the
//! file, its name, the unit its value is read in, what kind of entry it
//! is and, for a part, the standard series its values come from.
//!
//! The page builds its design form from this table (the wasm layer's
//! `fields()`), so that no second list of fields, labels or units exists.
//! The requirements block is not repeated here: its fields are the
//! [`REQUIREMENTS`](crate::REQUIREMENTS) table's. A unit test holds the
//! two tables together equal to the design-file reader's keys.

/// What kind of entry a field is.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum FieldKind {
    /// A value read with its unit: `4k7`, `100 nF`, `12`.
    Value,
    /// One line of text, at most this many characters.
    Text(usize),
    /// Several lines of text, at most this many characters.
    Notes(usize),
    /// One of a fixed list of names: the stage, the polarity, the preset.
    Choice,
}

/// The standard series a part's values come from.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Family {
    /// Resistors (E24 by default).
    Resistor,
    /// Capacitors (E6 by default).
    Capacitor,
}

/// The block of the design file a field belongs to, as the form groups
/// them.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Group {
    /// The top level: title, notes, stage, supply, ambient.
    Stage,
    /// The `transistor` block.
    Transistor,
    /// The `parts` block.
    Parts,
    /// The `tolerances` block.
    Tolerances,
}

impl Group {
    /// The group's short name: `stage`, `transistor`, `parts`, `tolerances`.
    pub fn id(self) -> &'static str {
        match self {
            Group::Stage => "stage",
            Group::Transistor => "transistor",
            Group::Parts => "parts",
            Group::Tolerances => "tolerances",
        }
    }

    /// The group's heading: "Stage and supply".
    pub fn legend(self) -> &'static str {
        match self {
            Group::Stage => "Stage and supply",
            Group::Transistor => "Transistor",
            Group::Parts => "Parts",
            Group::Tolerances => "Tolerances",
        }
    }
}

/// One field of the design file.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct Field {
    /// Where it sits in the file, as a dotted path: `parts.rc`, `supply`.
    pub key: &'static str,
    /// What it is, in words: "collector resistor".
    pub label: &'static str,
    /// The unit its value is read in (empty for a ratio or text); a share
    /// (`"5 %"` or `0.05`) is `%`.
    pub unit: &'static str,
    /// The kind of entry.
    pub kind: FieldKind,
    /// The standard series of a part, else `None`.
    pub family: Option<Family>,
    /// The block it belongs to.
    pub group: Group,
}

impl Field {
    /// The last part of the key: `rc` for `parts.rc`.
    pub fn name(&self) -> &'static str {
        self.key.rsplit('.').next().unwrap_or(self.key)
    }
}

const fn v(key: &'static str, label: &'static str, unit: &'static str, group: Group) -> Field {
    Field {
        key,
        label,
        unit,
        kind: FieldKind::Value,
        family: None,
        group,
    }
}

const fn part(key: &'static str, label: &'static str, family: Family) -> Field {
    Field {
        key,
        label,
        unit: match family {
            Family::Resistor => "Ω",
            Family::Capacitor => "F",
        },
        kind: FieldKind::Value,
        family: Some(family),
        group: Group::Parts,
    }
}

const fn words(key: &'static str, label: &'static str, kind: FieldKind) -> Field {
    Field {
        key,
        label,
        unit: "",
        kind,
        family: None,
        group: Group::Stage,
    }
}

const fn choice(key: &'static str, label: &'static str, group: Group) -> Field {
    Field {
        key,
        label,
        unit: "",
        kind: FieldKind::Choice,
        family: None,
        group,
    }
}

use Family::{Capacitor, Resistor};
use Group::{Parts, Stage, Tolerances, Transistor};

/// Every field of the design file but the requirements, in the order of
/// the file and of the form.
pub const FIELDS: &[Field] = &[
    words(
        "title",
        "title of this design",
        FieldKind::Text(crate::document::MAX_TITLE),
    ),
    words(
        "notes",
        "notes for reviewers",
        FieldKind::Notes(crate::document::MAX_NOTES),
    ),
    choice("stage", "configuration", Stage),
    v("supply", "supply voltage", "V", Stage),
    v("ambient", "ambient temperature", "°C", Stage),
    choice("transistor.preset", "device class", Transistor),
    choice("transistor.polarity", "polarity", Transistor),
    v("transistor.hfe", "typical current gain", "", Transistor),
    v("transistor.hfe_min", "lowest current gain", "", Transistor),
    v("transistor.hfe_max", "highest current gain", "", Transistor),
    v("transistor.vbe", "base-emitter voltage", "V", Transistor),
    v(
        "transistor.vbe_at_ic",
        "collector current of that vbe",
        "A",
        Transistor,
    ),
    v("transistor.early_voltage", "Early voltage", "V", Transistor),
    v("transistor.ft", "transition frequency", "Hz", Transistor),
    v("transistor.cob", "output capacitance", "F", Transistor),
    v(
        "transistor.cob_vcb",
        "collector-base voltage of that cob",
        "V",
        Transistor,
    ),
    v(
        "transistor.rbb",
        "base spreading resistance",
        "Ω",
        Transistor,
    ),
    v("transistor.vce_sat", "saturation voltage", "V", Transistor),
    v(
        "transistor.vceo_max",
        "collector-emitter rating",
        "V",
        Transistor,
    ),
    v(
        "transistor.ic_max",
        "collector current rating",
        "A",
        Transistor,
    ),
    v("transistor.ptot_max", "dissipation rating", "W", Transistor),
    v(
        "transistor.rth_ja",
        "thermal resistance, junction to air",
        "K/W",
        Transistor,
    ),
    v(
        "transistor.tj_max",
        "junction temperature rating",
        "°C",
        Transistor,
    ),
    part("parts.r1", "bias, supply to base", Resistor),
    part("parts.r2", "bias, base to ground", Resistor),
    part("parts.rc", "collector resistor", Resistor),
    part("parts.re", "emitter resistor, unbypassed", Resistor),
    part("parts.re_bypassed", "emitter resistor, bypassed", Resistor),
    part("parts.rs", "source resistance", Resistor),
    part("parts.rl", "load resistance", Resistor),
    part("parts.c_in", "input coupling capacitor", Capacitor),
    part("parts.c_out", "output coupling capacitor", Capacitor),
    part("parts.c_emitter", "emitter bypass capacitor", Capacitor),
    part("parts.c_base", "base decoupling capacitor", Capacitor),
    v("parts.resistor_rating", "resistor power rating", "W", Parts),
    v(
        "tolerances.resistor_tolerance",
        "resistors, ±",
        "%",
        Tolerances,
    ),
    v(
        "tolerances.capacitor_tolerance",
        "capacitors, ±",
        "%",
        Tolerances,
    ),
    v("tolerances.supply_tolerance", "supply, ±", "%", Tolerances),
    v("tolerances.vbe_spread", "VBE, ±", "V", Tolerances),
    v("tolerances.ambient_min", "ambient from", "°C", Tolerances),
    v("tolerances.ambient_max", "ambient to", "°C", Tolerances),
];

/// The fields of the specification file (`stagewright-spec/1`) that its
/// form shows, with the default each takes when left out (as the form
/// writes it; empty when the file must give it). The requirements are the
/// [`REQUIREMENTS`](crate::REQUIREMENTS) table's; the `bias` and the
/// pinned `parts` are composite entries the form builds itself. A unit
/// test holds every key here to the specification reader's keys.
pub const SPEC_FIELDS: &[SpecField] = &[
    SpecField::new(
        "title",
        "title",
        "",
        FieldKind::Text(crate::document::MAX_TITLE),
        "",
    ),
    SpecField::new("stage", "stage", "", FieldKind::Choice, ""),
    SpecField::new("transistor.preset", "transistor", "", FieldKind::Choice, ""),
    SpecField::new("transistor.polarity", "polarity", "", FieldKind::Choice, ""),
    SpecField::new("supply", "supply", "V", FieldKind::Value, ""),
    SpecField::new("ambient", "ambient", "°C", FieldKind::Value, "25"),
    SpecField::new("rs", "source resistance", "Ω", FieldKind::Value, ""),
    SpecField::new("rl", "load resistance", "Ω", FieldKind::Value, ""),
    SpecField::new(
        "resistor_rating",
        "resistor rating",
        "W",
        FieldKind::Value,
        "0.25",
    ),
    SpecField::new(
        "saturation_reserve",
        "saturation reserve",
        "V",
        FieldKind::Value,
        "0.5",
    ),
    SpecField::new(
        "stiffness",
        "stiffness k, RTH = k·hFE(min)·RE",
        "",
        FieldKind::Value,
        "0.1",
    ),
    SpecField::new(
        "emitter_fraction",
        "emitter fraction, the share of the supply across RE",
        "",
        FieldKind::Value,
        "0.1",
    ),
    SpecField::new(
        "series.resistors",
        "resistor series",
        "",
        FieldKind::Choice,
        "E24",
    ),
    SpecField::new(
        "series.capacitors",
        "capacitor series",
        "",
        FieldKind::Choice,
        "E12",
    ),
];

/// One field of the specification file, for its form.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct SpecField {
    /// Where it sits in the file, as a dotted path: `rs`, `series.resistors`.
    pub key: &'static str,
    /// What it is, in words.
    pub label: &'static str,
    /// The unit its value is read in (empty for a ratio or a choice).
    pub unit: &'static str,
    /// The kind of entry.
    pub kind: FieldKind,
    /// The value it takes when the file leaves it out, as the form writes
    /// it (empty when the file must give it, or has no default).
    pub default: &'static str,
}

impl SpecField {
    const fn new(
        key: &'static str,
        label: &'static str,
        unit: &'static str,
        kind: FieldKind,
        default: &'static str,
    ) -> SpecField {
        SpecField {
            key,
            label,
            unit,
            kind,
            default,
        }
    }
}

/// The field at `key` (a dotted path), if the table has it.
pub fn field(key: &str) -> Option<&'static Field> {
    FIELDS.iter().find(|f| f.key == key)
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::design_file::DESIGN_SCHEMA;
    use crate::requirements::REQUIREMENTS;
    use crate::stage::StageKind;

    #[test]
    fn fields_and_requirements_are_the_design_files_keys() {
        // The form's table and the requirements table together name every
        // key the reader accepts (less the format and the block names), in
        // the reader's order within each block, and nothing else.
        let mut table: alloc::vec::Vec<alloc::string::String> =
            FIELDS.iter().map(|f| f.key.into()).collect();
        table.extend(
            REQUIREMENTS
                .iter()
                .map(|r| alloc::format!("requirements.{}", r.key)),
        );
        table.extend(
            crate::requirements::CONDITIONS
                .iter()
                .map(|c| alloc::format!("requirements.{}", c.key)),
        );
        let blocks = [
            "format",
            "transistor",
            "parts",
            "requirements",
            "tolerances",
        ];
        let mut reader: alloc::vec::Vec<alloc::string::String> = DESIGN_SCHEMA
            .keys
            .iter()
            .flat_map(|k| k.iter())
            .filter(|k| !blocks.contains(k))
            .map(|k| (*k).into())
            .collect();
        let mut sorted_table = table.clone();
        sorted_table.sort();
        reader.sort();
        assert_eq!(sorted_table, reader);
        for f in FIELDS {
            assert!(!f.label.is_empty(), "{}", f.key);
            let standard = f.group == Group::Parts && (f.unit == "Ω" || f.unit == "F");
            assert_eq!(f.family.is_some(), standard, "{}", f.key);
        }
    }

    #[test]
    fn spec_fields_are_the_spec_files_keys_with_the_cores_defaults() {
        use crate::synthesis::{
            Series, DEFAULT_EMITTER_FRACTION, DEFAULT_SATURATION_RESERVE, DEFAULT_STIFFNESS,
        };
        let reader: alloc::vec::Vec<&str> = crate::spec_file::SPEC_SCHEMA
            .keys
            .iter()
            .flat_map(|k| k.iter().copied())
            .collect();
        for f in SPEC_FIELDS {
            assert!(
                reader.contains(&f.key),
                "{} is a key of the specification",
                f.key
            );
        }
        // Each default is the core's own, as the form writes it.
        let default = |key: &str| {
            SPEC_FIELDS
                .iter()
                .find(|f| f.key == key)
                .expect(key)
                .default
        };
        let num = |key: &str| default(key).parse::<f64>().expect(key);
        assert_eq!(num("saturation_reserve"), DEFAULT_SATURATION_RESERVE);
        assert_eq!(num("stiffness"), DEFAULT_STIFFNESS);
        assert_eq!(num("emitter_fraction"), DEFAULT_EMITTER_FRACTION);
        assert_eq!(
            num("resistor_rating"),
            crate::stage::DEFAULT_RESISTOR_RATING
        );
        assert_eq!(num("ambient"), crate::document::DEFAULT_AMBIENT_CELSIUS);
        assert_eq!(
            default("series.resistors"),
            Series::default().resistors.name()
        );
        assert_eq!(
            default("series.capacitors"),
            Series::default().capacitors.name()
        );
    }

    #[test]
    fn each_stages_parts_are_parts_of_the_file() {
        for s in StageKind::ALL {
            for p in s.parts() {
                let f = field(&alloc::format!("parts.{p}")).expect("a part of the file");
                assert!(f.family.is_some(), "{p} is a standard part");
            }
            assert_eq!(StageKind::parse(s.name()).expect("its own name"), s);
        }
        // The common emitter bypasses its emitter, the common base its base.
        assert!(StageKind::CommonEmitter.parts().contains(&"c_emitter"));
        assert!(!StageKind::CommonCollector.parts().contains(&"c_emitter"));
        assert!(StageKind::CommonBase.parts().contains(&"c_base"));
    }
}
