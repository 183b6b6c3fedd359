//! Isotope pattern fit of a candidate formula against an observed cluster.
//!
//! **Expected pattern.** The monoisotopic peak M and every isotopologue of the M+1 and M+2
//! shells, with abundances relative to M computed exactly from the multinomial isotope
//! distribution of each element (the ratio of one configuration's probability to the
//! monoisotopic one's: `n r` for one heavy atom of abundance ratio `r`, `n (n - 1) / 2 r^2`
//! for two of the same, `n_a n_b r_a r_b` for one each of two kinds), so no isotopologue
//! enumeration is needed per candidate. These fine peaks are then merged at the data's
//! resolving power with [`isotopes::aggregate`], the same merging rule the chemistry module's
//! [`isotopes::pattern`] applies, so at R = 60,000 the M+2 of a chlorinated compound shows
//! 37Cl (with 34S merged into it) apart from 18O and 13C2.
//!
//! **Fit.** Observed peaks are taken relative to the observed M (the peak nearest
//! [`ObservedCluster::mono_mz`]) as offsets `(m/z - m/z_M) |z|` and intensity ratios. Each
//! observed peak of the M+1 and M+2 regions (offsets 0.5-1.5 and 1.5-2.5 u) is matched to the
//! nearest expected peak within one peak width (`m/z / R`). Then
//!
//! `chi2 = sum_j ((o_j - e_j) / s_j)^2 + sum_matched ((d_obs - d_exp) / s_d)^2
//!        + sum_unmatched (o_k / s_0)^2`
//!
//! with `e_j` and `o_j` the expected and observed (summed) ratios of expected peak `j`,
//! `s_j^2 = s_0^2 + (intensity_sigma e_j)^2`, `s_0^2 = (noise / I_M)^2 + intensity_floor^2`,
//! and `s_d = width * max(0.05, s_j / o_j)` (a centroid is about as precise as its width over
//! its signal-to-noise ratio). The reported `isotope_fit` is `exp(-chi2 / (2 n))` over the `n`
//! terms (1 is a perfect fit), and the likelihood that enters the score is `exp(-chi2 / 2)`.

use crate::chem::Formula;
use crate::chem::elements::Element;
use crate::chem::isotopes::{self, Peak};

/// One centroid of the observed cluster.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ObservedPeak {
    /// m/z.
    pub mz: f64,
    /// Intensity (any unit, the same for every peak).
    pub intensity: f64,
}

/// The observed isotope cluster of one ion: its centroids around the monoisotopic peak M.
#[derive(Debug, Clone, PartialEq)]
pub struct ObservedCluster {
    /// The centroids of the cluster (at least M; M+1 and M+2 where seen), any order.
    pub peaks: Vec<ObservedPeak>,
    /// m/z of the monoisotopic peak M (the nearest centroid within one peak width is M).
    pub mono_mz: f64,
    /// Charge number of the ion (sign ignored), not 0.
    pub charge: i32,
    /// Resolving power m/FWHM of the data at this m/z.
    pub resolving_power: f64,
    /// Noise level (standard deviation) in intensity units; 0 when unknown.
    pub noise: f64,
}

/// Weights of the score (see the module documentation of [`super`]).
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ScoreSettings {
    /// Standard deviation of the mass error, ppm; `None`: half the search tolerance.
    pub mass_sigma_ppm: Option<f64>,
    /// Relative standard deviation of an isotope peak's intensity ratio (default 0.05: the
    /// paper's rule 3 quotes 2-5 % for isotope abundances on current instruments).
    pub intensity_sigma: f64,
    /// Least standard deviation of an intensity ratio, relative to M (default 0.005).
    pub intensity_floor: f64,
}

impl Default for ScoreSettings {
    fn default() -> ScoreSettings {
        ScoreSettings { mass_sigma_ppm: None, intensity_sigma: 0.05, intensity_floor: 0.005 }
    }
}

