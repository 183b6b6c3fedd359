//! Flagging: chlorine / bromine isotope signatures and the nitrogen rule, one spectrum at a time.
//!
//! Flags are screening hints from isotope patterns and mass parity, not identifications.
//!
//! [`flag_spectrum`] takes one spectrum's centroids (sorted by m/z, as the centroider returns
//! them) and does three things:
//!
//! 1. **Clusters** ([`cluster`]): every centroid with S/N at least
//!    [`FlagSettings::min_snr`] is tried, in ascending m/z, as the monoisotopic peak of a
//!    cluster. The charge (1 to [`FlagSettings::max_charge`], high resolution only) comes from
//!    the 13C and M+2 spacings (1.00336/z, ~1.997/z). Shell k of the cluster is the sum of
//!    the centroids between `k x 0.99785 / z` and `k x 1.00336 / z` above the monoisotopic
//!    peak (34S/2 and 13C bound the per-shell spacing of all C/H/N/O/S/Cl/Br isotopologues),
//!    widened by the m/z tolerance on both sides. A cluster whose best hypothesis fits
//!    ([`FlagSettings::max_misfit`]) *consumes* its partner peaks, which are then not tried
//!    as monoisotopic peaks themselves.
//! 2. **Halogen assignment** ([`halogen`]): the observed shells are scored against the
//!    chemistry core's expected Cl_n Br_m clusters (n 0..=8, m 0..=6,
//!    [`crate::chem::halogen::expected`]) and against sulfur (S2..S8) and silicon (Si1..Si8)
//!    look-alikes. The score is a posterior probability under the prior and error model
//!    documented in [`halogen`]. At high resolution the M+2
//!    spacing is compared with 37Cl-35Cl / 81Br-79Br and with 34S, 30Si, 18O and 13C2; a
//!    spacing that matches a look-alike and not the halogen vetoes the flag. At unit
//!    resolution only intensities are used and every ion says so ([`SpacingVerdict::NotUsed`]).
//!    Also at high resolution, a flagged ion must have a mass defect that a molecule with the
//!    assigned Cl/Br can have ([`nitrogen::defect_plausible`]); this rejects chance pairs of
//!    unrelated peaks and elemental sulfur (S8, defect -0.22).
//! 3. **Nitrogen rule** ([`nitrogen`]): the ion type comes from the ionization (EI gives
//!    M+., electrospray / APCI / APPI / CI positive [M+H]+, negative [M-H]-) unless
//!    [`FlagSettings::ion_type`] overrides it; the neutral nominal mass is computed with the
//!    Cl/Br mass defect (from the assignment) and an estimated C/H/N/O defect removed before
//!    rounding, and the call is `undecided` with a reason when the rounding is ambiguous or
//!    the ion type is unknown. In EI spectra the molecular-ion candidate is chosen by the
//!    rule in [`nitrogen`]; other clusters of an EI spectrum are fragments and get no parity.
//!
//! [`SpectrumFlags::ions`] lists the halogen-flagged clusters, the clusters whose best
//! hypothesis is a sulfur or silicon look-alike (not flagged; listed so that a look-alike's
//! trace across scans stays whole and the scans where a Cl/Br hypothesis wins by chance are
//! outvoted in its feature), and the spectrum's molecular-ion candidate (EI: by the rule;
//! other ionizations: the most intense cluster), so the nitrogen rule can be reported for
//! non-halogenated compounds too.
//! [`crate::feature::FeatureBuilder`] groups them across scans.
//!
//! # Examples
//!
//! ```
//! use mzcore::centroid::{Centroid, ResolutionClass};
//! use mzcore::flag::{flag_spectrum, FlagSettings};
//! use mzcore::spectrum::{Ionization, Polarity, SpectrumMeta};
//!
//! // Triclosan [M-H]- (C12H6Cl3O2-) at high resolution, S/N 200 (m/z and relative
//! // intensities of the isotope pattern as computed by molmass).
//! let peaks = [
//!     (286.94389, 100.0), (287.94726, 13.1), (288.94105, 97.2), (289.94436, 12.7),
//!     (290.93831, 31.9), (291.94152, 4.1), (292.93595, 3.6),
//! ];
//! let centroids: Vec<Centroid> = peaks
//!     .iter()
//!     .map(|&(mz, rel)| Centroid { mz, intensity: rel * 200.0, area: rel, snr: rel * 2.0, fwhm: mz / 60000.0 })
//!     .collect();
//! let meta = SpectrumMeta {
//!     ms_level: 1, polarity: Polarity::Negative, ionization: Ionization::Electrospray, ..Default::default()
//! };
//! let flags = flag_spectrum(&meta, &centroids, ResolutionClass::High, &FlagSettings::default());
//! assert!(flags.has_halogen);
//! let ion = &flags.ions[0];
//! assert_eq!((ion.n_cl, ion.n_br), (3, 0));
//! assert_eq!(ion.nominal_mass, Some(288)); // C12H7Cl3O2, even: no nitrogen
//! assert_eq!(ion.odd_nominal, mzcore::flag::OddNominal::False);
//! ```

