//! The peak picker proper: candidate maxima, valley merging, spike rejection, peak figures.

use super::apex::{self, GaussFit};
use super::noise::{NoiseLevel, quantile_in_place};
use super::{ApexMethod, Centroid, CentroidParams};

/// Points per bin of the spacing model (at least; at most 32 bins).
const MIN_BIN: usize = 64;
/// Spacings sampled per bin.
const BIN_SAMPLES: usize = 32;

/// Typical sampling of a spectrum, bin by bin (consecutive runs of points): the lower quartile
/// of spacing / m/z in the bin, then the smallest of each bin and its two neighbours. Gaps are
/// rare enough in any three bins that the lower quartile is a normal sampling step.
#[derive(Debug, Clone, Default)]
pub(crate) struct SpacingModel {
    bin_len: usize,
    relative: Vec<f64>,
}

impl SpacingModel {
    pub(crate) fn estimate(&mut self, mz: &[f64], scratch: &mut Vec<f64>) {
        let n = mz.len();
        self.relative.clear();
        self.bin_len = MIN_BIN.max(n.div_ceil(32));
        let mut start = 0;
        while start + 1 < n {
            let end = (start + self.bin_len).min(n - 1);
            scratch.clear();
            let stride = (end - start).div_ceil(BIN_SAMPLES).max(1);
            let mut k = start;
            while k < end {
                let r = (mz[k + 1] - mz[k]) / mz[k].abs();
                if r.is_finite() && r > 0.0 {
                    scratch.push(r);
                }
                k += stride;
            }
            let q =
                if scratch.is_empty() { f64::INFINITY } else { quantile_in_place(scratch, 0.25) };
            self.relative.push(q);
            start = end;
        }
        // Smallest of each bin and its neighbours, in place.
        let mut prev = f64::INFINITY;
        for i in 0..self.relative.len() {
            let cur = self.relative[i];
            let next = self.relative.get(i + 1).copied().unwrap_or(f64::INFINITY);
            self.relative[i] = prev.min(cur).min(next);
            prev = cur;
        }
    }

    /// Typical relative spacing around step `k` (infinite when unknown).
    #[inline]
    fn relative_at(&self, k: usize) -> f64 {
        let b = (k / self.bin_len.max(1)).min(self.relative.len().saturating_sub(1));
        self.relative.get(b).copied().unwrap_or(f64::INFINITY)
    }
}

/// Read-only view of one spectrum with the island rules.
struct Spectrum<'a> {
    mz: &'a [f64],
    y: &'a [f64],
    gap_factor: f64,
    spacing: &'a SpacingModel,
}

impl Spectrum<'_> {
    #[inline]
    fn step(&self, k: usize) -> f64 {
        self.mz[k + 1] - self.mz[k]
    }

    /// True when points `k` and `k + 1` are on one island (both finite, spacing not a gap).
    #[inline]
    fn linked(&self, k: usize) -> bool {
        if !(self.y[k].is_finite() && self.y[k + 1].is_finite()) {
            return false;
        }
        let d = self.step(k);
        if !(d > 0.0 && d.is_finite()) {
            return false;
        }
        let mut local = f64::INFINITY;
        if k > 0 {
            let p = self.step(k - 1);
            if p > 0.0 {
                local = local.min(p);
            }
        }
        if k + 2 < self.mz.len() {
            let q = self.step(k + 1);
            if q > 0.0 {
                local = local.min(q);
            }
        }
        if d > self.gap_factor * local {
            return false;
        }
        // Twice the local factor: leaves room for spacing that changes with m/z within a bin.
        !(d > 2.0 * self.gap_factor * self.spacing.relative_at(k) * self.mz[k].abs())
    }

    /// True when every step in `lo..hi` is linked.
    fn connected(&self, lo: usize, hi: usize) -> bool {
        (lo..hi).all(|k| self.linked(k))
    }
}

/// A run of candidate maxima merged into one peak.
#[derive(Debug, Clone, Copy)]
struct Group {
    first: usize,
    last: usize,
    apex0: usize,
    apex1: usize,
    height: f64,
    /// Lowest intensity between the tallest apex and `last`.
    min_after_apex: f64,
    noise: NoiseLevel,
}

