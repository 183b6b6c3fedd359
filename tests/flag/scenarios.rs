//! Scenario tests: handbook clusters, look-alikes, nitrogen parity, features, determinism.

use mzcore::centroid::ResolutionClass;
use mzcore::feature::FeatureBuilder;
use mzcore::flag::{FlagSettings, OddNominal, SpacingVerdict, flag_spectrum};
use mzcore::spectrum::{Ionization, Polarity, SpectrumMeta};

use super::compounds::{COMPOUNDS, Compound, Role, halogens};
use super::eval::{Outcome, ParityOutcome, evaluate, own_ion, run};
use super::synth::{Res, Spec, generate};

const HIGH: Res = Res::High(60_000.0);

fn compound(formula: &'static str) -> Compound {
    COMPOUNDS.iter().copied().find(|c| c.formula == formula).expect("listed compound")
}

/// Handbook clusters (common practice: Cl1..Cl6 chlorobenzenes and PCB-153, Br1..Br4
/// bromobenzenes, mixed ClBr, Cl2Br, ClBr2, Br2Cl2, Cl8) are assigned exactly at S/N 100 and
/// 1000 at high resolution and at S/N 1000 at unit resolution, for every seed; at unit
/// resolution and S/N 100 (EI fragments and background peaks interfering) at most 2 of 85.
#[test]
fn handbook_clusters_are_assigned_exactly() {
    let formulas = [
        "C6H5Cl",
        "C6H4Cl2",
        "C6H3Cl3",
        "C6H2Cl4",
        "C6HCl5",
        "C6Cl6",
        "C12H4Cl6",
        "C6H5Br",
        "C6H4Br2",
        "C6H3Br3",
        "C6H2Br4",
        "C6H4BrCl",
        "CHBrCl2",
        "CHBr2Cl",
        "C6H2Br2Cl2",
        "C12H6Br4O",
        "C10H6Cl8",
    ];
    let settings = FlagSettings::default();
    let (mut strict, mut loose) = (Vec::new(), Vec::new());
    for f in formulas {
        let c = compound(f);
        for res in [HIGH, Res::Unit] {
            for snr in [100.0, 1000.0] {
                for seed in 0..5 {
                    let o = evaluate(&c, res, snr, seed, &settings);
                    if o.counts != Some(o.truth) {
                        let line = format!("{f} {res:?} S/N {snr} seed {seed}: {:?}", o.counts);
                        if res == Res::Unit && snr < 1000.0 {
                            loose.push(line)
                        } else {
                            strict.push(line)
                        }
                    }
                }
            }
        }
    }
    assert!(strict.is_empty(), "{strict:#?}");
    assert!(loose.len() <= 2, "{loose:#?}");
}

/// The expected ratios reported for handbook clusters match the rules of thumb of the trade
/// (common practice: Cl1 M+2/M about 1/3, Cl2 100:64:10, Br1 about 1:1, Br2 51:100:49, ClBr
/// 77:100:24), within the carbon background.
#[test]
fn reported_ratios_follow_the_rules_of_thumb() {
    let cases = [
        ("C6H5Cl", 0.33, 0.0),
        ("C6H4Cl2", 0.64, 0.10),
        ("C6H5Br", 0.98, 0.0),
        ("C6H4Br2", 100.0 / 51.0, 49.0 / 51.0),
        ("C6H4BrCl", 100.0 / 77.0, 24.0 / 77.0),
    ];
    for (f, m2, m4) in cases {
        let (g, flags) = run(&compound(f), HIGH, 500.0, 1, &FlagSettings::default());
        let ion = own_ion(&g, &flags).expect("flagged");
        assert!((ion.m2_expected - m2).abs() < 0.06 * m2.max(0.3), "{f}: {}", ion.m2_expected);
        assert!((ion.m4_expected - m4).abs() < 0.05, "{f}: {}", ion.m4_expected);
        assert!((ion.m2_ratio - m2).abs() < 0.15 * m2.max(0.3), "{f}: {}", ion.m2_ratio);
        assert_eq!(ion.spacing, SpacingVerdict::Consistent, "{f}");
        assert!(ion.m2_delta.is_some());
    }
}

