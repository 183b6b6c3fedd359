//! Accuracy on synthetic spectra with known true m/z (generator in `profiles.rs`). The bounds
//! are the targets of the project's centroiding issue; `examples/centroid_accuracy.rs` prints
//! the measured figures (well inside these bounds).

use mzcore::centroid::{
    CentroidParams, Centroider, ResolutionAccumulator, ResolutionClass, estimate_resolution,
};

use crate::profiles::{self, Noise, Synth, median_abs};

struct Measured {
    median_error: f64,
    recall: f64,
    median_fwhm_rel_error: f64,
}

fn measure(spectra: u64, make: impl Fn(u64) -> Synth, ppm: bool) -> Measured {
    let (mut picker, mut out) = (Centroider::new(), Vec::new());
    let (mut errors, mut fwhm) = (Vec::new(), Vec::new());
    let (mut total, mut found) = (0, 0);
    for seed in 0..spectra {
        let s = make(seed);
        picker.centroid_profile(&s.mz, &s.intensity, &CentroidParams::default(), &mut out);
        let mzs: Vec<f64> = out.iter().map(|c| c.mz).collect();
        let (matched, _) = profiles::match_peaks(&s.truth, &mzs, |t| 0.5 * t.fwhm);
        for (t, e) in s.truth.iter().zip(matched) {
            total += 1;
            if let Some(e) = e {
                found += 1;
                errors.push(if ppm { e / t.mz * 1e6 } else { e });
                let c = out.iter().find(|c| (c.mz - (t.mz + e)).abs() < 1e-9).unwrap();
                fwhm.push(c.fwhm / t.fwhm - 1.0);
            }
        }
    }
    Measured {
        median_error: median_abs(&errors),
        recall: found as f64 / total as f64,
        median_fwhm_rel_error: median_abs(&fwhm),
    }
}

fn high_res(snr: f64, ppf: f64) -> Measured {
    let n = (50.0 * 40.0 * ppf) as usize;
    measure(
        8,
        |seed| profiles::high_res(seed, n, 200.0, 60_000.0, ppf, 50, snr, Noise::DEFAULT),
        true,
    )
}

#[test]
fn high_resolution_snr_100_within_0_2_ppm() {
    for ppf in [5.0, 10.0] {
        let m = high_res(100.0, ppf);
        assert!(m.median_error <= 0.2, "{ppf} points/FWHM: {} ppm", m.median_error);
        assert!(m.recall >= 0.99);
        assert!(m.median_fwhm_rel_error <= 0.05, "FWHM off by {}", m.median_fwhm_rel_error);
    }
}

#[test]
fn high_resolution_snr_20_within_1_ppm() {
    for ppf in [5.0, 10.0] {
        let m = high_res(20.0, ppf);
        assert!(m.median_error <= 1.0, "{ppf} points/FWHM: {} ppm", m.median_error);
    }
}

#[test]
fn recall_at_snr_10_at_least_99_percent() {
    for ppf in [5.0, 10.0] {
        let m = high_res(10.0, ppf);
        assert!(m.recall >= 0.99, "{ppf} points/FWHM: recall {}", m.recall);
    }
    let unit = measure(
        4,
        |seed| profiles::unit_res(seed, 50.0, 500.0, 0.1, 0.6, 5.0, 10.0, Noise::DEFAULT),
        false,
    );
    assert!(unit.recall >= 0.99, "unit resolution: recall {}", unit.recall);
}

#[test]
fn unit_resolution_within_0_02_u() {
    for snr in [100.0, 20.0] {
        let m = measure(
            4,
            |seed| profiles::unit_res(seed, 50.0, 500.0, 0.1, 0.6, 5.0, snr, Noise::DEFAULT),
            false,
        );
        assert!(m.median_error <= 0.02, "S/N {snr}: {} u", m.median_error);
    }
}

#[test]
fn at_most_one_false_peak_per_10000_noise_points() {
    let (mut picker, mut out) = (Centroider::new(), Vec::new());
    let (mut points, mut false_peaks) = (0, 0);
    for seed in 0..10 {
        let s = profiles::pure_noise(500 + seed, 20_000, 200.0, 60_000.0, 7.0, Noise::DEFAULT);
        picker.centroid_profile(&s.mz, &s.intensity, &CentroidParams::default(), &mut out);
        points += s.mz.len();
        false_peaks += out.len();
    }
    assert!(false_peaks * 10_000 <= points, "{false_peaks} false peaks in {points} points");
}

#[test]
fn resolution_class_and_resolving_power_from_peaks() {
    let (mut picker, mut out) = (Centroider::new(), Vec::new());
    let mut acc = ResolutionAccumulator::new();
    for seed in 0..3 {
        let s = profiles::high_res(seed, 14_000, 300.0, 60_000.0, 7.0, 50, 50.0, Noise::DEFAULT);
        picker.centroid_profile(&s.mz, &s.intensity, &CentroidParams::default(), &mut out);
        acc.add_spectrum(&out);
    }
    let e = acc.finish();
    assert_eq!(e.class, ResolutionClass::High);
    let r = e.median_resolving_power.unwrap();
    assert!((r / 60_000.0 - 1.0).abs() < 0.05, "R = {r}");

    let s = profiles::unit_res(1, 50.0, 500.0, 0.1, 0.6, 5.0, 50.0, Noise::DEFAULT);
    picker.centroid_profile(&s.mz, &s.intensity, &CentroidParams::default(), &mut out);
    let e = estimate_resolution(&out);
    assert_eq!(e.class, ResolutionClass::Unit);
    assert!((e.median_fwhm.unwrap() / 0.6 - 1.0).abs() < 0.05, "{e:?}");
}
