//! Comparing screening results with a synthetic acquisition's truth file.
//!
//! Matching: a truth compound is found when a halogen feature lies within 10 ppm (high
//! resolution) or 0.5 u (EI, unit resolution) of its monoisotopic ion m/z and its apex time lies
//! inside the feature's time range widened by 0.1 min. A halogen feature that matches a compound
//! without Cl/Br (a decoy) is a false positive, and so is one at a time where no halogenated
//! compound elutes (within 0.3 min); the other unmatched halogen features (fragments and
//! isotope partners of halogenated compounds) are counted apart. Parity is compared on the
//! molecular-ion feature that matches a compound, halogenated or not.
//!
//! The screening targets are stated for compounds whose monoisotopic peak has S/N of at least
//! [`STRONG_SNR`] at the apex (the truth file's `mono_snr`); recall and exactness are also
//! counted for that stratum alone.

use crate::error::{Error, ErrorKind, Result};
use crate::feature::Feature;
use crate::flag::OddNominal;

use super::TruthRow;

/// Reads a truth TSV (as written by [`super::write_truth`]).
pub fn read_truth(text: &str) -> Result<Vec<TruthRow>> {
    let mut r = csv::ReaderBuilder::new().delimiter(b'\t').from_reader(text.as_bytes());
    r.deserialize()
        .map(|row| row.map_err(|e| Error::new(ErrorKind::Config(format!("truth file: {e}")))))
        .collect()
}

/// The synthetic acquisitions of a folder: every `<run>.mzML` that has a `<run>.truth.tsv`
/// beside it (as [`super::generate`] writes them), by file name, with its truth rows.
pub fn truth_runs(dir: &std::path::Path) -> Result<Vec<(std::path::PathBuf, Vec<TruthRow>)>> {
    let mut files: Vec<std::path::PathBuf> = std::fs::read_dir(dir)?
        .filter_map(|e| e.ok().map(|e| e.path()))
        .filter(|p| p.extension().is_some_and(|x| x == "mzML"))
        .collect();
    files.sort();
    let mut out = Vec::new();
    for path in files {
        let Ok(text) = std::fs::read_to_string(path.with_extension("truth.tsv")) else { continue };
        out.push((path, read_truth(&text)?));
    }
    Ok(out)
}

/// Least expected monoisotopic S/N of the compounds the screening targets are stated for.
pub const STRONG_SNR: f64 = 20.0;

/// What happened to one truth compound.
#[derive(Debug, Clone, PartialEq)]
pub struct CompoundOutcome {
    /// Compound name.
    pub compound: String,
    /// True Cl and Br counts.
    pub truth: (u32, u32),
    /// Assignment of the matching halogen feature, if any.
    pub found_as: Option<(u8, u8)>,
    /// Nitrogen rule of the matching molecular-ion feature: `Some(right)` when decided.
    pub parity_right: Option<bool>,
    /// Expected S/N of the monoisotopic peak at the apex.
    pub mono_snr: f64,
}

/// Counts over one or more files.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct Evaluation {
    /// Halogenated compounds found.
    pub found: usize,
    /// Halogenated compounds missed.
    pub missed: usize,
    /// Halogenated compounds with a halogen feature on their molecular ion or, as happens in
    /// EI where the molecular ion is weak, on a fragment at their apex time (within 0.1 min).
    pub flagged_at_apex: usize,
    /// Found with the exact (n_cl, n_br).
    pub exact: usize,
    /// Halogen features on decoys or away from any halogenated compound.
    pub false_positives: usize,
    /// Decoy compounds (no Cl/Br) flagged as halogenated.
    pub decoys_flagged: usize,
    /// Unmatched halogen features near halogenated compounds (fragments, partners).
    pub other_halogen_features: usize,
    /// Nitrogen-rule calls right, wrong, undecided.
    pub parity: (usize, usize, usize),
    /// Halogenated compounds with monoisotopic S/N of at least [`STRONG_SNR`]: found, missed,
    /// found with the exact (n_cl, n_br).
    pub strong: (usize, usize, usize),
    /// Per-compound outcomes.
    pub compounds: Vec<CompoundOutcome>,
}

