//! Isotope clusters in one spectrum's centroids.
//!
//! Centroids with S/N at least [`FlagSettings::min_snr`] are tried as monoisotopic peaks in
//! ascending m/z. For each:
//!
//! - **charge** (high resolution only): z = 3, then 2, is taken when the shell-1 window for z
//!   (+1.00336/z) holds a peak of at least 3 % of the monoisotopic height *and* at least one
//!   more window that a singly charged cluster cannot explain (shells 3 and 5 for z = 2;
//!   shells 2, 4 and 5 for z = 3) holds a peak; otherwise z = 1. Requiring two windows keeps
//!   chance coincidences with unrelated peaks rare. At unit resolution z = 1 (partners 0.5 u
//!   apart are not resolved reliably);
//! - **shells**: shell k collects every centroid with m/z in
//!   `[mono + k x 0.99785 / z - tol, mono + hi_k / z + tol]`, summed, with the most intense
//!   one kept for the spacing test. 34S/2 (0.99790 per shell) bounds the step from below;
//!   `hi_k` is `k x 1.00336` (13C) for k <= 2 and `(k - 2) x 0.998975 + 2 x 1.00336` beyond
//!   (81Br steps plus at most two 13C), which keeps high-resolution windows of heavy shells
//!   narrow so that unrelated peaks rarely fall into them. The cluster ends after the last
//!   even shell reached from M+2 without a gap; one odd and one even shell beyond that end
//!   are kept (a missing peak there is evidence against hypotheses expecting more);
//! - **scoring** by [`super::halogen::score`]; when the best hypothesis fits
//!   (misfit at most [`FlagSettings::max_misfit`]), the cluster is kept and its partner peaks
//!   (shells 1 and up whose expected height is above the detection limit and whose observed
//!   height is not far above expectation) are consumed, so they are not tried as
//!   monoisotopic peaks. A misfit candidate (for example a small peak 2 u below an unrelated
//!   one) consumes nothing and is dropped.

use crate::centroid::{Centroid, Tolerance};
use crate::chem::halogen::SHELLS;

use super::FlagSettings;
use super::halogen::{self, Score};

/// 13C - 12C mass difference, u (AME2020 values of the isotope table, rounded).
pub const C13_DELTA: f64 = 1.003_354_84;
/// Smallest per-shell mass step considered (34S - 32S over two shells), u.
pub const MIN_SHELL_STEP: f64 = 0.997_85;
/// 81Br - 79Br over two shells, u.
pub const BR_SHELL_STEP: f64 = 0.998_975;

/// One observed cluster.
#[derive(Debug, Clone)]
pub struct Cluster {
    /// Index of the monoisotopic centroid.
    pub mono: usize,
    /// Charge magnitude.
    pub charge: u8,
    /// Observed shells (intensities summed per window).
    pub shells: Shells,
    /// The scoring result.
    pub score: Score,
    /// Most intense peak height of the cluster.
    pub apex: f64,
}

/// Observed shell intensities and noise of one candidate cluster.
#[derive(Debug, Clone, Copy)]
pub struct Shells {
    /// Number of shells looked at.
    pub len: usize,
    /// Summed intensity per shell (0 when no peak).
    pub intensity: [f64; SHELLS],
    /// Noise sigma per shell (the noise of the strongest peak there, else the monoisotopic
    /// peak's noise).
    pub sigma: [f64; SHELLS],
    /// Index of the most intense centroid per shell.
    pub top: [Option<usize>; SHELLS],
    /// Detection limit in S/N (smallest S/N in the centroid list, at least 1).
    pub detect_snr: f64,
    /// Prior probability that an unrelated centroid falls into each shell window (centroid
    /// density of the spectrum times the window width, 0.005 to 0.5).
    pub interference: [f64; SHELLS],
    /// ln of the spectrum's highest over lowest centroid height (at least 1).
    pub ln_range: f64,
    /// ln of `sigma^2` per shell.
    pub ln_sigma2: [f64; SHELLS],
    /// ln(1 - interference) per shell.
    pub ln_clean: [f64; SHELLS],
    /// ln(interference / ln_range) per shell.
    pub ln_unrelated: [f64; SHELLS],
}

