//! Quality metrics in mzQC 1.0.0 (HUPO-PSI Quality Control working group, mzQC specification
//! document version 1.0.0, 2021; JSON schema `mzqc_schema.json` of the mzQC repository).
//!
//! [`run_quality`] turns one file's [`FileReport`] (the rows the screening pass already
//! produced: nothing is read or computed from the file a second time) into a [`RunQuality`]:
//! the input file (name, location, format, SHA-256, completion time), this tool as analysis
//! software (MS:1000799 custom unreleased software tool, with version and URI) and the metrics
//! of [`METRICS`] under their PSI-MS QC accessions and units. [`MzQc::new`] wraps runs into a
//! document; [`MzQc::write`] writes it atomically.
//!
//! Our own figures that the CV has no term for (spectra flagged for Cl/Br, halogen and
//! odd-nominal features, unreadable spectra, QC-gate verdicts) are not metrics here: they stay
//! in `batch.tsv` / `check.tsv`; the document's free-text `description` may summarise them.
//!
//! # Examples
//!
//! ```
//! use mzcore::mzml::{Writer, WriterOptions};
//! use mzcore::mzqc::{run_quality, MzQc, RunInput};
//! use mzcore::screen::{screen_reader, ScreenConfig, Sha256Reader};
//! use mzcore::spectrum::{Peaks, SpectrumMeta};
//!
//! let mut w = Writer::new(Vec::new(), WriterOptions { spectrum_count: 2, ..Default::default() })?;
//! for (i, rt) in [1.0, 1.5].into_iter().enumerate() {
//!     let meta = SpectrumMeta { id: format!("scan={}", i + 1), ms_level: 1, rt_min: Some(rt), ..Default::default() };
//!     w.write_spectrum(&meta, &Peaks { mz: vec![100.0, 200.0], intensity: vec![10.0, 20.0] })?;
//! }
//! let doc = w.finish()?;
//! let pool = mzcore::pipeline::thread_pool(1)?;
//! let report = screen_reader(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool)?;
//!
//! let input = RunInput::new("night-01", std::path::Path::new("/data/night-01.mzML"), std::time::SystemTime::UNIX_EPOCH);
//! let run = run_quality(&input, &report);
//! let ms1 = run.quality_metrics.iter().find(|m| m.accession == "MS:4000059").unwrap();
//! assert_eq!(ms1.value, serde_json::json!(2));
//! let text = MzQc::new(vec![run], None, std::time::SystemTime::UNIX_EPOCH).to_json();
//! assert!(text.contains("\"runQualities\""));
//! # Ok::<_, mzcore::Error>(())
//! ```

use std::path::Path;
use std::time::SystemTime;

use serde::{Deserialize, Serialize};
use serde_json::{Value, json};

use crate::error::{Error, ErrorKind, Result};
use crate::screen::{FileReport, SpectrumRow};

/// The mzQC version written.
pub const MZQC_VERSION: &str = "1.0.0";

/// A CV term with an optional value (mzQC `cvParameter`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct CvParameter {
    /// Accession, e.g. `MS:4000059`.
    pub accession: String,
    /// The term's name in its CV.
    pub name: String,
    /// Value, when the term takes one.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub value: Option<Value>,
}

impl CvParameter {
    fn term(accession: &str, name: &str) -> Self {
        CvParameter { accession: accession.into(), name: name.into(), value: None }
    }

    fn with(accession: &str, name: &str, value: Value) -> Self {
        CvParameter { value: Some(value), ..Self::term(accession, name) }
    }
}

/// One metric: a PSI-MS QC term, its value and unit.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct QualityMetric {
    /// Accession of the QC term.
    pub accession: String,
    /// Its name.
    pub name: String,
    /// Value: a number, an array (n-tuple) or an object of columns (table).
    pub value: Value,
    /// Unit, when the term names one.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub unit: Option<CvParameter>,
}

/// An input file of a run (mzQC `inputFile`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "camelCase")]
pub struct InputFile {
    /// File name.
    pub name: String,
    /// Location as a `file://` URI.
    pub location: String,
    /// MS:1000584 mzML format.
    pub file_format: CvParameter,
    /// SHA-256 (MS:1003151) and completion time (MS:1000747).
    pub file_properties: Vec<CvParameter>,
}