impl Evaluation {
    /// Recall of halogenated compounds.
    pub fn recall(&self) -> f64 {
        self.found as f64 / (self.found + self.missed).max(1) as f64
    }

    /// Recall of halogenated compounds with monoisotopic S/N of at least [`STRONG_SNR`].
    pub fn strong_recall(&self) -> f64 {
        self.strong.0 as f64 / (self.strong.0 + self.strong.1).max(1) as f64
    }

    /// Precision of halogen features.
    pub fn precision(&self) -> f64 {
        self.found as f64 / (self.found + self.false_positives).max(1) as f64
    }

    /// Adds another file's counts.
    pub fn add(&mut self, other: Evaluation) {
        self.found += other.found;
        self.missed += other.missed;
        self.flagged_at_apex += other.flagged_at_apex;
        self.exact += other.exact;
        self.false_positives += other.false_positives;
        self.decoys_flagged += other.decoys_flagged;
        self.other_halogen_features += other.other_halogen_features;
        self.parity.0 += other.parity.0;
        self.parity.1 += other.parity.1;
        self.parity.2 += other.parity.2;
        self.strong.0 += other.strong.0;
        self.strong.1 += other.strong.1;
        self.strong.2 += other.strong.2;
        self.compounds.extend(other.compounds);
    }
}

fn matches(t: &TruthRow, f: &Feature) -> bool {
    let tol = if t.ion_type == "M+." { 0.5 } else { t.mz.abs() * 10e-6 };
    (f.mz - t.mz).abs() <= tol
        && t.rt_apex_min >= f.rt_start_min - 0.1
        && t.rt_apex_min <= f.rt_end_min + 0.1
}

/// Compares one file's features with its truth rows.
pub fn evaluate(truth: &[TruthRow], features: &[Feature]) -> Evaluation {
    // One row per compound: its main ion (adduct and fragment rows are for compound scoring).
    let truth: Vec<TruthRow> = truth.iter().filter(|t| t.role == "molecular").cloned().collect();
    let truth = truth.as_slice();
    let mut e = Evaluation::default();
    let halogen: Vec<&Feature> = features.iter().filter(|f| f.halogen).collect();
    for t in truth {
        let halogenated = t.n_cl + t.n_br > 0;
        let hit = halogen.iter().find(|f| matches(t, f));
        if halogenated
            && (hit.is_some()
                || halogen.iter().any(|f| (f.rt_apex_min - t.rt_apex_min).abs() <= 0.1))
        {
            e.flagged_at_apex += 1;
        }
        let strong = t.mono_snr >= STRONG_SNR;
        match (halogenated, hit) {
            (true, Some(f)) => {
                let exact = u32::from(f.n_cl) == t.n_cl && u32::from(f.n_br) == t.n_br;
                e.found += 1;
                e.exact += usize::from(exact);
                if strong {
                    e.strong.0 += 1;
                    e.strong.2 += usize::from(exact);
                }
            }
            (true, None) => {
                e.missed += 1;
                e.strong.1 += usize::from(strong);
            }
            (false, Some(_)) => {
                e.decoys_flagged += 1;
                e.false_positives += 1;
            }
            (false, None) => {}
        }
        let parity =
            features.iter().find(|f| matches(t, f) && f.molecular_candidate).and_then(|f| match f
                .odd_nominal
            {
                OddNominal::True => Some(t.odd_nominal),
                OddNominal::False => Some(!t.odd_nominal),
                OddNominal::Undecided => None,
            });
        match parity {
            Some(true) => e.parity.0 += 1,
            Some(false) => e.parity.1 += 1,
            None if features.iter().any(|f| matches(t, f) && f.molecular_candidate) => {
                e.parity.2 += 1
            }
            None => {}
        }
        e.compounds.push(CompoundOutcome {
            compound: t.compound.clone(),
            truth: (t.n_cl, t.n_br),
            found_as: hit.map(|f| (f.n_cl, f.n_br)),
            parity_right: parity,
            mono_snr: t.mono_snr,
        });
    }
    for f in &halogen {
        if truth.iter().any(|t| matches(t, f)) {
            continue;
        }
        let near = truth
            .iter()
            .any(|t| t.n_cl + t.n_br > 0 && (t.rt_apex_min - f.rt_apex_min).abs() <= 0.3);
        if near {
            e.other_halogen_features += 1;
        } else {
            e.false_positives += 1;
        }
    }
    e
}

