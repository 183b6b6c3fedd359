//! `mzsift check`: every rule passing on the demo batch and failing when its limit is out of
//! reach; crafted failures (a scan-time gap, a missing internal standard, a blank with
//! carry-over); rules errors; check.tsv and the JUnit file.
//!
//! The JUnit file is parsed with quick-xml here (well-formedness, one test case per file and
//! rule); `.ci/run` also runs `xmllint --noout` (libxml2) on it.

use std::collections::BTreeMap;
use std::path::Path;

use mzcore::mzml::{Reader, Writer, WriterOptions};

use crate::util::{fixture, mzsift, stderr, stdout, tsv};

fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// check.tsv as (file name, rule) -> (status, observed, limit).
fn outcomes(text: &str) -> BTreeMap<(String, String), (String, String, String)> {
    let (header, rows) = tsv(text);
    assert_eq!(header, ["file", "rule", "status", "observed", "limit", "message"]);
    rows.into_iter()
        .map(|r| {
            let name = r[0].rsplit('/').next().unwrap().to_owned();
            ((name, r[1].clone()), (r[2].clone(), r[3].clone(), r[4].clone()))
        })
        .collect()
}

/// Test cases, failures and suites of a JUnit file, parsed as XML.
fn junit_counts(xml: &str) -> (usize, usize, usize) {
    use quick_xml::events::Event;
    let mut reader = quick_xml::Reader::from_str(xml);
    let (mut cases, mut failures, mut suites) = (0, 0, 0);
    loop {
        match reader.read_event().expect("check.junit.xml is well-formed XML") {
            Event::Eof => break,
            Event::Start(e) | Event::Empty(e) => match e.name().as_ref() {
                b"testcase" => cases += 1,
                b"failure" => failures += 1,
                b"testsuite" => suites += 1,
                _ => {}
            },
            _ => {}
        }
    }
    (cases, failures, suites)
}

const DEMO_FILES: usize = 6;

