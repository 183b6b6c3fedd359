//! The `[report]` table of the configuration: what the run writes besides the TSV tables.

use serde::{Deserialize, Serialize};

/// Settings of the reports (`[report]` of the configuration).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct ReportSettings {
    /// Write `OUTDIR/report.html` at the end of `mzsift run` (see [`crate::html`]).
    pub html: bool,
    /// Digits of numbers: `measured` (per kind of quantity, see the README) or `full`
    /// (shortest round-trip digits).
    pub precision: crate::report::digits::Precision,
}

impl Default for ReportSettings {
    fn default() -> Self {
        ReportSettings { html: true, precision: Default::default() }
    }
}