/// Compound-level counts over one or more files (see [`evaluate_compounds`]).
///
/// Matching: a reported compound *is* truth compound t when its neutral mass is within
/// 10 ppm (high resolution) or 0.5 u (unit) of t's and t's apex lies inside the compound's
/// time range widened by 0.1 min. A compound whose molecular-ion m/z instead matches one of
/// t's adduct or fragment ions (same tolerance on m/z, same time rule) and not t's neutral is
/// a *misassigned* ion: a fragment or adduct reported as a molecule of its own.
#[derive(Debug, Clone, Default, PartialEq)]
pub struct CompoundEvaluation {
    /// Halogenated truth compounds with mono S/N >= [`STRONG_SNR`]: found as a halogen
    /// compound with the right neutral mass, missed.
    pub strong_found: usize,
    /// See `strong_found`.
    pub strong_missed: usize,
    /// Of the strong ones found, with the exact (n_cl, n_br) of the neutral.
    pub strong_exact: usize,
    /// Halogen calls that are right: the neutral of a halogenated truth compound.
    pub true_calls: usize,
    /// Halogen calls that are wrong: on nothing true, on a halogen-free neutral, or on a
    /// misassigned ion of a compound with mono S/N >= [`STRONG_SNR`].
    pub false_calls: usize,
    /// Halogen calls on misassigned ions of weak compounds (mono S/N below the stratum),
    /// counted apart.
    pub weak_misassigned_calls: usize,
    /// Halogen calls that are chloride adducts of halogen-free molecules.
    pub chloride_adduct_calls: usize,
    /// Misassigned ions (fragments or adducts reported as molecules) of strong compounds
    /// that the relation tables cover (adducts of the table; fragments whose loss from the
    /// main ion is a listed loss or two).
    pub strong_misassigned: usize,
    /// Misassigned fragments of strong compounds by a loss outside the tables (they stay
    /// compounds of their own by design), with the halogen calls on them counted apart.
    pub unlisted_fragments: usize,
    /// Nitrogen rule on compounds that match a truth compound: right, wrong, undecided.
    pub parity: (usize, usize, usize),
    /// (halogen probability, right) for every compound whose neutral carries a Cl/Br
    /// hypothesis, for the reliability table. Right means the ion truly carries Cl or Br.
    pub probabilities: Vec<(f64, bool)>,
    /// Names of strong halogenated compounds missed or found with other counts.
    pub misses: Vec<String>,
}

impl CompoundEvaluation {
    /// Recall of strong halogenated compounds.
    pub fn recall(&self) -> f64 {
        self.strong_found as f64 / (self.strong_found + self.strong_missed).max(1) as f64
    }

    /// Precision of halogen calls (weak compounds' misassigned ions aside).
    pub fn precision(&self) -> f64 {
        self.true_calls as f64 / (self.true_calls + self.false_calls).max(1) as f64
    }

    /// Exact (n_cl, n_br) among strong compounds found.
    pub fn exact(&self) -> f64 {
        self.strong_exact as f64 / self.strong_found.max(1) as f64
    }

    /// Right share of decided nitrogen-rule calls, and the undecided share of all.
    pub fn parity_right(&self) -> (f64, f64) {
        let (r, w, u) = self.parity;
        (r as f64 / (r + w).max(1) as f64, u as f64 / (r + w + u).max(1) as f64)
    }