/// Spectrum-wide quantities the shells need.
#[derive(Debug, Clone, Copy)]
pub struct SpectrumStats {
    /// Detection limit in S/N.
    pub detect_snr: f64,
    /// Centroids per u.
    pub density: f64,
    /// ln(max height / min height), at least 1.
    pub ln_range: f64,
}

impl SpectrumStats {
    /// Computes the statistics of a centroid list sorted by m/z.
    pub fn of(c: &[Centroid]) -> SpectrumStats {
        let detect = c.iter().map(|p| p.snr).filter(|&s| s > 0.0).fold(f64::INFINITY, f64::min);
        let detect_snr = if detect.is_finite() { detect.clamp(1.0, 10.0) } else { 3.0 };
        let (lo, hi) = c
            .iter()
            .filter(|p| p.intensity > 0.0)
            .fold((f64::INFINITY, 0.0f64), |(a, b), p| (a.min(p.intensity), b.max(p.intensity)));
        let ln_range = if hi > 0.0 { (hi / lo).ln().max(1.0) } else { 1.0 };
        let span = match (c.first(), c.last()) {
            (Some(a), Some(b)) => (b.mz - a.mz).max(1.0),
            _ => 1.0,
        };
        SpectrumStats { detect_snr, density: c.len() as f64 / span, ln_range }
    }
}

/// Noise sigma of a centroid (height over S/N), or `None` when S/N is not positive.
fn sigma_of(c: &Centroid) -> Option<f64> {
    (c.snr > 0.0 && c.intensity > 0.0).then(|| c.intensity / c.snr)
}

/// Index of the first centroid with m/z >= `x`, searching from `from`.
fn lower_bound(c: &[Centroid], from: usize, x: f64) -> usize {
    from + c[from..].partition_point(|p| p.mz < x)
}

/// Collects shells 0..len of the cluster whose monoisotopic peak is `mono`.
pub fn collect_shells(
    c: &[Centroid],
    mono: usize,
    z: u8,
    tol: f64,
    len: usize,
    stats: &SpectrumStats,
) -> Shells {
    let m = &c[mono];
    let noise = sigma_of(m).unwrap_or(m.intensity.max(1e-12) / 10.0);
    let mut s = Shells {
        len,
        intensity: [0.0; SHELLS],
        sigma: [noise; SHELLS],
        top: [None; SHELLS],
        detect_snr: stats.detect_snr,
        interference: [0.0; SHELLS],
        ln_range: stats.ln_range,
        ln_sigma2: [0.0; SHELLS],
        ln_clean: [0.0; SHELLS],
        ln_unrelated: [0.0; SHELLS],
    };
    s.intensity[0] = m.intensity;
    s.top[0] = Some(mono);
    let mut j = mono + 1;
    for k in 1..len {
        let (lo, hi) = window(m.mz, k, z, tol);
        s.interference[k] = (stats.density * (hi - lo)).clamp(0.005, 0.5);
        // Unit-resolution windows may overlap: search from the previous window's start.
        j = lower_bound(c, j, lo);
        let mut best = 0.0;
        let mut i = j;
        while i < c.len() && c[i].mz <= hi {
            s.intensity[k] += c[i].intensity;
            if c[i].intensity > best {
                best = c[i].intensity;
                s.top[k] = Some(i);
                if let Some(sg) = sigma_of(&c[i]) {
                    s.sigma[k] = sg;
                }
            }
            i += 1;
        }
    }
    // The cluster ends after the last even shell reached without a gap (see the module
    // docs); one odd and one even shell beyond it stay in, so that hypotheses expecting more
    // are penalised by the missing peaks.
    let mut end = 0;
    let mut k = 2;
    while k < len && s.intensity[k] > 0.0 {
        end = k;
        k += 2;
    }
    s.len = (end + 3).min(len);
    let ln_ln_range = s.ln_range.ln();
    for k in 0..s.len {
        s.ln_sigma2[k] = 2.0 * s.sigma[k].ln();
        s.ln_clean[k] = (-s.interference[k]).ln_1p();
        s.ln_unrelated[k] = s.interference[k].max(1e-300).ln() - ln_ln_range;
    }
    s
}

