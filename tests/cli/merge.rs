//! `mzsift merge`: one-file runs merged equal one run over the same inputs (every report
//! byte for byte, batch.tsv but its timing column); mixed settings refused unless allowed;
//! report-folder name collisions; merging into a merged folder refused.

use std::path::{Path, PathBuf};

use crate::util::{fixture, mzsift, stderr};

fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// batch.tsv without its last column (`seconds`: timings differ between runs).
fn batch_without_seconds(out: &Path) -> String {
    read(&out.join("batch.tsv"))
        .lines()
        .map(|l| {
            // `seconds` is the last column.
            let cells: Vec<&str> = l.split('\t').collect();
            cells[..cells.len() - 1].join("\t")
        })
        .collect::<Vec<_>>()
        .join("\n")
}

/// Every report file under `out` (relative name, contents), batch.tsv without timings.
fn reports(out: &Path) -> Vec<(String, String)> {
    fn walk(dir: &Path, out: &mut Vec<PathBuf>) {
        for e in std::fs::read_dir(dir).unwrap() {
            let p = e.unwrap().path();
            if p.is_dir() { walk(&p, out) } else { out.push(p) }
        }
    }
    let mut files = Vec::new();
    walk(out, &mut files);
    files.sort();
    let mut all = vec![("batch.tsv".to_owned(), batch_without_seconds(out))];
    for f in files {
        let name = f.strip_prefix(out).unwrap().display().to_string();
        if name.ends_with(".tsv") && name != "batch.tsv" {
            all.push((name, read(&f)));
        }
    }
    all
}

const INPUTS: [&str; 3] =
    ["variant-indexed-zlib.mzML", "encoding-numpress-zlib.mzML", "variant-plain.mzML"];

fn setup() -> tempfile::TempDir {
    let dir = tempfile::tempdir().unwrap();
    std::fs::create_dir_all(dir.path().join("in")).unwrap();
    for n in INPUTS {
        std::fs::copy(fixture(n), dir.path().join("in").join(n)).unwrap();
    }
    dir
}

fn ok(dir: &Path, args: &[&str]) {
    let o = mzsift(dir).args(args).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
}

#[test]
fn one_file_runs_merged_equal_one_run() {
    let dir = setup();
    let d = dir.path();
    ok(d, &["run", "in", "-o", "single", "-q", "-j", "2"]);
    // One job per input, in an order other than the folder's, with other thread counts.
    let mut parts = Vec::new();
    for (i, n) in INPUTS.iter().enumerate().rev() {
        let part = format!("parts/{i}");
        ok(
            d,
            &["run", &format!("in/{n}"), "-o", &part, "-q", "-j", if i == 0 { "1" } else { "2" }],
        );
        parts.push(part);
    }
    let mut args = vec!["merge"];
    args.extend(parts.iter().map(String::as_str));
    args.extend(["-o", "merged"]);
    ok(d, &args);
    let (single, merged) = (reports(&d.join("single")), reports(&d.join("merged")));
    // batch.tsv, then per file spectra, ions, features, compounds, traces and cluster.
    assert_eq!(single.len(), 1 + 3 * 6);
    assert_eq!(single, merged);
    // run.json: the same inputs in the same order, and where they came from.
    let run = |p: &str| -> serde_json::Value { serde_json::from_str(&read(&d.join(p))).unwrap() };
    let (a, b) = (run("single/run.json"), run("merged/run.json"));
    for k in ["path", "report_folder", "status", "bytes", "sha256"] {
        let pick = |v: &serde_json::Value| -> Vec<String> {
            v["inputs"].as_array().unwrap().iter().map(|i| i[k].to_string()).collect()
        };
        assert_eq!(pick(&a), pick(&b), "{k}");
    }
    assert_eq!(b["merged_from"].as_array().unwrap().len(), 3);
    assert_eq!(a["config"]["flag"], b["config"]["flag"]);
    assert!(b["caution"].as_str().unwrap().contains("not identifications"));
    // Every merged folder is complete (its record was copied with it).
    for n in ["variant-indexed-zlib", "encoding-numpress-zlib", "variant-plain"] {
        assert!(d.join("merged").join(n).join("complete.json").is_file(), "{n}");
    }
}

