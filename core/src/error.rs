//! The one error type of the crate.
//!
//! Every error names the field it is about (as the design file spells it,
//! for example `rc` or `transistor.hfe_min`), the value that was given and
//! what is allowed, so that a message can be shown to the user as it is.

use alloc::string::{String, ToString};
use core::fmt;

use crate::format::format_si;

/// An error from reading, validating or solving a stage.
///
/// Messages are lower case, name the field, the value and the fix, e.g.
/// `rc must be greater than 0 Ω, got -1 Ω`.
#[derive(Debug, Clone, PartialEq)]
pub struct Error {
    field: String,
    kind: ErrorKind,
}

/// What went wrong.
#[derive(Debug, Clone, PartialEq)]
#[non_exhaustive]
pub enum ErrorKind {
    /// Text that could not be read as a value.
    Parse {
        /// The text as typed.
        text: String,
        /// A short description of what would have been accepted.
        expected: &'static str,
    },
    /// A number outside the range the model or the physics allows.
    OutOfRange {
        /// The value given, in SI base units.
        value: f64,
        /// The unit symbol of `value` (empty for a plain number).
        unit: &'static str,
        /// What is allowed, as a phrase: "greater than 0 Ω".
        allowed: String,
    },
    /// A required value was not given.
    Missing {
        /// What the value is for, as a phrase.
        purpose: &'static str,
    },
    /// A part or key that makes no sense for the chosen stage.
    NotApplicable {
        /// The stage that was chosen.
        stage: &'static str,
        /// Why the part does not belong there.
        reason: &'static str,
    },
    /// A key that the format does not know.
    UnknownKey {
        /// The nearest known key, when one is close.
        suggestion: Option<&'static str>,
    },
    /// A word (stage name, preset, format version) that is not one of the choices.
    Unsupported {
        /// The word as given.
        value: String,
        /// The choices, as a phrase.
        allowed: String,
    },
    /// The operating point could not be found.
    NoConvergence {
        /// Newton iterations spent.
        iterations: u32,
        /// Largest KCL residual left, in volts of loop error.
        residual: f64,
    },
    /// Values that are individually valid but inconsistent with each other.
    Inconsistent {
        /// What is wrong and how to fix it.
        reason: String,
    },
    /// A document whose structure the format refuses: a key given twice,
    /// an empty key, nesting too deep, text too long.
    Document {
        /// What is wrong and how to fix it.
        reason: String,
    },
}

impl Error {
    /// A new error about `field`.
    pub fn new(field: impl Into<String>, kind: ErrorKind) -> Self {
        Error {
            field: field.into(),
            kind,
        }
    }

    /// `field` must satisfy `allowed`, but `value` (in `unit`) was given.
    pub fn out_of_range(
        field: impl Into<String>,
        value: f64,
        unit: &'static str,
        allowed: impl Into<String>,
    ) -> Self {
        Error::new(
            field,
            ErrorKind::OutOfRange {
                value,
                unit,
                allowed: allowed.into(),
            },
        )
    }

    /// `field` is required for `purpose`.
    pub fn missing(field: impl Into<String>, purpose: &'static str) -> Self {
        Error::new(field, ErrorKind::Missing { purpose })
    }

    /// Values that conflict; `reason` says how.
    pub fn inconsistent(field: impl Into<String>, reason: impl Into<String>) -> Self {
        Error::new(
            field,
            ErrorKind::Inconsistent {
                reason: reason.into(),
            },
        )
    }

    /// The field (or dotted path of fields) the error is about.
    pub fn field(&self) -> &str {
        &self.field
    }

    /// What went wrong.
    pub fn kind(&self) -> &ErrorKind {
        &self.kind
    }

    /// The same error, with `prefix.` put in front of the field name
    /// (used when a nested block is read: `hfe` becomes `transistor.hfe`).
    pub fn within(mut self, prefix: &str) -> Self {
        if !prefix.is_empty() {
            let mut f = String::with_capacity(prefix.len() + 1 + self.field.len());
            f.push_str(prefix);
            if !self.field.is_empty() {
                f.push('.');
                f.push_str(&self.field);
            }
            self.field = f;
        }
        self
    }
}

/// Longest text echoed back in a message, in characters; longer text is
/// cut with "…" (a message quotes what was typed, not a whole file).
pub const MAX_ECHO: usize = 40;

