//! Scoring an observed cluster against Cl_n Br_m and S / Si look-alike hypotheses.
//!
//! # Hypotheses
//!
//! - `Cl{n}Br{m}` for n in 0..=8, m in 0..=6: the chemistry core's cluster model
//!   ([`crate::chem::halogen::expected`]: exact Cl/Br clusters on a C/H/N/O/S background
//!   estimated from the ion mass, with a per-shell spread over background families);
//! - look-alikes that the background families do not cover: `S{k}` for k in 2, 3, 4, 6, 8
//!   and `Si{k}` for k in 1..=8 (siloxanes, elemental sulfur, polysulfides): the k-fold
//!   S or Si isotope polynomial convolved with the Cl0Br0 background of the remaining mass.
//!
//! Hypotheses heavier than the ion (by their 35Cl, 79Br or 32S alone) are left out, and so
//! are Si_k hypotheses of ions lighter than 70 u per Si (each Si of a siloxane or
//! trimethylsilyl group carries methyl groups and oxygen: 73-74 u per Si).
//!
//! The prior is flat over the Cl/Br hypotheses (including Cl0Br0); each look-alike family
//! (sulfur, silicon) together weighs as much as one of them, split evenly over its counts.
//!
//! # Error model and score
//!
//! Shell k of the observed cluster has intensity `o_k` (sum of the centroids in its window)
//! and noise sigma `s_k` (height over S/N of its strongest centroid, else of the
//! monoisotopic peak). Under hypothesis h with expected shell fractions `e_k`, model spread
//! `d_k` and a fitted scale `A` (weighted least squares over the observed shells), the variance of shell k is
//!
//! `var_k = s_k^2 + (r A e_k)^2 + (A d_k)^2`
//!
//! with r = [`FlagSettings::relative_error`] (ion statistics and peak-shape effects). An
//! observed shell contributes `(o_k - A e_k)^2 / var_k`; a shell with no centroid is
//! *censored* at the detection limit `D_k = t s_k` (t the smallest S/N in the centroid list)
//! and contributes `max(0, A e_k - D_k)^2 / var_k`. The log-likelihood of a shell is that of
//! a Gaussian, `-1/2 (chi2_k + ln var_k + ln 2 pi)`, except that a shell observed *above*
//! expectation may also hold an unrelated peak: its likelihood is the mixture
//! `(1 - p_k) N(excess) + p_k / (excess x L)`, with `p_k` the chance that an unrelated
//! centroid falls into the window (the spectrum's centroid density times the window width)
//! and heights of unrelated peaks taken as log-uniform over the spectrum's range
//! (`L = ln(max height / min height)`). Missing intensity has no such excuse. The
//! log-likelihood is the sum over shells. The **score** of a hypothesis is its posterior
//! probability under the prior above (a softmax of the log-likelihoods plus log-priors); `halogen_probability` sums the posteriors of all hypotheses with at
//! least one Cl or Br. The probability is only as calibrated as the error model; the
//! `flag_accuracy` example prints how often the best assignment is right per score band.
//! The **misfit** is the best hypothesis's chi-square per degree of freedom (shells with a
//! centroid or an expected height above the detection limit, minus one), with a shell above
//! expectation contributing at most 4 (interference is common at unit resolution). The
//! scale fit weighs shells above expectation by the probability that they hold no unrelated
//! peak (three passes).
//!
//! For clusters longer than six shells, every hypothesis is first fitted on shells M to M+5
//! and only those within 20 log-likelihood units of the best there are fitted in full (the
//! others would have posteriors below e^-20 unless the heavier shells reversed the order).
//!
//! A halogen flag needs a centroid in the M+2 shell: without one, Cl1 and Cl0Br0 cannot be
//! told apart at low S/N, and only those two are scored.
//!
//! When even the upper end of the observed M+2/M (plus three sigma) stays below 0.12 (one
//! chlorine alone gives 0.32 and every Cl/Br hypothesis more; S3+ and Si3+ look-alikes give
//! more than 0.12 and are scored in full), only `Cl0Br0` and `Cl1Br0`
//! are scored: the others cannot do better than `Cl1Br0` there. This keeps the many
//! non-halogenated clusters of a spectrum cheap.
//!
//! # M+2 spacing (high resolution)
//!
//! At high resolution the spacing also enters the likelihood: each hypothesis adds
//! `-1/2 ((d - d_h) / s_d)^2`, with d the observed M+2 mass difference (below), d_h the
//! abundance-weighted mean of the 37Cl and 81Br steps for Cl/Br hypotheses, the 34S or 30Si
//! step for look-alikes, and the closest of 34S, 18O, 13C2 and 30Si for `Cl0Br0`; `s_d` is
//! the measurement sigma below combined with 0.0002 u for unresolved blends. This tells
//! Cl4 from Cl2Br1 when the intensities are ambiguous.
//!
//! The mass difference between the strongest centroid of shell 2 and the monoisotopic peak,
//! times z, is compared with the halogen step(s) of the best halogen hypothesis (37Cl-35Cl
//! 1.99705 u, 81Br-79Br 1.99795 u; the interval between them for mixed clusters) and with
//! 34S 1.99580, 30Si 1.99684, 18O 2.00425 and 13C2 2.00671 ([`M2Spacing`]). The uncertainty
//! of each centroid's m/z is `hypot(fwhm / snr, 0.5 ppm)` (a third of the tolerance when no
//! width is known), combined for the difference. Within three sigma of the halogen step the
//! verdict is `consistent`; farther from it but within three sigma of a look-alike it is
//! that look-alike and the halogen flag is vetoed; otherwise `inconsistent` (reported, no
//! veto). 30Si lies 0.0002 u from 37Cl, so silicon is told from chlorine by intensities only.

