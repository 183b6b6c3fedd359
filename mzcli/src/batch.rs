//! What `run`, `merge` and `check` share: finding inputs and naming their report folders,
//! the completion record of a report folder, and the batch files `batch.tsv` and `run.json`.

use std::collections::HashSet;
use std::path::{Path, PathBuf};
use std::time::{SystemTime, UNIX_EPOCH};

use anyhow::Context;
use mzcore::report;
use mzcore::screen::{FileStatus, FileSummary, ScreenConfig};
use serde::{Deserialize, Serialize};

/// One input and the name of its report folder.
#[derive(Debug, Clone)]
pub struct Input {
    /// The path as given or found.
    pub path: PathBuf,
    /// Report folder name: the path relative to its input root without the extension, made
    /// unique with `-2`, `-3`, ...
    pub name: String,
}

/// The files of a per-input report folder besides the completion record.
pub const REPORT_FILES: [&str; 6] =
    ["spectra.tsv", "ions.tsv", "features.tsv", "compounds.tsv", "traces.tsv", "cluster.tsv"];

/// The completion record kept in each report folder.
#[derive(Serialize, Deserialize, PartialEq, Debug, Clone)]
pub struct Completion {
    /// Version of the tool that wrote the folder.
    pub tool_version: String,
    /// Input size, bytes.
    pub input_bytes: u64,
    /// Input modification time, nanoseconds since the UNIX epoch.
    pub input_mtime_ns: u128,
    /// The configuration in force, as TOML.
    pub config: String,
    /// The file's summary.
    pub summary: FileSummary,
}

/// Name of the completion record inside a report folder.
pub const COMPLETION_FILE: &str = "complete.json";

/// What happened to one input, for `batch.tsv` and `run.json`.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// The input path as given or found.
    pub path: String,
    /// Its report folder name.
    pub name: String,
    /// How it fared.
    pub status: FileStatus,
    /// First error (escaped text).
    pub error: String,
    /// Summary, when the file was screened.
    pub summary: Option<FileSummary>,
    /// Wall time spent on it.
    pub seconds: f64,
    /// Modification time, seconds since the UNIX epoch.
    pub mtime_unix: Option<u64>,
}

/// `run.json`.
#[derive(Serialize, Deserialize, Debug, Clone)]
pub struct RunRecord {
    /// `mzsift`.
    pub tool: String,
    /// Tool version.
    pub version: String,
    /// Start, UTC.
    pub started_utc: String,
    /// End, UTC.
    pub finished_utc: String,
    /// Wall time of the run.
    pub seconds: f64,
    /// Worker threads.
    pub threads: usize,
    /// Every parameter in force.
    pub config: ScreenConfig,
    /// Every input.
    pub inputs: Vec<InputRecord>,
    /// Screening hints, not identifications.
    pub caution: String,
    /// The runs a merged record was made from (merge only).
    #[serde(default, skip_serializing_if = "Vec::is_empty")]
    pub merged_from: Vec<MergedRun>,
}

/// One input in `run.json`.
#[derive(Serialize, Deserialize, Debug, Clone)]
pub struct InputRecord {
    /// Path as given or found.
    pub path: String,
    /// Report folder name.
    pub report_folder: String,
    /// How it fared.
    pub status: FileStatus,
    /// Size, bytes.
    pub bytes: Option<u64>,
    /// Modification time, seconds since the UNIX epoch.
    pub mtime_unix: Option<u64>,
    /// SHA-256 of the bytes as stored.
    pub sha256: Option<String>,
    /// Wall time spent on it.
    pub seconds: f64,
    /// First error (escaped text).
    pub error: String,
}

/// A run that went into a merged record.
#[derive(Serialize, Deserialize, Debug, Clone)]
pub struct MergedRun {
    /// The run's output folder, as given to `merge`.
    pub folder: String,
    /// Its tool version.
    pub version: String,
    /// Its start, UTC.
    pub started_utc: String,
    /// Its end, UTC.
    pub finished_utc: String,
    /// Its worker threads.
    pub threads: usize,
    /// Its parameters.
    pub config: ScreenConfig,
}