// Negated comparisons such as `!(x > 0.0)` are deliberate: they also catch NaN.
#![allow(clippy::neg_cmp_op_on_partial_ord)]

use serde::{Deserialize, Serialize};

use crate::centroid::{Centroid, ResolutionClass, Tolerance};
use crate::chem::IonType;
use crate::spectrum::SpectrumMeta;
use crate::{Error, ErrorKind, Result};

pub mod cluster;
pub mod halogen;
pub mod nitrogen;

pub use halogen::{Hypothesis, SpacingVerdict};
pub use nitrogen::OddNominal;

/// How the m/z tolerance for cluster partners is chosen.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(rename_all = "snake_case", deny_unknown_fields)]
pub enum MzTolerance {
    /// From the resolution class: 10 ppm (high resolution), 0.3 u (unit or unknown).
    Auto,
    /// Fixed, in parts per million.
    Ppm(f64),
    /// Fixed, in u (Da).
    Da(f64),
}

impl MzTolerance {
    /// The tolerance to use for data of the given resolution class.
    pub fn resolve(self, resolution: ResolutionClass) -> Tolerance {
        match self {
            MzTolerance::Auto => match resolution {
                ResolutionClass::High => Tolerance::Ppm(AUTO_PPM),
                ResolutionClass::Unit | ResolutionClass::Unknown => Tolerance::Da(AUTO_DA),
            },
            MzTolerance::Ppm(p) => Tolerance::Ppm(p),
            MzTolerance::Da(d) => Tolerance::Da(d),
        }
    }
}

/// Automatic tolerance at high resolution, ppm.
pub const AUTO_PPM: f64 = 10.0;
/// Automatic tolerance at unit (or unknown) resolution, u.
pub const AUTO_DA: f64 = 0.3;

/// Settings of the flagging and feature stages.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct FlagSettings {
    /// m/z tolerance for isotope partners (default: automatic from the resolution class).
    pub tolerance: MzTolerance,
    /// Minimum S/N of a monoisotopic peak (default 10).
    pub min_snr: f64,
    /// Highest charge tried at high resolution (1 to 3, default 3; unit resolution uses 1).
    pub max_charge: u8,
    /// Ion type for the nitrogen rule in the bracket or shell notation of
    /// [`IonType::parse`] (`M+.`, `[M+H]+`, ...); `None` (default) takes it from the
    /// spectrum's ionization and polarity.
    pub ion_type: Option<String>,
    /// Minimum posterior probability that a cluster carries Cl or Br (default 0.5: halogen
    /// more likely than not; raise it for fewer, surer flags).
    pub min_halogen_probability: f64,
    /// Largest chi-square per degree of freedom of the best hypothesis for a cluster to count
    /// as a cluster at all (default 6).
    pub max_misfit: f64,
    /// Relative intensity error of isotope peaks beyond the noise (default 0.05).
    pub relative_error: f64,
    /// EI molecular-ion candidates: the highest cluster whose most intense peak reaches this
    /// fraction of the base peak (default 0.05).
    pub ei_min_relative: f64,
    /// Features: minimum number of scans (default 3).
    pub feature_min_scans: usize,
    /// Features: MS1 scans that may be missing inside a feature (default 1).
    pub feature_max_gap: usize,
    /// Explaining away: a monoisotopic candidate next to a peak at least this many times
    /// taller is a side lobe or shoulder when its M+1 or M+2 partner is that peak's own
    /// isotopologue (default 5; see [`cluster::borrows_partners`]).
    pub side_lobe_ratio: f64,
    /// Explaining away: how near (in FWHM of the candidate peak) a taller peak must be
    /// (default 5).
    pub side_lobe_fwhm: f64,
}

