//! Compounds: the features of one file that belong to one molecule, grouped by co-elution,
//! with the molecular ion chosen, the neutral's chemistry worked out and the halogen call
//! weighed on the evidence.
//!
//! [`group`] runs after the feature stage ([`crate::feature`]) on one file's features:
//!
//! 1. **Co-elution**: two features of the same charge sign whose apexes lie within
//!    [`CompoundSettings::apex_tolerance_scans`] MS1 scans and whose monoisotopic traces
//!    correlate (Pearson r over the scans they share, at least
//!    [`CompoundSettings::min_shared_scans`] of them, r >= [`CompoundSettings::min_correlation`])
//!    are linked; the connected sets are candidate groups.
//! 2. **Relations** inside a group ([`relations`]): electrospray adducts and multimers of one
//!    neutral, and fragments by listed neutral losses whose halogen count is lower by the
//!    loss's own. Electrospray: every member under every adduct hypothesis proposes a neutral;
//!    the neutral explaining the most members wins (an adduct counts 2, a fragment 1; ties to
//!    the earlier adduct of the table, then the larger intensity). Electron ionization: the
//!    highest-m/z member from which the others follow by listed losses and whose pattern
//!    carries at least their halogens is the molecular ion. What a neutral does not explain
//!    is grouped again; a member with no relation is a compound of its own, taken as the
//!    table's first adduct (or M+.).
//! 3. **Chemistry of the neutral**: monoisotopic mass from the molecular ion and its ion
//!    type; Cl and Br of the neutral (an adduct's own Cl is the adduct's); nominal mass and
//!    the nitrogen rule from the neutral ([`crate::flag::nitrogen::nominal`]). Fragments never
//!    carry the parity call.
//! 4. **Evidence** before a halogen call, on the molecular ion's feature ([`Evidence`]):
//!    the fraction of its scans that agree with the assignment, the correlation of the M+2
//!    trace with the M trace, the feature being a chromatographic peak rather than a level
//!    present through the run, and a calibrated probability ([`calibrated_probability`]).
//!
//! Flags are screening hints from isotope patterns and mass parity, not identifications.
//!
//! One [`Compound`] is one row of `compounds.tsv`.

pub mod relations;

pub use relations::{Adduct, Loss, Relations};

use serde::{Deserialize, Serialize};

use crate::centroid::ResolutionClass;
use crate::feature::{Feature, FeaturePoint};
use crate::flag::OddNominal;
use crate::flag::nitrogen;
use crate::{Error, ErrorKind, Result};

/// One compound of a file: a group of co-eluting features (adducts, isotopologue-bearing
/// ions, in-source or EI fragments) explained by one neutral molecule.
///
/// Columns of `compounds.tsv`, in this order. Masses in u, m/z in Th, times in minutes,
/// intensities in the file's own units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Compound {
    /// Compound number in the file (1-based, by apex retention time, then mass).
    pub compound: usize,
    /// Retention time of the molecular ion's apex scan, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_apex_min: f64,
    /// First retention time of any member, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_start_min: f64,
    /// Last retention time of any member, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_end_min: f64,
    /// Scan polarity of the members: `+`, `-`, or empty when the file does not say.
    pub polarity: String,
    /// Ionization of the acquisition (`electron`, `electrospray`, ... as in the spectra).
    pub ionization: String,
    /// Resolution class of the molecular ion's scans: `unit`, `high` or `unknown`.
    pub resolution: String,
    /// Neutral monoisotopic mass of the molecule, u; empty when the ion type is unknown.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub neutral_mass: Option<f64>,
    /// Neutral nominal mass (mass defect of the assigned Cl/Br corrected before rounding).
    pub nominal_mass: Option<i64>,
    /// Nitrogen rule on the neutral: `true` odd, `false` even, `undecided`.
    pub odd_nominal: OddNominal,
    /// Chlorine atoms of the neutral (an adduct's own Cl not counted).
    pub n_cl: u8,
    /// Bromine atoms of the neutral.
    pub n_br: u8,
    /// True when the neutral carries Cl or Br with enough evidence.
    pub halogen: bool,
    /// Calibrated probability that the neutral carries at least one Cl or Br.
    #[serde(serialize_with = "crate::report::digits::probability")]
    pub halogen_probability: f64,
    /// m/z of the molecular ion's monoisotopic peak.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub molecular_ion_mz: f64,
    /// Ion type of the molecular ion (`M+.`, `[M+H]+`, `[M-H]-`, ...).
    pub ion_type: String,
    /// Charge number of the molecular ion (signed).
    pub charge: i32,
    /// Apex intensity of the molecular ion's monoisotopic peak.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub apex_intensity: f64,
    /// Trapezoid area of the molecular ion's monoisotopic trace, intensity x minutes.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub area: f64,
    /// The members: feature ids with their role, e.g. `4:[M+H]+;9:[M+Na]+;11:-HCl`.
    pub members: String,
    /// Short words behind the calls, `;`-separated.
    pub evidence: String,
}

/// Column names of `compounds.tsv` (the fields of [`Compound`]).
pub const COMPOUND_COLUMNS: &[&str] = &[
    "compound",
    "rt_apex_min",
    "rt_start_min",
    "rt_end_min",
    "polarity",
    "ionization",
    "resolution",
    "neutral_mass",
    "nominal_mass",
    "odd_nominal",
    "n_cl",
    "n_br",
    "halogen",
    "halogen_probability",
    "molecular_ion_mz",
    "ion_type",
    "charge",
    "apex_intensity",
    "area",
    "members",
    "evidence",
];