pub(crate) fn pick(
    mz: &[f64],
    y: &[f64],
    noise: &[NoiseLevel],
    block_len: usize,
    spacing: &SpacingModel,
    params: &CentroidParams,
    out: &mut Vec<Centroid>,
) {
    let n = mz.len();
    let s = Spectrum { mz, y, gap_factor: params.gap_factor, spacing };
    let block_len = block_len.max(1);
    let mut group: Option<Group> = None;
    let mut i = 0;
    while i < n {
        let block = i / block_len;
        let level = noise[block.min(noise.len() - 1)];
        let block_end = ((block + 1) * block_len).min(n);
        let thr = level.threshold(params.min_snr);
        // Fast scan for the next point above threshold in this block.
        match y[i..block_end].iter().position(|&v| v > thr) {
            None => {
                i = block_end;
                continue;
            }
            Some(off) => i += off,
        }
        let h = y[i];
        if !h.is_finite() || (i > 0 && !(y[i - 1] < h) && s.linked(i - 1)) {
            i += 1;
            continue;
        }
        // A flat top: equal neighbours on the same island.
        let mut j = i;
        while j + 1 < n && y[j + 1] == h && s.linked(j) {
            j += 1;
        }
        let is_max = j + 1 == n || y[j + 1] < h || !s.linked(j);
        if !is_max {
            i = j + 1;
            continue;
        }
        let hill = Group {
            first: i,
            last: j,
            apex0: i,
            apex1: j,
            height: h,
            min_after_apex: h,
            noise: level,
        };
        group = Some(match group {
            None => hill,
            Some(g) => match try_merge(&s, g, hill, params) {
                Ok(merged) => merged,
                Err(()) => {
                    finish(&s, &g, params, out);
                    hill
                }
            },
        });
        i = j + 1;
    }
    if let Some(g) = group {
        finish(&s, &g, params, out);
    }
}

/// Merges `hill` into `g` when the valley between them is shallow and no gap separates them.
fn try_merge(
    s: &Spectrum<'_>,
    g: Group,
    hill: Group,
    params: &CentroidParams,
) -> Result<Group, ()> {
    let lower = g.height.min(hill.height);
    let noise = g.noise;
    // The valley is deep enough to separate when it reaches down to `level`.
    let need = (params.min_valley_depth * (lower - noise.baseline))
        .max(params.min_valley_snr * noise.sigma);
    let level = lower - need;
    let between = &s.y[g.last + 1..hill.first];
    // Early exit: on a baseline stretch a deep point comes within a few points.
    if g.min_after_apex <= level || between.iter().any(|&v| v <= level) {
        return Err(());
    }
    if !s.connected(g.last, hill.first) {
        return Err(());
    }
    let valley = between.iter().copied().fold(g.min_after_apex, f64::min);
    let mut m = g;
    m.last = hill.last;
    if hill.height > g.height {
        m.apex0 = hill.apex0;
        m.apex1 = hill.apex1;
        m.height = hill.height;
        m.min_after_apex = hill.height;
        m.noise = hill.noise;
    } else {
        m.min_after_apex = valley.min(hill.height);
    }
    Ok(m)
}

/// Computes the figures of a finished group and appends its centroid unless it is a spike.
fn finish(s: &Spectrum<'_>, g: &Group, params: &CentroidParams, out: &mut Vec<Centroid>) {
    let (mz, y) = (s.mz, s.y);
    let n = mz.len();
    let base = g.noise.baseline;
    let h = g.height;
    let a = g.apex0;
    // One-point maxima need a neighbour that carries part of the peak.
    if g.apex0 == g.apex1 {
        let left = (a > 0 && s.linked(a - 1)).then(|| y[a - 1]);
        let right = (a + 1 < n && s.linked(a)).then(|| y[a + 1]);
        let best = match (left, right) {
            (Some(l), Some(r)) => l.max(r),
            (Some(v), None) | (None, Some(v)) => v,
            (None, None) => return,
        };
        if !(best - base > params.spike_ratio * (h - base)) {
            return;
        }
    }
    // Extent: walk downhill from the outermost maxima to the valleys or the island edges.
    let mut lo = g.first;
    while lo > 0 && y[lo - 1] <= y[lo] && s.linked(lo - 1) {
        lo -= 1;
    }
    let mut hi = g.last;
    while hi + 1 < n && y[hi + 1] <= y[hi] && s.linked(hi) {
        hi += 1;
    }
    // Points above half the apex point's height, around the apex.
    let half_pt = base + 0.5 * (h - base);
    let mut hl = g.apex0;
    while hl > lo && y[hl - 1] >= half_pt {
        hl -= 1;
    }
    let mut hr = g.apex1;
    while hr < hi && y[hr + 1] >= half_pt {
        hr += 1;
    }

    let mut fit: Option<GaussFit> = None;
    let (apex_mz, height) = if g.apex1 > g.apex0 {
        // Flat (saturated) top: the centre of the plateau.
        (0.5 * (mz[g.apex0] + mz[g.apex1]), h)
    } else {
        let three = || {
            (a > lo && a < hi).then_some(())?;
            apex::gaussian3(
                [mz[a - 1], mz[a], mz[a + 1]],
                [y[a - 1] - base, y[a] - base, y[a + 1] - base],
            )
            .filter(|f| f.mu >= mz[a - 1] && f.mu <= mz[a + 1])
        };
        fit = match params.apex {
            ApexMethod::Gaussian3 => three(),
            ApexMethod::GaussianFit => {
                if hr - hl + 1 >= 3 {
                    // A noisy top can bend the fit away; keep it only inside the fitted points.
                    lsq(mz, y, hl, hr, a, base)
                        .filter(|f| f.mu >= mz[hl] && f.mu <= mz[hr])
                        .or_else(three)
                } else {
                    three()
                }
            }
            ApexMethod::WeightedHalfHeight => None,
        };
        match fit {
            Some(f) if params.apex != ApexMethod::WeightedHalfHeight => {
                {
                    // Keep the fitted height near the highest point (noise can inflate it).
                    let span = (h - base).max(0.0);
                    (f.mu, base + f.height.clamp(0.5 * span, 2.0 * span))
                }
            }
            _ => {
                // Weighted centroid above half height (also the fallback of the fits).
                let m = if hr > hl {
                    half_height_centroid(mz, y, [lo, hl, hr, hi], half_pt, base)
                } else {
                    None
                };
                let m = m.or_else(|| weighted(mz, y, lo, hi, base)).unwrap_or(mz[a]);
                (m, h)
            }
        }
    };
    let apex_mz = if apex_mz.is_finite() { apex_mz.clamp(mz[lo], mz[hi]) } else { mz[a] };

    // FWHM from half-height crossings, interpolated linearly.
    let half = base + 0.5 * (height - base);
    let left_x = (lo..g.apex0).rev().find(|&k| y[k] < half).map(|k| cross(mz, y, k, half));
    let right_x = (g.apex1 + 1..=hi).find(|&k| y[k] < half).map(|k| cross(mz, y, k - 1, half));
    let mut fwhm = match (left_x, right_x) {
        (Some(l), Some(r)) => r - l,
        (Some(l), None) => 2.0 * (apex_mz - l),
        (None, Some(r)) => 2.0 * (r - apex_mz),
        (None, None) => fit.map_or(mz[hi] - mz[lo], |f| f.fwhm()),
    };
    if !(fwhm.is_finite() && fwhm >= 0.0) {
        fwhm = 0.0;
    }

    // Area above baseline by trapezoids.
    let mut area = 0.0;
    for k in lo..hi {
        let y0 = (y[k] - base).max(0.0);
        let y1 = (y[k + 1] - base).max(0.0);
        area += 0.5 * (y0 + y1) * (mz[k + 1] - mz[k]);
    }
    if !area.is_finite() {
        area = 0.0;
    }
    let height = if height.is_finite() { height } else { h };
    out.push(Centroid { mz: apex_mz, intensity: height, area, snr: g.noise.snr(height), fwhm });
}