impl Default for FlagSettings {
    fn default() -> Self {
        FlagSettings {
            tolerance: MzTolerance::Auto,
            min_snr: 10.0,
            max_charge: 3,
            ion_type: None,
            min_halogen_probability: 0.5,
            max_misfit: 6.0,
            relative_error: 0.05,
            ei_min_relative: 0.05,
            feature_min_scans: 3,
            feature_max_gap: 1,
            side_lobe_ratio: 5.0,
            side_lobe_fwhm: 5.0,
        }
    }
}

impl FlagSettings {
    /// Checks ranges and the ion type; `Config` errors name the setting.
    pub fn validate(&self) -> Result<()> {
        let bad = |what: &str| Err(Error::new(ErrorKind::Config(what.to_string())));
        match self.tolerance {
            MzTolerance::Ppm(p) if !(p > 0.0 && p <= 1000.0) => {
                return bad("flag tolerance in ppm must be in (0, 1000]");
            }
            MzTolerance::Da(d) if !(d > 0.0 && d <= 0.5) => {
                return bad("flag tolerance in Da must be in (0, 0.5]");
            }
            _ => {}
        }
        if !(self.min_snr >= 1.0 && self.min_snr.is_finite()) {
            return bad("flag min_snr must be at least 1");
        }
        if !(1..=3).contains(&self.max_charge) {
            return bad("flag max_charge must be 1, 2 or 3");
        }
        if !(self.min_halogen_probability > 0.0 && self.min_halogen_probability < 1.0) {
            return bad("flag min_halogen_probability must be in (0, 1)");
        }
        if !(self.max_misfit > 0.0 && self.max_misfit.is_finite()) {
            return bad("flag max_misfit must be positive");
        }
        if !(self.relative_error >= 0.0 && self.relative_error < 1.0) {
            return bad("flag relative_error must be in [0, 1)");
        }
        if !(self.ei_min_relative >= 0.0 && self.ei_min_relative <= 1.0) {
            return bad("flag ei_min_relative must be in [0, 1]");
        }
        if !(self.side_lobe_ratio >= 1.0 && self.side_lobe_ratio.is_finite()) {
            return bad("flag side_lobe_ratio must be at least 1");
        }
        if !(self.side_lobe_fwhm >= 0.0 && self.side_lobe_fwhm.is_finite()) {
            return bad("flag side_lobe_fwhm must be 0 or more (0 turns the rule off)");
        }
        if self.feature_min_scans == 0 {
            return bad("feature_min_scans must be at least 1");
        }
        if let Some(t) = &self.ion_type {
            IonType::parse(t)
                .map_err(|e| Error::new(ErrorKind::Config(format!("flag ion_type '{t}': {e}"))))?;
        }
        Ok(())
    }
}

/// One flagged ion: a halogen-flagged cluster or a spectrum's molecular-ion candidate.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FlaggedIon {
    /// Zero-based index of the spectrum in the file.
    pub scan: usize,
    /// Native id of the spectrum.
    pub spectrum_id: String,
    /// Retention time in minutes.
    pub rt_min: Option<f64>,
    /// m/z of the monoisotopic peak.
    pub mz: f64,
    /// Charge number (sign from the polarity or ion type).
    pub charge: i32,
    /// Height of the monoisotopic peak.
    pub intensity: f64,
    /// S/N of the monoisotopic peak.
    pub snr: f64,
    /// True when the cluster is flagged as carrying Cl and/or Br.
    pub halogen: bool,
    /// True for the spectrum's molecular-ion candidate (see [`nitrogen`]).
    pub molecular_candidate: bool,
    /// Best hypothesis, e.g. `Cl2Br1`, `Cl0Br0`, `S4`, `Si5`.
    pub assignment: String,
    /// Chlorine atoms of the best hypothesis (0 for S/Si look-alikes).
    pub n_cl: u8,
    /// Bromine atoms of the best hypothesis.
    pub n_br: u8,
    /// Posterior probability of the best hypothesis.
    pub score: f64,
    /// Posterior probability that the cluster carries at least one Cl or Br.
    pub halogen_probability: f64,
    /// Second-best hypothesis.
    pub second: String,
    /// Posterior probability of the second-best hypothesis.
    pub second_score: f64,
    /// Chi-square per degree of freedom of the best hypothesis.
    pub misfit: f64,
    /// Observed M+2/M intensity ratio (shell sums).
    pub m2_ratio: f64,
    /// Expected M+2/M under the best hypothesis.
    pub m2_expected: f64,
    /// Observed M+4/M.
    pub m4_ratio: f64,
    /// Expected M+4/M under the best hypothesis.
    pub m4_expected: f64,
    /// What the M+2 spacing says (high resolution only).
    pub spacing: SpacingVerdict,
    /// Observed M+2 mass difference (spacing times charge), u.
    pub m2_delta: Option<f64>,
    /// Neutral nominal mass of the molecule, if it could be worked out.
    pub nominal_mass: Option<i64>,
    /// Odd nominal mass (nitrogen rule): true, false or undecided.
    pub odd_nominal: OddNominal,
    /// Ion type used for the nitrogen rule (`M+.`, `[M+H]+`, ...), empty when unknown.
    pub ion_type: String,
    /// Tolerance used for the cluster, in u at this m/z.
    pub tolerance_da: f64,
    /// Human-readable reasons for the halogen and parity calls.
    pub reason: String,
    /// Observed and fitted shell heights (not a column of `ions.tsv`).
    #[serde(skip)]
    pub cluster: IonCluster,
}