/// Settings of the compound stage (`[compound]` of the configuration).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct CompoundSettings {
    /// Co-elution: apexes at most this many MS1 scans apart (default 4).
    pub apex_tolerance_scans: usize,
    /// Co-elution: least Pearson r of two monoisotopic traces over their shared scans
    /// (default 0.8).
    pub min_correlation: f64,
    /// Co-elution: least number of shared scans for the correlation (default 3).
    pub min_shared_scans: usize,
    /// Relations: m/z tolerance at high resolution, ppm (default 10).
    pub tolerance_ppm: f64,
    /// Relations: m/z tolerance at unit or unknown resolution, u (default 0.3).
    pub tolerance_da: f64,
    /// Adducts and multimers of positive ions, bracket notation; the first is the default
    /// for a lone ion.
    pub adducts_positive: Vec<String>,
    /// Adducts and multimers of negative ions; the first is the default.
    pub adducts_negative: Vec<String>,
    /// Neutral losses of fragments, as formulas.
    pub losses: Vec<String>,
    /// Losses that may follow each other (1 or 2, default 2).
    pub max_loss_steps: usize,
    /// Evidence: least fraction of the feature's scans agreeing with its assignment
    /// (default 0.6).
    pub min_support: f64,
    /// Evidence: least Pearson r of the M+2 trace with the M trace, checked on features with
    /// at least [`CompoundSettings::m2_trace_min_scans`] agreeing scans (default 0.5).
    pub min_m2_correlation: f64,
    /// Evidence: agreeing scans needed before the M+2 trace is tested (default 5).
    pub m2_trace_min_scans: usize,
    /// Evidence: a feature spanning more than this fraction of the file's MS1 scans is a
    /// background level unless its apex stands [`CompoundSettings::background_peak_ratio`]
    /// times above its median (default 0.5).
    pub background_fraction: f64,
    /// Evidence: apex over median height that makes a long feature a peak (default 3).
    pub background_peak_ratio: f64,
    /// Least calibrated probability for a halogen call (default 0.9).
    pub min_halogen_probability: f64,
}

impl Default for CompoundSettings {
    fn default() -> Self {
        let owned = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        CompoundSettings {
            apex_tolerance_scans: 4,
            min_correlation: 0.8,
            min_shared_scans: 3,
            tolerance_ppm: 10.0,
            tolerance_da: 0.3,
            adducts_positive: owned(relations::POSITIVE_ADDUCTS),
            adducts_negative: owned(relations::NEGATIVE_ADDUCTS),
            losses: owned(relations::LOSSES),
            max_loss_steps: 2,
            min_support: 0.6,
            min_m2_correlation: 0.5,
            m2_trace_min_scans: 5,
            background_fraction: 0.5,
            background_peak_ratio: 3.0,
            min_halogen_probability: 0.9,
        }
    }
}

impl CompoundSettings {
    /// Checks ranges and parses the relation tables; errors name the key.
    pub fn validate(&self) -> Result<Relations> {
        let bad = |what: &str| Err(Error::new(ErrorKind::Config(what.to_string())));
        if !(-1.0..=1.0).contains(&self.min_correlation) {
            return bad("compound min_correlation must be in [-1, 1]");
        }
        if !(-1.0..=1.0).contains(&self.min_m2_correlation) {
            return bad("compound min_m2_correlation must be in [-1, 1]");
        }
        if self.min_shared_scans < 2 {
            return bad("compound min_shared_scans must be at least 2");
        }
        if !(self.tolerance_ppm > 0.0 && self.tolerance_ppm <= 1000.0) {
            return bad("compound tolerance_ppm must be in (0, 1000]");
        }
        if !(self.tolerance_da > 0.0 && self.tolerance_da <= 0.5) {
            return bad("compound tolerance_da must be in (0, 0.5]");
        }
        if !(0.0..=1.0).contains(&self.min_support) {
            return bad("compound min_support must be in [0, 1]");
        }
        if !(self.background_fraction > 0.0 && self.background_fraction <= 1.0) {
            return bad("compound background_fraction must be in (0, 1]");
        }
        if !(self.background_peak_ratio >= 1.0 && self.background_peak_ratio.is_finite()) {
            return bad("compound background_peak_ratio must be at least 1");
        }
        if !(self.min_halogen_probability > 0.0 && self.min_halogen_probability < 1.0) {
            return bad("compound min_halogen_probability must be in (0, 1)");
        }
        Relations::new(
            &self.adducts_positive,
            &self.adducts_negative,
            &self.losses,
            self.max_loss_steps,
        )
    }

    fn tolerance(&self, mz: f64, resolution: Option<ResolutionClass>) -> f64 {
        match resolution {
            Some(ResolutionClass::High) => mz.abs() * self.tolerance_ppm * 1e-6,
            _ => self.tolerance_da,
        }
    }
}

/// The evidence behind a compound's halogen call, measured on its molecular ion's feature.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Evidence {
    /// Mean per-scan posterior probability of Cl/Br over the agreeing scans.
    pub scan_probability: f64,
    /// Fraction of the feature's scans that agree with its assignment.
    pub support: f64,
    /// Scans of the feature.
    pub scans: usize,
    /// Pearson r of the M+2 trace with the M trace over the agreeing scans (`None` when
    /// there are too few).
    pub m2_correlation: Option<f64>,
    /// True when the feature is a level through the run rather than a peak.
    pub background_level: bool,
    /// True at high resolution.
    pub high_resolution: bool,
}

/// Coefficients of the calibration: intercept, then the weights of the clamped logit of the
/// mean scan probability, the support, ln(scans), the M+2 trace correlation (0 when not
/// measured), whether it was measured (1/0) and high resolution (1/0). Fitted by logistic regression by
/// `cargo run --release -p mzcore --example calibrate_halogen` on generated acquisitions with
/// known truth (see that example and the README's reliability table): the demo batch, the
/// flagging acceptance set and the compound grouping set, seeds base+1 to base+3, 575 calls.
pub const CALIBRATION: [f64; 7] = [-10.75, 0.7306, 2.835, 3.129, 11.91, -9.282, -1.213];

/// The calibrated probability that the molecular ion carries Cl or Br, from its evidence and
/// the coefficients `w` (normally [`CALIBRATION`]).
pub fn calibrated_probability(e: &Evidence, w: &[f64; 7]) -> f64 {
    let x = calibration_inputs(e);
    let z: f64 = w.iter().zip(x).map(|(a, b)| a * b).sum();
    1.0 / (1.0 + (-z).exp())
}

/// The inputs of the calibration for `e` (see [`CALIBRATION`]).
pub fn calibration_inputs(e: &Evidence) -> [f64; 7] {
    let p = e.scan_probability.clamp(1e-6, 1.0 - 1e-6);
    [
        1.0,
        (p / (1.0 - p)).ln().clamp(-8.0, 8.0),
        e.support,
        (e.scans.max(1) as f64).ln(),
        e.m2_correlation.unwrap_or(0.0),
        f64::from(u8::from(e.m2_correlation.is_some())),
        f64::from(u8::from(e.high_resolution)),
    ]
}