/// m/z where the line from point `k` to `k + 1` crosses `level`.
fn cross(mz: &[f64], y: &[f64], k: usize, level: f64) -> f64 {
    let t = (level - y[k]) / (y[k + 1] - y[k]);
    let x = mz[k] + t.clamp(0.0, 1.0) * (mz[k + 1] - mz[k]);
    if x.is_finite() { x } else { mz[k] }
}

fn lsq(mz: &[f64], y: &[f64], l: usize, r: usize, a: usize, base: f64) -> Option<GaussFit> {
    // At most a few dozen points: fixed-size stack buffers avoid allocation.
    const MAX: usize = 64;
    let (l, r) = (l.max(a.saturating_sub(MAX / 2)), r.min(a + MAX / 2 - 1));
    let mut xs = [0.0; MAX];
    let mut ys = [0.0; MAX];
    let len = r - l + 1;
    for (k, idx) in (l..=r).enumerate() {
        xs[k] = mz[idx];
        ys[k] = y[idx] - base;
    }
    let scale = mz[r] - mz[l];
    apex::gaussian_lsq(&xs[..len], &ys[..len], mz[a], scale)
}

/// Intensity-weighted centroid of the linearly interpolated profile between its half-height
/// crossings, so that where the samples fall does not bias it (`b = [lo, hl, hr, hi]`: the
/// peak's extent and the run of points at or above `half`).
fn half_height_centroid(mz: &[f64], y: &[f64], b: [usize; 4], half: f64, base: f64) -> Option<f64> {
    let [lo, hl, hr, hi] = b;
    let (mut area, mut moment) = (0.0, 0.0);
    let mut seg = |x0: f64, w0: f64, x1: f64, w1: f64| {
        let dx = x1 - x0;
        area += 0.5 * (w0 + w1) * dx;
        moment += dx * (x0 * (2.0 * w0 + w1) + x1 * (w0 + 2.0 * w1)) / 6.0;
    };
    let w_half = half - base;
    if hl > lo {
        seg(cross(mz, y, hl - 1, half), w_half, mz[hl], y[hl] - base);
    }
    for k in hl..hr {
        seg(mz[k], y[k] - base, mz[k + 1], y[k + 1] - base);
    }
    if hr < hi {
        seg(mz[hr], y[hr] - base, cross(mz, y, hr, half), w_half);
    }
    let m = moment / area;
    (area > 0.0 && m.is_finite()).then_some(m)
}

fn weighted(mz: &[f64], y: &[f64], l: usize, r: usize, base: f64) -> Option<f64> {
    const MAX: usize = 64;
    let r = r.min(l + MAX - 1);
    let mut ws = [0.0; MAX];
    for (k, idx) in (l..=r).enumerate() {
        ws[k] = y[idx] - base;
    }
    apex::weighted_mean(&mz[l..=r], &ws[..r - l + 1])
}
