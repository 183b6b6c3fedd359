//! Robust noise estimates: baseline (median) and noise level (scaled median absolute deviation).
//!
//! Median and MAD are the usual robust location/scale pair (common practice; the factor
//! 1.4826 = 1/Phi^-1(3/4) makes the MAD a consistent estimate of a Gaussian standard deviation,
//! from memory). Only a strided subsample of at most a few hundred to a thousand values is
//! looked at, and it is partially ordered with `select_nth_unstable`, never sorted.

use serde::{Deserialize, Serialize};

/// Scale factor turning a median absolute deviation into a Gaussian standard deviation.
pub const MAD_TO_SIGMA: f64 = 1.482_602_218_505_602;

/// Most values a global estimate looks at (the input is subsampled with a fixed stride).
pub const GLOBAL_SAMPLES: usize = 1024;

/// Most values one sliding-window block looks at.
pub const BLOCK_SAMPLES: usize = 256;

/// The baseline and noise level of (part of) a spectrum.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub struct NoiseLevel {
    /// Baseline intensity (median of the sampled intensities).
    pub baseline: f64,
    /// Noise standard deviation (1.4826 x MAD), always finite and > 0.
    pub sigma: f64,
}

impl Default for NoiseLevel {
    fn default() -> Self {
        NoiseLevel { baseline: 0.0, sigma: 1.0 }
    }
}

impl NoiseLevel {
    /// Signal-to-noise ratio of a height: `(height - baseline) / sigma`, always finite
    /// (non-finite results become 0, overflow is clamped to `f64::MAX`).
    pub fn snr(&self, height: f64) -> f64 {
        let s = (height - self.baseline) / self.sigma;
        if s.is_nan() { 0.0 } else { s.clamp(-f64::MAX, f64::MAX) }
    }

    /// The intensity a point must exceed to have S/N above `min_snr`.
    pub fn threshold(&self, min_snr: f64) -> f64 {
        self.baseline + min_snr * self.sigma
    }
}

/// Estimates baseline and noise of `intensity` from a subsample of at most `max_samples` values.
///
/// Non-finite values are ignored. When more than half of the sampled values equal the median
/// (e.g. runs of exact zeros) the MAD is 0; the median of the non-zero deviations is used
/// instead. A constant or empty input gets a tiny positive sigma, so S/N stays finite.
/// `scratch` is reused between calls.
///
/// # Examples
///
/// ```
/// use mzcore::centroid::estimate_noise;
/// let y: Vec<f64> = (0..1000).map(|i| 10.0 + [-1.0, 0.0, 1.0][i % 3]).collect();
/// let noise = estimate_noise(&y, 1024, &mut Vec::new());
/// assert_eq!(noise.baseline, 10.0);
/// assert!((noise.sigma - 1.4826).abs() < 1e-3);
/// ```
pub fn estimate_noise(intensity: &[f64], max_samples: usize, scratch: &mut Vec<f64>) -> NoiseLevel {
    scratch.clear();
    let max_samples = max_samples.max(1);
    let stride = intensity.len().div_ceil(max_samples).max(1);
    // Start half a stride in, so a block's first (often edge) point is not always chosen.
    let start = (stride / 2).min(intensity.len().saturating_sub(1));
    scratch.extend(intensity.iter().skip(start).step_by(stride).copied().filter(|v| v.is_finite()));
    if scratch.is_empty() {
        return NoiseLevel::default();
    }
    let baseline = median_in_place(scratch);
    for v in scratch.iter_mut() {
        *v = (*v - baseline).abs();
    }
    let mut mad = median_in_place(scratch);
    if !(mad > 0.0) {
        scratch.retain(|&d| d > 0.0);
        mad = if scratch.is_empty() { 0.0 } else { median_in_place(scratch) };
    }
    let mut sigma = MAD_TO_SIGMA * mad;
    if !(sigma.is_finite() && sigma > 0.0) {
        sigma = (baseline.abs() * 1e-9).max(1e-12);
        if !sigma.is_finite() {
            sigma = f64::MAX;
        }
    }
    NoiseLevel { baseline, sigma }
}

/// Rounds of clipping [`estimate_noise_clipped`] does at most.
pub const CLIP_ROUNDS: usize = 8;

/// Median / MAD estimate of the noise among `values` after one-sided sigma clipping: values
/// above `baseline + clip * sigma` are set aside and the estimate repeated on the rest, until
/// nothing more is set aside, fewer than `min_kept` values would remain, or [`CLIP_ROUNDS`]
/// rounds have run.
///
/// This is for short lists where real peaks are a large share of the values (a centroid list
/// of a unit-resolution scan holds a few dozen entries, a third of them compound ions): there
/// the plain median/MAD takes the peaks for noise and understates every S/N. Iterative
/// sigma clipping is the usual remedy (common practice in astronomy and spectroscopy, from
/// memory). Peaks only ever lie above the noise, so only the upper side is clipped.
/// `values` is reordered and shortened; non-finite values are ignored; `scratch` is reused
/// between calls.
///
/// # Examples
///
/// ```
/// use mzcore::centroid::estimate_noise_clipped;
/// // Eleven noise values near 100 and four peaks.
/// let mut v = vec![90.0, 95.0, 100.0, 105.0, 110.0, 98.0, 102.0, 97.0, 103.0, 99.0, 101.0,
///                  5000.0, 3000.0, 2000.0, 800.0];
/// let n = estimate_noise_clipped(&mut v, 3.0, 5, &mut Vec::new());
/// assert_eq!(n.baseline, 100.0);
/// assert!(n.sigma < 10.0);
/// ```
pub fn estimate_noise_clipped(
    values: &mut Vec<f64>,
    clip: f64,
    min_kept: usize,
    scratch: &mut Vec<f64>,
) -> NoiseLevel {
    values.retain(|v| v.is_finite());
    let mut level = NoiseLevel::default();
    for _ in 0..CLIP_ROUNDS {
        level = estimate_noise(values, values.len().max(1), scratch);
        let limit = level.threshold(clip);
        let kept = values.iter().filter(|&&v| v <= limit).count();
        if kept == values.len() || kept < min_kept.max(1) {
            break;
        }
        values.retain(|&v| v <= limit);
    }
    level
}

