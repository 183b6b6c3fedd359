//! Prints the accuracy figures of the peak picker on synthetic profile spectra with known true
//! peak positions: m/z error, detection recall, false peaks in pure noise, FWHM and resolution.
//!
//! Run with `cargo run --release -p mzcore --example centroid_accuracy`.

#[path = "../../tests/centroid/profiles.rs"]
mod profiles;

use mzcore::centroid::{ApexMethod, Centroid, CentroidParams, Centroider, ResolutionAccumulator};
use profiles::{Noise, Synth, median_abs};

const SPECTRA: u64 = 20;
const PEAKS: usize = 50;

struct Figures {
    median_error: f64,
    recall: f64,
    false_peaks: usize,
    median_fwhm_rel_error: f64,
}

fn run(
    params: &CentroidParams,
    make: impl Fn(u64) -> Synth,
    relative: bool,
    acc: Option<&mut ResolutionAccumulator>,
) -> Figures {
    let mut picker = Centroider::new();
    let mut out: Vec<Centroid> = Vec::new();
    let (mut errors, mut fwhm_errors) = (Vec::new(), Vec::new());
    let (mut total, mut found, mut false_peaks) = (0, 0, 0);
    let mut acc = acc;
    for seed in 0..SPECTRA {
        let s = make(seed);
        picker.centroid_profile(&s.mz, &s.intensity, params, &mut out);
        if let Some(a) = acc.as_deref_mut() {
            a.add_spectrum(&out);
        }
        let mzs: Vec<f64> = out.iter().map(|c| c.mz).collect();
        let (matched, unmatched) = profiles::match_peaks(&s.truth, &mzs, |t| 0.5 * t.fwhm);
        false_peaks += unmatched;
        for (t, e) in s.truth.iter().zip(&matched) {
            total += 1;
            if let Some(e) = e {
                found += 1;
                errors.push(if relative { e / t.mz * 1e6 } else { *e });
                let c = out.iter().find(|c| (c.mz - t.mz - e).abs() < 1e-12).expect("matched");
                fwhm_errors.push(c.fwhm / t.fwhm - 1.0);
            }
        }
    }
    Figures {
        median_error: median_abs(&errors),
        recall: found as f64 / total.max(1) as f64,
        false_peaks,
        median_fwhm_rel_error: median_abs(&fwhm_errors),
    }
}

fn main() {
    let noise = Noise::DEFAULT;
    println!(
        "# noise model: baseline {} + N(0,1) * sqrt({}^2 + {} * signal); S/N = height / noise sd at apex",
        noise.baseline, noise.sigma, noise.gain
    );
    println!(
        "# {SPECTRA} spectra x {PEAKS} isolated peaks per row; high resolution R = 60,000 from m/z 200\n"
    );
    println!(
        "apex_method\tdata\tsnr\tpoints_per_fwhm\tmedian_abs_error\tunit\trecall\tfalse_peaks\tmedian_fwhm_rel_error"
    );
    for apex in [ApexMethod::GaussianFit, ApexMethod::Gaussian3, ApexMethod::WeightedHalfHeight] {
        let params = CentroidParams { apex, ..CentroidParams::default() };
        for (snr, ppf) in
            [(100.0, 5.0), (100.0, 10.0), (20.0, 5.0), (20.0, 10.0), (10.0, 5.0), (10.0, 10.0)]
        {
            let n = (PEAKS as f64 * 40.0 * ppf) as usize;
            let f = run(
                &params,
                |seed| profiles::high_res(seed, n, 200.0, 60_000.0, ppf, PEAKS, snr, noise),
                true,
                None,
            );
            println!(
                "{apex:?}\thigh_res\t{snr}\t{ppf}\t{:.3}\tppm\t{:.4}\t{}\t{:.3}",
                f.median_error, f.recall, f.false_peaks, f.median_fwhm_rel_error
            );
        }
        for snr in [100.0, 20.0, 10.0] {
            let f = run(
                &params,
                |seed| profiles::unit_res(seed, 50.0, 500.0, 0.1, 0.6, 5.0, snr, noise),
                false,
                None,
            );
            println!(
                "{apex:?}\tunit_res\t{snr}\t6\t{:.4}\tu\t{:.4}\t{}\t{:.3}",
                f.median_error, f.recall, f.false_peaks, f.median_fwhm_rel_error
            );
        }
    }

    // False peaks in pure noise at the default threshold.
    let params = CentroidParams::default();
    let mut picker = Centroider::new();
    let mut out = Vec::new();
    let (mut points, mut false_peaks) = (0usize, 0usize);
    for seed in 0..50 {
        let s = profiles::pure_noise(1000 + seed, 20_000, 200.0, 60_000.0, 7.0, noise);
        picker.centroid_profile(&s.mz, &s.intensity, &params, &mut out);
        points += s.mz.len();
        false_peaks += out.len();
    }
    println!(
        "\npure_noise\tpoints {points}\tfalse_peaks {false_peaks}\tper_10000_points {:.3}",
        false_peaks as f64 * 1e4 / points as f64
    );

    // Resolution estimate.
    let mut acc = ResolutionAccumulator::new();
    let n = (PEAKS as f64 * 40.0 * 7.0) as usize;
    run(
        &params,
        |seed| profiles::high_res(seed, n, 200.0, 60_000.0, 7.0, PEAKS, 50.0, noise),
        true,
        Some(&mut acc),
    );
    println!("resolution high_res (true R 60000): {:?}", acc.finish());
    let mut acc = ResolutionAccumulator::new();
    run(
        &params,
        |seed| profiles::unit_res(seed, 50.0, 500.0, 0.1, 0.6, 5.0, 50.0, noise),
        false,
        Some(&mut acc),
    );
    println!("resolution unit_res (true FWHM 0.6): {:?}", acc.finish());
}