/// The monoisotopic peak and the fine structure of the M+1 and M+2 shells of `formula`
/// (neutral atom masses, abundances relative to M = 1), sorted by mass.
///
/// Exact for elements whose most abundant isotope is the lightest (every element of the
/// formula search); lighter isotopes of other elements (B, Li, ...) are left out, as are
/// atoms written as explicit isotopes (they only add their mass).
///
/// # Examples
///
/// ```
/// use mzcore::chem::{Formula, formula_search::low_shells};
/// let peaks = low_shells(&Formula::parse("CHCl3")?);
/// let m2: f64 = peaks.iter().filter(|p| p.shell == 2).map(|p| p.abundance).sum();
/// assert!((m2 - 0.96).abs() < 0.01); // Cl3: about 100:96
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn low_shells(formula: &Formula) -> Vec<Peak> {
    let mut fixed = 0.0;
    let mut atoms: Vec<(&'static Element, u32)> = Vec::new();
    for e in formula.entries() {
        match e.isotope {
            Some(i) => fixed += f64::from(e.count) * i.mass,
            None => atoms.push((e.element, e.count)),
        }
    }
    let mut out = Vec::new();
    low_shell_peaks(&atoms, &mut out);
    for p in &mut out {
        p.mass += fixed;
    }
    out
}

/// [`low_shells`] of a list of (element, count), written into `out`.
pub(crate) fn low_shell_peaks(atoms: &[(&'static Element, u32)], out: &mut Vec<Peak>) {
    out.clear();
    let mut mono = 0.0;
    // (element slot, count, abundance ratio to the element's mono isotope, mass step)
    let mut one: Vec<(usize, f64, f64, f64)> = Vec::new();
    let mut two: Vec<(f64, f64)> = Vec::new();
    for (slot, &(el, n)) in atoms.iter().enumerate() {
        if n == 0 {
            continue;
        }
        let m0 = el.most_abundant();
        mono += f64::from(n) * m0.mass;
        for iso in el.isotopes {
            let shift = i32::from(iso.mass_number) - i32::from(m0.mass_number);
            let r = iso.abundance / m0.abundance;
            let dm = iso.mass - m0.mass;
            match shift {
                1 => one.push((slot, f64::from(n), r, dm)),
                2 => two.push((f64::from(n) * r, dm)),
                _ => {}
            }
        }
    }
    out.push(Peak { mass: mono, abundance: 1.0, shell: 0 });
    for &(_, n, r, dm) in &one {
        out.push(Peak { mass: mono + dm, abundance: n * r, shell: 1 });
    }
    for &(a, dm) in &two {
        out.push(Peak { mass: mono + dm, abundance: a, shell: 2 });
    }
    for (i, &(si, ni, ri, di)) in one.iter().enumerate() {
        if ni >= 2.0 {
            out.push(Peak {
                mass: mono + 2.0 * di,
                abundance: ni * (ni - 1.0) / 2.0 * ri * ri,
                shell: 2,
            });
        }
        for &(sj, nj, rj, dj) in &one[i + 1..] {
            let pairs = if si == sj { ni * (ni - 1.0) } else { ni * nj };
            if pairs > 0.0 {
                out.push(Peak { mass: mono + di + dj, abundance: pairs * ri * rj, shell: 2 });
            }
        }
    }
    out.sort_by(|a, b| a.mass.total_cmp(&b.mass));
}

/// The observed cluster relative to its M, ready to be fitted against many candidates.
#[derive(Debug, Clone)]
pub(crate) struct PreparedCluster {
    mono_mz: f64,
    z: f64,
    resolving_power: f64,
    /// Peak width in offset units (u).
    width: f64,
    /// Noise relative to M, squared, plus the floor squared.
    s0_sq: f64,
    /// (offset u, ratio to M) of the observed peaks in the M+1 and M+2 regions.
    peaks: Vec<(f64, f64)>,
}

impl PreparedCluster {
    /// `None` when no centroid lies within one peak width of `mono_mz` or the cluster's
    /// numbers are unusable (charge 0, resolving power not positive).
    pub(crate) fn new(obs: &ObservedCluster, settings: &ScoreSettings) -> Option<PreparedCluster> {
        let valid = obs.charge != 0
            && obs.resolving_power > 0.0
            && obs.resolving_power.is_finite()
            && obs.mono_mz > 0.0
            && obs.mono_mz.is_finite();
        if !valid {
            return None;
        }
        let z = f64::from(obs.charge.unsigned_abs());
        let width_mz = obs.mono_mz / obs.resolving_power;
        let m = obs
            .peaks
            .iter()
            .filter(|p| (p.mz - obs.mono_mz).abs() <= width_mz && p.intensity > 0.0)
            .min_by(|a, b| (a.mz - obs.mono_mz).abs().total_cmp(&(b.mz - obs.mono_mz).abs()))?;
        let noise =
            if obs.noise.is_finite() && obs.noise > 0.0 { obs.noise / m.intensity } else { 0.0 };
        let peaks = obs
            .peaks
            .iter()
            .filter(|p| p.intensity > 0.0 && p.intensity.is_finite())
            .map(|p| ((p.mz - m.mz) * z, p.intensity / m.intensity))
            .filter(|&(d, _)| (0.5..2.5).contains(&d))
            .collect();
        Some(PreparedCluster {
            mono_mz: m.mz,
            z,
            resolving_power: obs.resolving_power,
            width: width_mz * z,
            s0_sq: noise * noise + settings.intensity_floor * settings.intensity_floor,
            peaks,
        })
    }

    /// The expected M+1 and M+2 peaks at this cluster's resolving power, as (offset, ratio).
    pub(crate) fn expected(&self, fine: &[Peak], scratch: &mut Vec<Peak>) -> Vec<(f64, f64)> {
        let mono = fine.iter().find(|p| p.shell == 0).map_or(0.0, |p| p.mass);
        scratch.clear();
        scratch.extend(
            fine.iter()
                .filter(|p| p.shell > 0)
                .map(|p| Peak { mass: self.mono_mz + (p.mass - mono) / self.z, ..*p }),
        );
        isotopes::aggregate(scratch, self.resolving_power)
            .into_iter()
            .map(|p| ((p.mass - self.mono_mz) * self.z, p.abundance))
            .collect()
    }

    /// `(chi2, terms)` of the expected peaks (from [`PreparedCluster::expected`]).
    pub(crate) fn chi2(&self, expected: &[(f64, f64)], settings: &ScoreSettings) -> (f64, usize) {
        let mut sum = vec![0.0; expected.len()];
        let mut weighted = vec![0.0; expected.len()];
        let mut chi2 = 0.0;
        let mut terms = 0;
        for &(d, o) in &self.peaks {
            let nearest = expected
                .iter()
                .enumerate()
                .map(|(j, &(e_d, _))| (j, (e_d - d).abs()))
                .filter(|&(_, dist)| dist <= self.width)
                .min_by(|a, b| a.1.total_cmp(&b.1));
            match nearest {
                Some((j, _)) => {
                    sum[j] += o;
                    weighted[j] += o * d;
                }
                None => {
                    chi2 += o * o / self.s0_sq;
                    terms += 1;
                }
            }
        }
        for (j, &(e_d, e)) in expected.iter().enumerate() {
            let o = sum[j];
            let rel = settings.intensity_sigma * e;
            let s_sq = self.s0_sq + rel * rel;
            chi2 += (o - e) * (o - e) / s_sq;
            if o > 0.0 && e > 0.0 {
                let s_d = self.width * (s_sq.sqrt() / o).clamp(0.05, 1.0);
                let dd = weighted[j] / o - e_d;
                chi2 += dd * dd / (s_d * s_d);
            }
            if o > 0.0 || e >= settings.intensity_floor {
                terms += 1;
            }
        }
        (chi2, terms.max(1))
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::isotopes::fine_structure;

    #[test]
    fn low_shells_match_the_fine_structure() {
        // Every M+1 and M+2 isotopologue of the exact fine structure (mzcore::chem::isotopes,
        // itself checked against IsoSpecPy) appears with the same mass and relative abundance.
        for f in ["C9H11Cl3NO3PS", "C12H4Cl6", "C12H6Br4O", "C8H24O4Si4", "C7H8ClN3O4S2", "CHBr2Cl"]
        {
            let formula = Formula::parse(f).unwrap();
            let ours = low_shells(&formula);
            let fine = fine_structure(&formula, 1e-9).unwrap();
            let mono = fine.peaks().iter().find(|p| p.shell == 0).unwrap();
            let theirs: Vec<&Peak> =
                fine.peaks().iter().filter(|p| (0..=2).contains(&p.shell)).collect();
            assert_eq!(ours.len(), theirs.len(), "{f}");
            for (a, b) in ours.iter().zip(theirs) {
                assert!((a.mass - b.mass).abs() < 1e-9, "{f}: {} vs {}", a.mass, b.mass);
                let rel = b.abundance / mono.abundance;
                assert!(
                    (a.abundance - rel).abs() < 1e-9 * rel.max(1.0),
                    "{f}: {} vs {rel}",
                    a.abundance
                );
                assert_eq!(a.shell, b.shell);
            }
        }
    }

    fn cluster(formula: &str, r: f64) -> ObservedCluster {
        let f = Formula::parse(formula).unwrap();
        let ion = crate::chem::IonType::parse("M+.").unwrap();
        let pat = isotopes::pattern(&f, Some(&ion), isotopes::Resolution::ResolvingPower(r), 1e-5)
            .unwrap();
        let mono = pat.iter().find(|p| p.shell == 0).unwrap().mz;
        ObservedCluster {
            peaks: pat.iter().map(|p| ObservedPeak { mz: p.mz, intensity: p.abundance }).collect(),
            mono_mz: mono,
            charge: 1,
            resolving_power: r,
            noise: 0.0,
        }
    }

    #[test]
    fn the_true_formula_fits_best() {
        // Noise-free cluster of chlorpyrifos at R 60,000 against itself and a same-nominal-mass
        // look-alike with one S less and two O more (C9H11Cl3NO5P, 0.0095 u apart).
        let s = ScoreSettings::default();
        let obs = cluster("C9H11Cl3NO3PS", 60_000.0);
        let prep = PreparedCluster::new(&obs, &s).unwrap();
        let mut scratch = Vec::new();
        let mut fit = |f: &str| {
            let e = prep.expected(&low_shells(&Formula::parse(f).unwrap()), &mut scratch);
            prep.chi2(&e, &s).0
        };
        let own = fit("C9H11Cl3NO3PS");
        assert!(own < 1e-3, "chi2 of the true formula {own}");
        let other = fit("C9H11Cl3NO5P");
        assert!(other > 2.0, "chi2 of the look-alike {other}");
        // No peak near mono_mz: no fit.
        let mut far = obs.clone();
        far.mono_mz += 0.5;
        assert!(PreparedCluster::new(&far, &s).is_none());
    }
}
