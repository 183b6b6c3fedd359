//! Runs the flagger on generated spectra and compares with the truth (shared by the tests and
//! the `flag_accuracy` example).

#![allow(dead_code)]

use mzcore::centroid::ResolutionClass;
use mzcore::flag::{FlagSettings, FlaggedIon, OddNominal, SpectrumFlags, flag_spectrum};
use mzcore::spectrum::{Ionization, Polarity, SpectrumMeta};

use super::compounds::{Compound, Role, halogens};
use super::synth::{Generated, Res, Spec, generate};

/// Parity outcome for the compound's own ion.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum ParityOutcome {
    /// Decided and right.
    Right,
    /// Decided and wrong.
    Wrong,
    /// Undecided.
    Undecided,
    /// The compound's ion is not among the flagged ions.
    Missing,
}

/// What happened to one generated spectrum.
#[derive(Debug, Clone)]
pub struct Outcome {
    /// Compound role.
    pub role: Role,
    /// True (n_cl, n_br).
    pub truth: (u8, u8),
    /// The compound's monoisotopic ion was flagged as halogenated.
    pub flagged: bool,
    /// Its assignment (when flagged).
    pub counts: Option<(u8, u8)>,
    /// Any ion of the spectrum was flagged as halogenated.
    pub any_flag: bool,
    /// Parity of the compound's ion.
    pub parity: ParityOutcome,
    /// The compound's ion was chosen as the molecular-ion candidate.
    pub molecular: bool,
    /// Score of the compound's ion (when flagged).
    pub score: Option<f64>,
}

/// Ion type, metadata and resolution class for a compound at a resolution.
pub fn setup(c: &Compound, res: Res) -> (&'static str, SpectrumMeta, ResolutionClass, bool) {
    let (ion, class) = match res {
        Res::High(_) => (c.hr_ion, ResolutionClass::High),
        Res::Unit => ("M+.", ResolutionClass::Unit),
    };
    let ei = ion == "M+.";
    let meta = SpectrumMeta {
        index: 7,
        id: "scan=8".into(),
        ms_level: 1,
        rt_min: Some(1.0),
        polarity: if ion.ends_with('-') { Polarity::Negative } else { Polarity::Positive },
        ionization: if ei { Ionization::Electron } else { Ionization::Electrospray },
        ..Default::default()
    };
    (ion, meta, class, ei)
}

/// Generates and flags one spectrum.
pub fn run(
    c: &Compound,
    res: Res,
    snr: f64,
    seed: u64,
    settings: &FlagSettings,
) -> (Generated, SpectrumFlags) {
    let (ion, meta, class, ei) = setup(c, res);
    let background = match res {
        Res::High(_) => 300,
        Res::Unit => 60,
    };
    let g = generate(&Spec { formula: c.formula, ion, res, snr, seed, background, fragments: ei });
    let flags = flag_spectrum(&meta, &g.centroids, class, settings);
    (g, flags)
}

/// The flagged ion at the compound's monoisotopic m/z, if any.
pub fn own_ion<'a>(g: &Generated, flags: &'a SpectrumFlags) -> Option<&'a FlaggedIon> {
    flags.ions.iter().find(|i| (i.mz - g.mono_mz).abs() <= i.tolerance_da + 0.1 * i.tolerance_da)
}

/// Generates, flags and compares one case.
pub fn evaluate(c: &Compound, res: Res, snr: f64, seed: u64, settings: &FlagSettings) -> Outcome {
    let (g, flags) = run(c, res, snr, seed, settings);
    let truth = halogens(c.formula);
    let own = own_ion(&g, &flags);
    let rule = g.formula.nitrogen_rule();
    let want = if rule.nominal_mass % 2 != 0 { OddNominal::True } else { OddNominal::False };
    let parity = match own {
        None => ParityOutcome::Missing,
        Some(i) if i.odd_nominal == OddNominal::Undecided => ParityOutcome::Undecided,
        Some(i) if i.odd_nominal == want => ParityOutcome::Right,
        Some(_) => ParityOutcome::Wrong,
    };
    let flagged = own.is_some_and(|i| i.halogen);
    Outcome {
        role: c.role,
        truth,
        flagged,
        counts: own.filter(|i| i.halogen).map(|i| (i.n_cl, i.n_br)),
        any_flag: flags.has_halogen,
        parity,
        molecular: own.is_some_and(|i| i.molecular_candidate),
        score: own.filter(|i| i.halogen).map(|i| i.score),
    }
}