use std::sync::OnceLock;

use ndarray::Array2;
use serde::Serialize;

use crate::centroid::Centroid;
use crate::chem::elements::{element, isotope_mass};
use crate::chem::halogen::{ClusterModel, M2Spacing, MASS_STEP, MAX_BR, MAX_CL, SHELLS};

use super::FlagSettings;
use super::cluster::Shells;

/// One hypothesis about the heavy-isotope carriers of a cluster.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Serialize)]
pub enum Hypothesis {
    /// n chlorine and m bromine atoms on a C/H/N/O/S background.
    Halogen {
        /// Chlorine atoms.
        n_cl: u8,
        /// Bromine atoms.
        n_br: u8,
    },
    /// k sulfur atoms beyond the background.
    Sulfur(u8),
    /// k silicon atoms.
    Silicon(u8),
}

impl Hypothesis {
    /// `Cl2Br1`, `S4`, `Si5`.
    pub fn label(&self) -> String {
        match *self {
            Hypothesis::Halogen { n_cl, n_br } => format!("Cl{n_cl}Br{n_br}"),
            Hypothesis::Sulfur(k) => format!("S{k}"),
            Hypothesis::Silicon(k) => format!("Si{k}"),
        }
    }

    /// True for Cl/Br hypotheses with at least one halogen atom.
    pub fn is_halogen(&self) -> bool {
        matches!(*self, Hypothesis::Halogen { n_cl, n_br } if n_cl + n_br > 0)
    }
}

/// What the M+2 spacing says.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize)]
pub enum SpacingVerdict {
    /// Within three sigma of the 37Cl / 81Br step.
    #[serde(rename = "consistent")]
    Consistent,
    /// Matches 34S-32S and not the halogen step: veto.
    #[serde(rename = "34S")]
    Sulfur,
    /// Matches 30Si-28Si and not the halogen step: veto.
    #[serde(rename = "30Si")]
    Silicon,
    /// Matches 18O-16O and not the halogen step: veto.
    #[serde(rename = "18O")]
    Oxygen,
    /// Matches two 13C and not the halogen step: veto.
    #[serde(rename = "13C2")]
    TwoCarbon13,
    /// Matches neither the halogen step nor a look-alike (no veto).
    #[serde(rename = "inconsistent")]
    Inconsistent,
    /// No centroid in the M+2 shell.
    #[serde(rename = "no_m2_peak")]
    NoPeak,
    /// Unit (or unknown) resolution: intensities only.
    #[serde(rename = "not_used_unit_resolution")]
    NotUsed,
}