/// Shell `k` window above a monoisotopic peak at `mono` for charge `z` (see the module docs).
pub fn window(mono: f64, k: usize, z: u8, tol: f64) -> (f64, f64) {
    let kf = k as f64;
    let zf = f64::from(z);
    let top = if k <= 2 { kf * C13_DELTA } else { (kf - 2.0) * BR_SHELL_STEP + 2.0 * C13_DELTA };
    (mono + kf * MIN_SHELL_STEP / zf - tol, mono + top / zf + tol)
}

/// True when the window of shell `k` for charge `z` holds a peak of at least `min` height.
fn window_has(c: &[Centroid], mono: usize, z: u8, k: usize, tol: f64, min: f64) -> bool {
    let (lo, hi) = window(c[mono].mz, k, z, tol);
    let mut i = lower_bound(c, mono + 1, lo);
    while i < c.len() && c[i].mz <= hi {
        if c[i].intensity >= min {
            return true;
        }
        i += 1;
    }
    false
}

/// Charge of the cluster at `mono` (see the module docs).
pub fn detect_charge(c: &[Centroid], mono: usize, tol: f64, max_charge: u8) -> u8 {
    let min1 = 0.03 * c[mono].intensity;
    for z in (2..=max_charge.min(3)).rev() {
        let extra: &[usize] = if z == 3 { &[2, 4, 5] } else { &[3, 5] };
        if window_has(c, mono, z, 1, tol, min1)
            && extra.iter().any(|&k| window_has(c, mono, z, k, tol, 0.0))
        {
            return z;
        }
    }
    1
}

/// Explaining away: true when the candidate at `mono` sits within
/// [`FlagSettings::side_lobe_fwhm`] FWHM of a centroid at least
/// [`FlagSettings::side_lobe_ratio`] times taller (a side lobe or shoulder of it) and the
/// candidate's M+1 or M+2 peak is one that the taller peak's own isotopologue windows hold:
/// such a partner is already explained and cannot make the candidate a cluster. A candidate
/// whose partners are its own (outside the taller peak's windows) stays.
pub fn borrows_partners(
    c: &[Centroid],
    mono: usize,
    z: u8,
    tol: f64,
    shells: &Shells,
    settings: &FlagSettings,
) -> bool {
    let m = &c[mono];
    let reach = settings.side_lobe_fwhm * m.fwhm.max(0.0);
    if !(reach > 0.0) {
        return false;
    }
    let lo = c.partition_point(|p| p.mz < m.mz - reach);
    let mut i = lo;
    while i < c.len() && c[i].mz <= m.mz + reach {
        let d = &c[i];
        if i != mono && d.intensity >= settings.side_lobe_ratio * m.intensity {
            for k in 1..3.min(shells.len) {
                if let Some(top) = shells.top[k] {
                    let (wlo, whi) = window(d.mz, k, z, tol);
                    if c[top].mz >= wlo && c[top].mz <= whi {
                        return true;
                    }
                }
            }
        }
        i += 1;
    }
    false
}

