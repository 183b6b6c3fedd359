//! `mzsift info`.

use crate::util::{fixture, run, stderr, stdout};

fn info_json(name: &str, extra: &[&str]) -> serde_json::Value {
    let path = fixture(name);
    let mut args = vec!["info", path.to_str().unwrap(), "--format", "json"];
    args.extend_from_slice(extra);
    let (o, _d) = run(&args);
    assert!(o.status.success(), "{name}: {}", stderr(&o));
    serde_json::from_str(&stdout(&o)).unwrap()
}

#[test]
fn info_counts_levels_and_verifies_the_checksum() {
    let v = info_json("variant-indexed-zlib.mzML", &["--verify"]);
    assert_eq!(v["spectra"], 4);
    assert_eq!(v["spectra_per_ms_level"]["1"], 3);
    assert_eq!(v["spectra_per_ms_level"]["2"], 1);
    assert_eq!(v["rt_start_min"], 0.5);
    assert_eq!(v["rt_end_min"], 0.53);
    assert_eq!(v["checksum"], "verified");
    assert_eq!(v["indexed"], true);
    assert_eq!(v["index_entries"], 4);
    assert_eq!(v["ionization"][0], "esi");
    assert_eq!(v["encodings"], serde_json::json!(["f64+zlib", "f32+zlib"]));
    assert_eq!(v["tic_chromatogram_points"], 3);
}

#[test]
fn info_names_numpress_and_gzip() {
    let v = info_json("encoding-numpress-zlib.mzML", &[]);
    assert_eq!(v["encodings"], serde_json::json!(["numpress-linear+zlib", "numpress-pic+zlib"]));
    assert_eq!(v["checksum"], "not checked");
    let v = info_json("variant-indexed-zlib.mzML.gz", &["--verify"]);
    assert_eq!(v["gzip"], true);
    assert_eq!(v["checksum"], "verified");
}

#[test]
fn info_reports_a_checksum_mismatch_with_exit_code_1() {
    let text = std::fs::read_to_string(fixture("variant-indexed-zlib.mzML")).unwrap();
    let bad = text.replacen("value=\"0.51\"", "value=\"0.59\"", 1);
    assert_ne!(bad, text);
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("x.mzML"), bad).unwrap();
    let o = crate::util::mzsift(dir.path())
        .args(["info", "x.mzML", "--verify", "--format", "tsv"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1));
    assert!(stdout(&o).contains("checksum\tmismatch"), "{}", stdout(&o));
    assert!(stderr(&o).contains("fileChecksum mismatch"), "{}", stderr(&o));
}

#[test]
fn info_text_format_is_key_value_lines() {
    let (o, _d) = run(&["info", fixture("variant-param-groups-seconds-ei.mzML").to_str().unwrap()]);
    assert!(o.status.success());
    let out = stdout(&o);
    assert!(out.lines().any(|l| l.starts_with("ionization") && l.ends_with("ei")), "{out}");
}