/// The shells of a flagged ion's cluster: observed heights (summed per nominal shell) and the
/// heights the best hypothesis fits. Shell 0 is M; shell 2 is M+2.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct IonCluster {
    /// Observed intensity per shell.
    pub observed: Vec<f64>,
    /// Fitted intensity per shell under the best hypothesis.
    pub expected: Vec<f64>,
}

/// The best halogen assignment of a spectrum (the flagged ion with the most intense
/// monoisotopic peak).
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct BestAssignment {
    /// Index into [`SpectrumFlags::ions`].
    pub ion: usize,
    /// m/z of its monoisotopic peak.
    pub mz: f64,
    /// Chlorine atoms.
    pub n_cl: u8,
    /// Bromine atoms.
    pub n_br: u8,
    /// Posterior probability of the assignment.
    pub score: f64,
}

/// What flagging found in one spectrum.
#[derive(Debug, Clone, Default, PartialEq, Serialize)]
pub struct SpectrumFlags {
    /// At least one cluster carries a halogen signature.
    pub has_halogen: bool,
    /// The best halogen assignment, if any.
    pub best: Option<BestAssignment>,
    /// Nitrogen rule of the molecular-ion candidate.
    pub odd_nominal: OddNominal,
    /// Index into `ions` of the molecular-ion candidate.
    pub molecular_ion: Option<usize>,
    /// Number of clusters found (flagged or not).
    pub clusters: usize,
    /// Flagged ions, by ascending m/z.
    pub ions: Vec<FlaggedIon>,
    /// Resolution class the spectrum was flagged at.
    #[serde(skip)]
    pub resolution: Option<ResolutionClass>,
}

/// Flags one spectrum's centroids. Pure and cheap; safe to call from any thread.
///
/// Centroids should be sorted by m/z (an unsorted list is sorted on a copy). See the module
/// documentation for what is computed.
pub fn flag_spectrum(
    meta: &SpectrumMeta,
    centroids: &[Centroid],
    resolution: ResolutionClass,
    settings: &FlagSettings,
) -> SpectrumFlags {
    flag_spectrum_related(meta, centroids, resolution, settings, None)
}

