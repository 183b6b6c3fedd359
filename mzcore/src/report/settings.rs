//! The `[report]` table of the configuration: what the run writes besides the TSV tables.

use serde::{Deserialize, Serialize};

/// Settings of the reports (`[report]` of the configuration).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct ReportSettings {
    /// Write `OUTDIR/report.html` at the end of `mzsift run` (see [`crate::html`]).
    pub html: bool,
}

impl Default for ReportSettings {
    fn default() -> Self {
        ReportSettings { html: true }
    }
}
