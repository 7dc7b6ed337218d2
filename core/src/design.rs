//! The validated design: a stage, what it must meet and the spread its
//! tolerance analysis uses, with its title and notes. Every value is in SI
//! units and checked; the design file (`design_file`) reads and writes it,
//! the specification's synthesis makes it, and the analyses and the
//! report work on it.

use alloc::string::String;
use alloc::vec::Vec;

use crate::analysis::{analyze, Analysis};
use crate::error::Result;
use crate::ratings::Check;
use crate::requirements::Requirements;
use crate::stage::Stage;
use crate::tolerance::Tolerances;

/// A validated design: the stage, its requirements, and its title and notes.
///
/// Every value is checked ([`Stage::validate`] passed) and in SI units.
#[derive(Debug, Clone, PartialEq)]
pub struct Design {
    /// The title (empty when none).
    pub title: String,
    /// Free notes (empty when none).
    pub notes: String,
    /// The preset the transistor started from, when one was named.
    pub preset: Option<String>,
    /// The stage.
    pub stage: Stage,
    /// What it must meet.
    pub requirements: Requirements,
    /// The spread the tolerance analysis uses, when the file gives a
    /// `tolerances` block (checked against the stage).
    pub tolerances: Option<Tolerances>,
}

impl Design {
    /// Analyses the stage with every option on ([`analyze`]).
    ///
    /// # Errors
    /// When the operating point cannot be solved or the small-signal
    /// network is singular.
    pub fn analyze(&self) -> Result<Analysis> {
        analyze(&self.stage)
    }

    /// Every check of the design: the ratings checks of the analysis
    /// (always run) followed by the requirements that are set.
    pub fn checks(&self, analysis: &Analysis) -> Vec<Check> {
        let mut out = analysis.ratings.clone();
        out.extend(self.requirements.check(&self.stage, analysis));
        out
    }
}
