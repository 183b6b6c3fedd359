//! Centroiding: profile points to peaks, and one S/N threshold for both peak types.
//!
//! Data flow for one spectrum: a robust noise estimate ([`estimate_noise`]: median and MAD,
//! global or per block of points, or a [`NoiseMethod::Fixed`] level) gives a baseline and a
//! noise sigma; points above `baseline + min_snr * sigma` that are local maxima become candidate
//! apexes (a flat top of equal points counts as one, its apex at the plateau centre with the
//! plateau height); neighbouring candidates on the same sampled island whose valley is shallow
//! are merged; one-point spikes are dropped; each remaining peak gets an interpolated apex m/z
//! ([`ApexMethod`]), height, area, FWHM and S/N in a [`Centroid`]. S/N is measured against the
//! baseline noise sigma, so with shot noise a peak's S/N is higher than its height over the
//! noise at its apex.
//!
//! Profile data from real instruments is sampled non-uniformly and often has runs of zero
//! points removed. Two neighbouring points are on the same *island* when their spacing is
//! not much larger than the spacings next to it and than the typical spacing in that part of
//! the spectrum (see [`CentroidParams::gap_factor`]); a peak never extends across a gap, and
//! an island of two or three points can be a peak.
//!
//! [`Centroider`] holds the scratch buffers so that a worker thread can centroid spectrum after
//! spectrum without allocating ([`Centroider::pick`] chooses between profile centroiding and
//! thresholding by the spectrum's representation); [`centroid_profile`] and
//! [`threshold_centroided`] are convenience functions using a thread-local [`Centroider`].
//! [`ResolutionAccumulator`] collects peak widths across spectra (and threads) to tell unit
//! from high resolution data.
//!
//! # Examples
//!
//! ```
//! use mzcore::centroid::{centroid_profile, CentroidParams};
//! // A Gaussian peak at m/z 400.002 (FWHM 0.0067) on a noisy baseline of 10.
//! let mz: Vec<f64> = (0..2000).map(|i| 399.9 + 0.0001 * i as f64).collect();
//! let intensity: Vec<f64> = mz
//!     .iter()
//!     .enumerate()
//!     .map(|(i, &m)| {
//!         let ripple = [-1.0, 0.5, 1.0, -0.5][i % 4];
//!         10.0 + ripple + 1000.0 * (-((m - 400.002) / 0.002845).powi(2) / 2.0).exp()
//!     })
//!     .collect();
//! let mut peaks = Vec::new();
//! centroid_profile(&mz, &intensity, &CentroidParams::default(), &mut peaks);
//! assert_eq!(peaks.len(), 1);
//! assert!((peaks[0].mz - 400.002).abs() < 1e-5);
//! assert!((peaks[0].fwhm - 0.0067).abs() < 2e-4);
//! ```

// Negated comparisons such as `!(x > 0.0)` are deliberate throughout: they also catch NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

use std::cell::RefCell;

use serde::{Deserialize, Serialize};

use crate::spectrum::{Peaks, Representation};
use crate::{Error, ErrorKind, Result};

mod apex;
mod noise;
mod pick;
mod resolution;

pub use noise::{
    BLOCK_SAMPLES, CLIP_ROUNDS, GLOBAL_SAMPLES, MAD_TO_SIGMA, NoiseLevel, estimate_noise,
    estimate_noise_blocks, estimate_noise_clipped,
};
pub use resolution::{
    CLOSE_SPACING_DA, ResolutionAccumulator, ResolutionClass, ResolutionEstimate, Tolerance,
    UNIT_FWHM_DA, estimate_resolution,
};

/// How the baseline and noise level are estimated.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum NoiseMethod {
    /// One median / MAD estimate for the whole spectrum.
    Global,
    /// A median / MAD estimate per block of `window` consecutive points, for spectra whose
    /// baseline changes across m/z.
    Sliding {
        /// Points per block (at least 1; 500 to 2000 is typical).
        window: usize,
    },
    /// A known baseline and noise level (e.g. from blank runs, or for data whose instrument
    /// already removed the baseline so that a median sees mostly peak points).
    Fixed(NoiseLevel),
}

/// How the apex m/z of a profile peak is interpolated.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ApexMethod {
    /// Exact Gaussian through the highest point and its two neighbours, on log intensities
    /// (Caruana's method).
    Gaussian3,
    /// Weighted least-squares Gaussian (log-parabola, weights y^2) through all points above
    /// half height; falls back to [`ApexMethod::Gaussian3`] with fewer than three such points.
    GaussianFit,
    /// Intensity-weighted mean m/z of the points above half height.
    WeightedHalfHeight,
}