    /// Adds another file's counts.
    pub fn add(&mut self, o: CompoundEvaluation) {
        self.strong_found += o.strong_found;
        self.strong_missed += o.strong_missed;
        self.strong_exact += o.strong_exact;
        self.true_calls += o.true_calls;
        self.false_calls += o.false_calls;
        self.weak_misassigned_calls += o.weak_misassigned_calls;
        self.chloride_adduct_calls += o.chloride_adduct_calls;
        self.strong_misassigned += o.strong_misassigned;
        self.unlisted_fragments += o.unlisted_fragments;
        self.parity.0 += o.parity.0;
        self.parity.1 += o.parity.1;
        self.parity.2 += o.parity.2;
        self.probabilities.extend(o.probabilities);
        self.misses.extend(o.misses);
    }

    /// The reliability table of the halogen probability: per bin `[lo, hi)` of
    /// `edges` the calls in it, their mean probability and the fraction right.
    pub fn reliability(&self, edges: &[f64]) -> Vec<ReliabilityBin> {
        edges
            .windows(2)
            .map(|w| {
                let last = w[1] >= 1.0;
                let inside: Vec<&(f64, bool)> = self
                    .probabilities
                    .iter()
                    .filter(|(p, _)| *p >= w[0] && (*p < w[1] || (last && *p <= w[1])))
                    .collect();
                let n = inside.len();
                let mean = inside.iter().map(|x| x.0).sum::<f64>() / n.max(1) as f64;
                let right = inside.iter().filter(|x| x.1).count();
                ReliabilityBin { lo: w[0], hi: w[1], calls: n, mean_probability: mean, right }
            })
            .collect()
    }
}

/// One bin of a reliability table.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct ReliabilityBin {
    /// Lower edge (inclusive).
    pub lo: f64,
    /// Upper edge (exclusive, inclusive for the last bin).
    pub hi: f64,
    /// Calls with a probability in the bin.
    pub calls: usize,
    /// Their mean probability.
    pub mean_probability: f64,
    /// Of them, right.
    pub right: usize,
}

impl ReliabilityBin {
    /// Observed fraction right (0 when empty).
    pub fn observed(&self) -> f64 {
        self.right as f64 / self.calls.max(1) as f64
    }
}

fn neutral_of(t: &TruthRow) -> f64 {
    crate::chem::Formula::parse(&t.formula).map_or(f64::NAN, |f| f.monoisotopic_mass())
}

fn ion_has_halogen(t: &TruthRow) -> bool {
    match crate::chem::Formula::parse(&t.ion_formula) {
        Ok(f) if !t.ion_formula.is_empty() => f.count("Cl") + f.count("Br") > 0,
        _ => t.n_cl + t.n_br > 0,
    }
}

/// The truth rows a reported compound matches (see [`CompoundEvaluation`]): the truth
/// compound whose neutral it is, and the truth ion its molecular ion is.
struct Matched<'a> {
    neutral: Option<&'a TruthRow>,
    ion: Option<&'a TruthRow>,
}

/// True when compound `c` is the neutral of truth compound `t` (mass and time rules).
fn is_neutral_of(c: &crate::compound::Compound, t: &TruthRow) -> bool {
    let m = neutral_of(t);
    t.role == "molecular"
        && c.neutral_mass.is_some_and(|n| (n - m).abs() <= mass_tolerance(c, m))
        && in_time(c, t)
}

fn mass_tolerance(c: &crate::compound::Compound, x: f64) -> f64 {
    if c.resolution == "high" { x.abs() * 10e-6 } else { 0.5 }
}

fn in_time(c: &crate::compound::Compound, t: &TruthRow) -> bool {
    t.rt_apex_min >= c.rt_start_min - 0.1 && t.rt_apex_min <= c.rt_end_min + 0.1
}

fn matched<'a>(truth: &'a [TruthRow], c: &crate::compound::Compound) -> Matched<'a> {
    Matched {
        neutral: truth.iter().find(|t| is_neutral_of(c, t)),
        ion: truth.iter().find(|t| {
            (t.mz - c.molecular_ion_mz).abs() <= mass_tolerance(c, t.mz) && in_time(c, t)
        }),
    }
}

impl Matched<'_> {
    /// See [`halogen_truth`].
    fn halogen_truth(&self, c: &crate::compound::Compound) -> Option<bool> {
        if c.n_cl + c.n_br == 0 {
            return None;
        }
        Some(match (self.neutral, self.ion) {
            (Some(t), _) => t.n_cl + t.n_br > 0,
            (None, ion) => ion.is_some_and(ion_has_halogen),
        })
    }
}