/// S- and Si-bearing look-alikes: never flagged at S/N 50 and above at either resolution;
/// at S/N 20, at most 1 in 40 spectra at high resolution (a chance background peak at
/// M+2) and at most 1 in 6 at unit resolution, where intensities alone cannot tell S8 or
/// a siloxane from one chlorine when M+1 and M+4 are near the noise.
#[test]
fn sulfur_and_silicon_decoys_are_not_flagged() {
    let settings = FlagSettings::default();
    let mut flagged = Vec::new();
    let (mut low_high, mut low_unit, mut n_low) = (0, 0, 0);
    for c in COMPOUNDS.iter().filter(|c| c.role == Role::Decoy) {
        for res in [HIGH, Res::Unit] {
            for snr in [20.0, 50.0, 200.0, 1000.0] {
                for seed in 0..8 {
                    let o = evaluate(c, res, snr, seed, &settings);
                    if snr == 20.0 {
                        if res == HIGH {
                            n_low += 1;
                            low_high += usize::from(o.flagged);
                        } else {
                            low_unit += usize::from(o.flagged);
                        }
                    } else if o.flagged {
                        flagged.push(format!("{} {res:?} S/N {snr} seed {seed}", c.name));
                    }
                }
            }
        }
    }
    assert!(flagged.is_empty(), "{flagged:#?}");
    assert!(low_high * 40 <= n_low, "{low_high} of {n_low} at high resolution, S/N 20");
    assert!(low_unit * 6 <= n_low, "{low_unit} of {n_low} at unit resolution, S/N 20");
}

/// At unit resolution the spacing is not used, and every ion says so.
#[test]
fn unit_resolution_says_intensities_only() {
    let (_, flags) = run(&compound("C6H4Cl2"), Res::Unit, 200.0, 3, &FlagSettings::default());
    assert!(flags.has_halogen);
    assert!(flags.ions.iter().all(|i| i.spacing == SpacingVerdict::NotUsed));
}

/// At high resolution a sulfur M+2 spacing vetoes a chlorine-like intensity pattern: S8
/// (M+2/M 0.36, close to one Cl) is rejected by spacing or intensities, and a synthetic
/// cluster with Cl1 intensities but the 34S spacing is rejected by spacing.
#[test]
fn sulfur_spacing_vetoes_chlorine_like_intensities() {
    use mzcore::centroid::Centroid;
    // C6H5Cl M+. at S/N 300 from the generator, with the M+2 shell moved from the 37Cl step
    // to the 34S step (-0.00125 u).
    let g = generate(&Spec {
        formula: "C6H5Cl",
        ion: "M+.",
        res: HIGH,
        snr: 300.0,
        seed: 0,
        background: 0,
        fragments: false,
    });
    let mono = g.centroids[0].mz;
    let shift = mzcore::chem::halogen::M2Spacing::Sulfur.delta()
        - mzcore::chem::halogen::M2Spacing::Chlorine.delta();
    let moved: Vec<Centroid> =
        g.centroids
            .iter()
            .map(|c| {
                if (c.mz - mono - 2.0).abs() < 0.1 {
                    Centroid { mz: c.mz + shift, ..*c }
                } else {
                    *c
                }
            })
            .collect();
    // Electrospray metadata: the most intense cluster is the listed molecular candidate.
    let meta = SpectrumMeta {
        ms_level: 1,
        ionization: Ionization::Electrospray,
        polarity: Polarity::Positive,
        ..Default::default()
    };
    let settings = FlagSettings::default();
    let flags = flag_spectrum(&meta, &g.centroids, ResolutionClass::High, &settings);
    assert!(flags.has_halogen);
    let flags = flag_spectrum(&meta, &moved, ResolutionClass::High, &settings);
    assert!(!flags.has_halogen, "{:#?}", flags.ions);
    let ion = flags.ions.iter().find(|i| (i.mz - mono).abs() < 1e-6).expect("molecular ion");
    assert_eq!(ion.spacing, SpacingVerdict::Sulfur);
    // The same intensities at unit resolution cannot be told from chlorine.
    let unit = flag_spectrum(&meta, &moved, ResolutionClass::Unit, &settings);
    assert!(unit.has_halogen);
}