/// One row of `batch.tsv`.
#[derive(Serialize)]
struct BatchRow<'a> {
    file: String,
    status: &'a str,
    error: String,
    spectra: Option<usize>,
    ms1: Option<usize>,
    ms2: Option<usize>,
    rt_start_min: Option<f64>,
    rt_end_min: Option<f64>,
    flagged_spectra: Option<usize>,
    halogen_features: Option<usize>,
    odd_nominal_features: Option<usize>,
    halogen_compounds: Option<usize>,
    odd_nominal_compounds: Option<usize>,
    unreadable_spectra: Option<usize>,
    seconds: f64,
}

const BATCH_COLUMNS: &[&str] = &[
    "file",
    "status",
    "error",
    "spectra",
    "ms1",
    "ms2",
    "rt_start_min",
    "rt_end_min",
    "flagged_spectra",
    "halogen_features",
    "odd_nominal_features",
    "halogen_compounds",
    "odd_nominal_compounds",
    "unreadable_spectra",
    "seconds",
];

/// True for `.mzML` and `.mzML.gz` names, in any case.
pub fn is_mzml(name: &str) -> bool {
    let lower = name.to_ascii_lowercase();
    lower.ends_with(".mzml") || lower.ends_with(".mzml.gz")
}

/// `rel` without `.mzML` / `.mzML.gz`.
pub fn strip_extension(rel: &str) -> String {
    let lower = rel.to_ascii_lowercase();
    for ext in [".mzml.gz", ".mzml"] {
        if lower.ends_with(ext) {
            return rel[..rel.len() - ext.len()].to_owned();
        }
    }
    rel.to_owned()
}

fn walk(dir: &Path, root: &Path, out: &mut Vec<(PathBuf, String)>) -> std::io::Result<()> {
    let mut entries: Vec<_> = std::fs::read_dir(dir)?.collect::<Result<_, _>>()?;
    entries.sort_by_key(|e| e.file_name());
    for e in entries {
        let name = e.file_name().to_string_lossy().into_owned();
        if name.starts_with('.') {
            continue;
        }
        let path = e.path();
        if e.file_type()?.is_dir() {
            walk(&path, root, out)?;
        } else if is_mzml(&name) {
            let rel = path.strip_prefix(root).unwrap_or(&path).to_string_lossy().replace('\\', "/");
            out.push((path, rel));
        }
    }
    Ok(())
}

/// `base`, or `base-2`, `base-3`, ... whichever is not in `used` yet (then added to it).
pub fn unique_name(used: &mut HashSet<String>, base: &str) -> String {
    let base = if base.is_empty() { "input" } else { base };
    let mut name = base.to_owned();
    let mut k = 2;
    while !used.insert(name.clone()) {
        name = format!("{base}-{k}");
        k += 1;
    }
    name
}

/// Lists the inputs (folders searched recursively, in name order) with unique report-folder
/// names.
pub fn discover(inputs: &[PathBuf]) -> anyhow::Result<Vec<Input>> {
    let mut found = Vec::new();
    for input in inputs {
        if input.is_dir() {
            walk(input, input, &mut found).with_context(|| input.display().to_string())?;
        } else {
            let rel =
                input.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
            found.push((input.clone(), rel));
        }
    }
    let mut used = HashSet::new();
    Ok(found
        .into_iter()
        .map(|(path, rel)| Input { path, name: unique_name(&mut used, &strip_extension(&rel)) })
        .collect())
}

/// Modification time as (seconds, nanoseconds) since the UNIX epoch.
pub fn mtime(path: &Path) -> Option<(u64, u128)> {
    let t = std::fs::metadata(path).ok()?.modified().ok()?.duration_since(UNIX_EPOCH).ok()?;
    Some((t.as_secs(), t.as_nanos()))
}

