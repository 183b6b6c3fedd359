//! The batch view of `mzsift run` and `mzsift merge` (batch_compounds.tsv, detections.tsv,
//! rt_drift.tsv) on the generated scenario `tests/batch/drift-blanks.toml`: the sample sheet's
//! errors, a run in another input order, per-file runs merged, and `--resume` all give the
//! same tables.
//!
//! The batch view reads each report folder's `compounds.tsv`. Where a run does not write one
//! yet (before the compound stage), the test writes a stand-in (each halogen feature of
//! `features.tsv` as an [M+H]+ compound) into the folders and lets `--resume` / `merge`
//! recompute the tables from disk, which is the path the real table takes too.

use std::path::{Path, PathBuf};

use crate::util::{mzsift, repo, stderr, tsv};

fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

fn scenario_inputs(dir: &Path) -> PathBuf {
    let scenario = repo().join("tests/batch/drift-blanks.toml");
    let o = mzsift(dir).args(["demo", "in", "--scenario"]).arg(&scenario).output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    std::fs::write(dir.join("screen.toml"), "[flag]\nmin_snr = 40.0\n").unwrap();
    dir.join("in")
}

fn sheet() -> PathBuf {
    repo().join("tests/batch/drift-blanks.samples.tsv")
}

const COMPOUND_HEADER: &str = "compound\trt_apex_min\trt_start_min\trt_end_min\tpolarity\tionization\tresolution\tneutral_mass\tnominal_mass\todd_nominal\tn_cl\tn_br\thalogen\thalogen_probability\tmolecular_ion_mz\tion_type\tcharge\tapex_intensity\tarea\tmembers\tevidence";

/// Writes the stand-in compounds.tsv into every report folder of `out` that has none.
fn stand_in_compounds(out: &Path) {
    for e in std::fs::read_dir(out).unwrap() {
        let dir = e.unwrap().path();
        if !dir.is_dir() || dir.join("compounds.tsv").exists() {
            continue;
        }
        let (h, rows) = tsv(&read(&dir.join("features.tsv")));
        let col = |name: &str| h.iter().position(|c| c == name).unwrap();
        let (_, spectra) = tsv(&read(&dir.join("spectra.tsv")));
        // The most common resolution class of the spectra (column 12 of spectra.tsv).
        let mut counts = std::collections::BTreeMap::<&str, usize>::new();
        for r in &spectra {
            *counts.entry(r[12].as_str()).or_default() += 1;
        }
        let resolution = counts.iter().max_by_key(|(_, n)| **n).map(|(r, _)| *r).unwrap_or("");
        let mut text = format!("{COMPOUND_HEADER}\n");
        let mut n = 0;
        for r in &rows {
            let (ncl, nbr): (u8, u8) =
                (r[col("n_cl")].parse().unwrap(), r[col("n_br")].parse().unwrap());
            if ncl + nbr == 0 || r[col("charge")] != "1" || r[col("molecular_candidate")] != "true"
            {
                continue;
            }
            n += 1;
            let mz: f64 = r[col("mz")].parse().unwrap();
            text.push_str(&format!(
                "{n}\t{}\t{}\t{}\t+\telectrospray\t{resolution}\t{}\t{}\t{}\t{ncl}\t{nbr}\ttrue\t{}\t{mz}\t[M+H]+\t1\t{}\t{}\t{}:[M+H]+\t\n",
                r[col("rt_apex_min")],
                r[col("rt_start_min")],
                r[col("rt_end_min")],
                mz - 1.007_276_466_62,
                r[col("nominal_mass")],
                r[col("odd_nominal")],
                r[col("halogen_score")],
                r[col("apex_intensity")],
                r[col("area")],
                r[col("feature")],
            ));
        }
        std::fs::write(dir.join("compounds.tsv"), text).unwrap();
    }
}

fn batch_tables(out: &Path) -> Vec<String> {
    ["batch_compounds.tsv", "detections.tsv", "rt_drift.tsv"]
        .iter()
        .map(|f| read(&out.join(f)))
        .collect()
}