impl SpacingVerdict {
    /// True when the spacing points to a look-alike.
    pub fn is_look_alike(self) -> bool {
        matches!(
            self,
            SpacingVerdict::Sulfur
                | SpacingVerdict::Silicon
                | SpacingVerdict::Oxygen
                | SpacingVerdict::TwoCarbon13
        )
    }
}

/// The result of scoring one cluster.
#[derive(Debug, Clone)]
pub struct Score {
    /// Best hypothesis.
    pub best: Hypothesis,
    /// Its posterior probability.
    pub best_p: f64,
    /// Second-best hypothesis.
    pub second: Hypothesis,
    /// Its posterior probability.
    pub second_p: f64,
    /// Posterior probability of at least one Cl or Br.
    pub p_halogen: f64,
    /// Chi-square per degree of freedom of the best hypothesis.
    pub misfit: f64,
    /// Chlorine atoms of the best hypothesis (0 for look-alikes).
    pub n_cl: u8,
    /// Bromine atoms of the best hypothesis.
    pub n_br: u8,
    /// The cluster is flagged as halogenated.
    pub halogen: bool,
    /// Observed M+2/M.
    pub m2_ratio: f64,
    /// Expected M+2/M (best hypothesis).
    pub m2_expected: f64,
    /// Observed M+4/M.
    pub m4_ratio: f64,
    /// Expected M+4/M (best hypothesis).
    pub m4_expected: f64,
    /// M+2 spacing verdict.
    pub spacing: SpacingVerdict,
    /// Observed M+2 mass difference times z, u.
    pub m2_delta: Option<f64>,
    /// Fitted shell heights of the best hypothesis (scale times expected fraction).
    pub fitted: [f64; SHELLS],
    /// Why the halogen call came out as it did.
    pub reason: &'static str,
}

/// 37Cl/35Cl abundance ratio (IUPAC 2013: 24.24 / 75.76), weight of a Cl in the M+2 shell.
const CL_M2_WEIGHT: f64 = 0.2424 / 0.7576;
/// 81Br/79Br abundance ratio (49.31 / 50.69).
const BR_M2_WEIGHT: f64 = 0.4931 / 0.5069;
/// Sulfur counts tried as look-alikes.
const SULFUR_COUNTS: [u8; 5] = [2, 3, 4, 6, 8];
/// Silicon counts tried as look-alikes.
const SILICON_COUNTS: [u8; 8] = [1, 2, 3, 4, 5, 6, 7, 8];
/// Least ion mass per Si atom for a silicon look-alike, u (a dimethylsiloxane unit
/// C2H6OSi weighs 74 u, a trimethylsilyl group 73 u).
const SI_MIN_MASS: f64 = 70.0;
/// Below this observed M+2/M upper bound only Cl0Br0 and Cl1Br0 are scored.
const QUICK_M2_RATIO: f64 = 0.12;
/// Largest contribution of a shell observed above expectation to the misfit.
const EXCESS_CAP: f64 = 4.0;
/// Shells of the first pass for long clusters.
const STAGE1_SHELLS: usize = 6;
/// Hypotheses more than this far behind the best in the first pass (log-likelihood) are
/// not fitted in full.
const STAGE1_MARGIN: f64 = 20.0;
/// ln(2 pi).
const LN_2PI: f64 = 1.837_877_066_409_345_5;
/// Model part of the M+2 spacing uncertainty (unresolved 34S, 18O, 13C2 blends), u.
const SPACING_MODEL_SIGMA: f64 = 0.0002;

/// Look-alike isotope polynomials: (S counts then Si counts) x shell, plus the light masses.
struct Decoys {
    poly: Array2<f64>,
    s32: f64,
    si28: f64,
    cl35: f64,
    br79: f64,
}

/// Reads the first shells of the cluster model for one ion mass: the same linear
/// interpolation between mass bins as [`ClusterModel::expected`], on the shells needed only.
struct Lookup<'a> {
    mean: &'a [f32],
    spread: &'a [f32],
    i0: usize,
    t: f32,
}

