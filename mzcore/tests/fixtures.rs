//! Every committed fixture variant reads back to the same spectra as the reference variant
//! (`variant-indexed-zlib.mzML`): one input through every encoding and layout.

use std::path::{Path, PathBuf};

use mzcore::mzml::{ChecksumStatus, IndexedReader, Reader, ReaderOptions};
use mzcore::spectrum::{Ionization, Peaks, Spectrum};

fn fixtures() -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("../fixtures")
}

fn read_all(name: &str, verify: bool) -> (Vec<(Spectrum, Peaks)>, ChecksumStatus) {
    let path = fixtures().join(name);
    let mut r = Reader::from_path_with(&path, ReaderOptions::default().verify_checksum(verify))
        .unwrap_or_else(|e| panic!("{name}: {e}"));
    let mut out = Vec::new();
    for s in &mut r {
        let s = s.unwrap_or_else(|e| panic!("{name}: {e}"));
        let p = s.decode().unwrap_or_else(|e| panic!("{name}: {e}"));
        out.push((s, p));
    }
    (out, r.checksum_status().clone())
}

/// How closely a variant must reproduce the reference values.
#[derive(Clone, Copy)]
enum Tolerance {
    Exact,
    /// Relative error of 32-bit floats (2^-24, IEEE 754 binary32 rounding).
    F32,
    /// MS-Numpress: linear m/z within 0.5/fixed point (Teleman et al. 2014); intensities
    /// within 0.5 (pic rounds to integers) or 0.05 % relative (slof at its optimal fixed point).
    Numpress,
}

fn close(a: f64, b: f64, tol: Tolerance, is_mz: bool) -> bool {
    match tol {
        Tolerance::Exact => a == b,
        Tolerance::F32 => (a - b).abs() <= b.abs() * 6e-8,
        Tolerance::Numpress if is_mz => (a - b).abs() < 1e-6,
        Tolerance::Numpress => (a - b).abs() <= 0.5 + b.abs() * 5e-4,
    }
}

fn assert_same(name: &str, tol: Tolerance) {
    let (reference, _) = read_all("variant-indexed-zlib.mzML", false);
    let (got, _) = read_all(name, false);
    assert_eq!(got.len(), reference.len(), "{name}: spectrum count");
    for ((s, p), (rs, rp)) in got.iter().zip(&reference) {
        let (m, rm) = (&s.meta, &rs.meta);
        assert_eq!(m.index, rm.index, "{name}");
        if name != "variant-escaped-ids.mzML" {
            assert_eq!(m.id, rm.id, "{name}");
        }
        assert_eq!(m.ms_level, rm.ms_level, "{name} {}", m.id);
        assert_eq!(m.polarity, rm.polarity, "{name} {}", m.id);
        assert_eq!(m.representation, rm.representation, "{name} {}", m.id);
        assert_eq!(m.precursors, rm.precursors, "{name} {}", m.id);
        let (rt, rrt) = (m.rt_min.unwrap(), rm.rt_min.unwrap());
        assert!((rt - rrt).abs() < 1e-12, "{name} {}: rt {rt} vs {rrt}", m.id);
        assert_eq!(p.len(), rp.len(), "{name} {}: points", m.id);
        for (x, rx) in p.mz.iter().zip(&rp.mz) {
            assert!(close(*x, *rx, tol, true), "{name} {}: m/z {x} vs {rx}", m.id);
        }
        for (x, rx) in p.intensity.iter().zip(&rp.intensity) {
            assert!(close(*x, *rx, tol, false), "{name} {}: intensity {x} vs {rx}", m.id);
        }
    }
}

