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