/// One point of an extracted-ion trace of a halogenated compound (`traces.tsv`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct TraceRow {
    /// Compound number.
    pub compound: usize,
    /// `M`, `M+2` or `M+4`.
    pub shell: String,
    /// Centre m/z of the shell (monoisotopic m/z plus the shell's nominal step over z).
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub mz: f64,
    /// Retention time, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_min: f64,
    /// Height (shell sum for M+2, M+4; 0 when absent).
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub intensity: f64,
}

/// Column names of `traces.tsv`.
pub const TRACE_COLUMNS: &[&str] = &["compound", "shell", "mz", "rt_min", "intensity"];

/// One shell of a halogenated compound's isotope cluster at its apex (`cluster.tsv`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct ClusterRow {
    /// Compound number.
    pub compound: usize,
    /// Nominal shell: 0 is M, 2 is M+2.
    pub shell: usize,
    /// Observed height relative to the most intense observed shell.
    #[serde(serialize_with = "crate::report::digits::ratio")]
    pub observed: f64,
    /// Height the assigned Cl/Br hypothesis fits, same scale.
    #[serde(serialize_with = "crate::report::digits::ratio")]
    pub expected: f64,
}

/// Column names of `cluster.tsv`.
pub const CLUSTER_COLUMNS: &[&str] = &["compound", "shell", "observed", "expected"];

/// What [`group`] returns for one file.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Grouping {
    /// One row per compound, by apex time then mass.
    pub compounds: Vec<Compound>,
    /// Traces of the halogenated compounds.
    pub traces: Vec<TraceRow>,
    /// Apex clusters of the halogenated compounds.
    pub clusters: Vec<ClusterRow>,
    /// The evidence of each compound's molecular ion, in the order of `compounds`.
    pub evidence: Vec<Evidence>,
}

/// How a member relates to its compound's neutral.
#[derive(Debug, Clone, PartialEq)]
enum Role {
    Adduct(usize),
    Fragment(String),
}

/// One explanation of (part of) a group.
#[derive(Debug, Clone)]
struct Hypothesis {
    /// Halogens of the neutral when fragments revised the molecular ion's own reading (EI).
    halogens: Option<(u8, u8)>,
    /// Members explained (index into the group) with their role.
    members: Vec<(usize, Role)>,
    score: usize,
    /// Position of the best adduct in the table (the molecular ion's).
    rank: usize,
    intensity: f64,
}

/// Groups one file's features into compounds (see the module docs) and sets each feature's
/// `compound`. `ms1_scans` is the file's number of MS1 scans; `ionization` its source as
/// named in the spectra (`electron`, `electrospray`, ...).
///
/// # Examples
///
/// ```
/// use mzcore::compound::{group, CompoundSettings};
/// use mzcore::feature::{Feature, FeaturePoint};
/// use mzcore::centroid::ResolutionClass;
/// use mzcore::flag::OddNominal;
///
/// // Glucose (C6H12O6, 180.06339) in ESI-: [M-H]- and its chloride adduct co-elute. The
/// // adduct's Cl1 pattern belongs to the adduct, not to the molecule.
/// let feature = |id: usize, mz: f64, n_cl: u8, height: f64| Feature {
///     feature: id, mz, charge: -1, rt_apex_min: 2.0, rt_start_min: 1.9, rt_end_min: 2.1,
///     scans: 5, apex_scan: 2, apex_intensity: height, area: height * 0.1,
///     halogen: n_cl > 0, n_cl, n_br: 0, assignment: format!("Cl{n_cl}Br0"), support: 1.0,
///     halogen_score: if n_cl > 0 { 0.99 } else { 0.01 }, nominal_mass: None,
///     odd_nominal: OddNominal::Undecided, molecular_candidate: true, compound: 0,
///     resolution: Some(ResolutionClass::High), ion_type: "[M-H]-".into(),
///     trace: (0..5).map(|k| FeaturePoint {
///         ms1: k, scan: k, rt_min: Some(1.9 + 0.05 * k as f64),
///         intensity: height * [0.2, 0.6, 1.0, 0.6, 0.2][k],
///         m2: height * 0.32 * [0.2, 0.6, 1.0, 0.6, 0.2][k] * f64::from(n_cl), m4: 0.0,
///         halogen_probability: 0.99, agrees: true,
///     }).collect(),
///     apex_cluster: Default::default(),
/// };
/// let mut features = vec![feature(1, 179.05611, 0, 1000.0), feature(2, 215.03279, 1, 800.0)];
/// let out = group(&mut features, 100, "electrospray", &CompoundSettings::default())?;
/// assert_eq!(out.compounds.len(), 1);
/// let c = &out.compounds[0];
/// assert_eq!((c.n_cl, c.halogen), (0, false));
/// assert_eq!(c.ion_type, "[M-H]-");
/// assert!((c.neutral_mass.unwrap() - 180.06339).abs() < 1e-3);
/// assert_eq!(c.members, "1:[M-H]-;2:[M+Cl]-");
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn group(
    features: &mut [Feature],
    ms1_scans: usize,
    ionization: &str,
    settings: &CompoundSettings,
) -> Result<Grouping> {
    let relations = settings.validate()?;
    let groups = coelution_groups(features, settings);
    let mut parts: Vec<(Vec<usize>, Hypothesis)> = Vec::new();
    for g in groups {
        let ei = features[g[0]].ion_type == "M+.";
        let mut rest = g;
        while !rest.is_empty() {
            let h = if ei {
                best_ei(features, &rest, &relations, settings)
            } else {
                best_esi(features, &rest, &relations, settings)
            };
            let explained: Vec<usize> = h.members.iter().map(|(i, _)| rest[*i]).collect();
            let h = Hypothesis {
                members: h.members.iter().map(|(i, r)| (rest[*i], r.clone())).collect(),
                ..h
            };
            rest.retain(|i| !explained.contains(i));
            parts.push((explained, h));
        }
    }
    let mut rows: Vec<((Compound, Evidence), usize)> = parts
        .iter()
        .enumerate()
        .map(|(k, (_, h))| {
            (compound_row(features, h, &relations, settings, ms1_scans, ionization), k)
        })
        .collect();
    rows.sort_by(|a, b| {
        let (a, b) = (&a.0.0, &b.0.0);
        a.rt_apex_min
            .total_cmp(&b.rt_apex_min)
            .then(a.molecular_ion_mz.total_cmp(&b.molecular_ion_mz))
    });
    let mut out = Grouping::default();
    for (n, ((mut c, e), part)) in rows.into_iter().enumerate() {
        c.compound = n + 1;
        let (members, h) = &parts[part];
        for &m in members {
            features[m].compound = c.compound;
        }
        if c.halogen {
            let mol = molecular_member(h).expect("a compound has a member");
            push_trace_and_cluster(&mut out, &c, &features[mol]);
        }
        out.compounds.push(c);
        out.evidence.push(e);
    }
    Ok(out)
}

