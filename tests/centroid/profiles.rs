//! Deterministic synthetic profile spectra with known true peak positions.
//!
//! Shared by the centroid tests, `examples/centroid_accuracy.rs` and `benches/centroid.rs`
//! (included with `#[path]`). The PRNG is SplitMix64 (Steele, Lea, Flood, "Fast splittable
//! pseudorandom number generators", OOPSLA 2014; constants from memory), normal deviates by the
//! Box-Muller transform. Noise: Gaussian with standard deviation `sqrt(sigma^2 + gain * s)` at
//! clean signal `s` above the baseline, i.e. baseline noise plus shot-like noise.
// Generator knobs are plain arguments on purpose (each call site reads as a recipe).
#![allow(dead_code, clippy::too_many_arguments)]

/// The library's deterministic generator (xoshiro256** seeded by SplitMix64).
pub use mzcore::synth::rng::Rng;

/// Noise model: `baseline + N(0, 1) * sqrt(sigma^2 + gain * s)` for clean signal `s`.
#[derive(Clone, Copy, Debug)]
pub struct Noise {
    pub baseline: f64,
    pub sigma: f64,
    pub gain: f64,
}

impl Noise {
    pub const DEFAULT: Noise = Noise { baseline: 20.0, sigma: 2.0, gain: 0.2 };

    /// Standard deviation of the noise at clean signal `s`.
    pub fn sd(&self, s: f64) -> f64 {
        (self.sigma * self.sigma + self.gain * s).sqrt()
    }

    /// Peak height whose apex S/N (height over the noise sd at the apex) is `snr`.
    pub fn height_for_snr(&self, snr: f64) -> f64 {
        // A / sqrt(sigma^2 + g A) = snr  =>  A^2 - g snr^2 A - snr^2 sigma^2 = 0.
        let b = self.gain * snr * snr;
        0.5 * (b + (b * b + 4.0 * snr * snr * self.sigma * self.sigma).sqrt())
    }
}

/// A true peak.
#[derive(Clone, Copy, Debug)]
pub struct TruePeak {
    pub mz: f64,
    pub height: f64,
    pub fwhm: f64,
}

/// A generated spectrum and its truth.
pub struct Synth {
    pub mz: Vec<f64>,
    pub intensity: Vec<f64>,
    pub truth: Vec<TruePeak>,
}

/// Gaussian standard deviation from a FWHM.
pub fn sigma_of(fwhm: f64) -> f64 {
    fwhm / (2.0 * (2.0 * std::f64::consts::LN_2).sqrt())
}

/// Adds the clean peaks to `y` (points within 6 FWHM), then noise.
fn render(mz: &[f64], truth: &[TruePeak], noise: Noise, rng: &mut Rng) -> Vec<f64> {
    let mut clean = vec![0.0; mz.len()];
    for p in truth {
        let s = sigma_of(p.fwhm);
        let lo = mz.partition_point(|&m| m < p.mz - 6.0 * p.fwhm);
        let hi = mz.partition_point(|&m| m <= p.mz + 6.0 * p.fwhm);
        for k in lo..hi {
            let d = (mz[k] - p.mz) / s;
            clean[k] += p.height * (-0.5 * d * d).exp();
        }
    }
    clean.iter().map(|&c| (noise.baseline + c + rng.normal() * noise.sd(c)).max(0.0)).collect()
}

/// High-resolution profile: `n` points from m/z `start`, constant resolving power `r`,
/// `ppf` points per FWHM (spacing grows with m/z), `peaks` isolated peaks (at least 40 FWHM
/// apart) at random positions relative to the sampling grid, each with apex S/N `snr`.
pub fn high_res(
    seed: u64,
    n: usize,
    start: f64,
    r: f64,
    ppf: f64,
    peaks: usize,
    snr: f64,
    noise: Noise,
) -> Synth {
    let mut rng = Rng::new(seed);
    let step = 1.0 / (r * ppf);
    let mz: Vec<f64> = (0..n).map(|k| start * (1.0f64 + step).powi(k as i32)).collect();
    let slot = n / peaks.max(1);
    assert!(slot as f64 >= 40.0 * ppf, "peaks too dense to be isolated");
    let mut truth = Vec::with_capacity(peaks);
    for p in 0..peaks {
        let centre = p * slot + slot / 2;
        let jitter = rng.uniform() - 0.5;
        let m = mz[centre] * (1.0 + jitter * step);
        truth.push(TruePeak { mz: m, height: noise.height_for_snr(snr), fwhm: m / r });
    }
    let intensity = render(&mz, &truth, noise, &mut rng);
    Synth { mz, intensity, truth }
}