/// [`flag_spectrum`] that also lists the clusters related to a flagged ion or to the
/// molecular-ion candidate by `relations` (another adduct of the same neutral, a parent or a
/// fragment by a listed loss), so that the compound stage can group them
/// ([`crate::compound`]). They are listed like the others (`halogen` as scored).
pub fn flag_spectrum_related(
    meta: &SpectrumMeta,
    centroids: &[Centroid],
    resolution: ResolutionClass,
    settings: &FlagSettings,
    relations: Option<&crate::compound::Relations>,
) -> SpectrumFlags {
    let sorted;
    let centroids = if centroids.windows(2).all(|w| w[0].mz <= w[1].mz) {
        centroids
    } else {
        let mut v = centroids.to_vec();
        v.sort_by(|a, b| a.mz.total_cmp(&b.mz));
        sorted = v;
        &sorted
    };
    let tolerance = settings.tolerance.resolve(resolution);
    let high = resolution == ResolutionClass::High;
    let clusters = cluster::find_clusters(centroids, tolerance, high, settings);
    let ion_type = nitrogen::ion_type_for(meta, settings);
    let mut out = SpectrumFlags {
        clusters: clusters.len(),
        resolution: Some(resolution),
        ..Default::default()
    };
    let unc_at = |mz: f64| if high { tolerance.at(mz) } else { 0.15 };
    let molecular = if meta.ms_level <= 1 {
        let plausible: Vec<bool> = clusters
            .iter()
            .map(|c| {
                let mz = centroids[c.mono].mz;
                let s = &c.score;
                !high
                    || nitrogen::defect_plausible(
                        mz,
                        c.charge,
                        &ion_type,
                        s.n_cl,
                        s.n_br,
                        unc_at(mz),
                    )
            })
            .collect();
        nitrogen::molecular_candidate(centroids, &clusters, &plausible, &ion_type, settings)
    } else {
        None
    };
    let ei = nitrogen::is_ei(&ion_type);
    let sign = ion_type.as_ref().map_or(
        match meta.polarity {
            crate::spectrum::Polarity::Negative => -1,
            _ => 1,
        },
        |t| t.charge().signum(),
    );
    let scores: Vec<halogen::Score> = clusters
        .iter()
        .map(|c| {
            let mono = &centroids[c.mono];
            let mut s = c.score.clone();
            // High resolution: a Cl/Br-bearing ion needs a plausible mass defect.
            if s.halogen
                && high
                && !nitrogen::defect_plausible(
                    mono.mz,
                    c.charge,
                    &ion_type,
                    s.n_cl,
                    s.n_br,
                    unc_at(mono.mz),
                )
            {
                s.halogen = false;
                s.reason = "mass defect implausible for the Cl/Br assignment";
            }
            s
        })
        .collect();
    let related = match relations {
        Some(r) if meta.ms_level <= 1 => {
            related_clusters(centroids, &clusters, &scores, molecular, sign, ei, tolerance, r)
        }
        _ => vec![false; clusters.len()],
    };
    for (i, c) in clusters.iter().enumerate() {
        let is_mol = molecular == Some(i);
        let mono = &centroids[c.mono];
        let s = scores[i].clone();
        // Look-alike rows keep a sulfur or silicon ion's chromatographic trace whole, so the
        // scans where a Cl/Br hypothesis wins by chance are outvoted in its feature.
        let look_alike = matches!(s.best, Hypothesis::Sulfur(_) | Hypothesis::Silicon(_));
        if !(s.halogen || is_mol || look_alike || related[i]) {
            continue;
        }
        let unc = unc_at(mono.mz);
        let (nominal_mass, odd_nominal, parity_reason) = if ei && !is_mol {
            (
                None,
                OddNominal::Undecided,
                "EI fragment: the nitrogen rule applies to the molecular ion".to_string(),
            )
        } else {
            nitrogen::nominal(mono.mz, c.charge, &ion_type, s.n_cl, s.n_br, unc)
        };
        out.ions.push(FlaggedIon {
            scan: meta.index,
            spectrum_id: meta.id.clone(),
            rt_min: meta.rt_min,
            mz: mono.mz,
            charge: sign * i32::from(c.charge),
            intensity: mono.intensity,
            snr: mono.snr,
            halogen: s.halogen,
            molecular_candidate: is_mol,
            assignment: s.best.label(),
            n_cl: s.n_cl,
            n_br: s.n_br,
            score: s.best_p,
            halogen_probability: s.p_halogen,
            second: s.second.label(),
            second_score: s.second_p,
            misfit: s.misfit,
            m2_ratio: s.m2_ratio,
            m2_expected: s.m2_expected,
            m4_ratio: s.m4_ratio,
            m4_expected: s.m4_expected,
            spacing: s.spacing,
            m2_delta: s.m2_delta,
            nominal_mass,
            odd_nominal,
            ion_type: ion_type.as_ref().map_or_else(String::new, |t| t.to_string()),
            tolerance_da: tolerance.at(mono.mz),
            reason: format!("{}; {}", s.reason, parity_reason),
            cluster: IonCluster {
                observed: c.shells.intensity[..c.shells.len].to_vec(),
                expected: s.fitted[..c.shells.len].to_vec(),
            },
        });
        if is_mol {
            out.molecular_ion = Some(out.ions.len() - 1);
            out.odd_nominal = odd_nominal;
        }
    }
    let best = out
        .ions
        .iter()
        .enumerate()
        .filter(|(_, ion)| ion.halogen)
        .max_by(|a, b| a.1.intensity.total_cmp(&b.1.intensity).then(b.0.cmp(&a.0)));
    if let Some((i, ion)) = best {
        out.has_halogen = true;
        out.best = Some(BestAssignment {
            ion: i,
            mz: ion.mz,
            n_cl: ion.n_cl,
            n_br: ion.n_br,
            score: ion.score,
        });
    }
    out
}