/// Estimates noise separately for consecutive blocks of `window` points (the last block may be
/// shorter), writing one [`NoiseLevel`] per block into `out` (cleared first).
pub fn estimate_noise_blocks(
    intensity: &[f64],
    window: usize,
    scratch: &mut Vec<f64>,
    out: &mut Vec<NoiseLevel>,
) {
    out.clear();
    let window = window.max(1);
    for block in intensity.chunks(window) {
        out.push(estimate_noise(block, BLOCK_SAMPLES, scratch));
    }
}

/// Median of finite values (upper median for even counts); reorders `v`. `v` must not be empty.
fn median_in_place(v: &mut [f64]) -> f64 {
    let mid = v.len() / 2;
    let (_, m, _) = v.select_nth_unstable_by(mid, f64::total_cmp);
    *m
}

/// The `q`-quantile (0..=1, nearest rank) of finite values; reorders `v`. `v` must not be empty.
pub(crate) fn quantile_in_place(v: &mut [f64], q: f64) -> f64 {
    let k = ((v.len() - 1) as f64 * q.clamp(0.0, 1.0)).round() as usize;
    let (_, m, _) = v.select_nth_unstable_by(k, f64::total_cmp);
    *m
}

#[cfg(test)]
mod tests {
    use super::*;

    // Expected values: median and MAD by hand (common practice definitions).
    #[test]
    fn median_and_mad_of_small_sets() {
        let n = estimate_noise(&[1.0, 2.0, 3.0, 4.0, 100.0], 1024, &mut Vec::new());
        assert_eq!(n.baseline, 3.0);
        // deviations 2,1,0,1,97 -> median 1
        assert!((n.sigma - MAD_TO_SIGMA).abs() < 1e-12);
    }

    #[test]
    fn zeros_fall_back_to_nonzero_deviations() {
        let mut y = vec![0.0; 100];
        y[10] = 2.0;
        y[20] = 4.0;
        y[30] = 6.0;
        let n = estimate_noise(&y, 1024, &mut Vec::new());
        assert_eq!(n.baseline, 0.0);
        assert!((n.sigma - 4.0 * MAD_TO_SIGMA).abs() < 1e-12);
    }

    #[test]
    fn empty_constant_and_nan_inputs_give_positive_finite_sigma() {
        for y in [vec![], vec![5.0; 10], vec![f64::NAN; 4], vec![f64::INFINITY, 1.0]] {
            let n = estimate_noise(&y, 16, &mut Vec::new());
            assert!(n.baseline.is_finite() && n.sigma.is_finite() && n.sigma > 0.0, "{y:?}");
        }
    }

    // Worked by hand: 13 values; round 1 median 8, deviations' median 3 (sigma 4.45), limit
    // 21.3 drops 40 and 400; round 2 median 7, MAD 2 (sigma 2.97), limit 15.9 keeps the rest.
    #[test]
    fn clipping_sets_peaks_aside() {
        let mut v = vec![3.0, 4.0, 5.0, 6.0, 7.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 40.0, 400.0];
        let n = estimate_noise_clipped(&mut v, 3.0, 3, &mut Vec::new());
        assert_eq!(n.baseline, 7.0);
        assert!((n.sigma - 2.0 * MAD_TO_SIGMA).abs() < 1e-12, "{n:?}");
        assert_eq!(v.len(), 11);
    }

    #[test]
    fn clipping_keeps_at_least_min_kept_values() {
        // Median 3, MAD 2 (sigma 2.97), limit 11.9 would keep three values, fewer than four:
        // it stops with the first estimate.
        let mut v = vec![1.0, 2.0, 3.0, 1000.0, 2000.0];
        let n = estimate_noise_clipped(&mut v, 3.0, 4, &mut Vec::new());
        assert_eq!(n.baseline, 3.0);
        assert_eq!(v.len(), 5);
    }

    #[test]
    fn blocks_follow_a_changing_baseline() {
        let y: Vec<f64> = (0..2000)
            .map(|i| if i < 1000 { 10.0 } else { 50.0 } + [-1.0, 0.0, 1.0][i % 3])
            .collect();
        let mut out = Vec::new();
        estimate_noise_blocks(&y, 500, &mut Vec::new(), &mut out);
        assert_eq!(out.len(), 4);
        assert_eq!(out[0].baseline, 10.0);
        assert_eq!(out[3].baseline, 50.0);
    }
}