/// Software that computed the metrics (mzQC `analysisSoftware`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct AnalysisSoftware {
    /// MS:1000799.
    pub accession: String,
    /// custom unreleased software tool.
    pub name: String,
    /// `mzsift`.
    pub value: String,
    /// Tool version.
    pub version: String,
    /// The project's URI.
    pub uri: String,
}

/// mzQC `metadata` of a run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "camelCase")]
pub struct Metadata {
    /// Unique name of the run (the report folder name).
    pub label: String,
    /// The input file.
    pub input_files: Vec<InputFile>,
    /// This tool.
    pub analysis_software: Vec<AnalysisSoftware>,
}

/// One run's metrics (mzQC `runQuality`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "camelCase")]
pub struct RunQuality {
    /// Input, software and label.
    pub metadata: Metadata,
    /// The metrics.
    pub quality_metrics: Vec<QualityMetric>,
}

/// A controlled vocabulary the document uses.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ControlledVocabulary {
    /// Full name.
    pub name: String,
    /// URI.
    pub uri: String,
    /// Version.
    pub version: String,
}

/// The `mzQC` object.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "camelCase")]
pub struct MzQcBody {
    /// [`MZQC_VERSION`].
    pub version: String,
    /// UTC, `YYYY-MM-DDTHH:MM:SSZ`.
    pub creation_date: String,
    /// Free text.
    #[serde(default, skip_serializing_if = "Option::is_none")]
    pub description: Option<String>,
    /// One per input.
    pub run_qualities: Vec<RunQuality>,
    /// PSI-MS and UO.
    pub controlled_vocabularies: Vec<ControlledVocabulary>,
}

/// An mzQC document.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct MzQc {
    /// The root object.
    #[serde(rename = "mzQC")]
    pub mzqc: MzQcBody,
}

/// What [`run_quality`] needs to know about the input besides its report.
#[derive(Debug, Clone, PartialEq)]
pub struct RunInput {
    /// Unique run name.
    pub label: String,
    /// File name.
    pub name: String,
    /// `file://` URI of the file.
    pub location: String,
    /// When screening of the file completed.
    pub completed: SystemTime,
}

impl RunInput {
    /// The input at `path` (made absolute against the current folder for its URI).
    pub fn new(label: &str, path: &Path, completed: SystemTime) -> Self {
        let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        RunInput { label: label.into(), name, location: file_uri(path), completed }
    }
}

/// A `file://` URI for `path` (absolute; bytes outside the RFC 3986 unreserved set and `/`
/// percent-encoded).
pub fn file_uri(path: &Path) -> String {
    let abs = std::path::absolute(path).unwrap_or_else(|_| path.to_owned());
    let text = abs.to_string_lossy().replace('\\', "/");
    let mut out = String::from("file://");
    if !text.starts_with('/') {
        out.push('/');
    }
    for b in text.bytes() {
        if b.is_ascii_alphanumeric() || b"-._~/".contains(&b) {
            out.push(b as char);
        } else {
            out.push_str(&format!("%{b:02X}"));
        }
    }
    out
}

/// Formats a time as `YYYY-MM-DDTHH:MM:SSZ` (proleptic Gregorian calendar, UTC).
pub fn utc(t: SystemTime) -> String {
    let secs = t.duration_since(std::time::UNIX_EPOCH).map(|d| d.as_secs()).unwrap_or(0);
    let (days, rem) = ((secs / 86_400) as i64, secs % 86_400);
    // Civil-from-days conversion for the Gregorian calendar (era of 400 years).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = doy - (153 * mp + 2) / 5 + 1;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    let year = yoe + era * 400 + i64::from(month <= 2);
    format!(
        "{year:04}-{month:02}-{day:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        (rem / 60) % 60,
        rem % 60
    )
}

