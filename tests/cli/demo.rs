//! `mzsift demo`: byte-identical output on every call, equal to the committed fixtures/demo,
//! custom scenarios, size knobs and scenario errors.

use std::collections::BTreeMap;
use std::path::Path;

use crate::util::{self, mzsift, stderr, stdout, tsv};

fn files(dir: &Path) -> BTreeMap<String, Vec<u8>> {
    std::fs::read_dir(dir)
        .expect("read dir")
        .map(|e| e.expect("entry").path())
        .filter(|p| p.is_file())
        .map(|p| {
            (p.file_name().unwrap().to_string_lossy().into_owned(), std::fs::read(&p).unwrap())
        })
        .collect()
}

#[test]
fn demo_twice_gives_identical_bytes_equal_to_the_committed_fixtures() {
    let dir = tempfile::tempdir().unwrap();
    for name in ["a", "b"] {
        let out = mzsift(dir.path()).args(["demo", name]).output().unwrap();
        assert!(out.status.success(), "{}", stderr(&out));
        let (header, rows) = tsv(&stdout(&out));
        assert_eq!(header, ["file", "spectra", "points", "bytes"]);
        assert_eq!(rows.len(), 6);
    }
    let a = files(&dir.path().join("a"));
    let b = files(&dir.path().join("b"));
    assert_eq!(a.len(), 13, "6 mzML, 6 truth TSV and the scenario: {:?}", a.keys());
    for (name, bytes) in &a {
        assert!(b.get(name) == Some(bytes), "{name} differs between two runs");
    }
    let committed = files(&util::fixture("demo"));
    assert_eq!(
        committed.keys().collect::<Vec<_>>(),
        a.keys().collect::<Vec<_>>(),
        "fixtures/demo holds other files than `mzsift demo` writes"
    );
    for (name, bytes) in &a {
        assert!(
            committed.get(name) == Some(bytes),
            "fixtures/demo/{name} is stale: regenerate with `mzsift demo fixtures/demo`"
        );
    }
    let total: usize = committed.values().map(Vec::len).sum();
    assert!(total <= 5_000_000, "fixtures/demo is {total} bytes");
}

#[test]
fn demo_with_a_scenario_file_and_size_knobs() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("mine.toml"),
        r#"
name = "small"
seed = 9
[instruments.tof]
ionization = "esi"
polarity = "positive"
resolving_power = 20000
mz_min = 150.0
mz_max = 350.0
output = "profile"
scan_rate_hz = 2.0
rt_start_min = 1.0
rt_end_min = 2.0
[[compound]]
name = "diclofenac"
formula = "C14H11Cl2NO2"
[[run]]
file = "one"
instrument = "tof"
compound = [{ name = "diclofenac", rt_apex_min = 1.5, width_min = 0.1, abundance = 1e5 }]
[[run]]
file = "two"
instrument = "tof"
"#,
    )
    .unwrap();
    let out = mzsift(dir.path())
        .args([
            "demo",
            "out",
            "--scenario",
            "mine.toml",
            "--run",
            "one",
            "--spectra",
            "5",
            "--points",
            "1000",
        ])
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", stderr(&out));
    let (_, rows) = tsv(&stdout(&out));
    assert_eq!(rows.len(), 1);
    assert_eq!(&rows[0][1..3], ["5", "5000"]);
    let written = files(&dir.path().join("out"));
    assert_eq!(written.keys().collect::<Vec<_>>(), ["one.mzML", "one.truth.tsv"]);
    let truth = String::from_utf8(written["one.truth.tsv"].clone()).unwrap();
    let (header, rows) = tsv(&truth);
    assert_eq!(header.len(), 14);
    assert_eq!(header[11], "mono_snr");
    // Diclofenac [M+H]+ C14H12Cl2NO2+: 296.0240 (chem module's worked example, 296.02396).
    assert_eq!(&rows[0][..4], ["diclofenac", "C14H11Cl2NO2", "M+H", "1"]);
    assert!((rows[0][4].parse::<f64>().unwrap() - 296.02396).abs() < 1e-4);
    let info = mzsift(dir.path()).args(["info", "--verify", "out/one.mzML"]).output().unwrap();
    assert!(stdout(&info).contains("verified"), "{}", stdout(&info));
}

#[test]
fn demo_rejects_a_bad_scenario_with_a_usage_error() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("bad.toml"),
        "name = \"x\"\nseed = 1\n[instruments]\n[[run]]\nfile = \"r\"\ninstrument = \"missing\"\n",
    )
    .unwrap();
    let out = mzsift(dir.path()).args(["demo", "out", "--scenario", "bad.toml"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("missing"), "{}", stderr(&out));
    let out = mzsift(dir.path()).args(["demo", "out", "--run", "no-such-run"]).output().unwrap();
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr(&out).contains("no-such-run"), "{}", stderr(&out));
}