#[test]
fn different_parameters_are_refused_unless_allowed() {
    let dir = setup();
    let d = dir.path();
    std::fs::write(d.join("strict.toml"), "[flag]\nmin_snr = 20.0\n").unwrap();
    ok(d, &["run", "in/variant-plain.mzML", "-o", "a", "-q"]);
    ok(d, &["run", "in/variant-indexed-zlib.mzML", "-o", "b", "-q", "--config", "strict.toml"]);
    let o = mzsift(d).args(["merge", "a", "b", "-o", "m"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    let e = stderr(&o);
    assert!(e.contains("parameters") && e.contains("--allow-mixed"), "{e}");
    assert!(!d.join("m").join("batch.tsv").exists(), "nothing written when refused");
    ok(d, &["merge", "a", "b", "-o", "m", "--allow-mixed"]);
    let run: serde_json::Value = serde_json::from_str(&read(&d.join("m/run.json"))).unwrap();
    let from = run["merged_from"].as_array().unwrap();
    assert_eq!(from[1]["config"]["flag"]["min_snr"], 20.0);
    assert_eq!(from[0]["config"]["flag"]["min_snr"], 10.0);
}

#[test]
fn colliding_report_folders_get_unique_names() {
    let dir = setup();
    let d = dir.path();
    std::fs::create_dir_all(d.join("other")).unwrap();
    std::fs::copy(fixture("encoding-f32-none.mzML"), d.join("other/variant-plain.mzML")).unwrap();
    ok(d, &["run", "in/variant-plain.mzML", "-o", "a", "-q"]);
    ok(d, &["run", "other/variant-plain.mzML", "-o", "b", "-q"]);
    ok(d, &["merge", "b", "a", "-o", "m"]);
    // Rows by path: in/ before other/; the second one's folder gets -2.
    let batch = batch_without_seconds(&d.join("m"));
    let files: Vec<&str> = batch.lines().skip(1).map(|l| l.split('\t').next().unwrap()).collect();
    assert_eq!(files, ["in/variant-plain.mzML", "other/variant-plain.mzML"]);
    assert_eq!(
        read(&d.join("m/variant-plain/spectra.tsv")),
        read(&d.join("a/variant-plain/spectra.tsv"))
    );
    assert_eq!(
        read(&d.join("m/variant-plain-2/spectra.tsv")),
        read(&d.join("b/variant-plain/spectra.tsv"))
    );
    let run: serde_json::Value = serde_json::from_str(&read(&d.join("m/run.json"))).unwrap();
    assert_eq!(run["inputs"][1]["report_folder"], "variant-plain-2");
}

#[test]
fn bad_merges_are_usage_errors() {
    let dir = setup();
    let d = dir.path();
    ok(d, &["run", "in/variant-plain.mzML", "-o", "a", "-q"]);
    let o = mzsift(d).args(["merge", "a", "-o", "a"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2), "{}", stderr(&o));
    let o = mzsift(d).args(["merge", "a", "in", "-o", "m"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("run.json"), "{}", stderr(&o));
    // A file that failed in its run stays failed in the merge (exit code 1).
    std::fs::write(d.join("in/cut.mzML"), "<mzML><run><spectrumList count=\"1\"><spectrum")
        .unwrap();
    let o = mzsift(d).args(["run", "in/cut.mzML", "-o", "c", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1));
    let o = mzsift(d).args(["merge", "a", "c", "-o", "m"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let batch = batch_without_seconds(&d.join("m"));
    assert!(batch.lines().any(|l| l.starts_with("in/cut.mzML\tfailed\t")), "{batch}");
}