#[test]
fn lossless_variants_equal_the_reference() {
    for name in [
        "variant-plain.mzML",
        "variant-indexed-zlib.mzML.gz",
        "encoding-f64-none.mzML",
        "encoding-int-zlib.mzML",
        "encoding-int64-none.mzML",
        "variant-param-groups-seconds-ei.mzML",
        "variant-crlf.mzML",
        "variant-wrapped-base64.mzML",
        "variant-ns-prefix.mzML",
        "variant-extra-array.mzML",
        "variant-array-length.mzML",
        "variant-escaped-ids.mzML",
        "variant-latin1.mzML",
    ] {
        assert_same(name, Tolerance::Exact);
    }
}

#[test]
fn f32_variant_is_within_single_precision() {
    assert_same("encoding-f32-none.mzML", Tolerance::F32);
}

#[test]
fn numpress_variants_are_within_published_bounds() {
    for name in [
        "encoding-numpress-linear-pic.mzML",
        "encoding-numpress-linear-slof.mzML",
        "encoding-numpress-zlib.mzML",
        "encoding-numpress-slof-zlib.mzML",
    ] {
        assert_same(name, Tolerance::Numpress);
    }
}

#[test]
fn indexed_variants_verify_their_checksum() {
    for name in [
        "variant-indexed-zlib.mzML",
        "variant-indexed-zlib.mzML.gz",
        "encoding-numpress-zlib.mzML",
        "variant-param-groups-seconds-ei.mzML",
    ] {
        let (_, status) = read_all(name, true);
        assert_eq!(status, ChecksumStatus::Verified, "{name}");
    }
    let (_, status) = read_all("variant-plain.mzML", true);
    assert_eq!(status, ChecksumStatus::Absent);
}

#[test]
fn escaped_ids_are_unescaped_once() {
    let (got, _) = read_all("variant-escaped-ids.mzML", false);
    assert_eq!(got[1].0.meta.id, "scan=2 title=a&b_x0020_c");
}

#[test]
fn extra_arrays_are_listed_by_name() {
    let (got, _) = read_all("variant-extra-array.mzML", false);
    for (s, _) in &got {
        assert_eq!(s.meta.skipped_arrays, ["drift time"], "{}", s.meta.id);
        assert_eq!(s.arrays.len(), 2);
    }
}

#[test]
fn ionization_comes_from_the_instrument_configuration() {
    let (ei, _) = read_all("variant-param-groups-seconds-ei.mzML", false);
    assert!(ei.iter().all(|(s, _)| s.meta.ionization == Ionization::Electron));
    let (esi, _) = read_all("variant-plain.mzML", false);
    assert!(esi.iter().all(|(s, _)| s.meta.ionization == Ionization::Electrospray));
}

#[test]
fn tic_chromatogram_is_read_in_minutes() {
    let mut r = Reader::from_path(fixtures().join("variant-param-groups-seconds-ei.mzML")).unwrap();
    let n = r.by_ref().count();
    assert_eq!(n, 4);
    let tic = r.tic_chromatogram().expect("TIC chromatogram");
    assert_eq!(tic.time_min, [0.5, 0.52, 0.53]);
    assert_eq!(tic.intensity.len(), 3);
}

#[test]
fn random_access_by_id_and_index_matches_streaming() {
    let (all, _) = read_all("variant-indexed-zlib.mzML", false);
    let mut r = IndexedReader::from_path(fixtures().join("variant-indexed-zlib.mzML")).unwrap();
    assert_eq!(r.len(), all.len());
    for (s, p) in all.iter().rev() {
        let by_id = r.by_id(&s.meta.id).unwrap();
        assert_eq!(&by_id, s);
        assert_eq!(&by_id.decode().unwrap(), p);
        assert_eq!(&r.by_index(s.meta.index).unwrap(), s);
    }
    assert!(r.by_id("scan=999").is_err());
}

#[test]
fn declared_spectrum_count_matches_the_index() {
    let mut r = Reader::from_path(fixtures().join("variant-indexed-zlib.mzML")).unwrap();
    let n = r.by_ref().filter(|s| s.is_ok()).count();
    assert_eq!(r.declared_spectrum_count(), Some(n));
    assert_eq!(r.index().len(), n);
    assert!(r.is_indexed());
}