impl<'a> Lookup<'a> {
    const STRIDE_BIN: usize = (MAX_CL + 1) * (MAX_BR + 1) * SHELLS;

    fn new(model: &'a ClusterModel, mass: f64) -> Lookup<'a> {
        let bins = model.mean_table().shape()[0];
        let x = (mass.max(0.0) / MASS_STEP).min((bins - 1) as f64);
        let b0 = (x.floor() as usize).min(bins - 2);
        Lookup {
            mean: model.mean_table().as_slice().expect("standard layout"),
            spread: model.spread_table().as_slice().expect("standard layout"),
            i0: b0 * Self::STRIDE_BIN,
            t: (x - b0 as f64) as f32,
        }
    }

    fn get(&self, n_cl: usize, n_br: usize, len: usize) -> ([f64; SHELLS], [f64; SHELLS]) {
        let i = self.i0 + (n_cl * (MAX_BR + 1) + n_br) * SHELLS;
        let j = i + Self::STRIDE_BIN;
        let (mut e, mut d) = ([0.0; SHELLS], [0.0; SHELLS]);
        for k in 0..len.min(SHELLS) {
            let (m0, m1) = (self.mean[i + k], self.mean[j + k]);
            let (s0, s1) = (self.spread[i + k], self.spread[j + k]);
            e[k] = f64::from(m0 + self.t * (m1 - m0));
            d[k] = f64::from(s0 + self.t * (s1 - s0));
        }
        (e, d)
    }
}

fn decoys() -> &'static Decoys {
    static D: OnceLock<Decoys> = OnceLock::new();
    D.get_or_init(|| {
        let poly_of = |sym: &str| {
            let e = element(sym).expect("element");
            let light = e.isotopes[0].mass_number;
            let mut p = vec![0.0; SHELLS];
            for i in e.isotopes {
                p[usize::from(i.mass_number - light)] = i.abundance;
            }
            p
        };
        let power = |p: &[f64], k: u8| {
            let mut q = vec![0.0; SHELLS];
            q[0] = 1.0;
            for _ in 0..k {
                let mut r = vec![0.0; SHELLS];
                for (i, &a) in q.iter().enumerate() {
                    for (j, &b) in p.iter().enumerate().take(SHELLS - i) {
                        r[i + j] += a * b;
                    }
                }
                q = r;
            }
            q
        };
        let (ps, psi) = (poly_of("S"), poly_of("Si"));
        let n = SULFUR_COUNTS.len() + SILICON_COUNTS.len();
        let mut poly = Array2::<f64>::zeros((n, SHELLS));
        for (row, &k) in SULFUR_COUNTS.iter().enumerate() {
            for (s, v) in power(&ps, k).into_iter().enumerate() {
                poly[[row, s]] = v;
            }
        }
        for (i, &k) in SILICON_COUNTS.iter().enumerate() {
            for (s, v) in power(&psi, k).into_iter().enumerate() {
                poly[[SULFUR_COUNTS.len() + i, s]] = v;
            }
        }
        Decoys {
            poly,
            s32: isotope_mass("S", 32).expect("32S"),
            si28: isotope_mass("Si", 28).expect("28Si"),
            cl35: isotope_mass("Cl", 35).expect("35Cl"),
            br79: isotope_mass("Br", 79).expect("79Br"),
        }
    })
}

/// Shells worth looking at for an ion of mass `mass` (m/z times z): up to two per halogen
/// atom the mass allows (at most 14), plus four.
pub fn shells_needed(mass: f64) -> usize {
    let halogens = (mass / 34.97).floor().clamp(0.0, (MAX_CL + MAX_BR) as f64) as usize;
    (2 * halogens + 4).min(SHELLS)
}

/// Fit of one hypothesis.
struct Fit {
    loglik: f64,
    chi2: f64,
    informative: usize,
    scale: f64,
}

/// ln of a variance `s2 (1 + x)` given `ln s2`, cheap when `x` is small.
#[inline]
fn ln_var(ln_s2: f64, s2: f64, x: f64) -> f64 {
    if x < 1e-4 { ln_s2 + x } else { (s2 * (1.0 + x)).ln() }
}