/// Settings of the peak picker. [`Default`] suits profile spectra with Gaussian-like peaks.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(default)]
pub struct CentroidParams {
    /// Least S/N (`(apex point - baseline) / sigma`) of a peak's highest point. Default 4.
    pub min_snr: f64,
    /// Noise estimate. Default [`NoiseMethod::Global`].
    pub noise: NoiseMethod,
    /// Apex interpolation. Default [`ApexMethod::GaussianFit`].
    pub apex: ApexMethod,
    /// Two maxima on one island stay separate peaks only if the valley between them is at
    /// least this fraction of the smaller one's height above baseline. Default 0.1.
    pub min_valley_depth: f64,
    /// ... and at least this many noise sigmas deep. Default 5.
    pub min_valley_snr: f64,
    /// A one-point maximum is a noise spike unless its higher neighbour reaches this fraction
    /// of its height above baseline. Default 0.25.
    pub spike_ratio: f64,
    /// A spacing larger than this factor times the smaller neighbouring spacing, or than twice
    /// this factor times the typical spacing in that part of the spectrum, is a gap (a dropped
    /// run of points). Default 1.6.
    pub gap_factor: f64,
    /// Least S/N of a peak in already-centroided data, where S/N is measured against the
    /// floor of the list (see [`Centroider::threshold_centroided`]). Default 1 (keep every
    /// peak at or above the floor).
    pub centroided_min_snr: f64,
}

impl Default for CentroidParams {
    fn default() -> Self {
        CentroidParams {
            min_snr: 4.0,
            noise: NoiseMethod::Global,
            apex: ApexMethod::GaussianFit,
            min_valley_depth: 0.1,
            min_valley_snr: 5.0,
            spike_ratio: 0.25,
            gap_factor: 1.6,
            centroided_min_snr: 1.0,
        }
    }
}

impl CentroidParams {
    /// Checks that every setting is finite and in range.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::centroid::CentroidParams;
    /// CentroidParams::default().validate()?;
    /// let bad = CentroidParams { gap_factor: 0.5, ..CentroidParams::default() };
    /// assert!(bad.validate().is_err());
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn validate(&self) -> Result<()> {
        let bad = |what: &str| Err(Error::new(ErrorKind::Config(format!("centroid: {what}"))));
        if !(self.min_snr.is_finite() && self.min_snr >= 0.0) {
            return bad("min_snr must be finite and >= 0");
        }
        if !(0.0..=1.0).contains(&self.min_valley_depth) {
            return bad("min_valley_depth must be between 0 and 1");
        }
        if !(self.min_valley_snr.is_finite() && self.min_valley_snr >= 0.0) {
            return bad("min_valley_snr must be finite and >= 0");
        }
        if !(0.0..=1.0).contains(&self.spike_ratio) {
            return bad("spike_ratio must be between 0 and 1");
        }
        if !(self.gap_factor.is_finite() && self.gap_factor > 1.0) {
            return bad("gap_factor must be finite and > 1");
        }
        match self.noise {
            NoiseMethod::Sliding { window: 0 } => {
                return bad("sliding noise window must be at least 1 point");
            }
            NoiseMethod::Fixed(l)
                if !(l.baseline.is_finite() && l.sigma.is_finite() && l.sigma > 0.0) =>
            {
                return bad("fixed noise needs a finite baseline and a finite sigma > 0");
            }
            _ => {}
        }
        Ok(())
    }
}

/// One peak. Every field is finite.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct Centroid {
    /// Apex m/z, inside the m/z range of the peak's points.
    pub mz: f64,
    /// Apex height (interpolated for profile peaks; the stored value for centroided input).
    pub intensity: f64,
    /// Area above baseline (trapezoids over the peak's points, intensity x m/z); for centroided
    /// input, the stored intensity.
    pub area: f64,
    /// Signal-to-noise ratio of the apex height.
    pub snr: f64,
    /// Full width at half maximum in m/z; 0 when not measured (centroided input).
    pub fwhm: f64,
}

/// Reusable peak picker: holds scratch buffers and the last noise estimate.
#[derive(Debug, Clone, Default)]
pub struct Centroider {
    samples: Vec<f64>,
    scratch: Vec<f64>,
    noise: Vec<NoiseLevel>,
    block_len: usize,
    spacing: pick::SpacingModel,
}

impl Centroider {
    /// A picker with empty buffers.
    pub fn new() -> Self {
        Self::default()
    }

    /// The noise levels of the last spectrum: one for [`NoiseMethod::Global`] and
    /// [`NoiseMethod::Fixed`] (invalid fixed values replaced by baseline 0, sigma 1), one per block
    /// (see [`Centroider::noise_block_len`]) for [`NoiseMethod::Sliding`].
    pub fn noise(&self) -> &[NoiseLevel] {
        &self.noise
    }