/// Nitrogen parity for test compounds (nitrogen rule, common practice) is right wherever it
/// is decided, at both resolutions; C12Br10O (exact 949.18, nominal 950, DESIGN.md) is never
/// given the wrong parity although Br10 exceeds the model's six bromines.
#[test]
fn nitrogen_parity_is_right_where_decided() {
    let settings = FlagSettings::default();
    let mut extra = COMPOUNDS.to_vec();
    extra.push(Compound {
        name: "BDE-209",
        formula: "C12Br10O",
        hr_ion: "M+.",
        role: Role::Halogenated,
    });
    let (mut right, mut wrong, mut undecided) = (0usize, Vec::new(), 0usize);
    for c in &extra {
        for res in [HIGH, Res::Unit] {
            for seed in 0..3 {
                match evaluate(c, res, 100.0, seed, &settings).parity {
                    ParityOutcome::Right => right += 1,
                    ParityOutcome::Wrong => wrong.push(format!("{} {res:?} {seed}", c.name)),
                    _ => undecided += 1,
                }
            }
        }
    }
    assert!(wrong.is_empty(), "{wrong:#?}");
    // At least half are decided (undecided: ambiguous rounding, C12Br10O beyond the model's
    // six bromines, or EI spectra whose molecular-ion candidate is another cluster).
    assert!(right >= undecided, "{right} right, {undecided} undecided or missing");
}

/// Looser bounds of the `flag_accuracy` targets: recall and precision of the halogen flag,
/// exact counts, at S/N 20 to 1000.
#[test]
fn accuracy_over_the_compound_list() {
    let settings = FlagSettings::default();
    for res in [HIGH, Res::Unit] {
        let mut outcomes: Vec<Outcome> = Vec::new();
        for c in COMPOUNDS {
            for snr in [20.0, 100.0, 1000.0] {
                for seed in 0..2 {
                    outcomes.push(evaluate(c, res, snr, seed, &settings));
                }
            }
        }
        let hal: Vec<&Outcome> = outcomes.iter().filter(|o| o.role == Role::Halogenated).collect();
        let tp = hal.iter().filter(|o| o.flagged).count();
        let fp = outcomes.iter().filter(|o| o.role != Role::Halogenated && o.flagged).count();
        let exact = hal.iter().filter(|o| o.counts == Some(o.truth)).count();
        let recall = tp as f64 / hal.len() as f64;
        let precision = tp as f64 / (tp + fp).max(1) as f64;
        let exact_frac = exact as f64 / tp.max(1) as f64;
        assert!(recall >= 0.95, "{res:?}: recall {recall}");
        assert!(precision >= 0.97, "{res:?}: precision {precision}");
        assert!(exact_frac >= 0.9, "{res:?}: exact {exact_frac}");
    }
}