/// This tool as mzQC analysis software.
pub fn analysis_software() -> AnalysisSoftware {
    let (acc, name) = crate::mzml::CUSTOM_SOFTWARE;
    AnalysisSoftware {
        accession: acc.into(),
        name: name.into(),
        value: "mzsift".into(),
        version: env!("CARGO_PKG_VERSION").into(),
        uri: env!("CARGO_PKG_REPOSITORY").into(),
    }
}

// Units: names as the PSI-MS QC terms give them in their `has_units` relationships
// (psi-ms.obo 4.1.257); UO terms come from the Unit Ontology.
const COUNT: (&str, &str) = ("UO:0000189", "count unit");
const SECOND: (&str, &str) = ("UO:0000010", "second");
const HERTZ: (&str, &str) = ("UO:0000106", "hertz");
const MZ: (&str, &str) = ("MS:1000040", "m/z");
const INTENSITY: (&str, &str) = ("MS:1000043", "intensity unit");

/// A metric [`run_quality`] may write: accession, name, unit (accession, name), how computed.
pub type MetricDef =
    (&'static str, &'static str, Option<(&'static str, &'static str)>, &'static str);

/// Every metric [`run_quality`] may write: accession, name, unit, and how it is computed.
/// A metric is left out when the file gives no value for it (e.g. MS2 metrics without MS2
/// spectra, frequencies with fewer than two scans).
pub const METRICS: &[MetricDef] = &[
    ("MS:4000059", "number of MS1 spectra", Some(COUNT), "readable MS1 spectra"),
    ("MS:4000060", "number of MS2 spectra", Some(COUNT), "readable MS2-or-higher spectra"),
    (
        "MS:4000070",
        "retention time acquisition range",
        Some(SECOND),
        "first and last scan start time",
    ),
    ("MS:4000069", "m/z acquisition range", Some(MZ), "smallest and largest decoded m/z"),
    ("MS:4000067", "MS run duration", Some(SECOND), "last minus first scan start time"),
    (
        "MS:4000099",
        "number of empty MS1 scans",
        Some(COUNT),
        "MS1 spectra whose decoded intensities sum to 0",
    ),
    (
        "MS:4000100",
        "number of empty MS2 scans",
        Some(COUNT),
        "MS2 spectra whose decoded intensities sum to 0",
    ),
    (
        "MS:4000204",
        "total ion current maximum",
        Some(INTENSITY),
        "largest TIC (sum of decoded intensities) of any spectrum",
    ),
    (
        "MS:4000202",
        "base peak intensity maximum",
        Some(INTENSITY),
        "largest base peak intensity (most intense decoded point) of any spectrum",
    ),
    (
        "MS:4000029",
        "area under TIC in MS1",
        None,
        "trapezoids of the MS1 TIC over scan start time in seconds (intensity x s)",
    ),
    (
        "MS:4000030",
        "area under TIC in MS2",
        None,
        "trapezoids of the MS2 TIC over scan start time in seconds (intensity x s)",
    ),
    (
        "MS:4000211",
        "MS1 total ion current",
        None,
        "table: TIC (MS:1000285) and scan start time in seconds (UO:0000010) of each MS1 spectrum",
    ),
    (
        "MS:4000212",
        "MS2 total ion current",
        None,
        "table: TIC (MS:1000285) and scan start time in seconds (UO:0000010) of each MS2 spectrum",
    ),
    (
        "MS:4000097",
        "MS1 signal jump (10x) count",
        Some(COUNT),
        "consecutive MS1 spectra (in time order) whose TIC rises more than 10-fold",
    ),
    (
        "MS:4000098",
        "MS1 signal fall (10x) count",
        Some(COUNT),
        "consecutive MS1 spectra whose TIC falls more than 10-fold",
    ),
    (
        "MS:4000192",
        "MS1 median cycle time",
        Some(SECOND),
        "median time between consecutive MS1 scans",
    ),
    (
        "MS:4000065",
        "fastest frequency for MS level 1 collection",
        Some(HERTZ),
        "1 / smallest non-zero time between consecutive MS1 scans",
    ),
    (
        "MS:4000095",
        "slowest frequency for MS level 1 collection",
        Some(HERTZ),
        "1 / largest time between consecutive MS1 scans (the largest MS1 scan-time gap)",
    ),
    (
        "MS:4000066",
        "fastest frequency for MS level 2 collection",
        Some(HERTZ),
        "1 / smallest non-zero time between consecutive MS2 scans",
    ),
    (
        "MS:4000096",
        "slowest frequency for MS level 2 collection",
        Some(HERTZ),
        "1 / largest time between consecutive MS2 scans",
    ),
    (
        "MS:4000061",
        "MS1 density quantiles",
        Some(COUNT),
        "quartiles (nearest rank) of the picked peaks per MS1 spectrum",
    ),
    (
        "MS:4000062",
        "MS2 density quantiles",
        Some(COUNT),
        "quartiles (nearest rank) of the picked peaks per MS2 spectrum",
    ),
];

/// Nearest-rank quantile of sorted values.
fn nearest_rank(sorted: &[usize], p: f64) -> usize {
    let k = ((p * sorted.len() as f64).ceil() as usize).clamp(1, sorted.len());
    sorted[k - 1]
}

fn median(sorted: &[f64]) -> Option<f64> {
    let n = sorted.len();
    match n {
        0 => None,
        _ if n % 2 == 1 => Some(sorted[n / 2]),
        _ => Some((sorted[n / 2 - 1] + sorted[n / 2]) / 2.0),
    }
}

/// Seconds, rounded to the nanosecond (minutes to seconds leaves last-digit noise).
fn seconds(min: f64) -> f64 {
    (min * 60.0 * 1e9).round() / 1e9
}

/// Per MS level: (time s, TIC, peaks) of readable spectra, in time order.
fn level_series(rows: &[&SpectrumRow], ms2: bool) -> Vec<(f64, f64, usize)> {
    let mut v: Vec<(f64, f64, usize)> = rows
        .iter()
        .filter(|r| r.ms_level.is_some_and(|l| (l >= 2) == ms2))
        .filter_map(|r| Some((seconds(r.rt_min?), r.intensity_sum?, r.peaks.unwrap_or(0))))
        .collect();
    v.sort_by(|a, b| a.0.total_cmp(&b.0));
    v
}

/// The metrics of [`METRICS`] that `report` gives values for, in that order.
pub fn metrics(report: &FileReport) -> Vec<QualityMetric> {
    let s = &report.summary;
    let rows: Vec<&SpectrumRow> = report.spectra.iter().filter(|r| r.status == "ok").collect();
    let ms1 = level_series(&rows, false);
    let ms2 = level_series(&rows, true);
    let mut values: Vec<(&str, Value)> =
        vec![("MS:4000059", json!(s.ms1)), ("MS:4000060", json!(s.ms2))];
    if let (Some(a), Some(b)) = (s.rt_start_min, s.rt_end_min) {
        values.push(("MS:4000070", json!([seconds(a), seconds(b)])));
    }
    if let Some((lo, hi)) = report.mz_range {
        values.push(("MS:4000069", json!([lo, hi])));
    }
    if let (Some(a), Some(b)) = (s.rt_start_min, s.rt_end_min) {
        values.push(("MS:4000067", json!(seconds(b) - seconds(a))));
    }
    let empty = |ms2: bool| {
        rows.iter()
            .filter(|r| r.ms_level.is_some_and(|l| (l >= 2) == ms2))
            .filter(|r| r.intensity_sum == Some(0.0))
            .count()
    };
    if s.ms1 > 0 {
        values.push(("MS:4000099", json!(empty(false))));
    }
    if s.ms2 > 0 {
        values.push(("MS:4000100", json!(empty(true))));
    }
    let max = |f: fn(&SpectrumRow) -> Option<f64>| {
        rows.iter().filter_map(|r| f(r)).filter(|v| v.is_finite()).reduce(f64::max)
    };
    if let Some(m) = max(|r| r.intensity_sum) {
        values.push(("MS:4000204", json!(m)));
    }
    if let Some(m) = max(|r| r.base_peak_intensity) {
        values.push(("MS:4000202", json!(m)));
    }
    let area = |v: &[(f64, f64, usize)]| {
        v.windows(2).map(|w| (w[1].0 - w[0].0) * (w[0].1 + w[1].1) / 2.0).sum::<f64>()
    };
    if ms1.len() >= 2 {
        values.push(("MS:4000029", json!(area(&ms1))));
    }
    if ms2.len() >= 2 {
        values.push(("MS:4000030", json!(area(&ms2))));
    }
    let table = |v: &[(f64, f64, usize)]| {
        json!({
            "MS:1000285": v.iter().map(|p| p.1).collect::<Vec<_>>(),
            "UO:0000010": v.iter().map(|p| p.0).collect::<Vec<_>>(),
        })
    };
    if !ms1.is_empty() {
        values.push(("MS:4000211", table(&ms1)));
    }
    if !ms2.is_empty() {
        values.push(("MS:4000212", table(&ms2)));
    }
    if ms1.len() >= 2 {
        let jumps = ms1.windows(2).filter(|w| w[0].1 > 0.0 && w[1].1 > 10.0 * w[0].1).count();
        let falls = ms1.windows(2).filter(|w| w[1].1 > 0.0 && w[0].1 > 10.0 * w[1].1).count();
        values.push(("MS:4000097", json!(jumps)));
        values.push(("MS:4000098", json!(falls)));
    }
    let gaps = |v: &[(f64, f64, usize)]| {
        let mut g: Vec<f64> = v.windows(2).map(|w| w[1].0 - w[0].0).collect();
        g.sort_by(f64::total_cmp);
        g
    };
    let (g1, g2) = (gaps(&ms1), gaps(&ms2));
    if let Some(m) = median(&g1) {
        values.push(("MS:4000192", json!(m)));
    }
    for (g, fast, slow) in [(&g1, "MS:4000065", "MS:4000095"), (&g2, "MS:4000066", "MS:4000096")] {
        if let Some(min) = g.iter().copied().find(|x| *x > 0.0) {
            values.push((fast, json!(1.0 / min)));
        }
        if let Some(max) = g.last().copied().filter(|x| *x > 0.0) {
            values.push((slow, json!(1.0 / max)));
        }
    }
    for (v, acc) in [(&ms1, "MS:4000061"), (&ms2, "MS:4000062")] {
        let mut peaks: Vec<usize> = v.iter().map(|p| p.2).collect();
        if peaks.is_empty() {
            continue;
        }
        peaks.sort_unstable();
        let q: Vec<usize> = [0.25, 0.5, 0.75].iter().map(|&p| nearest_rank(&peaks, p)).collect();
        values.push((acc, json!(q)));
    }
    METRICS
        .iter()
        .filter_map(|(acc, name, unit, _)| {
            let value = values.iter().find(|(a, _)| a == acc)?.1.clone();
            Some(QualityMetric {
                accession: (*acc).into(),
                name: (*name).into(),
                value,
                unit: unit.map(|(a, n)| CvParameter::term(a, n)),
            })
        })
        .collect()
}

/// The `runQuality` of one screened file.
pub fn run_quality(input: &RunInput, report: &FileReport) -> RunQuality {
    let (fmt_acc, fmt_name) = crate::mzml::MZML_FORMAT;
    let (sha_acc, sha_name) = crate::mzml::SHA256;
    let mut properties = Vec::new();
    if !report.summary.sha256.is_empty() {
        properties.push(CvParameter::with(sha_acc, sha_name, json!(report.summary.sha256)));
    }
    properties.push(CvParameter::with(
        "MS:1000747",
        "completion time",
        json!(utc(input.completed)),
    ));
    RunQuality {
        metadata: Metadata {
            label: input.label.clone(),
            input_files: vec![InputFile {
                name: input.name.clone(),
                location: input.location.clone(),
                file_format: CvParameter::term(fmt_acc, fmt_name),
                file_properties: properties,
            }],
            analysis_software: vec![analysis_software()],
        },
        quality_metrics: metrics(report),
    }
}

impl MzQc {
    /// A document of `runs` (input file names that repeat are replaced by their location, so
    /// that every name is unique as the format requires).
    pub fn new(
        mut runs: Vec<RunQuality>,
        description: Option<String>,
        created: SystemTime,
    ) -> Self {
        let mut seen = std::collections::HashMap::<String, usize>::new();
        for r in &runs {
            for f in &r.metadata.input_files {
                *seen.entry(f.name.clone()).or_default() += 1;
            }
        }
        for r in &mut runs {
            for f in &mut r.metadata.input_files {
                if seen[&f.name] > 1 {
                    f.name = f.location.clone();
                }
            }
        }
        MzQc {
            mzqc: MzQcBody {
                version: MZQC_VERSION.into(),
                creation_date: utc(created),
                description,
                run_qualities: runs,
                controlled_vocabularies: vec![
                    ControlledVocabulary {
                        name: "Proteomics Standards Initiative Mass Spectrometry Ontology".into(),
                        uri:
                            "https://raw.githubusercontent.com/HUPO-PSI/psi-ms-CV/master/psi-ms.obo"
                                .into(),
                        version: "4.1.257".into(),
                    },
                    ControlledVocabulary {
                        name: "Unit Ontology".into(),
                        uri: "http://purl.obolibrary.org/obo/uo.obo".into(),
                        version: "releases/2020-03-10".into(),
                    },
                ],
            },
        }
    }

    /// Pretty JSON text.
    pub fn to_json(&self) -> String {
        serde_json::to_string_pretty(self).expect("an mzQC document always serializes")
    }

    /// Parses a document written by [`MzQc::write`].
    pub fn from_json(text: &str) -> Result<Self> {
        serde_json::from_str(text).map_err(|e| Error::new(ErrorKind::Config(format!("mzQC: {e}"))))
    }

    /// Writes the document to `path` atomically. A document without runs is not valid mzQC
    /// (`runQualities` needs at least one): nothing is written then, and `false` returned.
    pub fn write(&self, path: &Path) -> Result<bool> {
        if self.mzqc.run_qualities.is_empty() {
            return Ok(false);
        }
        crate::report::write_json_atomic(path, self)?;
        Ok(true)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mzml::{Writer, WriterOptions};
    use crate::screen::{ScreenConfig, Sha256Reader, screen_reader};
    use crate::spectrum::{Peaks, Representation, SpectrumMeta};

    fn value(run: &RunQuality, acc: &str) -> Option<Value> {
        run.quality_metrics.iter().find(|m| m.accession == acc).map(|m| m.value.clone())
    }

    /// Four MS1 scans (TIC 30, 400, 20, 0) at 1.0, 1.5, 2.5, 3.0 min and two MS2 scans; the
    /// expected metrics are worked out by hand from the definitions in psi-ms.obo 4.1.257.
    #[test]
    fn metrics_of_a_small_run_match_hand_computed_values() {
        let scans: [(u8, f64, f64); 6] = [
            (1, 1.0, 30.0),
            (2, 1.25, 5.0),
            (1, 1.5, 400.0),
            (1, 2.5, 20.0),
            (2, 2.75, 7.0),
            (1, 3.0, 0.0),
        ];
        let mut w =
            Writer::new(Vec::new(), WriterOptions { spectrum_count: 6, ..Default::default() })
                .unwrap();
        for (i, (level, rt, tic)) in scans.iter().enumerate() {
            let meta = SpectrumMeta {
                id: format!("scan={}", i + 1),
                ms_level: *level,
                rt_min: Some(*rt),
                representation: Representation::Centroid,
                ..Default::default()
            };
            let peaks = Peaks { mz: vec![100.0, 150.0], intensity: vec![tic / 2.0, tic / 2.0] };
            w.write_spectrum(&meta, &peaks).unwrap();
        }
        let doc = w.finish().unwrap();
        let pool = crate::pipeline::thread_pool(1).unwrap();
        let report =
            screen_reader(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool).unwrap();
        let input = RunInput::new("r1", Path::new("/data/a b.mzML"), std::time::UNIX_EPOCH);
        let run = run_quality(&input, &report);
        assert_eq!(value(&run, "MS:4000059"), Some(json!(4)));
        assert_eq!(value(&run, "MS:4000060"), Some(json!(2)));
        assert_eq!(value(&run, "MS:4000070"), Some(json!([60.0, 180.0])));
        assert_eq!(value(&run, "MS:4000069"), Some(json!([100.0, 150.0])));
        assert_eq!(value(&run, "MS:4000067"), Some(json!(120.0)));
        assert_eq!(value(&run, "MS:4000099"), Some(json!(1)));
        assert_eq!(value(&run, "MS:4000100"), Some(json!(0)));
        assert_eq!(value(&run, "MS:4000204"), Some(json!(400.0)));
        assert_eq!(value(&run, "MS:4000202"), Some(json!(200.0)));
        // Trapezoids over seconds: 30 s x (30+400)/2 + 60 s x (400+20)/2 + 30 s x (20+0)/2.
        assert_eq!(value(&run, "MS:4000029"), Some(json!(6450.0 + 12600.0 + 300.0)));
        assert_eq!(value(&run, "MS:4000030"), Some(json!(90.0 * 6.0)));
        // 30 -> 400 is a jump of more than 10-fold; 400 -> 20 a fall of more than 10-fold;
        // 20 -> 0 is not counted (no ratio).
        assert_eq!(value(&run, "MS:4000097"), Some(json!(1)));
        assert_eq!(value(&run, "MS:4000098"), Some(json!(1)));
        // MS1 gaps 30, 60, 30 s.
        assert_eq!(value(&run, "MS:4000192"), Some(json!(30.0)));
        assert_eq!(value(&run, "MS:4000065"), Some(json!(1.0 / 30.0)));
        assert_eq!(value(&run, "MS:4000095"), Some(json!(1.0 / 60.0)));
        assert_eq!(value(&run, "MS:4000066"), Some(json!(1.0 / 90.0)));
        assert_eq!(
            value(&run, "MS:4000211"),
            Some(
                json!({"MS:1000285": [30.0, 400.0, 20.0, 0.0], "UO:0000010": [60.0, 90.0, 150.0, 180.0]})
            )
        );
        let f = &run.metadata.input_files[0];
        assert_eq!((f.name.as_str(), f.location.as_str()), ("a b.mzML", "file:///data/a%20b.mzML"));
        assert_eq!(f.file_properties.last().unwrap().value, Some(json!("1970-01-01T00:00:00Z")));
        // Every metric written is listed in METRICS with its unit.
        for m in &run.quality_metrics {
            let def = METRICS.iter().find(|d| d.0 == m.accession).unwrap();
            assert_eq!(def.1, m.name);
            assert_eq!(def.2.map(|u| u.0.to_owned()), m.unit.as_ref().map(|u| u.accession.clone()));
        }
    }

    #[test]
    fn repeated_file_names_are_replaced_by_their_location_and_empty_documents_are_not_written() {
        let pool = crate::pipeline::thread_pool(1).unwrap();
        let mut w = Writer::new(Vec::new(), WriterOptions::default()).unwrap();
        let meta = SpectrumMeta { id: "scan=1".into(), ms_level: 1, ..Default::default() };
        w.write_spectrum(&meta, &Peaks { mz: vec![100.0], intensity: vec![1.0] }).unwrap();
        let doc = w.finish().unwrap();
        let report = |sha: &str| {
            let mut r = screen_reader(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool)
                .unwrap();
            r.summary.sha256 = sha.into();
            r
        };
        let t = std::time::UNIX_EPOCH;
        let a = run_quality(&RunInput::new("x", Path::new("/a/n.mzML"), t), &report("aa"));
        let b = run_quality(&RunInput::new("x-2", Path::new("/b/n.mzML"), t), &report("bb"));
        let doc = MzQc::new(vec![a, b], None, t);
        let names: Vec<&str> = doc
            .mzqc
            .run_qualities
            .iter()
            .map(|r| r.metadata.input_files[0].name.as_str())
            .collect();
        assert_eq!(names, ["file:///a/n.mzML", "file:///b/n.mzML"]);
        assert_eq!(MzQc::from_json(&doc.to_json()).unwrap(), doc);
        let dir = tempfile::tempdir().unwrap();
        let p = dir.path().join("x.mzQC");
        assert!(!MzQc::new(Vec::new(), None, t).write(&p).unwrap());
        assert!(!p.exists());
    }
}