    /// Points per block of [`Centroider::noise`] for the last spectrum.
    pub fn noise_block_len(&self) -> usize {
        self.block_len
    }

    fn estimate(&mut self, intensity: &[f64], method: NoiseMethod) {
        match method {
            NoiseMethod::Global => {
                self.noise.clear();
                self.noise.push(estimate_noise(intensity, GLOBAL_SAMPLES, &mut self.samples));
                self.block_len = intensity.len().max(1);
            }
            NoiseMethod::Sliding { window } => {
                let window = window.max(1);
                estimate_noise_blocks(intensity, window, &mut self.samples, &mut self.noise);
                if self.noise.is_empty() {
                    self.noise.push(NoiseLevel::default());
                }
                self.block_len = window;
            }
            NoiseMethod::Fixed(level) => {
                self.noise.clear();
                let sigma =
                    if level.sigma.is_finite() && level.sigma > 0.0 { level.sigma } else { 1.0 };
                let baseline = if level.baseline.is_finite() { level.baseline } else { 0.0 };
                self.noise.push(NoiseLevel { baseline, sigma });
                self.block_len = intensity.len().max(1);
            }
        }
    }

    /// Picks the peaks of a profile spectrum, replacing the contents of `out` (ascending m/z).
    ///
    /// `mz` should be ascending; points with non-finite m/z or intensity, or a non-ascending
    /// step, break islands. Extra elements of the longer slice are ignored. Never panics.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::centroid::{Centroider, CentroidParams};
    /// // A two-point island between dropped-zero gaps, and one lone spike.
    /// let mz = [100.0, 100.01, 100.02, 100.5, 100.51, 101.0, 101.01, 101.02];
    /// let y = [1.0, 2.0, 1.5, 900.0, 800.0, 1.0, 3000.0, 1.0];
    /// let (mut picker, mut out) = (Centroider::new(), Vec::new());
    /// picker.centroid_profile(&mz, &y, &CentroidParams::default(), &mut out);
    /// assert_eq!(out.len(), 1);
    /// assert!(out[0].mz > 100.5 && out[0].mz < 100.51);
    /// ```
    pub fn centroid_profile(
        &mut self,
        mz: &[f64],
        intensity: &[f64],
        params: &CentroidParams,
        out: &mut Vec<Centroid>,
    ) {
        out.clear();
        let n = mz.len().min(intensity.len());
        if n == 0 {
            return;
        }
        let (mz, intensity) = (&mz[..n], &intensity[..n]);
        self.estimate(intensity, params.noise);
        self.spacing.estimate(mz, &mut self.samples);
        pick::pick(mz, intensity, &self.noise, self.block_len, &self.spacing, params, out);
    }

    /// Applies the same noise estimate and S/N threshold to an already centroided spectrum,
    /// replacing the contents of `out`: peaks keep their m/z and intensity, `area` is the
    /// stored intensity and `fwhm` is 0.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::centroid::{Centroider, CentroidParams};
    /// let mz: Vec<f64> = (0..100).map(|i| 50.0 + i as f64).collect();
    /// let mut y: Vec<f64> = (0..100).map(|i| 10.0 + (i % 5) as f64).collect();
    /// y[40] = 500.0;
    /// let (mut picker, mut out) = (Centroider::new(), Vec::new());
    /// picker.threshold_centroided(&mz, &y, &CentroidParams::default(), &mut out);
    /// assert_eq!(out.len(), 1);
    /// assert_eq!((out[0].mz, out[0].intensity, out[0].fwhm), (90.0, 500.0, 0.0));
    /// ```
    pub fn threshold_centroided(
        &mut self,
        mz: &[f64],
        intensity: &[f64],
        params: &CentroidParams,
        out: &mut Vec<Centroid>,
    ) {
        out.clear();
        let n = mz.len().min(intensity.len());
        if n == 0 {
            return;
        }
        // Two kinds of centroid list occur. One still holds the noise (centroided without
        // noise removal): most entries are noise, the median sits close to the floor, and the
        // median/MAD estimate with `min_snr` applies as for profile data. The other holds only
        // what the instrument kept: the median is a real peak, so S/N is measured against the
        // floor of the list (its 10th percentile, baseline 0) with `centroided_min_snr`. A
        // list counts as noise-dominated when its median is at most 3 times its floor.
        let (noise, min_snr) = match params.noise {
            NoiseMethod::Fixed(_) => {
                self.estimate(&intensity[..n], params.noise);
                (self.noise[0], params.min_snr)
            }
            _ => {
                self.samples.clear();
                self.samples
                    .extend(intensity[..n].iter().copied().filter(|v| v.is_finite() && *v > 0.0));
                if self.samples.is_empty() {
                    (NoiseLevel { baseline: 0.0, sigma: 1.0 }, params.centroided_min_snr)
                } else {
                    let floor = noise::quantile_in_place(&mut self.samples, 0.1);
                    let median = noise::quantile_in_place(&mut self.samples, 0.5);
                    if median <= 3.0 * floor && params.noise == NoiseMethod::Global {
                        // The list's own values, peaks included: clip the peaks away before
                        // taking median/MAD, else a short list (a unit-resolution scan has a
                        // few dozen entries) lends its peaks to the noise estimate.
                        let noise = noise::estimate_noise_clipped(
                            &mut self.samples,
                            3.0,
                            8,
                            &mut self.scratch,
                        );
                        (noise, params.min_snr)
                    } else if median <= 3.0 * floor {
                        self.estimate(&intensity[..n], params.noise);
                        (self.noise[0], params.min_snr)
                    } else {
                        (NoiseLevel { baseline: 0.0, sigma: floor }, params.centroided_min_snr)
                    }
                }
            }
        };
        let thr = noise.threshold(min_snr);
        for i in 0..n {
            let (m, y) = (mz[i], intensity[i]);
            if y >= thr && y > 0.0 && y.is_finite() && m.is_finite() {
                out.push(Centroid { mz: m, intensity: y, area: y, snr: noise.snr(y), fwhm: 0.0 });
            }
        }
    }
}