/// A compound eluting over 9 scans becomes one feature with the right assignment, apex and
/// scan count; ions of another compound at a different m/z stay separate.
#[test]
fn features_group_consecutive_scans() {
    let settings = FlagSettings::default();
    let mut fb = FeatureBuilder::new(&settings);
    let rts: Vec<f64> = (0..15).map(|i| 5.0 + 0.02 * i as f64).collect();
    let apex_rt = 5.14;
    for (i, &rt) in rts.iter().enumerate() {
        let profile = (-((rt - apex_rt) / 0.03f64).powi(2) / 2.0).exp();
        let snr = 400.0 * profile;
        let meta = SpectrumMeta {
            index: i,
            id: format!("scan={}", i + 1),
            ms_level: 1,
            rt_min: Some(rt),
            polarity: Polarity::Negative,
            ionization: Ionization::Electrospray,
            ..Default::default()
        };
        let mut centroids = if snr >= 3.0 {
            generate(&Spec {
                formula: "C12H7Cl3O2",
                ion: "[M-H]-",
                res: HIGH,
                snr,
                seed: i as u64,
                background: 100,
                fragments: false,
            })
            .centroids
        } else {
            Vec::new()
        };
        // A second, brominated compound throughout.
        centroids.extend(
            generate(&Spec {
                formula: "C7H3Br2NO",
                ion: "[M-H]-",
                res: HIGH,
                snr: 200.0,
                seed: 100 + i as u64,
                background: 0,
                fragments: false,
            })
            .centroids,
        );
        centroids.sort_by(|a, b| a.mz.total_cmp(&b.mz));
        fb.push(&meta, &flag_spectrum(&meta, &centroids, ResolutionClass::High, &settings));
        // An MS2 scan in between does not break features.
        let ms2 = SpectrumMeta { ms_level: 2, ..meta.clone() };
        fb.push(&ms2, &Default::default());
    }
    let features = fb.finish();
    let tri: Vec<_> = features.iter().filter(|f| (f.mz - 286.944).abs() < 0.01).collect();
    assert_eq!(tri.len(), 1, "{features:#?}");
    let t = tri[0];
    assert_eq!((t.n_cl, t.n_br), (3, 0));
    assert!(t.scans >= 5 && t.scans <= 11, "{}", t.scans);
    assert!((t.rt_apex_min - apex_rt).abs() <= 0.021, "{}", t.rt_apex_min);
    assert!(t.rt_start_min < t.rt_apex_min && t.rt_apex_min < t.rt_end_min);
    assert!(t.support >= 0.8 && t.halogen && t.area > 0.0);
    assert_eq!((t.nominal_mass, t.odd_nominal), (Some(288), OddNominal::False));
    let bro: Vec<_> = features.iter().filter(|f| f.n_br == 2 && f.n_cl == 0).collect();
    assert_eq!(bro.len(), 1);
    assert_eq!(bro[0].scans, 15);
    // Bromoxynil C7H3Br2NO: nominal 275, odd (one N).
    assert_eq!((bro[0].nominal_mass, bro[0].odd_nominal), (Some(275), OddNominal::True));
    // Minimum scan count: a feature needs 3 scans by default.
    let mut fb = FeatureBuilder::new(&settings);
    let (g, flags) = run(&compound("C6H4Cl2"), HIGH, 100.0, 0, &settings);
    assert!(own_ion(&g, &flags).is_some());
    fb.push(&SpectrumMeta { ms_level: 1, ..Default::default() }, &flags);
    fb.push(&SpectrumMeta { ms_level: 1, ..Default::default() }, &flags);
    assert!(fb.finish().is_empty());
}

/// Results do not depend on the thread that computes them.
#[test]
fn flags_are_the_same_on_any_thread() {
    use rayon::prelude::*;
    let settings = FlagSettings::default();
    let cases: Vec<(Compound, u64)> =
        COMPOUNDS.iter().take(20).enumerate().map(|(i, c)| (*c, i as u64)).collect();
    let seq: Vec<_> = cases.iter().map(|(c, s)| run(c, HIGH, 50.0, *s, &settings).1).collect();
    let pool = rayon::ThreadPoolBuilder::new().num_threads(2).build().unwrap();
    let par: Vec<_> = pool
        .install(|| cases.par_iter().map(|(c, s)| run(c, HIGH, 50.0, *s, &settings).1).collect());
    assert_eq!(seq, par);
    assert!(halogens("C6H4BrCl") == (1, 1));
}