/// Writes `text` cut to [`MAX_ECHO`] characters, with "…" when longer.
fn echo(f: &mut fmt::Formatter<'_>, text: &str) -> fmt::Result {
    match text.char_indices().nth(MAX_ECHO) {
        Some((end, _)) => {
            f.write_str(&text[..end])?;
            f.write_str("…")
        }
        None => f.write_str(text),
    }
}

fn show_value(f: &mut fmt::Formatter<'_>, value: f64, unit: &str) -> fmt::Result {
    if !value.is_finite() {
        return write!(f, "{value}");
    }
    if unit.is_empty() {
        write!(f, "{value}")
    } else {
        f.write_str(&format_si(value, unit))
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        // A field is a dotted path of known keys, or (for an unknown key)
        // what was typed, cut by the reader; cut here too, so that no
        // message grows with its input.
        let mut cut = String::new();
        let field = if self.field.is_empty() {
            "input"
        } else if self.field.chars().count() > 4 * MAX_ECHO {
            cut.extend(self.field.chars().take(4 * MAX_ECHO));
            cut.push('…');
            &cut
        } else {
            &self.field
        };
        match &self.kind {
            ErrorKind::Parse { text, expected } => {
                write!(f, "{field}: cannot read \"")?;
                echo(f, text)?;
                write!(f, "\" as a value; expected {expected}")
            }
            ErrorKind::OutOfRange {
                value,
                unit,
                allowed,
            } => {
                write!(f, "{field} must be {allowed}, got ")?;
                show_value(f, *value, unit)
            }
            ErrorKind::Missing { purpose } => write!(f, "{field} is required: {purpose}"),
            ErrorKind::NotApplicable { stage, reason } => {
                write!(f, "{field} does not belong in a {stage} stage: {reason}")
            }
            ErrorKind::UnknownKey { suggestion } => match suggestion {
                Some(s) => write!(f, "unknown key \"{field}\"; did you mean \"{s}\"?"),
                None => write!(f, "unknown key \"{field}\""),
            },
            ErrorKind::Unsupported { value, allowed } => {
                write!(f, "{field}: \"")?;
                echo(f, value)?;
                write!(f, "\" is not understood; allowed: {allowed}")
            }
            ErrorKind::NoConvergence {
                iterations,
                residual,
            } => match field {
                "steady state" | "transient" => write!(
                    f,
                    "{field}: the time-domain solve did not converge after {iterations} Newton \
                     iterations; try a smaller amplitude or another frequency (a drive that \
                     slams the transistor between cutoff and deep saturation can defeat it)"
                ),
                _ => write!(
                    f,
                    "{field}: the operating point did not converge after {iterations} iterations \
                     (residual {residual:.3e} V); check that the bias network can turn the transistor on"
                ),
            },
            ErrorKind::Inconsistent { reason } | ErrorKind::Document { reason } => {
                write!(f, "{field}: {reason}")
            }
        }
    }
}

#[cfg(feature = "std")]
impl std::error::Error for Error {}

/// Shorthand for results of this crate.
pub type Result<T> = core::result::Result<T, Error>;

/// Checks that `value` is finite and strictly positive.
pub(crate) fn positive(field: &str, value: f64, unit: &'static str) -> Result<f64> {
    if value.is_finite() && value > 0.0 {
        Ok(value)
    } else {
        Err(Error::out_of_range(
            field,
            value,
            unit,
            ["a finite value greater than 0 ", unit].concat(),
        ))
    }
}

/// Checks that `value` is finite and not negative.
pub(crate) fn non_negative(field: &str, value: f64, unit: &'static str) -> Result<f64> {
    if value.is_finite() && value >= 0.0 {
        Ok(value)
    } else {
        Err(Error::out_of_range(
            field,
            value,
            unit,
            ["a finite value of 0 ", unit, " or more"].concat(),
        ))
    }
}

/// Checks that `lo <= value <= hi`.
pub(crate) fn within(field: &str, value: f64, lo: f64, hi: f64, unit: &'static str) -> Result<f64> {
    if value.is_finite() && value >= lo && value <= hi {
        Ok(value)
    } else {
        let mut allowed = String::from("between ");
        allowed.push_str(&format_si(lo, unit));
        allowed.push_str(" and ");
        allowed.push_str(&format_si(hi, unit));
        Err(Error::out_of_range(field, value, unit, allowed))
    }
}

impl From<Error> for String {
    fn from(e: Error) -> String {
        e.to_string()
    }
}