impl Centroider {
    /// Centroids profile data or thresholds centroided data, as `representation` says; data
    /// of unknown representation is judged by [`looks_like_profile`]. Returns the
    /// representation acted on (never [`Representation::Unknown`]).
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::centroid::{Centroider, CentroidParams};
    /// use mzcore::spectrum::{Peaks, Representation};
    /// let peaks = Peaks { mz: vec![100.0, 150.2, 207.9], intensity: vec![5.0, 900.0, 6.0] };
    /// let (mut picker, mut out) = (Centroider::new(), Vec::new());
    /// let used = picker.pick(&peaks, Representation::Unknown, &CentroidParams::default(), &mut out);
    /// assert_eq!(used, Representation::Centroid);
    /// assert_eq!(out.len(), 1);
    /// ```
    pub fn pick(
        &mut self,
        peaks: &Peaks,
        representation: Representation,
        params: &CentroidParams,
        out: &mut Vec<Centroid>,
    ) -> Representation {
        let used = match representation {
            Representation::Unknown if looks_like_profile(&peaks.mz) => Representation::Profile,
            Representation::Unknown => Representation::Centroid,
            known => known,
        };
        if used == Representation::Profile {
            self.centroid_profile(&peaks.mz, &peaks.intensity, params, out);
        } else {
            self.threshold_centroided(&peaks.mz, &peaks.intensity, params, out);
        }
        used
    }
}

/// Guesses whether points are profile samples: in profile data most neighbouring spacings
/// are nearly equal (ratio within 0.8 to 1.25), in centroid lists they are irregular. Looks at
/// up to 256 spacing pairs; fewer than 8 points count as centroided.
pub fn looks_like_profile(mz: &[f64]) -> bool {
    let n = mz.len();
    if n < 8 {
        return false;
    }
    let stride = (n - 2).div_ceil(256).max(1);
    let (mut pairs, mut even) = (0u32, 0u32);
    let mut k = 0;
    while k + 2 < n {
        let (a, b) = (mz[k + 1] - mz[k], mz[k + 2] - mz[k + 1]);
        if a > 0.0 && b > 0.0 && (a / b).is_finite() {
            pairs += 1;
            even += u32::from((0.8..=1.25).contains(&(a / b)));
        }
        k += stride;
    }
    pairs > 0 && 2 * even >= pairs
}

thread_local! {
    static PICKER: RefCell<Centroider> = RefCell::new(Centroider::new());
}

/// Picks the peaks of a profile spectrum with a thread-local [`Centroider`]; see
/// [`Centroider::centroid_profile`].
pub fn centroid_profile(
    mz: &[f64],
    intensity: &[f64],
    params: &CentroidParams,
    out: &mut Vec<Centroid>,
) {
    PICKER.with(|p| p.borrow_mut().centroid_profile(mz, intensity, params, out));
}

/// Thresholds an already centroided spectrum with a thread-local [`Centroider`]; see
/// [`Centroider::threshold_centroided`].
pub fn threshold_centroided(
    mz: &[f64],
    intensity: &[f64],
    params: &CentroidParams,
    out: &mut Vec<Centroid>,
) {
    PICKER.with(|p| p.borrow_mut().threshold_centroided(mz, intensity, params, out));
}