/// Pearson correlation of two equally long series; `None` when either is constant.
pub fn pearson(a: &[f64], b: &[f64]) -> Option<f64> {
    let n = a.len().min(b.len());
    if n < 2 {
        return None;
    }
    let (ma, mb) = (a[..n].iter().sum::<f64>() / n as f64, b[..n].iter().sum::<f64>() / n as f64);
    let (mut sab, mut saa, mut sbb) = (0.0, 0.0, 0.0);
    for i in 0..n {
        let (x, y) = (a[i] - ma, b[i] - mb);
        sab += x * y;
        saa += x * x;
        sbb += y * y;
    }
    (saa > 0.0 && sbb > 0.0).then(|| sab / (saa * sbb).sqrt())
}

fn apex_ms1(f: &Feature) -> usize {
    f.trace.iter().max_by(|a, b| a.intensity.total_cmp(&b.intensity)).map_or(0, |p| p.ms1)
}

/// Pearson r of two features' monoisotopic traces over their shared MS1 scans, with the
/// number of shared scans.
fn shared_correlation(a: &[FeaturePoint], b: &[FeaturePoint]) -> (Option<f64>, usize) {
    let (mut x, mut y) = (Vec::new(), Vec::new());
    let (mut i, mut j) = (0, 0);
    while i < a.len() && j < b.len() {
        match a[i].ms1.cmp(&b[j].ms1) {
            std::cmp::Ordering::Less => i += 1,
            std::cmp::Ordering::Greater => j += 1,
            std::cmp::Ordering::Equal => {
                x.push(a[i].intensity);
                y.push(b[j].intensity);
                i += 1;
                j += 1;
            }
        }
    }
    (pearson(&x, &y), x.len())
}

/// Connected sets of co-eluting, correlated features of one charge sign, each sorted.
fn coelution_groups(features: &[Feature], settings: &CompoundSettings) -> Vec<Vec<usize>> {
    let n = features.len();
    let mut parent: Vec<usize> = (0..n).collect();
    fn find(p: &mut [usize], mut i: usize) -> usize {
        while p[i] != i {
            p[i] = p[p[i]];
            i = p[i];
        }
        i
    }
    let apex: Vec<usize> = features.iter().map(apex_ms1).collect();
    let mut order: Vec<usize> = (0..n).collect();
    order.sort_by_key(|&i| (apex[i], i));
    for (k, &i) in order.iter().enumerate() {
        for &j in &order[k + 1..] {
            if apex[j] > apex[i] + settings.apex_tolerance_scans {
                break;
            }
            if features[i].charge.signum() != features[j].charge.signum() {
                continue;
            }
            let (r, shared) = shared_correlation(&features[i].trace, &features[j].trace);
            if shared >= settings.min_shared_scans
                && r.is_some_and(|r| r >= settings.min_correlation)
            {
                let (a, b) = (find(&mut parent, i), find(&mut parent, j));
                parent[a.max(b)] = a.min(b);
            }
        }
    }
    let mut groups: std::collections::BTreeMap<usize, Vec<usize>> = Default::default();
    for i in 0..n {
        let root = find(&mut parent, i);
        groups.entry(root).or_default().push(i);
    }
    groups.into_values().collect()
}

/// Members of `rest` (indexes into the group) that follow from the explained ones by a
/// listed loss, added to `members` until nothing more follows.
fn add_fragments(
    features: &[Feature],
    rest: &[usize],
    members: &mut Vec<(usize, Role)>,
    relations: &Relations,
    settings: &CompoundSettings,
) {
    let mut k = 0;
    while k < members.len() {
        let parent = &features[rest[members[k].0]];
        for (i, &fi) in rest.iter().enumerate() {
            if members.iter().any(|(m, _)| *m == i) {
                continue;
            }
            let f = &features[fi];
            if f.charge != parent.charge || parent.charge.abs() != 1 || f.mz >= parent.mz {
                continue;
            }
            let tol = settings.tolerance(f.mz, f.resolution);
            let d = parent.mz - f.mz;
            let loss = relations.losses.iter().find(|l| {
                (d - l.mass).abs() <= tol
                    && parent.n_cl.checked_sub(l.cl) == Some(f.n_cl)
                    && parent.n_br.checked_sub(l.br) == Some(f.n_br)
            });
            if let Some(l) = loss {
                members.push((i, Role::Fragment(l.label.clone())));
            }
        }
        k += 1;
    }
}

