//! `mzsift run --write-centroided` and the mzQC files of `run` and `check`, end to end on the
//! demo batch. The mzQC files written here are copied into `$MZSIFT_MZQC_OUT` when it is set,
//! so that `.ci/run` validates them against the mzQC 1.0.0 schema and the PSI-MS CV
//! (`tests/reference/check_mzqc.py`); the centroided files are validated there with xmllint.

use std::path::Path;

use crate::util::{fixture, mzsift, stderr, stdout, tsv};

fn keep_for_ci(path: &Path, tag: &str) {
    if let Ok(dir) = std::env::var("MZSIFT_MZQC_OUT") {
        std::fs::create_dir_all(&dir).unwrap();
        let name = format!("{tag}-{}", path.file_name().unwrap().to_string_lossy());
        std::fs::copy(path, Path::new(&dir).join(name)).unwrap();
    }
}

fn json(path: &Path) -> serde_json::Value {
    serde_json::from_str(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn metric(run: &serde_json::Value, acc: &str) -> Option<serde_json::Value> {
    run["qualityMetrics"]
        .as_array()
        .unwrap()
        .iter()
        .find(|m| m["accession"] == acc)
        .map(|m| m["value"].clone())
}

#[test]
fn run_writes_mzqc_and_centroided_copies_that_match_the_inputs() {
    let dir = tempfile::tempdir().unwrap();
    let demo = fixture("demo");
    let o = mzsift(dir.path())
        .args(["run", demo.to_str().unwrap(), "-o", "out", "-q", "--write-centroided"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let out = dir.path().join("out");
    let doc = json(&out.join("run.mzQC"));
    keep_for_ci(&out.join("run.mzQC"), "run");
    assert_eq!(doc["mzQC"]["version"], "1.0.0");
    let runs = doc["mzQC"]["runQualities"].as_array().unwrap();
    let (header, rows) = tsv(&std::fs::read_to_string(out.join("batch.tsv")).unwrap());
    assert_eq!(runs.len(), rows.len());
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    for (run, row) in runs.iter().zip(&rows) {
        let file = Path::new(&row[col("file")]).file_name().unwrap().to_string_lossy().into_owned();
        assert_eq!(run["metadata"]["inputFiles"][0]["name"], file.as_str());
        let ms1: u64 = row[col("ms1")].parse().unwrap();
        assert_eq!(metric(run, "MS:4000059"), Some(serde_json::json!(ms1)), "{file}");
        let rt0: f64 = row[col("rt_start_min")].parse().unwrap();
        let range = metric(run, "MS:4000070").unwrap();
        assert!((range[0].as_f64().unwrap() - rt0 * 60.0).abs() < 1e-6, "{file}");
        let sw = &run["metadata"]["analysisSoftware"][0];
        assert_eq!(
            (sw["accession"].as_str(), sw["version"].as_str()),
            (Some("MS:1000799"), Some(env!("CARGO_PKG_VERSION")))
        );
    }
    // Spot check against `mzsift peaks` of the input: the copy's points are the picked peaks
    // (m/z as printed, intensity within 32-bit rounding).
    let name = "DRWL0417-03_lc-pos_fennick-cross-effluent";
    let copy = out.join(name).join("centroided.mzML");
    let input = demo.join(format!("{name}.mzML"));
    for index in ["0", "40", "147"] {
        let a = mzsift(dir.path())
            .args(["peaks", input.to_str().unwrap(), "--index", index])
            .output()
            .unwrap();
        let b = mzsift(dir.path())
            .args(["peaks", copy.to_str().unwrap(), "--index", index, "--raw"])
            .output()
            .unwrap();
        assert!(a.status.success() && b.status.success(), "{}{}", stderr(&a), stderr(&b));
        let (_, pa) = tsv(&stdout(&a));
        let (_, pb) = tsv(&stdout(&b));
        assert!(!pa.is_empty(), "spectrum {index} has peaks");
        assert_eq!(pa.len(), pb.len(), "spectrum {index}");
        for (x, y) in pa.iter().zip(&pb) {
            assert_eq!(x[0], y[0], "m/z of spectrum {index}");
            let (i, j): (f64, f64) = (x[1].parse().unwrap(), y[1].parse().unwrap());
            assert!((i - j).abs() <= 1e-7 * i.abs(), "intensity {i} vs {j}");
        }
    }
    // --resume keeps every folder (same configuration) and run.mzQC again covers all inputs.
    let before = std::fs::metadata(&copy).unwrap().modified().unwrap();
    let o = mzsift(dir.path())
        .args(["run", demo.to_str().unwrap(), "-o", "out", "-q", "--write-centroided", "--resume"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(std::fs::metadata(&copy).unwrap().modified().unwrap(), before);
    let again = json(&out.join("run.mzQC"));
    assert_eq!(again["mzQC"]["runQualities"], doc["mzQC"]["runQualities"]);
    // Without the switch the configuration differs: every folder is redone, without a copy.
    let o = mzsift(dir.path())
        .args(["run", demo.to_str().unwrap(), "-o", "out", "-q", "--resume"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(!copy.exists());
    assert!(out.join(name).join("quality.mzQC").is_file());
    let leftovers: Vec<String> = std::fs::read_dir(&out)
        .unwrap()
        .map(|e| e.unwrap().file_name().to_string_lossy().into_owned())
        .filter(|n| n.starts_with('.'))
        .collect();
    assert!(leftovers.is_empty(), "temporary entries left: {leftovers:?}");
}

#[test]
fn check_writes_check_mzqc_with_the_verdict_in_its_description() {
    let dir = tempfile::tempdir().unwrap();
    let o = mzsift(dir.path())
        .args([
            "check",
            fixture("demo").to_str().unwrap(),
            "--rules",
            fixture("qc-rules.toml").to_str().unwrap(),
            "-o",
            "qc",
            "-q",
        ])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let path = dir.path().join("qc/check.mzQC");
    keep_for_ci(&path, "check");
    let doc = json(&path);
    assert_eq!(doc["mzQC"]["runQualities"].as_array().unwrap().len(), 6);
    let description = doc["mzQC"]["description"].as_str().unwrap();
    assert!(description.contains("52 pass, 0 warn, 0 fail: PASSED"), "{description}");
}

#[test]
fn mzqc_can_be_switched_off() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), "[output]\nmzqc = false\n").unwrap();
    let input = fixture("demo").join("DRWL0417-06_lc-pos_procedural-blank.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o", "out", "-q", "--config", "c.toml"])
        .output()
        .unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert!(!dir.path().join("out/run.mzQC").exists());
    assert!(!dir.path().join("out/DRWL0417-06_lc-pos_procedural-blank/quality.mzQC").exists());
}
