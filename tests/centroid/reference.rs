//! Cross-check against scipy.signal.find_peaks (general-purpose reference library): the maxima
//! in `tests/reference/centroid_peaks.tsv` were found by `tests/reference/centroid_reference.py`
//! (criterion in its header: height, prominence and width at half prominence). On these clean
//! spectra our detector must report exactly one centroid per scipy maximum, lying between the
//! maximum's two neighbouring points, and nothing else.

use std::collections::BTreeMap;

use mzcore::centroid::{CentroidParams, Centroider};

#[derive(Default)]
struct RefSpectrum {
    name: String,
    mz: Vec<f64>,
    intensity: Vec<f64>,
    maxima: Vec<usize>,
}

fn load() -> BTreeMap<usize, RefSpectrum> {
    let path = concat!(env!("CARGO_MANIFEST_DIR"), "/../tests/reference/centroid_peaks.tsv");
    let text = std::fs::read_to_string(path).expect("reference TSV (run centroid_reference.py)");
    let mut out: BTreeMap<usize, RefSpectrum> = BTreeMap::new();
    for line in text.lines().filter(|l| !l.starts_with('#')).skip(1) {
        let f: Vec<&str> = line.split('\t').collect();
        assert_eq!(f.len(), 6, "bad line {line:?}");
        let id: usize = f[1].parse().unwrap();
        let s = out.entry(id).or_default();
        s.name = f[2].to_string();
        let index: usize = f[3].parse().unwrap();
        match f[0] {
            "point" => {
                assert_eq!(index, s.mz.len(), "points out of order");
                s.mz.push(f[4].parse().unwrap());
                s.intensity.push(f[5].parse().unwrap());
            }
            "maximum" => s.maxima.push(index),
            other => panic!("unknown record {other}"),
        }
    }
    out
}

#[test]
fn same_maxima_as_scipy_find_peaks() {
    let spectra = load();
    assert_eq!(spectra.len(), 5);
    let mut picker = Centroider::new();
    let mut out = Vec::new();
    let mut total = 0;
    for s in spectra.values() {
        picker.centroid_profile(&s.mz, &s.intensity, &CentroidParams::default(), &mut out);
        let found: Vec<f64> = out.iter().map(|c| c.mz).collect();
        let last = s.mz.len() - 1;
        let mut used = vec![false; found.len()];
        for &k in &s.maxima {
            let (lo, hi) = (s.mz[k.saturating_sub(1)], s.mz[(k + 1).min(last)]);
            let hits: Vec<usize> =
                (0..found.len()).filter(|&i| found[i] > lo && found[i] < hi).collect();
            assert_eq!(
                hits.len(),
                1,
                "{}: scipy maximum at index {k} (m/z {}) matched {hits:?}; found {found:?}",
                s.name,
                s.mz[k]
            );
            used[hits[0]] = true;
        }
        let extra: Vec<f64> = (0..found.len()).filter(|&i| !used[i]).map(|i| found[i]).collect();
        assert!(extra.is_empty(), "{}: centroids scipy did not find: {extra:?}", s.name);
        total += s.maxima.len();
    }
    assert!(total >= 25, "reference set unexpectedly small: {total}");
}
