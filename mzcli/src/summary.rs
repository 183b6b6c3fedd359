//! The short summary that ends `mzsift run` on stderr: files by status, findings in how many
//! files, warnings, and where the reports are.

use std::path::Path;

use mzcore::screen::{FileStatus, FileSummary};

use crate::batch::Outcome;

/// What the summary counts per file: the halogenated and the odd-nominal findings (compounds),
/// and the word for them. The one place that decides what is counted.
fn findings(s: &FileSummary) -> (usize, usize) {
    (s.halogen_compounds, s.odd_nominal_compounds)
}

/// The word for what [`findings`] counts.
const FINDINGS: &str = "compounds";

/// The summary lines (without trailing newlines).
pub fn lines(outcomes: &[Outcome], out: &Path) -> Vec<String> {
    let count = |st: FileStatus| outcomes.iter().filter(|o| o.status == st).count();
    let statuses = [FileStatus::Ok, FileStatus::Partial, FileStatus::Failed, FileStatus::Skipped]
        .map(|st| format!("{} {}", count(st), st.name()))
        .join(", ");
    let summaries: Vec<&FileSummary> = outcomes.iter().filter_map(|o| o.summary.as_ref()).collect();
    let tally = |pick: fn((usize, usize)) -> usize| {
        let per_file: Vec<usize> = summaries.iter().map(|s| pick(findings(s))).collect();
        (per_file.iter().sum::<usize>(), per_file.iter().filter(|&&n| n > 0).count())
    };
    let (halogen, halogen_files) = tally(|f| f.0);
    let (odd, odd_files) = tally(|f| f.1);
    let warnings: usize = summaries.iter().map(|s| s.warnings.len()).sum();
    let warned = summaries.iter().filter(|s| !s.warnings.is_empty()).count();
    let plural = |n: usize, one: &str| if n == 1 { one.to_owned() } else { format!("{one}s") };
    vec![
        format!("mzsift: {} {}: {statuses}", outcomes.len(), plural(outcomes.len(), "file")),
        format!(
            "mzsift: halogenated {FINDINGS}: {halogen} in {halogen_files} {}; odd nominal mass: \
             {odd} in {odd_files} {}",
            plural(halogen_files, "file"),
            plural(odd_files, "file")
        ),
        format!(
            "mzsift: {warnings} {} in {warned} {}",
            plural(warnings, "warning"),
            plural(warned, "file")
        ),
        format!(
            "mzsift: batch table {}; run record {}; per-file reports under {}",
            out.join("batch.tsv").display(),
            out.join("run.json").display(),
            out.display()
        ),
    ]
}

#[cfg(test)]
mod tests {
    use super::*;

    fn outcome(status: FileStatus, halogen: usize, odd: usize, warnings: usize) -> Outcome {
        let summary: FileSummary = serde_json::from_value(serde_json::json!({
            "status": status, "error": "", "spectra": 1, "ms1": 1, "ms2": 0,
            "rt_start_min": null, "rt_end_min": null, "flagged_spectra": 0,
            "halogen_features": 0, "odd_nominal_features": 0, "unreadable": [],
            "halogen_compounds": halogen, "odd_nominal_compounds": odd,
            "missing_from_index": [], "index_entries": null, "sha256": "", "bytes": 0,
            "warnings": vec!["w"; warnings],
        }))
        .unwrap();
        Outcome {
            path: "x".into(),
            name: "x".into(),
            status,
            error: String::new(),
            summary: Some(summary),
            seconds: 0.0,
            mtime_unix: None,
        }
    }

    #[test]
    fn counts_files_findings_and_warnings() {
        let o = [
            outcome(FileStatus::Ok, 3, 0, 0),
            outcome(FileStatus::Ok, 2, 1, 2),
            outcome(FileStatus::Partial, 0, 0, 0),
        ];
        let l = lines(&o, Path::new("out"));
        assert_eq!(l[0], "mzsift: 3 files: 2 ok, 1 partial, 0 failed, 0 skipped");
        assert_eq!(
            l[1],
            "mzsift: halogenated compounds: 5 in 2 files; odd nominal mass: 1 in 1 file"
        );
        assert_eq!(l[2], "mzsift: 2 warnings in 1 file");
        assert!(l[3].contains("out/batch.tsv") && l[3].contains("out/run.json"), "{}", l[3]);
    }
}