/// The most intense unconsumed centroid with S/N of at least 3 whose M+2 window holds `mono`.
fn lower_mono(c: &[Centroid], mono: usize, z: u8, tol: f64, consumed: &[bool]) -> Option<usize> {
    let zf = f64::from(z);
    let m = c[mono].mz;
    let (lo, hi) = (m - 2.0 * C13_DELTA / zf - tol, m - 2.0 * MIN_SHELL_STEP / zf + tol);
    let start = c[..mono].partition_point(|p| p.mz < lo);
    (start..mono)
        .filter(|&i| c[i].mz <= hi && !consumed[i] && c[i].snr >= 3.0)
        .max_by(|&a, &b| c[a].intensity.total_cmp(&c[b].intensity))
}

/// Finds and scores the clusters of a spectrum (see the module docs).
pub fn find_clusters(
    c: &[Centroid],
    tolerance: Tolerance,
    high: bool,
    settings: &FlagSettings,
) -> Vec<Cluster> {
    let stats = SpectrumStats::of(c);
    let mut consumed = vec![false; c.len()];
    let mut out = Vec::new();
    for mono in 0..c.len() {
        let m = &c[mono];
        if consumed[mono] || !(m.snr >= settings.min_snr) || !(m.mz > 0.0) {
            continue;
        }
        let tol = tolerance.at(m.mz);
        let z = if high { detect_charge(c, mono, tol, settings.max_charge) } else { 1 };
        let shells_len = halogen::shells_needed(m.mz * f64::from(z));
        let shells = collect_shells(c, mono, z, tol, shells_len, &stats);
        if borrows_partners(c, mono, z, tol, &shells, settings) {
            continue;
        }
        let score = halogen::score(c, &shells, m.mz, z, high, tol, settings);
        if !(score.misfit <= settings.max_misfit) {
            continue;
        }
        // With three or more bromines the monoisotopic peak is smaller than M+2 and may fall
        // below `min_snr` while M+2 passes. Try the peak two shells below (detected at S/N 3
        // at least) as the monoisotopic one; keep it when it fits as well and says halogen.
        let (mono, shells, score) = match lower_mono(c, mono, z, tol, &consumed) {
            Some(lower) => {
                let lm = c[lower].mz;
                let l_shells = collect_shells(
                    c,
                    lower,
                    z,
                    tol,
                    halogen::shells_needed(lm * f64::from(z)),
                    &stats,
                );
                let l_score = halogen::score(c, &l_shells, lm, z, high, tol, settings);
                if l_score.halogen && l_score.misfit <= score.misfit.max(1.0) {
                    (lower, l_shells, l_score)
                } else {
                    (mono, shells, score)
                }
            }
            None => (mono, shells, score),
        };
        let m = &c[mono];
        // Consume partner peaks that the fitted pattern explains.
        for k in 1..shells.len {
            let expect = score.fitted[k];
            let lim = shells.detect_snr * shells.sigma[k];
            if expect < lim {
                continue;
            }
            if shells.intensity[k] <= 2.0 * expect + 3.0 * shells.sigma[k] {
                let (lo, hi) = window(m.mz, k, z, tol);
                let mut i = lower_bound(c, mono + 1, lo);
                while i < c.len() && c[i].mz <= hi {
                    consumed[i] = true;
                    i += 1;
                }
            }
        }
        let apex = (0..shells.len).map(|k| shells.intensity[k]).fold(0.0, f64::max);
        out.push(Cluster { mono, charge: z, shells, score, apex });
    }
    out
}

#[cfg(test)]
mod tests {
    use super::*;

    fn peak(mz: f64, intensity: f64) -> Centroid {
        Centroid { mz, intensity, area: intensity, snr: intensity / 10.0, fwhm: mz / 50_000.0 }
    }

