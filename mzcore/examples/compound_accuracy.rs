//! Compound-level accuracy of a screening run against synthetic truth: recall, precision and
//! exactness of halogen calls at monoisotopic S/N >= 20, chloride-adduct and misassigned-ion
//! counts, the nitrogen rule on compounds, and the reliability table of the halogen
//! probability.
//!
//! `cargo run --release -p mzcore --example compound_accuracy -- DIR [DIR ...]`, where each DIR
//! holds `<run>.mzML` with `<run>.truth.tsv` (as `mzsift demo` writes them).

use std::path::PathBuf;

use mzcore::screen::{ScreenConfig, screen_file};
use mzcore::synth::evaluate::{CompoundEvaluation, evaluate_compounds, truth_runs};

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let dirs: Vec<PathBuf> = std::env::args().skip(1).map(PathBuf::from).collect();
    if dirs.is_empty() {
        return Err("usage: compound_accuracy DIR [DIR ...]".into());
    }
    let pool = mzcore::pipeline::thread_pool(0)?;
    let config = ScreenConfig::default();
    let mut all = CompoundEvaluation::default();
    for dir in &dirs {
        for (path, truth) in truth_runs(dir)? {
            let report = screen_file(&path, &config, &pool)?;
            let e = evaluate_compounds(&truth, &report.compounds);
            println!(
                "{}: strong {}/{} exact {} | calls right {} wrong {} (weak misassigned {}) | \
                 chloride adducts {} | misassigned {} | parity {:?} | {}",
                path.file_name().unwrap_or_default().to_string_lossy(),
                e.strong_found,
                e.strong_found + e.strong_missed,
                e.strong_exact,
                e.true_calls,
                e.false_calls,
                e.weak_misassigned_calls,
                e.chloride_adduct_calls,
                e.strong_misassigned,
                e.parity,
                e.misses.join(", ")
            );
            all.add(e);
        }
    }
    let (right, undecided) = all.parity_right();
    println!(
        "all: recall {:.3} precision {:.3} exact {:.3} | chloride-adduct calls {} | \
         misassigned (strong) {} | unlisted-loss fragments {} | parity right {:.3} of decided, \
         undecided share {:.3}",
        all.recall(),
        all.precision(),
        all.exact(),
        all.chloride_adduct_calls,
        all.strong_misassigned,
        all.unlisted_fragments,
        right,
        undecided
    );
    println!("reliability of halogen_probability (calls with a Cl/Br hypothesis):");
    println!("   bin        calls  mean p  observed right");
    for b in all.reliability(&[0.0, 0.5, 0.7, 0.9, 0.99, 1.0]) {
        println!(
            "  {:.2}-{:.2}  {:>6}  {:.3}   {:.3}",
            b.lo,
            b.hi,
            b.calls,
            b.mean_probability,
            b.observed()
        );
    }
    Ok(())
}