fn best_esi(
    features: &[Feature],
    rest: &[usize],
    relations: &Relations,
    settings: &CompoundSettings,
) -> Hypothesis {
    let sign = features[rest[0]].charge.signum();
    let table = relations.adducts(sign);
    let mut best: Option<Hypothesis> = None;
    for (i, &fi) in rest.iter().enumerate() {
        let f = &features[fi];
        for (ai, a) in table.iter().enumerate() {
            if a.ion.charge() != f.charge {
                continue;
            }
            let Some(halogens) = a.neutral_halogens(f.n_cl, f.n_br) else { continue };
            let mass = a.neutral(f.mz);
            if mass.is_nan() || mass <= 0.0 {
                continue;
            }
            let mut members = vec![(i, Role::Adduct(ai))];
            for (j, &fj) in rest.iter().enumerate() {
                if j == i {
                    continue;
                }
                let g = &features[fj];
                let tol = settings.tolerance(g.mz, g.resolution);
                let hit = table.iter().position(|b| {
                    b.ion.charge() == g.charge
                        && (b.mz(mass) - g.mz).abs() <= tol
                        && b.neutral_halogens(g.n_cl, g.n_br) == Some(halogens)
                });
                if let Some(bi) = hit {
                    members.push((j, Role::Adduct(bi)));
                }
            }
            add_fragments(features, rest, &mut members, relations, settings);
            let adducts = members.iter().filter(|m| matches!(m.1, Role::Adduct(_))).count();
            let score = 2 * adducts + (members.len() - adducts);
            let rank = members
                .iter()
                .filter_map(|m| match m.1 {
                    Role::Adduct(r) => Some(r),
                    _ => None,
                })
                .min()
                .unwrap_or(usize::MAX);
            let intensity: f64 = members.iter().map(|m| features[rest[m.0]].apex_intensity).sum();
            let h = Hypothesis { halogens: None, members, score, rank, intensity };
            let better = match &best {
                None => true,
                Some(b) => {
                    (h.score, std::cmp::Reverse(h.rank)) > (b.score, std::cmp::Reverse(b.rank))
                        || ((h.score, h.rank) == (b.score, b.rank) && h.intensity > b.intensity)
                }
            };
            if better {
                best = Some(h);
            }
        }
    }
    best.unwrap_or_else(|| lone(features, rest))
}

/// A member explained by nothing: its own compound under no known adduct.
fn lone(features: &[Feature], rest: &[usize]) -> Hypothesis {
    let f = &features[rest[0]];
    Hypothesis {
        halogens: None,
        members: vec![(0, Role::Adduct(usize::MAX))],
        score: 1,
        rank: usize::MAX,
        intensity: f.apex_intensity,
    }
}

/// Electron ionization: each member in turn as the molecular ion. A lower member is its
/// fragment when their difference is a listed loss; the loss then implies the parent's
/// halogens (the fragment's plus the loss's). The parent's own assignment and the implied ones
/// vote (ties to the parent's own: at unit resolution Cl4 and Cl2Br1 clusters look alike, and
/// two fragments that lost Br and Cl outvote a Cl4 reading); members consistent with the
/// winner are explained. The parent explaining the most wins, ties to the higher m/z.
fn best_ei(
    features: &[Feature],
    rest: &[usize],
    relations: &Relations,
    settings: &CompoundSettings,
) -> Hypothesis {
    let mut best: Option<(Hypothesis, f64)> = None;
    for (i, &fi) in rest.iter().enumerate() {
        let p = &features[fi];
        if p.charge.abs() != 1 {
            continue;
        }
        // (member, loss, implied parent halogens) for every loss that fits the difference.
        let mut links: Vec<(usize, &Loss, (u8, u8))> = Vec::new();
        for (j, &fj) in rest.iter().enumerate() {
            let f = &features[fj];
            if j == i || f.charge != p.charge || f.mz >= p.mz {
                continue;
            }
            let tol = settings.tolerance(f.mz, f.resolution);
            for l in relations.losses.iter().filter(|l| (p.mz - f.mz - l.mass).abs() <= tol) {
                links.push((j, l, (f.n_cl + l.cl, f.n_br + l.br)));
            }
        }
        let own = (p.n_cl, p.n_br);
        let mut votes: Vec<((u8, u8), usize)> = vec![(own, 1)];
        let mut counted: Vec<usize> = Vec::new();
        for &(j, _, h) in &links {
            if counted.contains(&j) {
                continue;
            }
            // One vote per member: for the parent's own reading when any loss allows it.
            let h = if links.iter().any(|&(k, _, hh)| k == j && hh == own) { own } else { h };
            counted.push(j);
            match votes.iter_mut().find(|v| v.0 == h) {
                Some(v) => v.1 += 1,
                None => votes.push((h, 1)),
            }
        }
        let winner = votes
            .iter()
            .max_by(|a, b| a.1.cmp(&b.1).then((b.0 == own).cmp(&(a.0 == own)).reverse()))
            .map_or(own, |v| v.0);
        let mut members = vec![(i, Role::Adduct(0))];
        for &(j, l, h) in &links {
            if h == winner && !members.iter().any(|m| m.0 == j) {
                members.push((j, Role::Fragment(l.label.clone())));
            }
        }
        let revised = (winner != own).then_some(winner);
        let h = Hypothesis {
            halogens: revised,
            score: members.len(),
            rank: 0,
            intensity: p.apex_intensity,
            members,
        };
        // Ties to the higher m/z: the molecular ion stands above its fragments.
        if best.as_ref().is_none_or(|(b, b_mz)| (h.score, p.mz) > (b.score, *b_mz)) {
            best = Some((h, p.mz));
        }
    }
    best.map_or_else(|| lone(features, rest), |(h, _)| h)
}

/// The molecular ion's feature: the member explained as the table's earliest adduct (the
/// parent in EI), ties to the more intense.
fn molecular_member(h: &Hypothesis) -> Option<usize> {
    h.members
        .iter()
        .filter_map(|(i, r)| match r {
            Role::Adduct(a) => Some((*a, *i)),
            Role::Fragment(_) => None,
        })
        .min_by_key(|&(a, i)| (a, i))
        .map(|(_, i)| i)
}

/// The evidence of a feature (see [`Evidence`]).
pub fn evidence(f: &Feature, ms1_scans: usize, settings: &CompoundSettings) -> Evidence {
    let agree: Vec<&FeaturePoint> = f.trace.iter().filter(|p| p.agrees).collect();
    let m2_correlation = (agree.len() >= settings.m2_trace_min_scans).then(|| {
        let m: Vec<f64> = agree.iter().map(|p| p.intensity).collect();
        let m2: Vec<f64> = agree.iter().map(|p| p.m2).collect();
        pearson(&m, &m2).unwrap_or(0.0)
    });
    let first = f.trace.first().map_or(0, |p| p.ms1);
    let last = f.trace.last().map_or(0, |p| p.ms1);
    let span = (last + 1 - first.min(last)) as f64;
    let long = ms1_scans > 0 && span > settings.background_fraction * ms1_scans as f64;
    let background_level = long && {
        let mut h: Vec<f64> = f.trace.iter().map(|p| p.intensity).collect();
        h.sort_by(f64::total_cmp);
        let median = h[h.len() / 2];
        f.apex_intensity.is_nan() || f.apex_intensity < settings.background_peak_ratio * median
    };
    Evidence {
        scan_probability: f.halogen_score,
        support: f.support,
        scans: f.scans,
        m2_correlation,
        background_level,
        high_resolution: f.resolution == Some(ResolutionClass::High),
    }
}