#[test]
fn demo_batch_passes_the_shipped_rules() {
    let dir = tempfile::tempdir().unwrap();
    let o = mzsift(dir.path())
        .args(["check", "-q", "--rules"])
        .arg(fixture("qc-rules.toml"))
        .arg(fixture("demo"))
        .args(["-o", "qc"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let text = read(&dir.path().join("qc/check.tsv"));
    let got = outcomes(&text);
    // Every file gets the seven rules without a `files` limit and its method's compound; the
    // three LC-pos runs add rt_coverage; the blank adds carry_over.
    assert_eq!(got.len(), 6 * 7 + 6 + 3 + 1, "{text}");
    assert!(got.values().all(|v| v.0 == "pass"), "{text}");
    let blank = "DRWL0417-06_lc-pos_procedural-blank.mzML".to_owned();
    assert_eq!(got[&(blank.clone(), "carry_over".into())], ("pass".into(), "0".into(), "0".into()));
    assert_eq!(got[&(blank, "checksum".into())].1, "verified");
    let (cases, failures, suites) = junit_counts(&read(&dir.path().join("qc/check.junit.xml")));
    assert_eq!((cases, failures, suites), (got.len(), 0, DEMO_FILES));
    let e = stderr(&o);
    assert_eq!(e.lines().count(), 1, "one summary line: {e}");
    assert!(e.contains("52 pass, 0 warn, 0 fail"), "{e}");
}

#[test]
fn every_rule_fails_on_the_demo_batch_when_out_of_reach() {
    // The shipped rules with each limit moved beyond what any normal run reaches.
    let mut strict = read(&fixture("qc-rules.toml"));
    for (from, to) in [
        ("[min_spectra]\nlimit = 100", "[min_spectra]\nlimit = 100000"),
        ("[min_ms1]\nlimit = 100", "[min_ms1]\nlimit = 100000"),
        ("from_min = 2.75", "from_min = 0.5"),
        ("seconds = 5.0", "seconds = 0.2"),
        ("limit = 1000.0", "limit = 1e12"),
        ("min_intensity = 5000.0", "min_intensity = 1e9"),
        ("min_intensity = 200.0", "min_intensity = 1e9"),
        ("files = [\"*blank*\"]", "files = [\"*_lc-neg_*\"]"),
    ] {
        assert!(strict.contains(from), "fixtures/qc-rules.toml no longer holds {from:?}");
        strict = strict.replace(from, to);
    }
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("strict.toml"), &strict).unwrap();
    let o = mzsift(dir.path())
        .args(["check", "-q", "--rules", "strict.toml"])
        .arg(fixture("demo"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let got = outcomes(&stdout(&o));
    let status_of = |file: &str, rule: &str| got[&(file.to_owned(), rule.to_owned())].0.clone();
    let gc = "DRWL0417-01_gc_fennick-cross-tap.mzML";
    let pos = "DRWL0417-03_lc-pos_fennick-cross-effluent.mzML";
    let neg = "DRWL0417-04_lc-neg_fennick-cross-effluent.mzML";
    for rule in ["min_spectra", "min_ms1", "max_scan_gap"] {
        assert_eq!(status_of(gc, rule), "fail", "{rule}");
    }
    // The demo files have no empty or unreadable spectra and intact checksums: these rules
    // fail on the crafted files below and in the library's tests.
    for rule in ["max_empty_fraction", "max_unreadable", "checksum"] {
        assert_eq!(status_of(gc, rule), "pass", "{rule}");
    }
    assert_eq!(status_of(pos, "rt_coverage"), "fail");
    // min_median_tic and the GC compound are set to warn.
    assert_eq!(status_of(pos, "min_median_tic"), "warn");
    assert_eq!(status_of(gc, "compound:trimethylsilyl ion"), "warn");
    assert_eq!(status_of(pos, "compound:D5 siloxane [M+NH4]+ background"), "fail");
    // The LC-neg effluent run, treated as a blank, carries halogenated features.
    let (status, observed, limit) = &got[&(neg.to_owned(), "carry_over".to_owned())];
    assert_eq!((status.as_str(), limit.as_str()), ("fail", "0"));
    assert!(observed.parse::<usize>().unwrap() > 0, "{observed}");
}

/// A small scenario of our own: an internal standard (carbamazepine, [M+H]+) at 0.5 min in
/// the samples and the blank, and diclofenac (two Cl) at 1.2 min in the blank only.
const SCENARIO: &str = r#"
name = "qc crafted"
seed = 11
[instruments.lc]
ionization = "esi"
polarity = "positive"
resolving_power = 30000
mz_min = 150.0
mz_max = 400.0
output = "profile"
dropped_zeros = true
drop_below = 50.0
scan_rate_hz = 2.0
rt_start_min = 0.0
rt_end_min = 2.0
[[compound]]
name = "carbamazepine"
formula = "C15H12N2O"
[[compound]]
name = "diclofenac"
formula = "C14H11Cl2NO2"
[[run]]
file = "harbour-sample"
instrument = "lc"
compound = [{ name = "carbamazepine", rt_apex_min = 0.5, width_min = 0.08, abundance = 200000.0 }]
[[run]]
file = "harbour-sample-no-istd"
instrument = "lc"
[[run]]
file = "harbour-blank"
instrument = "lc"
compound = [
  { name = "carbamazepine", rt_apex_min = 0.5, width_min = 0.08, abundance = 200000.0 },
  { name = "diclofenac", rt_apex_min = 1.2, width_min = 0.08, abundance = 500000.0 },
]
"#;

const RULES: &str = r#"
[min_spectra]
limit = 100
[max_scan_gap]
seconds = 5.0
[checksum]
[[compound]]
name = "carbamazepine ISTD"
formula = "C15H12N2O"
ion = "M+H"
rt_from_min = 0.3
rt_to_min = 0.7
min_intensity = 20000.0
tolerance_ppm = 10.0
[carry_over]
limit = 0
files = ["*blank*"]
"#;

/// Copies `from` to `to` without the spectra whose scan time lies in `hole` (minutes);
/// returns the scan times kept.
fn copy_with_hole(from: &Path, to: &Path, hole: (f64, f64)) -> Vec<f64> {
    let spectra: Vec<_> = Reader::from_path(from)
        .unwrap()
        .map(|s| s.unwrap())
        .filter(|s| !s.meta.rt_min.is_some_and(|t| t >= hole.0 && t <= hole.1))
        .collect();
    let options = WriterOptions { spectrum_count: spectra.len(), ..Default::default() };
    let mut w = Writer::new(Vec::new(), options).unwrap();
    let mut times = Vec::new();
    for (i, s) in spectra.iter().enumerate() {
        let mut meta = s.meta.clone();
        meta.index = i;
        times.extend(meta.rt_min);
        w.write_spectrum(&meta, &s.decode().unwrap()).unwrap();
    }
    std::fs::write(to, w.finish().unwrap()).unwrap();
    times
}

#[test]
fn crafted_gap_missing_standard_and_carry_over_fail() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("s.toml"), SCENARIO).unwrap();
    std::fs::write(dir.path().join("rules.toml"), RULES).unwrap();
    let o = mzsift(dir.path()).args(["demo", "in", "--scenario", "s.toml"]).output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    let times = copy_with_hole(
        &dir.path().join("in/harbour-sample.mzML"),
        &dir.path().join("in/harbour-sample-gap.mzML"),
        (1.2, 1.6),
    );
    // The largest step between the kept scan times, computed here from the file's own times.
    let want_gap = times.windows(2).map(|w| (w[1] - w[0]) * 60.0).fold(0.0, f64::max);
    assert!(want_gap > 20.0, "{want_gap}");

    let o = mzsift(dir.path())
        .args(["check", "in", "--rules", "rules.toml", "-o", "qc"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let text = read(&dir.path().join("qc/check.tsv"));
    let got = outcomes(&text);
    let get = |f: &str, r: &str| {
        got.get(&(f.to_owned(), r.to_owned())).unwrap_or_else(|| panic!("{f} {r}:\n{text}"))
    };
    let status = |f: &str, r: &str| get(f, r).0.clone();
    let istd = "compound:carbamazepine ISTD";
    // The good sample passes everything.
    for rule in ["min_spectra", "max_scan_gap", "checksum", istd] {
        assert_eq!(status("harbour-sample.mzML", rule), "pass", "{rule}:\n{text}");
    }
    // The gap.
    let (s, observed, limit) = get("harbour-sample-gap.mzML", "max_scan_gap");
    assert_eq!((s.as_str(), limit.as_str()), ("fail", "5"));
    assert!((observed.parse::<f64>().unwrap() - want_gap).abs() < 1e-6, "{observed} vs {want_gap}");
    assert_eq!(status("harbour-sample-gap.mzML", istd), "pass");
    // The missing internal standard.
    assert_eq!(status("harbour-sample-no-istd.mzML", istd), "fail");
    assert_eq!(status("harbour-sample-no-istd.mzML", "max_scan_gap"), "pass");
    // The blank with carry-over; carry_over applies to the blank only.
    let (s, observed, _) = get("harbour-blank.mzML", "carry_over");
    assert_eq!(s, "fail");
    assert!(observed.parse::<usize>().unwrap() >= 1, "{text}");
    assert_eq!(status("harbour-blank.mzML", istd), "pass");
    assert!(!got.contains_key(&("harbour-sample.mzML".to_owned(), "carry_over".to_owned())));
    // One test case per file and rule in the JUnit file, one failure per failed rule.
    let fails = got.values().filter(|v| v.0 == "fail").count();
    assert_eq!(fails, 3, "{text}");
    let (cases, failures, suites) = junit_counts(&read(&dir.path().join("qc/check.junit.xml")));
    assert_eq!((cases, failures, suites), (got.len(), fails, 4));
    // Each failed rule is named on stderr, then the summary.
    let e = stderr(&o);
    assert!(e.contains("harbour-blank.mzML: carry_over: fail"), "{e}");
    assert!(e.lines().last().unwrap().contains("3 fail: FAILED"), "{e}");
}

#[test]
fn rules_errors_name_the_key_and_exit_2() {
    let dir = tempfile::tempdir().unwrap();
    for (text, key) in [
        ("[max_scan_gap]\nsecnds = 5.0\n", "secnds"),
        ("[min_ms1]\nlimit = \"lots\"\n", "limit"),
        (
            "[[compound]]\nname = \"x\"\nformula = \"C6H6\"\nion = \"M+H\"\nrt_from_min = 1\nrt_to_min = 2\nmin_intensity = 1\n",
            "tolerance_mz, tolerance_ppm",
        ),
    ] {
        std::fs::write(dir.path().join("bad.toml"), text).unwrap();
        let o = mzsift(dir.path())
            .args(["check", "--rules", "bad.toml"])
            .arg(fixture("variant-plain.mzML"))
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(2), "{text}");
        let e = stderr(&o);
        assert!(e.starts_with("mzsift: bad.toml: ") && e.contains(key), "{key}: {e}");
        assert!(o.stdout.is_empty());
    }
    // A missing rules file is a usage error too.
    let o = mzsift(dir.path()).args(["check", "--rules", "none.toml", "x.mzML"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
}

#[test]
fn an_unreadable_input_fails_every_rule_and_the_rest_go_on() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(
        dir.path().join("r.toml"),
        "[min_spectra]\nlimit = 1\n[checksum]\nallow_absent = true\n",
    )
    .unwrap();
    std::fs::write(dir.path().join("broken.mzML"), "<mzML><run><spectrumList count=\"1\">")
        .unwrap();
    let o = mzsift(dir.path())
        .args(["check", "--rules", "r.toml", "broken.mzML", "missing.mzML"])
        .arg(fixture("variant-plain.mzML"))
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let got = outcomes(&stdout(&o));
    assert_eq!(got.len(), 6);
    assert_eq!(got[&("variant-plain.mzML".to_owned(), "min_spectra".to_owned())].0, "pass");
    assert_eq!(got[&("variant-plain.mzML".to_owned(), "checksum".to_owned())].1, "absent");
    assert_eq!(got[&("missing.mzML".to_owned(), "checksum".to_owned())].1, "unreadable");
    assert_eq!(got[&("broken.mzML".to_owned(), "min_spectra".to_owned())].0, "fail");
    assert!(stderr(&o).contains("mzsift: missing.mzML: "), "{}", stderr(&o));
}