/// Unit-resolution profile: m/z `start..start + span` every `step` u, FWHM `fwhm` u, one peak
/// every `every` u near a nominal mass (mass defect -0.1 .. +0.3), apex S/N `snr`.
pub fn unit_res(
    seed: u64,
    start: f64,
    span: f64,
    step: f64,
    fwhm: f64,
    every: f64,
    snr: f64,
    noise: Noise,
) -> Synth {
    let mut rng = Rng::new(seed);
    let n = (span / step) as usize;
    let mz: Vec<f64> = (0..n).map(|k| start + step * k as f64).collect();
    let mut truth = Vec::new();
    let mut nominal = (start + every).ceil();
    while nominal < start + span - every {
        let m = nominal - 0.1 + 0.4 * rng.uniform();
        truth.push(TruePeak { mz: m, height: noise.height_for_snr(snr), fwhm });
        nominal += every;
    }
    let intensity = render(&mz, &truth, noise, &mut rng);
    Synth { mz, intensity, truth }
}

/// Pure noise on the high-resolution grid (no peaks).
pub fn pure_noise(seed: u64, n: usize, start: f64, r: f64, ppf: f64, noise: Noise) -> Synth {
    let mut rng = Rng::new(seed);
    let step = 1.0 / (r * ppf);
    let mz: Vec<f64> = (0..n).map(|k| start * (1.0f64 + step).powi(k as i32)).collect();
    let intensity = render(&mz, &[], noise, &mut rng);
    Synth { mz, intensity, truth: Vec::new() }
}

/// A realistic busy spectrum for speed: `n` points, R = 60,000, 7 points per FWHM, `peaks`
/// peaks with log-uniform S/N 5 .. 2000 at random (possibly overlapping) positions.
pub fn busy(seed: u64, n: usize, peaks: usize) -> Synth {
    let mut rng = Rng::new(seed);
    let (r, ppf, start) = (60_000.0, 7.0, 150.0);
    let step = 1.0 / (r * ppf);
    let mz: Vec<f64> = (0..n).map(|k| start * (1.0f64 + step).powi(k as i32)).collect();
    let noise = Noise::DEFAULT;
    let (lo, hi) = (mz[0], mz[n - 1]);
    let truth: Vec<TruePeak> = (0..peaks)
        .map(|_| {
            let m = lo + (hi - lo) * rng.uniform();
            let snr = 5.0 * 400f64.powf(rng.uniform());
            TruePeak { mz: m, height: noise.height_for_snr(snr), fwhm: m / r }
        })
        .collect();
    let mut truth = truth;
    truth.sort_by(|a, b| a.mz.total_cmp(&b.mz));
    let intensity = render(&mz, &truth, noise, &mut rng);
    Synth { mz, intensity, truth }
}

/// Matches true peaks to the nearest found m/z within `window(peak)`; returns for each true
/// peak the signed error of its match (None when missed) and the number of unmatched found
/// peaks.
pub fn match_peaks(
    truth: &[TruePeak],
    found: &[f64],
    window: impl Fn(&TruePeak) -> f64,
) -> (Vec<Option<f64>>, usize) {
    let mut used = vec![false; found.len()];
    let errors = truth
        .iter()
        .map(|t| {
            let k = found.partition_point(|&m| m < t.mz);
            let best = [k.wrapping_sub(1), k]
                .into_iter()
                .filter(|&i| i < found.len())
                .min_by(|&a, &b| (found[a] - t.mz).abs().total_cmp(&(found[b] - t.mz).abs()))?;
            if (found[best] - t.mz).abs() <= window(t) && !used[best] {
                used[best] = true;
                Some(found[best] - t.mz)
            } else {
                None
            }
        })
        .collect();
    (errors, used.iter().filter(|u| !**u).count())
}

/// Median of absolute values (sorts a copy; test code only).
pub fn median_abs(v: &[f64]) -> f64 {
    let mut a: Vec<f64> = v.iter().map(|x| x.abs()).collect();
    a.sort_by(f64::total_cmp);
    if a.is_empty() { f64::NAN } else { a[a.len() / 2] }
}