/// The row of one explained part (its number is set by the caller).
fn compound_row(
    features: &[Feature],
    h: &Hypothesis,
    relations: &Relations,
    settings: &CompoundSettings,
    ms1_scans: usize,
    ionization: &str,
) -> (Compound, Evidence) {
    let mol = molecular_member(h).expect("a compound has a member");
    let f = &features[mol];
    let sign = f.charge.signum();
    let ei = f.ion_type == "M+.";
    let adduct: Option<&Adduct> =
        h.members.iter().find(|(i, _)| *i == mol).and_then(|(_, r)| match r {
            Role::Adduct(a) if !ei => relations.adducts(sign).get(*a),
            _ => None,
        });
    // A lone ion outside EI is taken as the table's first adduct when the charge fits.
    let adduct = adduct.or_else(|| {
        let first = relations.adducts(sign).first()?;
        (!ei && !f.ion_type.is_empty() && first.ion.charge() == f.charge).then_some(first)
    });
    let (ion_type, halogens) = match (ei, adduct) {
        (true, _) => ("M+.".to_string(), h.halogens.unwrap_or((f.n_cl, f.n_br))),
        (false, Some(a)) => {
            (a.label.clone(), a.neutral_halogens(f.n_cl, f.n_br).unwrap_or((f.n_cl, f.n_br)))
        }
        (false, None) => (f.ion_type.clone(), (f.n_cl, f.n_br)),
    };
    let ion = crate::chem::IonType::parse(&ion_type).ok();
    let unc = settings.tolerance(f.mz, f.resolution).min(0.15);
    let z = f.charge.unsigned_abs().clamp(1, 255) as u8;
    let (nominal_mass, mut odd_nominal, mut parity_reason) = if ion.is_some() {
        nitrogen::nominal(f.mz, z, &ion, halogens.0, halogens.1, unc)
    } else {
        (None, OddNominal::Undecided, "ion type unknown".to_string())
    };
    // An EI ion with no fragment below it may itself be a fragment (the molecular ion of
    // trihalomethanes is often too weak to see): no parity call on it.
    if ei && h.members.len() == 1 && odd_nominal != OddNominal::Undecided {
        odd_nominal = OddNominal::Undecided;
        parity_reason = "EI: no fragment confirms this ion as the molecular ion".into();
    }
    let neutral_mass = ion.as_ref().map(|i| i.neutral_mass(f.mz));
    let e = evidence(f, ms1_scans, settings);
    let p = calibrated_probability(&e, &CALIBRATION);
    let neutral_halogen = halogens.0 + halogens.1 > 0;
    let mut words: Vec<String> = Vec::new();
    let mut ok = f.halogen && neutral_halogen;
    if let Some((cl, br)) = h.halogens {
        words.push(format!(
            "Cl{cl}Br{br} from the fragments' losses (own reading Cl{}Br{})",
            f.n_cl, f.n_br
        ));
    }
    if f.halogen && !neutral_halogen {
        words.push(format!("Cl/Br of the {ion_type} adduct, not the molecule's"));
    }
    if neutral_halogen {
        words.push(format!("p={p:.3} over {} scans, support {:.2}", e.scans, e.support));
        if e.support < settings.min_support {
            ok = false;
            words.push("too few scans agree".into());
        }
        match e.m2_correlation {
            Some(r) if r < settings.min_m2_correlation => {
                ok = false;
                words.push(format!("M+2 trace does not follow M (r={r:.2})"));
            }
            Some(r) => words.push(format!("M+2 trace follows M (r={r:.2})")),
            None => words.push("too few scans for the M+2 trace test".into()),
        }
        if e.background_level {
            ok = false;
            words.push("a level through the run, not a peak".into());
        }
        if p < settings.min_halogen_probability {
            ok = false;
            words.push("below min_halogen_probability".into());
        }
    }
    if odd_nominal == OddNominal::Undecided {
        words.push(parity_reason);
    }
    let members = {
        let mut m: Vec<(usize, String)> = h
            .members
            .iter()
            .map(|(i, r)| {
                let role = match r {
                    Role::Adduct(_) if *i == mol => ion_type.clone(),
                    Role::Adduct(a) => relations
                        .adducts(sign)
                        .get(*a)
                        .map_or_else(|| ion_type.clone(), |a| a.label.clone()),
                    Role::Fragment(l) => l.clone(),
                };
                (features[*i].feature, role)
            })
            .collect();
        m.sort();
        m.iter().map(|(id, role)| format!("{id}:{role}")).collect::<Vec<_>>().join(";")
    };
    let (start, end) =
        h.members.iter().fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), (i, _)| {
            (a.min(features[*i].rt_start_min), b.max(features[*i].rt_end_min))
        });
    let row = Compound {
        compound: 0,
        rt_apex_min: f.rt_apex_min,
        rt_start_min: start,
        rt_end_min: end,
        polarity: if sign < 0 { "-" } else { "+" }.to_string(),
        ionization: ionization.to_string(),
        resolution: f.resolution.map_or("unknown", ResolutionClass::name).to_string(),
        neutral_mass,
        nominal_mass,
        odd_nominal,
        n_cl: halogens.0,
        n_br: halogens.1,
        halogen: ok,
        halogen_probability: if neutral_halogen { p } else { 0.0 },
        molecular_ion_mz: f.mz,
        ion_type,
        charge: f.charge,
        apex_intensity: f.apex_intensity,
        area: f.area,
        members,
        evidence: crate::report::escape_text(&words.join("; ")),
    };
    (row, e)
}

