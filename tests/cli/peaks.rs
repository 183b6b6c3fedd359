//! `mzsift peaks`.

use crate::util::{fixture, run, stderr, stdout, tsv};

#[test]
fn peaks_of_a_profile_spectrum_by_index_and_by_id_agree() {
    let f = fixture("variant-indexed-zlib.mzML");
    let (a, _d1) = run(&["peaks", f.to_str().unwrap(), "--index", "3"]);
    let (b, _d2) = run(&["peaks", f.to_str().unwrap(), "--id", "scan=4"]);
    assert!(a.status.success(), "{}", stderr(&a));
    assert_eq!(stdout(&a), stdout(&b));
    let (header, rows) = tsv(&stdout(&a));
    assert_eq!(header, ["mz", "intensity", "area", "snr", "fwhm"]);
    // The fixture's fourth spectrum is one Gaussian at m/z 199.9462 (make_fixtures.rs).
    assert_eq!(rows.len(), 1);
    let mz: f64 = rows[0][0].parse().unwrap();
    assert!((mz - 199.9462).abs() < 1e-6, "{mz}");
}

#[test]
fn raw_points_and_streaming_lookup_in_a_plain_file() {
    let f = fixture("variant-crlf.mzML");
    let (o, _d) = run(&["peaks", f.to_str().unwrap(), "--id", "scan=2", "--raw"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (header, rows) = tsv(&stdout(&o));
    assert_eq!(header, ["mz", "intensity"]);
    assert_eq!(rows.len(), 4);
    assert_eq!(rows[1], ["91.00000", "850.000"]);
}

#[test]
fn a_missing_spectrum_is_an_error() {
    let f = fixture("variant-plain.mzML");
    let (o, _d) = run(&["peaks", f.to_str().unwrap(), "--index", "99"]);
    assert_eq!(o.status.code(), Some(1));
    assert!(stderr(&o).contains("no spectrum 99"), "{}", stderr(&o));
}

#[test]
fn index_or_id_is_required() {
    let f = fixture("variant-plain.mzML");
    let (o, _d) = run(&["peaks", f.to_str().unwrap()]);
    assert_eq!(o.status.code(), Some(2));
}