    #[test]
    fn shells_sum_fine_structure_and_charge_is_found() {
        // Shell 2 of a z = 1 ion: 37Cl (+1.99705) and 13C2 (+2.00671) both land in it.
        let c = vec![
            peak(300.0, 1000.0),
            peak(301.00336, 150.0),
            peak(301.99705, 320.0),
            peak(302.00671, 10.0),
            peak(303.0, 30.0),
        ];
        let s = collect_shells(&c, 0, 1, 0.003, 5, &SpectrumStats::of(&c));
        assert_eq!(s.intensity[2], 330.0);
        assert_eq!(s.top[2], Some(2));
        assert_eq!(s.intensity[3], 30.0);
        assert_eq!(detect_charge(&c, 0, 0.003, 3), 1);
        // z = 2: partners every 0.50168.
        let c2: Vec<Centroid> = (0..6)
            .map(|k| peak(400.0 + k as f64 * C13_DELTA / 2.0, 1000.0 / (k + 1) as f64))
            .collect();
        assert_eq!(detect_charge(&c2, 0, 0.004, 3), 2);
        assert_eq!(detect_charge(&c2, 0, 0.004, 1), 1);
        // One stray peak at +0.5 is not enough for z = 2.
        let mut c3 = c.clone();
        c3.insert(1, peak(300.5017, 200.0));
        assert_eq!(detect_charge(&c3, 0, 0.003, 3), 1);
    }

    #[test]
    fn a_side_lobe_cannot_borrow_the_tall_peaks_isotopologues() {
        // A C20 ion at m/z 300 (13C about 22 %, 13C2 about 2.3 %: common practice) with a side
        // lobe at 3 % of its height one FWHM above. The lobe's M+1 and M+2 windows hold the
        // tall ion's 13C and 13C2 peaks, which look like a Br1 pair (M+2/M about 0.8).
        let fwhm = 300.0 / 60_000.0;
        let at = |mz: f64, intensity: f64, snr: f64| Centroid {
            mz,
            intensity,
            area: intensity,
            snr,
            fwhm,
        };
        let c = vec![
            at(300.0, 1000.0, 1000.0),
            at(300.0 + fwhm, 30.0, 30.0),
            at(301.00336, 220.0, 220.0),
            at(302.00671, 23.0, 23.0),
        ];
        let s = FlagSettings::default();
        let stats = SpectrumStats::of(&c);
        let tol = 300.0 * 10e-6;
        let lobe = collect_shells(&c, 1, 1, tol, 5, &stats);
        assert_eq!(lobe.top[2], Some(3), "test setup: the lobe's M+2 window holds 13C2");
        assert!(borrows_partners(&c, 1, 1, tol, &lobe, &s));
        // The tall ion itself borrows nothing (no taller neighbour).
        let tall = collect_shells(&c, 0, 1, tol, 5, &stats);
        assert!(!borrows_partners(&c, 0, 1, tol, &tall, &s));
        // Off: ratio above the heights' ratio.
        let off = FlagSettings { side_lobe_ratio: 50.0, ..FlagSettings::default() };
        assert!(!borrows_partners(&c, 1, 1, tol, &lobe, &off));
        // A weak ion 0.02 u below (4 FWHM) with its own M+1 and M+2 is not a side lobe.
        let mut d = c.clone();
        d[1] = at(299.98, 30.0, 30.0);
        d.push(at(299.98 + 1.00336, 3.0, 3.0));
        d.push(at(299.98 + 1.99705, 10.0, 10.0));
        d.sort_by(|a, b| a.mz.total_cmp(&b.mz));
        let stats = SpectrumStats::of(&d);
        let own = collect_shells(&d, 0, 1, tol, 5, &stats);
        assert!(!borrows_partners(&d, 0, 1, tol, &own, &s));
        // find_clusters drops the lobe as a cluster start.
        let found = find_clusters(&c, Tolerance::Ppm(10.0), true, &s);
        assert!(found.iter().all(|cl| cl.mono != 1));
        let unruled = FlagSettings { side_lobe_fwhm: 0.0, ..FlagSettings::default() };
        let found = find_clusters(&c, Tolerance::Ppm(10.0), true, &unruled);
        assert!(
            found.iter().any(|cl| cl.mono == 1),
            "test setup: without the rule the lobe is a cluster"
        );
    }
}
