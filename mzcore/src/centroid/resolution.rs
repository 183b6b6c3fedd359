//! Resolution awareness: is an acquisition unit resolution or high resolution?
//!
//! Resolving power is R = m / FWHM (common practice). Unit-resolution instruments (quadrupoles,
//! ion traps in normal scan mode) give peaks about 0.5-0.7 u wide at any m/z; high-resolution
//! ones (TOF, Orbitrap, FT-ICR) give peaks well under 0.1 u below m/z 1000. The estimate
//! collects widths in a fixed logarithmic histogram, so it needs constant memory, can be fed
//! spectrum by spectrum from several threads and merged, and does not depend on the order.

use serde::Serialize;

use super::Centroid;

/// FWHM at or above which a spectrum counts as unit resolution (u).
pub const UNIT_FWHM_DA: f64 = 0.3;

/// Spacing (u) below which two neighbouring centroids count as "close" when no widths exist.
pub const CLOSE_SPACING_DA: f64 = 0.3;

const BINS_PER_DECADE: f64 = 50.0;
const LOG_MIN: f64 = -6.0; // histogram covers 1e-6 ..
const BINS: usize = 400; // .. 1e2 (8 decades)

/// Resolution class of an acquisition.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
#[serde(rename_all = "lowercase")]
pub enum ResolutionClass {
    /// Peaks about a unit wide: use tolerances in u (Da).
    Unit,
    /// Narrow peaks: use tolerances in ppm.
    High,
    /// Too few peaks to tell.
    Unknown,
}

impl ResolutionClass {
    /// The lower-case name used in reports: `unit`, `high` or `unknown`.
    pub fn name(self) -> &'static str {
        match self {
            ResolutionClass::Unit => "unit",
            ResolutionClass::High => "high",
            ResolutionClass::Unknown => "unknown",
        }
    }
}

/// An m/z tolerance, absolute or relative.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub enum Tolerance {
    /// Absolute, in u (Da).
    Da(f64),
    /// Relative, in parts per million of the m/z.
    Ppm(f64),
}

impl Tolerance {
    /// The absolute half-width of the tolerance at `mz`, in u.
    pub fn at(&self, mz: f64) -> f64 {
        match *self {
            Tolerance::Da(d) => d,
            Tolerance::Ppm(p) => mz.abs() * p * 1e-6,
        }
    }
}

/// What [`estimate_resolution`] or [`ResolutionAccumulator::finish`] found.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct ResolutionEstimate {
    /// The class.
    pub class: ResolutionClass,
    /// Median resolving power m/FWHM over peaks with a measured width.
    pub median_resolving_power: Option<f64>,
    /// Median FWHM (u) over peaks with a measured width.
    pub median_fwhm: Option<f64>,
    /// Number of peaks with a measured width.
    pub peaks_with_width: u64,
    /// Fraction of neighbouring-centroid spacings below [`CLOSE_SPACING_DA`] (used when no
    /// widths are known, e.g. for centroided input).
    pub close_spacing_fraction: Option<f64>,
}

impl ResolutionEstimate {
    /// A starting tolerance for matching peaks: half the median FWHM as ppm (between 2 and
    /// 20 ppm) for high resolution, 0.3 u for unit resolution, 0.5 u when unknown.
    /// Callers should let users override it.
    pub fn suggested_tolerance(&self) -> Tolerance {
        match self.class {
            ResolutionClass::High => {
                let ppm = self.median_resolving_power.map_or(10.0, |r| 0.5e6 / r);
                Tolerance::Ppm(ppm.clamp(2.0, 20.0))
            }
            ResolutionClass::Unit => Tolerance::Da(0.3),
            ResolutionClass::Unknown => Tolerance::Da(0.5),
        }
    }
}

/// Accumulates peak widths and spacings across spectra in constant memory.
#[derive(Debug, Clone, PartialEq)]
pub struct ResolutionAccumulator {
    fwhm_hist: Vec<u64>,
    power_hist: Vec<u64>,
    widths: u64,
    spacings: u64,
    close: u64,
}

impl Default for ResolutionAccumulator {
    fn default() -> Self {
        ResolutionAccumulator {
            fwhm_hist: vec![0; BINS],
            power_hist: vec![0; BINS],
            widths: 0,
            spacings: 0,
            close: 0,
        }
    }
}

/// Least peaks with a width (or spacings without) before a class is decided.
const MIN_PEAKS: u64 = 5;
const MIN_SPACINGS: u64 = 20;

fn bin_of(v: f64) -> Option<usize> {
    let b = ((v.log10() - LOG_MIN) * BINS_PER_DECADE).floor();
    (b.is_finite() && b >= 0.0).then(|| (b as usize).min(BINS - 1))
}

fn bin_centre(b: usize) -> f64 {
    10f64.powf(LOG_MIN + (b as f64 + 0.5) / BINS_PER_DECADE)
}

fn hist_median(h: &[u64], n: u64) -> Option<f64> {
    if n == 0 {
        return None;
    }
    let half = n.div_ceil(2);
    let mut acc = 0;
    for (b, &c) in h.iter().enumerate() {
        acc += c;
        if acc >= half {
            return Some(bin_centre(b));
        }
    }
    None
}

impl ResolutionAccumulator {
    /// An empty accumulator.
    pub fn new() -> Self {
        Self::default()
    }