fn push_trace_and_cluster(out: &mut Grouping, c: &Compound, f: &Feature) {
    let z = f64::from(f.charge.unsigned_abs().max(1));
    for p in &f.trace {
        let Some(rt) = p.rt_min else { continue };
        for (shell, k, v) in [("M", 0.0, p.intensity), ("M+2", 2.0, p.m2), ("M+4", 4.0, p.m4)] {
            out.traces.push(TraceRow {
                compound: c.compound,
                shell: shell.to_string(),
                mz: f.mz + k * crate::flag::cluster::C13_DELTA / z,
                rt_min: rt,
                intensity: v,
            });
        }
    }
    let obs = &f.apex_cluster.observed;
    let top = obs.iter().copied().fold(0.0, f64::max);
    if top > 0.0 {
        for (k, &o) in obs.iter().enumerate() {
            let e = f.apex_cluster.expected.get(k).copied().unwrap_or(0.0);
            out.clusters.push(ClusterRow {
                compound: c.compound,
                shell: k,
                observed: o / top,
                expected: e / top,
            });
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::{Formula, IonType};

    /// A feature of five scans with a Gaussian-like trace scaled by `height`.
    fn feature(id: usize, mz: f64, charge: i32, cl: u8, br: u8, height: f64, ion: &str) -> Feature {
        let shape = [0.2, 0.6, 1.0, 0.6, 0.2];
        let high = ion != "M+.";
        Feature {
            feature: id,
            mz,
            charge,
            rt_apex_min: 2.0,
            rt_start_min: 1.9,
            rt_end_min: 2.1,
            scans: 5,
            apex_scan: 2,
            apex_intensity: height,
            area: height * 0.1,
            halogen: cl + br > 0,
            n_cl: cl,
            n_br: br,
            assignment: format!("Cl{cl}Br{br}"),
            support: 1.0,
            halogen_score: if cl + br > 0 { 0.999 } else { 0.001 },
            nominal_mass: None,
            odd_nominal: OddNominal::Undecided,
            molecular_candidate: true,
            compound: 0,
            resolution: Some(if high { ResolutionClass::High } else { ResolutionClass::Unit }),
            ion_type: ion.into(),
            trace: (0..5)
                .map(|k| FeaturePoint {
                    ms1: k,
                    scan: k,
                    rt_min: Some(1.9 + 0.05 * k as f64),
                    intensity: height * shape[k],
                    m2: height * shape[k] * 0.3 * f64::from(cl + br),
                    m4: 0.0,
                    halogen_probability: 0.999,
                    agrees: true,
                })
                .collect(),
            apex_cluster: Default::default(),
        }
    }

    fn mz(formula: &str, ion: &str) -> f64 {
        IonType::parse(ion).unwrap().mz(&Formula::parse(formula).unwrap()).unwrap()
    }

    fn run(features: &mut [Feature]) -> Grouping {
        group(features, 200, "esi", &CompoundSettings::default()).unwrap()
    }

    #[test]
    fn each_adduct_is_found_at_its_exact_spacing_and_not_beside_it() {
        // Triclosan C12H7Cl3O2 (negative) and metolachlor C15H22ClNO2 (positive), each with every
        // other adduct of the default table; masses from the chemistry module.
        for (formula, sign, table, cl) in [
            ("C12H7Cl3O2", -1, relations::NEGATIVE_ADDUCTS, 3u8),
            ("C15H22ClNO2", 1, relations::POSITIVE_ADDUCTS, 1u8),
        ] {
            let base = table[0];
            for other in &table[1..] {
                let a = Adduct::parse(other).unwrap();
                let ion_cl = cl * a.ion.molecules() as u8 + a.cl as u8;
                let mut fs = vec![
                    feature(1, mz(formula, base), sign, cl, 0, 1000.0, base),
                    feature(2, mz(formula, other), a.ion.charge(), ion_cl, 0, 400.0, base),
                ];
                let g = run(&mut fs);
                assert_eq!(g.compounds.len(), 1, "{formula} {other}: {:?}", g.compounds);
                let c = &g.compounds[0];
                assert_eq!(c.members, format!("1:{base};2:{}", a.label), "{formula}");
                assert_eq!((c.n_cl, c.ion_type.as_str()), (cl, base));
                let m = Formula::parse(formula).unwrap().monoisotopic_mass();
                assert!((c.neutral_mass.unwrap() - m).abs() < 1e-6);
                // 0.02 u off (20 to 100 ppm here) is no relation: two compounds.
                let mut off = fs.clone();
                off[1].mz += 0.02;
                assert_eq!(run(&mut off).compounds.len(), 2, "{formula} {other} off by 0.02");
            }
        }
    }

    #[test]
    fn chloride_adduct_of_a_halogen_free_molecule_is_not_a_halogen_compound() {
        // Glucose [M-H]- and [M+Cl]- (the adduct's Cl1 pattern), plus its formate adduct.
        let mut fs = vec![
            feature(1, mz("C6H12O6", "M-H"), -1, 0, 0, 1000.0, "[M-H]-"),
            feature(2, mz("C6H12O6", "M+Cl"), -1, 1, 0, 700.0, "[M-H]-"),
            feature(3, mz("C6H12O6", "M+HCOO"), -1, 0, 0, 300.0, "[M-H]-"),
        ];
        let g = run(&mut fs);
        assert_eq!(g.compounds.len(), 1, "{:?}", g.compounds);
        let c = &g.compounds[0];
        assert!(!c.halogen && c.n_cl == 0, "{c:?}");
        assert_eq!(c.members, "1:[M-H]-;2:[M+Cl]-;3:[M+HCOO]-");
        assert!(fs.iter().all(|f| f.compound == 1));
        // Alone, the chloride adduct is taken for [M-H]- of a Cl1 molecule: nothing tells.
        let mut alone = vec![fs[1].clone()];
        let g = run(&mut alone);
        assert_eq!((g.compounds[0].n_cl, g.compounds[0].ion_type.as_str()), (1, "[M-H]-"));
    }

    #[test]
    fn sodium_and_ammonium_adducts_take_the_parity_of_the_neutral() {
        // Atrazine C8H14ClN5: nominal 215, odd (five N). [M+Na]+ and [M+NH4]+ alone would give
        // the parity of an [M+H]+ reading; grouped with [M+H]+ they carry the neutral's.
        let mut fs = vec![
            feature(1, mz("C8H14ClN5", "M+H"), 1, 1, 0, 1000.0, "[M+H]+"),
            feature(2, mz("C8H14ClN5", "M+Na"), 1, 1, 0, 800.0, "[M+H]+"),
            feature(3, mz("C8H14ClN5", "M+NH4"), 1, 1, 0, 200.0, "[M+H]+"),
        ];
        let g = run(&mut fs);
        assert_eq!(g.compounds.len(), 1);
        let c = &g.compounds[0];
        assert_eq!((c.nominal_mass, c.odd_nominal), (Some(215), OddNominal::True));
        assert_eq!(c.ion_type, "[M+H]+");
    }

    #[test]
    fn each_loss_is_found_with_its_halogen_count_and_not_without() {
        // EI: hexachloroethane C2Cl6 M+. and a fragment per loss of the table, the fragment
        // carrying the parent's halogens less the loss's.
        let r = Relations::defaults();
        let parent = mz("C2Cl6", "M+.");
        for l in r.losses.iter().filter(|l| l.cl <= 6 && l.br == 0) {
            let mut fs = vec![
                feature(1, parent, 1, 6, 0, 1000.0, "M+."),
                feature(2, parent - l.mass, 1, 6 - l.cl, 0, 800.0, "M+."),
            ];
            let g = group(&mut fs, 200, "ei", &CompoundSettings::default()).unwrap();
            assert_eq!(g.compounds.len(), 1, "{}: {:?}", l.label, g.compounds);
            assert!(
                g.compounds[0].members.contains(&format!("2:{}", l.label)) || {
                    // Another loss of the same mass within 0.3 u may name it (CO and C2H4).
                    g.compounds[0].members.starts_with("1:M+.;2:-")
                }
            );
            assert_eq!(g.compounds[0].molecular_ion_mz, parent);
        }
        // A gap that is no listed loss (7 u) leaves two compounds.
        let mut fs = vec![
            feature(1, parent, 1, 6, 0, 1000.0, "M+."),
            feature(2, parent - 7.0, 1, 6, 0, 800.0, "M+."),
        ];
        let g = group(&mut fs, 200, "ei", &CompoundSettings::default()).unwrap();
        assert_eq!(g.compounds.len(), 2);
    }

    #[test]
    fn trihalomethane_fragments_are_members_and_outvote_a_misread_parent() {
        // Bromodichloromethane CHBrCl2: M+. read as Cl4 (alike at unit resolution), fragments
        // CHCl2+ (-Br) and CHBrCl+ (-Cl). The fragments imply Cl2Br1.
        let m = mz("CHBrCl2", "M+.");
        let mut fs = vec![
            feature(1, m, 1, 4, 0, 300.0, "M+."),
            feature(2, mz("CHCl2", "M+."), 1, 2, 0, 2000.0, "M+."),
            feature(3, mz("CHBrCl", "M+."), 1, 1, 1, 500.0, "M+."),
        ];
        let g = group(&mut fs, 200, "ei", &CompoundSettings::default()).unwrap();
        assert_eq!(g.compounds.len(), 1, "{:?}", g.compounds);
        let c = &g.compounds[0];
        assert_eq!((c.n_cl, c.n_br), (2, 1));
        assert_eq!(c.members, "1:M+.;2:-Br;3:-Cl");
        assert_eq!((c.nominal_mass, c.odd_nominal), (Some(162), OddNominal::False));
        // A lone EI ion gets no parity call: it may be a fragment itself.
        let mut lone = vec![fs[1].clone()];
        let g = group(&mut lone, 200, "ei", &CompoundSettings::default()).unwrap();
        assert_eq!(g.compounds[0].odd_nominal, OddNominal::Undecided);
    }

    #[test]
    fn traces_that_do_not_correlate_are_not_grouped() {
        let mut a = feature(1, mz("C8H14ClN5", "M+H"), 1, 1, 0, 1000.0, "[M+H]+");
        let mut b = feature(2, mz("C8H14ClN5", "M+Na"), 1, 1, 0, 800.0, "[M+H]+");
        let falling = [1.0, 0.8, 0.5, 0.3, 0.1];
        let rising = [0.1, 0.3, 0.5, 0.8, 1.0];
        for k in 0..5 {
            a.trace[k].intensity = 1000.0 * falling[k];
            b.trace[k].intensity = 800.0 * rising[k];
        }
        let g = run(&mut [a, b]);
        assert_eq!(g.compounds.len(), 2);
    }

    #[test]
    fn evidence_rules_stop_background_levels_and_uncorrelated_partners() {
        // A level through the run (CO2+ at m/z 44 with noise at +2): 200 scans, flat.
        let mut level = feature(1, 43.9898, 1, 1, 0, 1000.0, "M+.");
        level.trace = (0..200)
            .map(|k| FeaturePoint {
                ms1: k,
                scan: k,
                rt_min: Some(k as f64 * 0.01),
                intensity: 1000.0 + (k % 7) as f64,
                m2: if k % 9 == 0 { 320.0 } else { 0.0 },
                m4: 0.0,
                halogen_probability: 0.6,
                agrees: true,
            })
            .collect();
        level.scans = 200;
        let s = CompoundSettings::default();
        let e = evidence(&level, 200, &s);
        assert!(e.background_level);
        assert!(e.m2_correlation.is_some_and(|r| r < s.min_m2_correlation), "{e:?}");
        let g = group(&mut [level], 200, "ei", &s).unwrap();
        assert!(!g.compounds[0].halogen, "{:?}", g.compounds[0]);
        // A real peak passes both.
        let peak = feature(2, 300.0, -1, 2, 0, 1000.0, "[M-H]-");
        let mut long = peak.clone();
        long.trace.iter_mut().for_each(|p| p.m2 = p.intensity * 0.64);
        let e = evidence(&long, 200, &s);
        assert!(!e.background_level);
        assert_eq!(e.m2_correlation.map(|r| (r * 1e6).round()), Some(1e6));
    }

    #[test]
    fn settings_validate_and_name_the_key() {
        assert!(CompoundSettings::default().validate().is_ok());
        let bad = CompoundSettings { min_correlation: 2.0, ..Default::default() };
        assert!(bad.validate().unwrap_err().to_string().contains("min_correlation"));
        let bad =
            CompoundSettings { adducts_negative: vec!["[M+H]+".into()], ..Default::default() };
        assert!(bad.validate().unwrap_err().to_string().contains("adducts_negative"));
        let toml_text = toml::to_string(&CompoundSettings::default()).unwrap();
        let back: CompoundSettings = toml::from_str(&toml_text).unwrap();
        assert_eq!(back, CompoundSettings::default());
    }
}
