//! The batch view's TSV tables: `batch_compounds.tsv` (wide), `detections.tsv` (long) and
//! `rt_drift.tsv` (the drift fits).

use std::io::Write;

use serde::Serialize;

use super::{BatchView, Detection, SampleKind};
use crate::error::Result;
use crate::flag::OddNominal;
use crate::report::{escape_text, write_tsv};

/// The columns of `batch_compounds.tsv` before the one column per file.
pub const COMPOUND_FIXED_COLUMNS: &[&str] = &[
    "batch_compound",
    "neutral_mass",
    "rt_min",
    "polarity",
    "n_cl",
    "n_br",
    "halogen",
    "odd_nominal",
    "files_detected",
    "in_blank",
    "blank_max",
    "above_blank",
];

/// The columns of `detections.tsv`.
pub const DETECTION_COLUMNS: &[&str] = &[
    "batch_compound",
    "file",
    "sample",
    "kind",
    "detected",
    "filled",
    "area",
    "apex_intensity",
    "rt_min",
    "mz_error_ppm",
    "compound",
    "blank_ratio",
    "replicates",
    "replicate_rsd_percent",
    "carry_over",
];

/// The columns of `rt_drift.tsv`.
pub const DRIFT_COLUMNS: &[&str] = &[
    "file",
    "polarity",
    "ionization",
    "resolution",
    "anchors",
    "median_shift_min",
    "median_abs_residual_min",
    "max_abs_residual_min",
];

/// `x` rounded to `digits` decimals (so that tables compare equal across runs whatever the
/// order of floating-point sums).
fn round(x: f64, digits: i32) -> f64 {
    let p = 10f64.powi(digits);
    let r = (x * p).round() / p;
    if r == 0.0 { 0.0 } else { r }
}

fn cell(x: Option<f64>, digits: i32) -> String {
    x.filter(|v| v.is_finite()).map(|v| round(v, digits).to_string()).unwrap_or_default()
}

fn odd_word(o: OddNominal) -> &'static str {
    match o {
        OddNominal::True => "true",
        OddNominal::False => "false",
        OddNominal::Undecided => "undecided",
    }
}

#[derive(Serialize)]
struct DetectionRow {
    batch_compound: usize,
    file: String,
    sample: String,
    kind: SampleKind,
    detected: bool,
    filled: Option<bool>,
    area: Option<f64>,
    apex_intensity: Option<f64>,
    rt_min: Option<f64>,
    mz_error_ppm: Option<f64>,
    compound: Option<usize>,
    blank_ratio: Option<f64>,
    replicates: String,
    replicate_rsd_percent: Option<f64>,
    carry_over: bool,
}

#[derive(Serialize)]
struct DriftRow<'a> {
    file: String,
    polarity: &'a str,
    ionization: &'a str,
    resolution: &'a str,
    anchors: usize,
    median_shift_min: f64,
    median_abs_residual_min: f64,
    max_abs_residual_min: f64,
}

impl BatchView {
    /// Writes `batch_compounds.tsv`: one row per aligned compound, the columns of
    /// [`COMPOUND_FIXED_COLUMNS`] then one area column per file (named by its report folder,
    /// in acquisition order; empty when absent after gap filling or of another class).
    pub fn write_compounds(&self, out: &mut dyn Write) -> Result<()> {
        let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
        let mut header: Vec<String> = COMPOUND_FIXED_COLUMNS.iter().map(|s| (*s).into()).collect();
        header.extend(self.files.iter().map(|f| escape_text(&f.name)));
        w.write_record(&header).map_err(csv_error)?;
        for (r, c) in self.compounds.iter().enumerate() {
            let mut rec = vec![
                c.batch_compound.to_string(),
                cell(c.neutral_mass, 6),
                cell(Some(c.rt_min), 4),
                c.class.polarity.clone(),
                c.n_cl.to_string(),
                c.n_br.to_string(),
                c.halogen.to_string(),
                odd_word(c.odd_nominal).into(),
                c.files_detected.to_string(),
                c.in_blank.to_string(),
                cell(c.blank_max, 3),
                c.above_blank.to_string(),
            ];
            rec.extend((0..self.files.len()).map(|f| cell(Some(self.matrix[[f, r]]), 3)));
            w.write_record(&rec).map_err(csv_error)?;
        }
        w.flush()?;
        Ok(())
    }

    /// Writes `detections.tsv` ([`DETECTION_COLUMNS`]), one row per aligned compound and file
    /// of its class.
    pub fn write_detections(&self, out: &mut dyn Write) -> Result<()> {
        let rows: Vec<DetectionRow> = self.detections.iter().map(detection_row).collect();
        write_tsv(out, DETECTION_COLUMNS, &rows)
    }

    /// Writes `rt_drift.tsv` ([`DRIFT_COLUMNS`]): each file's drift fit per class.
    pub fn write_drift(&self, out: &mut dyn Write) -> Result<()> {
        let rows: Vec<DriftRow<'_>> = self
            .drift
            .iter()
            .map(|d| DriftRow {
                file: escape_text(&d.file),
                polarity: &d.class.polarity,
                ionization: &d.class.ionization,
                resolution: &d.class.resolution,
                anchors: d.fit.anchors,
                median_shift_min: round(d.fit.median_shift_min, 4),
                median_abs_residual_min: round(d.fit.median_abs_residual_min, 4),
                max_abs_residual_min: round(d.fit.max_abs_residual_min, 4),
            })
            .collect();
        write_tsv(out, DRIFT_COLUMNS, &rows)
    }
}

fn detection_row(d: &Detection) -> DetectionRow {
    let r = |x: Option<f64>, digits| x.filter(|v| v.is_finite()).map(|v| round(v, digits));
    DetectionRow {
        batch_compound: d.batch_compound,
        file: escape_text(&d.file),
        sample: escape_text(&d.sample),
        kind: d.kind,
        detected: d.detected,
        filled: d.filled,
        area: r(d.area, 3),
        apex_intensity: r(d.apex_intensity, 3),
        rt_min: r(d.rt_min, 4),
        mz_error_ppm: r(d.mz_error_ppm, 3),
        compound: d.compound,
        blank_ratio: r(d.blank_ratio, 3),
        replicates: format!("{}/{}", d.replicates_detected, d.replicate_injections),
        replicate_rsd_percent: r(d.replicate_rsd_percent, 2),
        carry_over: d.carry_over,
    }
}

fn csv_error(e: csv::Error) -> crate::Error {
    use crate::error::{Error, ErrorKind};
    match e.into_kind() {
        csv::ErrorKind::Io(io) => Error::new(ErrorKind::Io(io)),
        other => Error::new(ErrorKind::Config(format!("TSV writer: {other:?}"))),
    }
}