/// `mzsift run ARGS` in `dir` with the scenario's configuration (and its sheet, for the whole
/// batch); asserts success.
fn run(dir: &Path, inputs: &[PathBuf], out: &str, resume: bool, whole: bool) -> String {
    let mut c = mzsift(dir);
    c.arg("run").args(inputs).args(["-o", out, "--config", "screen.toml"]);
    if whole {
        // A sheet names every file of the batch: per-file jobs go without, merge takes it.
        c.arg("--samples").arg(sheet());
    }
    if resume {
        c.arg("--resume");
    }
    let o = c.output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    stderr(&o)
}

#[test]
fn sheet_errors_are_usage_errors_naming_the_line() {
    let dir = tempfile::tempdir().unwrap();
    let input = repo().join("fixtures/demo/DRWL0417-06_lc-pos_procedural-blank.mzML");
    for (text, want) in [
        ("file\tsample\tkind\tsite\n", "line 1: unknown column 'site'"),
        (
            "file\tsample\tkind\nDRWL0417-06_lc-pos_procedural-blank\tpb\tspike\n",
            "line 2: unknown kind 'spike'",
        ),
        (
            "file\tsample\tkind\nnight-99\tx\tsample\n",
            "line 2: file 'night-99' is not in the batch",
        ),
    ] {
        std::fs::write(dir.path().join("sheet.tsv"), text).unwrap();
        let o = mzsift(dir.path())
            .arg("run")
            .arg(&input)
            .args(["-o", "out", "--samples", "sheet.tsv"])
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2), "{text:?}");
        let e = stderr(&o);
        assert!(e.contains(&format!("sheet.tsv: {want}")), "{e}");
        assert!(!dir.path().join("out").join("batch.tsv").exists());
    }
}

#[test]
fn run_merge_resume_and_input_order_give_the_same_batch_view() {
    let tmp = tempfile::tempdir().unwrap();
    let dir = tmp.path();
    let input = scenario_inputs(dir);
    let mut files: Vec<PathBuf> = std::fs::read_dir(&input)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "mzML"))
        .collect();
    files.sort();
    assert_eq!(files.len(), 9);
    // One run over the folder, then --resume (recomputed from the folders on disk).
    run(dir, std::slice::from_ref(&input), "one", false, true);
    stand_in_compounds(&dir.join("one"));
    let summary = run(dir, std::slice::from_ref(&input), "one", true, true);
    let one = batch_tables(&dir.join("one"));
    // The same inputs in reverse order.
    let reversed: Vec<PathBuf> = files.iter().rev().cloned().collect();
    run(dir, &reversed, "rev", false, true);
    stand_in_compounds(&dir.join("rev"));
    run(dir, &reversed, "rev", true, true);
    assert_eq!(batch_tables(&dir.join("rev")), one, "input order changed the batch view");
    // Per-file runs merged.
    let mut parts = Vec::new();
    for (k, f) in files.iter().enumerate() {
        let part = format!("part-{k}");
        run(dir, std::slice::from_ref(f), &part, false, false);
        stand_in_compounds(&dir.join(&part));
        parts.push(part);
    }
    let o = mzsift(dir)
        .arg("merge")
        .args(parts.iter().rev())
        .args(["-o", "merged", "--samples"])
        .arg(sheet())
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(batch_tables(&dir.join("merged")), one, "merge differs from one run");

    // What the tables say (the stand-in compounds: halogen features).
    let (header, rows) = tsv(&one[0]);
    let files_cols: Vec<&str> = header[12..].iter().map(String::as_str).collect();
    assert_eq!(files_cols[0], "TB12-01_blank-a");
    assert_eq!(files_cols.len(), 9);
    // Carry-over: triclosan (287.9515 u) and bromacil (260.0160 u) in the blank after the
    // concentrated sample.
    let (_, long) = tsv(&one[1]);
    let carried: Vec<f64> = rows
        .iter()
        .filter(|r| long.iter().any(|d| d[0] == r[0] && d[14] == "true"))
        .filter_map(|r| r[1].parse().ok())
        .collect();
    for mass in [287.9515, 260.0160] {
        assert!(
            carried.iter().any(|m| (m - mass).abs() < 0.005),
            "{mass} not flagged: {carried:?}"
        );
    }
    let (_, long) = tsv(&one[1]);
    let filled = long.iter().filter(|d| d[5] == "true").count();
    assert!(filled >= 1, "nothing gap-filled");
    assert!(summary.contains(&format!("{} carry-over suspects", carried.len())), "{summary}");
}