/// ln(e^a + e^b), skipping the transcendental part when one term dominates.
#[inline]
fn log_add(a: f64, b: f64) -> f64 {
    let d = (a - b).abs();
    a.max(b) + if d > 30.0 { 0.0 } else { (1.0 + (-d).exp()).ln() }
}

fn fit(obs: &Shells, e: &[f64; SHELLS], d: &[f64; SHELLS], rel: f64) -> Fit {
    let n = obs.len;
    let mut scale = if e[0] > 0.0 { obs.intensity[0] / e[0] } else { obs.intensity[0] };
    for _ in 0..3 {
        let (mut num, mut den) = (0.0, 0.0);
        for k in 0..n {
            if obs.intensity[k] > 0.0 {
                let s2 = obs.sigma[k] * obs.sigma[k];
                let extra = (rel * scale * e[k]).powi(2) + (scale * d[k]).powi(2);
                let v = s2 + extra;
                // Shells above expectation count with the probability that they hold no
                // unrelated peak (the mixture below), so interference does not pull the scale.
                let r = obs.intensity[k] - scale * e[k];
                let w = if r > 0.0 {
                    let a = -0.5 * (r * r / v + ln_var(obs.ln_sigma2[k], s2, extra / s2) + LN_2PI)
                        + obs.ln_clean[k];
                    let b = obs.ln_unrelated[k] - r.max(obs.sigma[k]).ln();
                    if b - a > 30.0 { 0.0 } else { 1.0 / (1.0 + (b - a).exp()) }
                } else {
                    1.0
                };
                num += w * obs.intensity[k] * e[k] / v;
                den += w * e[k] * e[k] / v;
            }
        }
        if den > 0.0 {
            scale = num / den;
        }
    }
    let (mut chi2, mut loglik, mut informative) = (0.0, 0.0, 0);
    for k in 0..n {
        let s2 = obs.sigma[k] * obs.sigma[k];
        let extra = (rel * scale * e[k]).powi(2) + (scale * d[k]).powi(2);
        let v = s2 + extra;
        let lnv = ln_var(obs.ln_sigma2[k], s2, extra / s2);
        let expect = scale * e[k];
        let limit = obs.detect_snr * obs.sigma[k];
        let gauss = |r: f64| -0.5 * (r * r / v + lnv + LN_2PI);
        if obs.intensity[k] > 0.0 {
            informative += 1;
            let r = obs.intensity[k] - expect;
            if r > 0.0 {
                // Signal, or signal plus an unrelated peak (see the module docs).
                let a = gauss(r) + obs.ln_clean[k];
                let b = obs.ln_unrelated[k] - r.max(obs.sigma[k]).ln();
                loglik += log_add(a, b);
                chi2 += (r * r / v).min(EXCESS_CAP);
            } else {
                loglik += gauss(r);
                chi2 += r * r / v;
            }
        } else {
            if expect > limit {
                informative += 1;
            }
            let r = (expect - limit).max(0.0);
            loglik += gauss(r);
            chi2 += r * r / v;
        }
    }
    Fit { loglik, chi2, informative, scale }
}

/// m/z uncertainty of a centroid (see the module docs).
fn mz_sigma(c: &Centroid, tol: f64) -> f64 {
    if c.fwhm > 0.0 && c.snr > 0.0 { (c.fwhm / c.snr).hypot(0.5e-6 * c.mz) } else { tol / 3.0 }
}