    /// Adds the centroids of one spectrum (in ascending m/z order, as produced here).
    pub fn add_spectrum(&mut self, centroids: &[Centroid]) {
        for c in centroids {
            if c.fwhm > 0.0 && c.mz > 0.0 {
                // Resolving power histogram is kept in units of 1e4 so it fits the same bins.
                if let (Some(bf), Some(bp)) = (bin_of(c.fwhm), bin_of(c.mz / c.fwhm * 1e-4)) {
                    self.fwhm_hist[bf] += 1;
                    self.power_hist[bp] += 1;
                    self.widths += 1;
                }
            }
        }
        for w in centroids.windows(2) {
            let d = w[1].mz - w[0].mz;
            if d.is_finite() && d > 0.0 {
                self.spacings += 1;
                self.close += u64::from(d < CLOSE_SPACING_DA);
            }
        }
    }

    /// Adds another accumulator's counts (e.g. from another thread).
    pub fn merge(&mut self, other: &ResolutionAccumulator) {
        for (a, b) in self.fwhm_hist.iter_mut().zip(&other.fwhm_hist) {
            *a += b;
        }
        for (a, b) in self.power_hist.iter_mut().zip(&other.power_hist) {
            *a += b;
        }
        self.widths += other.widths;
        self.spacings += other.spacings;
        self.close += other.close;
    }

    /// The estimate so far. Medians are histogram-bin centres (within 2.3 %).
    pub fn finish(&self) -> ResolutionEstimate {
        let median_fwhm = hist_median(&self.fwhm_hist, self.widths);
        let median_resolving_power = hist_median(&self.power_hist, self.widths).map(|r| r * 1e4);
        let close_spacing_fraction =
            (self.spacings > 0).then(|| self.close as f64 / self.spacings as f64);
        let class = match (median_fwhm, close_spacing_fraction) {
            (Some(f), _) if self.widths >= MIN_PEAKS => {
                if f >= UNIT_FWHM_DA {
                    ResolutionClass::Unit
                } else {
                    ResolutionClass::High
                }
            }
            (_, Some(frac)) if self.spacings >= MIN_SPACINGS => {
                // Without widths: high-resolution centroid lists have many neighbours closer
                // than any unit-resolution peak width allows.
                if frac >= 0.05 { ResolutionClass::High } else { ResolutionClass::Unit }
            }
            _ => ResolutionClass::Unknown,
        };
        ResolutionEstimate {
            class,
            median_resolving_power,
            median_fwhm,
            peaks_with_width: self.widths,
            close_spacing_fraction,
        }
    }
}

/// Estimates the resolution class from the centroids of one spectrum.
///
/// # Examples
///
/// ```
/// use mzcore::centroid::{estimate_resolution, Centroid, ResolutionClass};
/// let peaks: Vec<Centroid> = (0..10)
///     .map(|i| {
///         let mz = 300.0 + 7.0 * i as f64;
///         Centroid { mz, intensity: 100.0, area: 1.0, snr: 50.0, fwhm: mz / 60_000.0 }
///     })
///     .collect();
/// let est = estimate_resolution(&peaks);
/// assert_eq!(est.class, ResolutionClass::High);
/// let r = est.median_resolving_power.unwrap();
/// assert!((r / 60_000.0 - 1.0).abs() < 0.03);
/// ```
pub fn estimate_resolution(centroids: &[Centroid]) -> ResolutionEstimate {
    let mut acc = ResolutionAccumulator::new();
    acc.add_spectrum(centroids);
    acc.finish()
}

#[cfg(test)]
mod tests {
    use super::*;

    fn c(mz: f64, fwhm: f64) -> Centroid {
        Centroid { mz, intensity: 1.0, area: 1.0, snr: 10.0, fwhm }
    }

    #[test]
    fn unit_resolution_from_widths() {
        let peaks: Vec<_> = (0..20).map(|i| c(50.0 + i as f64, 0.6)).collect();
        let e = estimate_resolution(&peaks);
        assert_eq!(e.class, ResolutionClass::Unit);
        assert!((e.median_fwhm.unwrap() / 0.6 - 1.0).abs() < 0.03);
        assert_eq!(e.suggested_tolerance(), Tolerance::Da(0.3));
    }

    #[test]
    fn spacing_decides_without_widths_and_merge_adds_up() {
        let unit: Vec<_> = (0..30).map(|i| c(50.0 + i as f64, 0.0)).collect();
        assert_eq!(estimate_resolution(&unit).class, ResolutionClass::Unit);
        let high: Vec<_> = (0..30).map(|i| c(50.0 + 0.05 * i as f64, 0.0)).collect();
        assert_eq!(estimate_resolution(&high).class, ResolutionClass::High);
        let mut a = ResolutionAccumulator::new();
        a.add_spectrum(&unit[..10]);
        let mut b = ResolutionAccumulator::new();
        b.add_spectrum(&unit[10..]);
        a.merge(&b);
        assert_eq!(a.finish().close_spacing_fraction, Some(0.0));
        assert_eq!(estimate_resolution(&[]).class, ResolutionClass::Unknown);
    }

    #[test]
    fn ppm_tolerance_scales_with_mz() {
        assert!((Tolerance::Ppm(5.0).at(400.0) - 0.002).abs() < 1e-12);
        assert_eq!(Tolerance::Da(0.3).at(400.0), 0.3);
    }
}