/// Whether a compound's Cl/Br hypothesis is true: `None` when its neutral carries none;
/// else true when it is the neutral of a halogenated truth compound, or when its molecular ion
/// is a truth ion (adduct, fragment) whose composition carries Cl or Br. Anything else (noise,
/// background, side lobes, halogen-free molecules) is false. The labels behind the
/// reliability table and the calibration fit.
pub fn halogen_truth(truth: &[TruthRow], c: &crate::compound::Compound) -> Option<bool> {
    matched(truth, c).halogen_truth(c)
}

/// True when a truth ion relates to its compound's main ion by the tables: an adduct, or a
/// fragment whose m/z lies one or two of the listed `losses` below the main ion's.
fn listed_relation(truth: &[TruthRow], t: &TruthRow, losses: &[crate::compound::Loss]) -> bool {
    if t.role != "fragment" {
        return true;
    }
    let Some(main) = truth.iter().find(|m| m.compound == t.compound && m.role == "molecular")
    else {
        return false;
    };
    let d = main.mz - t.mz;
    losses.iter().any(|l| (l.mass - d).abs() <= 0.01)
}

/// Compares one file's compounds with its truth rows (see [`CompoundEvaluation`]).
pub fn evaluate_compounds(
    truth: &[TruthRow],
    compounds: &[crate::compound::Compound],
) -> CompoundEvaluation {
    let mut e = CompoundEvaluation::default();
    let losses = crate::compound::Relations::defaults().losses;
    let main: Vec<&TruthRow> = truth.iter().filter(|t| t.role == "molecular").collect();
    for c in compounds {
        let m = matched(truth, c);
        let (neutral, ion) = (m.neutral, m.ion);
        let misassigned = neutral.is_none() && ion.is_some_and(|t| t.role != "molecular");
        let unlisted = misassigned && ion.is_some_and(|t| !listed_relation(truth, t, &losses));
        let strong_parent = ion.is_some_and(|t| t.mono_snr >= STRONG_SNR) && !unlisted;
        if misassigned && ion.is_some_and(|t| t.mono_snr >= STRONG_SNR) {
            if unlisted {
                e.unlisted_fragments += 1;
            } else {
                e.strong_misassigned += 1;
            }
        }
        if let Some(right) = m.halogen_truth(c) {
            e.probabilities.push((c.halogen_probability, right));
        }
        if c.halogen {
            match neutral {
                Some(t) if t.n_cl + t.n_br > 0 => e.true_calls += 1,
                _ if misassigned && !strong_parent => e.weak_misassigned_calls += 1,
                _ => e.false_calls += 1,
            }
            if neutral.is_none()
                && ion.is_some_and(|t| t.ion_type.contains("Cl") && t.n_cl + t.n_br == 0)
            {
                e.chloride_adduct_calls += 1;
            }
        }
        if let Some(t) = neutral {
            match c.odd_nominal {
                crate::flag::OddNominal::True if t.odd_nominal => e.parity.0 += 1,
                crate::flag::OddNominal::False if !t.odd_nominal => e.parity.0 += 1,
                crate::flag::OddNominal::Undecided => e.parity.2 += 1,
                _ => e.parity.1 += 1,
            }
        }
    }
    for t in main.iter().filter(|t| t.n_cl + t.n_br > 0 && t.mono_snr >= STRONG_SNR) {
        let hit = compounds.iter().find(|c| c.halogen && is_neutral_of(c, t));
        match hit {
            Some(c) => {
                e.strong_found += 1;
                let exact = u32::from(c.n_cl) == t.n_cl && u32::from(c.n_br) == t.n_br;
                e.strong_exact += usize::from(exact);
                if !exact {
                    e.misses.push(format!("{} as Cl{}Br{}", t.compound, c.n_cl, c.n_br));
                }
            }
            None => {
                e.strong_missed += 1;
                e.misses.push(format!("{} missed", t.compound));
            }
        }
    }
    e
}