fn spacing_verdict(
    c: &[Centroid],
    obs: &Shells,
    z: u8,
    high: bool,
    tol: f64,
    n_cl: u8,
    n_br: u8,
) -> (SpacingVerdict, Option<f64>) {
    let (Some(i0), top2) = (obs.top[0], obs.top.get(2).copied().flatten()) else {
        return (SpacingVerdict::NoPeak, None);
    };
    let Some(i2) = top2 else {
        return (if high { SpacingVerdict::NoPeak } else { SpacingVerdict::NotUsed }, None);
    };
    let zf = f64::from(z);
    let delta = (c[i2].mz - c[i0].mz) * zf;
    if !high {
        return (SpacingVerdict::NotUsed, Some(delta));
    }
    let sigma = mz_sigma(&c[i0], tol).hypot(mz_sigma(&c[i2], tol)) * zf;
    let (cl, br) = (M2Spacing::Chlorine.delta(), M2Spacing::Bromine.delta());
    let (lo, hi) = match (n_cl > 0, n_br > 0) {
        (true, true) => (cl, br),
        (false, true) => (br, br),
        _ => (cl, cl),
    };
    let off_halogen = if delta < lo {
        lo - delta
    } else if delta > hi {
        delta - hi
    } else {
        0.0
    };
    if off_halogen <= 3.0 * sigma {
        return (SpacingVerdict::Consistent, Some(delta));
    }
    let looks = [
        (M2Spacing::Sulfur, SpacingVerdict::Sulfur),
        (M2Spacing::Silicon, SpacingVerdict::Silicon),
        (M2Spacing::Oxygen, SpacingVerdict::Oxygen),
        (M2Spacing::TwoCarbon13, SpacingVerdict::TwoCarbon13),
    ];
    let nearest = looks
        .iter()
        .map(|&(s, v)| ((delta - s.delta()).abs(), v))
        .min_by(|a, b| a.0.total_cmp(&b.0))
        .expect("non-empty");
    if nearest.0 <= 3.0 * sigma {
        (nearest.1, Some(delta))
    } else {
        (SpacingVerdict::Inconsistent, Some(delta))
    }
}

