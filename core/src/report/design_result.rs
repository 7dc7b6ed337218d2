//! A specification designed, as one document: [`DesignResult`], the output
//! of `stagewright design SPEC --json` (format [`DESIGN_RESULT_FORMAT`])
//! and of the page's "from requirements" view.

use alloc::string::String;
use alloc::vec::Vec;

use serde::Serialize;

use super::Report;
use crate::design_file::DesignDocument;
use crate::document::DESIGN_RESULT_FORMAT;
use crate::error::Result;
use crate::spec_file::SpecFile;
use crate::synthesis::{synthesize, Difference, PartChoice, Synthesis, Target};

/// One part of a [`DesignResult`]: how it was chosen.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct PartEntry {
    /// The design-file name: `r1`, `c_in`, ...
    pub part: &'static str,
    /// The continuous value, Ω or F.
    pub ideal: f64,
    /// The value chosen, Ω or F.
    pub chosen: f64,
    /// True when the user pinned it.
    pub pinned: bool,
    /// The series it was taken from (`"E24"`), `None` when pinned.
    pub series: Option<&'static str>,
    /// `chosen/ideal − 1`.
    pub change: f64,
}

impl From<&PartChoice> for PartEntry {
    fn from(p: &PartChoice) -> PartEntry {
        PartEntry {
            part: p.part,
            ideal: p.ideal,
            chosen: p.chosen,
            pinned: p.pinned,
            series: p.series.map(|s| s.name()),
            change: p.change,
        }
    }
}

/// A specification designed: the ideal target, each part ideal and
/// snapped, the results before and after snapping, the design file and its
/// report. Serialized, it is the document of `stagewright design SPEC
/// --json` (format [`DESIGN_RESULT_FORMAT`]); the page shows the same.
#[derive(Debug, Clone, Serialize)]
pub struct DesignResult {
    /// [`DESIGN_RESULT_FORMAT`].
    pub format: &'static str,
    /// True when the standard-value design passes every check of its report.
    pub pass: bool,
    /// The ideal continuous solution.
    pub target: Target,
    /// Each part: continuous value, chosen value, series.
    pub parts: Vec<PartEntry>,
    /// Each result before and after snapping.
    pub differences: Vec<Difference>,
    /// Decisions worth knowing, as sentences.
    pub notes: Vec<String>,
    /// The design file of the standard-value design ([`SpecFile::design`]).
    pub design: DesignDocument,
    /// Its report, as `stagewright analyze` gives it.
    pub report: Report,
}

impl SpecFile {
    /// Designs this specification ([`synthesize`]) and gathers the result:
    /// the one function behind `stagewright design --json` and the page.
    ///
    /// # Errors
    /// What [`synthesize`] reports: for a valid file, a specification that
    /// cannot be met, naming the requirement and the shortfall.
    pub fn design_result(&self) -> Result<(DesignResult, Synthesis)> {
        let synthesis = synthesize(&self.spec)?;
        let design = self.design(&synthesis);
        let report = Report::new(&design, &synthesis.analysis);
        let result = DesignResult {
            format: DESIGN_RESULT_FORMAT,
            pass: report.passed(),
            target: synthesis.target,
            parts: synthesis.parts.iter().map(PartEntry::from).collect(),
            differences: synthesis.differences.clone(),
            notes: synthesis.notes.clone(),
            design: design.to_document(),
            report,
        };
        Ok((result, synthesis))
    }
}