/// Formats a UNIX time as `YYYY-MM-DDTHH:MM:SSZ` (proleptic Gregorian calendar, UTC).
pub fn utc(t: SystemTime) -> String {
    let secs = t.duration_since(UNIX_EPOCH).map(|d| d.as_secs()).unwrap_or(0);
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

/// Removes `batch.tsv` and `run.json` of an earlier run from `out`, so that an interrupted
/// run or merge never leaves batch files that look like its own.
pub fn remove_stale_batch_files(out: &Path) -> anyhow::Result<()> {
    for stale in ["batch.tsv", "run.json"] {
        let p = out.join(stale);
        if p.exists() {
            std::fs::remove_file(&p).with_context(|| p.display().to_string())?;
        }
    }
    Ok(())
}

/// Writes `out/batch.tsv` (atomically), one row per outcome in the order given.
pub fn write_batch(out: &Path, outcomes: &[Outcome]) -> anyhow::Result<()> {
    let rows: Vec<BatchRow<'_>> = outcomes
        .iter()
        .map(|o| {
            let s = o.summary.as_ref();
            BatchRow {
                file: report::escape_text(&o.path),
                status: o.status.name(),
                error: o.error.clone(),
                spectra: s.map(|s| s.spectra),
                ms1: s.map(|s| s.ms1),
                ms2: s.map(|s| s.ms2),
                rt_start_min: s.and_then(|s| s.rt_start_min),
                rt_end_min: s.and_then(|s| s.rt_end_min),
                flagged_spectra: s.map(|s| s.flagged_spectra),
                halogen_features: s.map(|s| s.halogen_features),
                odd_nominal_features: s.map(|s| s.odd_nominal_features),
                halogen_compounds: s.map(|s| s.halogen_compounds),
                odd_nominal_compounds: s.map(|s| s.odd_nominal_compounds),
                unreadable_spectra: s.map(|s| s.unreadable.len()),
                seconds: (o.seconds * 1000.0).round() / 1000.0,
            }
        })
        .collect();
    report::write_atomic(&out.join("batch.tsv"), |w| report::write_tsv(w, BATCH_COLUMNS, &rows))?;
    Ok(())
}

/// The `run.json` inputs of `outcomes`.
pub fn input_records(outcomes: &[Outcome]) -> Vec<InputRecord> {
    outcomes
        .iter()
        .map(|o| InputRecord {
            path: o.path.clone(),
            report_folder: o.name.clone(),
            status: o.status,
            bytes: o.summary.as_ref().map(|s| s.bytes),
            mtime_unix: o.mtime_unix,
            sha256: o.summary.as_ref().map(|s| s.sha256.clone()),
            seconds: o.seconds,
            error: o.error.clone(),
        })
        .collect()
}

/// Writes `out/run.json` atomically.
pub fn write_run_record(out: &Path, record: &RunRecord) -> anyhow::Result<()> {
    report::write_json_atomic(&out.join("run.json"), record)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn utc_formats_known_instants() {
        // 2000-03-01 is day 11017 after 1970-01-01; 2026-12-02T01:06:43Z is 1796173603 s.
        assert_eq!(utc(UNIX_EPOCH), "1970-01-01T00:00:00Z");
        assert_eq!(
            utc(UNIX_EPOCH + std::time::Duration::from_secs(11_017 * 86_400)),
            "2000-03-01T00:00:00Z"
        );
        assert_eq!(
            utc(UNIX_EPOCH + std::time::Duration::from_secs(1_796_173_603)),
            "2026-12-02T01:06:43Z"
        );
    }

    #[test]
    fn extensions_are_recognised_case_insensitively() {
        assert!(is_mzml("a.mzML") && is_mzml("b.MZML.GZ") && is_mzml("c.mzml"));
        assert!(!is_mzml("d.mzXML") && !is_mzml("e.mzML.bak"));
        assert_eq!(strip_extension("site/night.mzML.gz"), "site/night");
        assert_eq!(strip_extension("x.MZML"), "x");
    }

    #[test]
    fn names_are_made_unique() {
        let mut used = HashSet::new();
        let names: Vec<String> =
            ["a", "a", "", "a", "a-2"].iter().map(|b| unique_name(&mut used, b)).collect();
        assert_eq!(names, ["a", "a-2", "input", "a-3", "a-2-2"]);
    }
}
