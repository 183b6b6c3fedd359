//! `mzsift list`.

use crate::assert_tsv_eq;
use crate::util::{fixture, run, stderr, stdout, tsv};

#[test]
fn list_has_the_documented_columns_and_one_row_per_spectrum() {
    let (o, _d) = run(&["list", fixture("variant-indexed-zlib.mzML").to_str().unwrap()]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (header, rows) = tsv(&stdout(&o));
    assert_eq!(
        header,
        [
            "index",
            "id",
            "ms_level",
            "polarity",
            "representation",
            "rt_min",
            "points",
            "intensity_sum",
            "mz_min",
            "mz_max",
            "base_peak_mz",
            "base_peak_intensity",
            "precursor_mz",
            "precursor_charge"
        ]
    );
    assert_eq!(rows.len(), 4);
    // Second spectrum: the MS2 of the fixture generator (mzcore/examples/make_fixtures.rs).
    let ms2 = &rows[1];
    assert_eq!(&ms2[..7], ["1", "scan=2", "2", "+", "centroid", "0.5100", "4"]);
    // Digits per the README's "Numbers": intensities 6 significant, m/z 5 decimals.
    assert_eq!(ms2[7], "1320.00"); // 120 + 850 + 40 + 310
    assert_eq!(ms2[10], "91.00000");
    assert_eq!(ms2[12], "151.99040");
    assert_eq!(ms2[13], "1");
    // Empty spectrum: empty cells for values that do not exist.
    let empty = &rows[2];
    assert_eq!(empty[6], "0");
    assert_eq!(&empty[8..], ["", "", "", "", "", ""]);
}

#[test]
fn list_is_the_same_for_every_lossless_variant() {
    let reference =
        stdout(&run(&["list", fixture("variant-indexed-zlib.mzML").to_str().unwrap()]).0);
    for name in [
        "variant-plain.mzML",
        "variant-indexed-zlib.mzML.gz",
        "variant-crlf.mzML",
        "variant-ns-prefix.mzML",
    ] {
        let (o, _d) = run(&["list", fixture(name).to_str().unwrap()]);
        assert!(o.status.success(), "{name}: {}", stderr(&o));
        assert_tsv_eq!(stdout(&o), reference);
    }
}

#[test]
fn list_reads_stdin() {
    let file = std::fs::File::open(fixture("variant-plain.mzML")).unwrap();
    let dir = tempfile::tempdir().unwrap();
    let o = crate::util::mzsift(dir.path()).args(["list", "-"]).stdin(file).output().unwrap();
    assert!(o.status.success());
    assert_eq!(tsv(&stdout(&o)).1.len(), 4);
}

#[test]
fn a_bad_spectrum_is_reported_and_the_rest_listed() {
    let text = std::fs::read_to_string(fixture("variant-plain.mzML")).unwrap();
    let bad = text.replacen("name=\"ms level\" value=\"2\"", "name=\"ms level\" value=\"two\"", 1);
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("bad.mzML");
    std::fs::write(&path, bad).unwrap();
    let o = crate::util::mzsift(dir.path()).args(["list", "bad.mzML"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1));
    assert_eq!(tsv(&stdout(&o)).1.len(), 3);
    let err = stderr(&o);
    assert!(err.starts_with("mzsift: bad.mzML: spectrum 1 (id 'scan=2'), byte "), "{err}");
    assert!(err.contains("invalid value 'two'"), "{err}");
}

#[test]
fn a_missing_file_is_one_clear_line() {
    let (o, _d) = run(&["list", "no-such-file.mzML"]);
    assert_eq!(o.status.code(), Some(1));
    let err = stderr(&o);
    assert!(err.starts_with("mzsift: no-such-file.mzML"), "{err}");
    assert_eq!(err.lines().count(), 1, "{err}");
}

#[test]
fn unknown_option_is_a_usage_error() {
    let (o, _d) = run(&["list", "--bogus"]);
    assert_eq!(o.status.code(), Some(2));
}