/// Scores the cluster `obs` of an ion at `mz` with charge `z` (see the module docs).
pub fn score(
    c: &[Centroid],
    obs: &Shells,
    mz: f64,
    z: u8,
    high: bool,
    tol: f64,
    settings: &FlagSettings,
) -> Score {
    let model = ClusterModel::global();
    let mass = mz * f64::from(z);
    let rel = settings.relative_error;
    let o0 = obs.intensity[0];
    let no_m2 = obs.len <= 2 || obs.intensity[2] <= 0.0;
    let quick = no_m2 || obs.intensity[2] + 3.0 * obs.sigma[2] < QUICK_M2_RATIO * o0;

    // Collect the hypotheses with their log-priors, expected shells and spreads.
    let mut cands: Vec<(Hypothesis, f64, [f64; SHELLS], [f64; SHELLS])> = Vec::with_capacity(80);
    let mut push = |h: Hypothesis, e: [f64; SHELLS], d: [f64; SHELLS]| {
        let prior = match h {
            Hypothesis::Halogen { .. } => 0.0,
            Hypothesis::Sulfur(_) => -(SULFUR_COUNTS.len() as f64).ln(),
            Hypothesis::Silicon(_) => -(SILICON_COUNTS.len() as f64).ln(),
        };
        cands.push((h, prior, e, d));
    };
    // Only the shells looked at matter.
    let n = obs.len.max(5);
    let (max_cl, max_br) = if quick { (1, 0) } else { (MAX_CL, MAX_BR) };
    let dec = decoys();
    let table = Lookup::new(model, mass);
    for nc in 0..=max_cl {
        for nb in 0..=max_br {
            // The model's feasibility rule (Cl and Br alone no heavier than the ion).
            if mass < nc as f64 * dec.cl35 + nb as f64 * dec.br79 {
                continue;
            }
            let (e, d) = table.get(nc, nb, n);
            push(Hypothesis::Halogen { n_cl: nc as u8, n_br: nb as u8 }, e, d);
        }
    }
    if !quick {
        let kinds =
            SULFUR_COUNTS.iter().map(|&k| (Hypothesis::Sulfur(k), f64::from(k) * dec.s32)).chain(
                SILICON_COUNTS.iter().map(|&k| (Hypothesis::Silicon(k), f64::from(k) * dec.si28)),
            );
        for (row, (h, light)) in kinds.enumerate() {
            let min_mass = match h {
                Hypothesis::Silicon(k) => SI_MIN_MASS * f64::from(k),
                _ => light,
            };
            if min_mass > mass + 0.5 {
                continue;
            }
            let (bg, bs) = Lookup::new(model, mass - light).get(0, 0, n);
            let p = dec.poly.row(row);
            let (mut e, mut d) = ([0.0f64; SHELLS], [0.0f64; SHELLS]);
            for i in 0..n {
                let (b, s) = (bg[i], bs[i]);
                if b == 0.0 && s == 0.0 {
                    continue;
                }
                for j in 0..n - i {
                    e[i + j] += b * p[j];
                    d[i + j] += s * p[j];
                }
            }
            push(h, e, d);
        }
    }
    // Long clusters: a first pass on shells M to M+5 drops hypotheses far behind there.
    let keep: Vec<bool> = if obs.len > STAGE1_SHELLS && cands.len() > 2 {
        let short = Shells { len: STAGE1_SHELLS, ..*obs };
        let ll: Vec<f64> =
            cands.iter().map(|(_, prior, e, d)| fit(&short, e, d, rel).loglik + prior).collect();
        let best = ll.iter().copied().fold(f64::NEG_INFINITY, f64::max);
        ll.iter().map(|&l| l >= best - STAGE1_MARGIN).collect()
    } else {
        vec![true; cands.len()]
    };
    let mut results: Vec<(Hypothesis, f64, Fit, [f64; SHELLS])> = cands
        .iter()
        .zip(&keep)
        .filter(|(_, k)| **k)
        .map(|((h, prior, e, d), _)| {
            let f = fit(obs, e, d, rel);
            (*h, f.loglik + prior, f, *e)
        })
        .collect();
    // High resolution: the M+2 spacing enters the likelihood (see the module docs).
    if let (true, Some(i0), Some(i2)) = (high, obs.top[0], obs.top[2]) {
        let zf = f64::from(z);
        let d = (c[i2].mz - c[i0].mz) * zf;
        let sd =
            (mz_sigma(&c[i0], tol).hypot(mz_sigma(&c[i2], tol)) * zf).hypot(SPACING_MODEL_SIGMA);
        let term = |x: f64| -0.5 * ((d - x) / sd).powi(2);
        let (cl, br) = (M2Spacing::Chlorine.delta(), M2Spacing::Bromine.delta());
        let others =
            [M2Spacing::Sulfur, M2Spacing::Oxygen, M2Spacing::TwoCarbon13, M2Spacing::Silicon]
                .map(|s| term(s.delta()))
                .into_iter()
                .fold(f64::NEG_INFINITY, f64::max);
        for r in &mut results {
            r.1 += match r.0 {
                Hypothesis::Halogen { n_cl: 0, n_br: 0 } => others,
                Hypothesis::Halogen { n_cl, n_br } => {
                    let (wc, wb) = (f64::from(n_cl) * CL_M2_WEIGHT, f64::from(n_br) * BR_M2_WEIGHT);
                    term((wc * cl + wb * br) / (wc + wb))
                }
                Hypothesis::Sulfur(_) => term(M2Spacing::Sulfur.delta()),
                Hypothesis::Silicon(_) => term(M2Spacing::Silicon.delta()),
            };
        }
    }
    let max_ll = results.iter().map(|r| r.1).fold(f64::NEG_INFINITY, f64::max);
    let mut total = 0.0;
    let mut p_hal = 0.0;
    for r in &results {
        let w = (r.1 - max_ll).exp();
        total += w;
        if r.0.is_halogen() {
            p_hal += w;
        }
    }
    // Best and second best; ties broken by the order of evaluation (deterministic).
    let (mut first, mut second): (usize, Option<usize>) = (0, None);
    for i in 1..results.len() {
        if results[i].1 > results[first].1 {
            second = Some(first);
            first = i;
        } else if second.is_none_or(|j| results[i].1 > results[j].1) {
            second = Some(i);
        }
    }
    let b = &results[first];
    let s = second.map(|i| &results[i]);
    let best_p = (b.1 - max_ll).exp() / total;
    let p_halogen = p_hal / total;
    let dof = b.2.informative.saturating_sub(1).max(1);
    let misfit = b.2.chi2 / dof as f64;
    let (n_cl, n_br) = match b.0 {
        Hypothesis::Halogen { n_cl, n_br } => (n_cl, n_br),
        _ => (0, 0),
    };
    // Halogen counts for the spacing test: the best halogen hypothesis.
    let (hc, hb) = results
        .iter()
        .filter(|r| r.0.is_halogen())
        .fold(None, |best: Option<&(Hypothesis, f64, Fit, [f64; SHELLS])>, r| match best {
            Some(b) if b.1 >= r.1 => Some(b),
            _ => Some(r),
        })
        .and_then(|r| match r.0 {
            Hypothesis::Halogen { n_cl, n_br } => Some((n_cl, n_br)),
            _ => None,
        })
        .unwrap_or((1, 0));
    let (spacing, m2_delta) = spacing_verdict(c, obs, z, high, tol, hc, hb);
    let mut fitted = [0.0; SHELLS];
    for (f, &e) in fitted.iter_mut().zip(&b.3) {
        *f = b.2.scale * e;
    }
    let ratio = |k: usize| if obs.len > k && o0 > 0.0 { obs.intensity[k] / o0 } else { 0.0 };
    let expect = |k: usize| if b.3[0] > 0.0 { b.3[k] / b.3[0] } else { 0.0 };
    let (halogen, reason) = if no_m2 {
        (false, "no M+2 peak")
    } else if !b.0.is_halogen() {
        (false, "best hypothesis has no Cl or Br")
    } else if p_halogen < settings.min_halogen_probability {
        (false, "halogen probability below threshold")
    } else if spacing.is_look_alike() {
        (false, "M+2 spacing matches a S/Si/O/13C look-alike, not Cl/Br")
    } else {
        (true, "isotope pattern fits Cl/Br")
    };
    Score {
        best: b.0,
        best_p,
        second: s.map_or(b.0, |s| s.0),
        second_p: s.map_or(0.0, |s| (s.1 - max_ll).exp() / total),
        p_halogen,
        misfit,
        n_cl,
        n_br,
        halogen,
        m2_ratio: ratio(2),
        m2_expected: expect(2),
        m4_ratio: ratio(4),
        m4_expected: expect(4),
        spacing,
        m2_delta,
        fitted,
        reason,
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn decoy_polynomials_are_binomial_like() {
        // S2: M+2 / M = 2 x 4.25 / 94.99 (IUPAC 2013 abundances; arithmetic by hand).
        let d = decoys();
        let s2 = d.poly.row(0);
        assert!((s2[2] / s2[0] - 2.0 * 0.0425 / 0.9499).abs() < 0.005, "{}", s2[2] / s2[0]);
        let si1 = d.poly.row(SULFUR_COUNTS.len());
        assert!((si1[1] - 0.04685).abs() < 1e-4 && (si1[2] - 0.03092).abs() < 1e-4);
        assert!(d.poly.rows().into_iter().all(|r| (r.sum() - 1.0).abs() < 1e-9));
    }

    #[test]
    fn lookup_matches_the_model() {
        let model = ClusterModel::global();
        for mass in [0.0, 37.5, 296.02, 2999.0, 5000.0] {
            for (n, m) in [(0, 0), (3, 0), (2, 1), (8, 6)] {
                let want = model.expected(mass, 1, n, m).unwrap();
                let (e, d) = Lookup::new(model, mass).get(n, m, SHELLS);
                for k in 0..SHELLS {
                    assert_eq!(e[k], f64::from(want.shells[k]), "{mass} {n} {m} {k}");
                    assert_eq!(d[k], f64::from(want.spread[k]));
                }
            }
        }
    }

    #[test]
    fn hypothesis_labels() {
        assert_eq!(Hypothesis::Halogen { n_cl: 2, n_br: 1 }.label(), "Cl2Br1");
        assert!(!Hypothesis::Halogen { n_cl: 0, n_br: 0 }.is_halogen());
        assert!(!Hypothesis::Silicon(4).is_halogen());
        assert_eq!(shells_needed(100.0), 2 * 2 + 4); // two 35Cl fit in 100 u
        assert_eq!(shells_needed(5000.0), SHELLS);
    }
}