/// Marks the clusters that stand at a related m/z (see [`flag_spectrum_related`]) of an
/// anchor: a halogen-flagged cluster or the molecular-ion candidate.
#[allow(clippy::too_many_arguments)]
fn related_clusters(
    centroids: &[Centroid],
    clusters: &[cluster::Cluster],
    scores: &[halogen::Score],
    molecular: Option<usize>,
    sign: i32,
    ei: bool,
    tolerance: Tolerance,
    relations: &crate::compound::Relations,
) -> Vec<bool> {
    let mut related = vec![false; clusters.len()];
    let mut by_mz: Vec<(f64, usize)> =
        clusters.iter().enumerate().map(|(i, c)| (centroids[c.mono].mz, i)).collect();
    by_mz.sort_by(|a, b| a.0.total_cmp(&b.0));
    let mut targets = Vec::new();
    for (i, c) in clusters.iter().enumerate() {
        if !(scores[i].halogen || molecular == Some(i)) {
            continue;
        }
        let mz = centroids[c.mono].mz;
        relations.related_mz(mz, sign * i32::from(c.charge), ei, &mut targets);
        for &t in &targets {
            let tol = tolerance.at(t);
            let from = by_mz.partition_point(|p| p.0 < t - tol);
            for &(m, j) in &by_mz[from..] {
                if m > t + tol {
                    break;
                }
                if j != i {
                    related[j] = true;
                }
            }
        }
    }
    related
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn settings_validate_and_deserialize() {
        assert!(FlagSettings::default().validate().is_ok());
        let bad = [
            FlagSettings { min_snr: 0.0, ..Default::default() },
            FlagSettings { max_charge: 4, ..Default::default() },
            FlagSettings { tolerance: MzTolerance::Ppm(-1.0), ..Default::default() },
            FlagSettings { ion_type: Some("M*H".into()), ..Default::default() },
            FlagSettings { min_halogen_probability: 1.0, ..Default::default() },
        ];
        for b in bad {
            assert!(matches!(b.validate().unwrap_err().kind(), ErrorKind::Config(_)), "{b:?}");
        }
        assert_eq!(MzTolerance::Auto.resolve(ResolutionClass::High), Tolerance::Ppm(10.0));
        assert_eq!(MzTolerance::Auto.resolve(ResolutionClass::Unit), Tolerance::Da(0.3));
        assert_eq!(MzTolerance::Da(0.2).resolve(ResolutionClass::High), Tolerance::Da(0.2));
    }

    #[test]
    fn settings_deserialize_with_defaults_and_reject_unknown_fields() {
        let s: FlagSettings =
            serde_json::from_str(r#"{"tolerance": {"ppm": 5.0}, "ion_type": "M+Na"}"#).unwrap();
        assert_eq!(s.tolerance, MzTolerance::Ppm(5.0));
        assert_eq!(s.ion_type.as_deref(), Some("M+Na"));
        assert_eq!(s.min_snr, FlagSettings::default().min_snr);
        assert!(s.validate().is_ok());
        let auto: FlagSettings = serde_json::from_str(r#"{"tolerance": "auto"}"#).unwrap();
        assert_eq!(auto.tolerance, MzTolerance::Auto);
        assert!(serde_json::from_str::<FlagSettings>(r#"{"min_sn": 3}"#).is_err());
        let back: FlagSettings =
            serde_json::from_str(&serde_json::to_string(&FlagSettings::default()).unwrap())
                .unwrap();
        assert_eq!(back, FlagSettings::default());
    }

    #[test]
    fn empty_and_unsorted_inputs() {
        let meta = SpectrumMeta { ms_level: 1, ..Default::default() };
        let s = FlagSettings::default();
        let empty = flag_spectrum(&meta, &[], ResolutionClass::High, &s);
        assert!(!empty.has_halogen && empty.ions.is_empty() && empty.clusters == 0);
        // A Br1 pair (81Br/79Br 0.973, IUPAC 2013 abundances) in reverse order is still found;
        // with unknown ionization the parity stays undecided.
        let c = |mz: f64, i: f64| Centroid { mz, intensity: i, area: i, snr: i / 10.0, fwhm: 0.6 };
        let pair = [c(158.97, 973.0), c(156.97, 1000.0)];
        let f = flag_spectrum(&meta, &pair, ResolutionClass::Unit, &s);
        assert!(f.has_halogen, "{f:?}");
        assert_eq!((f.ions[0].n_cl, f.ions[0].n_br), (0, 1));
        assert_eq!(f.ions[0].odd_nominal, OddNominal::Undecided);
        assert_eq!(f.ions[0].spacing, SpacingVerdict::NotUsed);
    }
}
