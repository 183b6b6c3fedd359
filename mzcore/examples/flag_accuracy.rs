//! Accuracy of the halogen and nitrogen-rule flags on generated centroid lists.
//!
//! Runs the deterministic generator of `tests/flag/synth.rs` over the compound list of
//! `tests/flag/compounds.rs` (pesticides, disinfection by-products, flame retardants,
//! pharmaceuticals with odd and even nitrogen counts, S and Si look-alikes) at several S/N
//! levels and seeds, at high resolution (R = 60,000; LC-ESI ions, or M+. for compounds that do
//! not protonate, with EI fragments) and at unit resolution (EI, M+. with fragments), and
//! prints the confusion tables.
//!
//! ```text
//! cargo run --release -p mzcore --example flag_accuracy [seeds [min_halogen_probability]]
//! ```

#[path = "../../tests/flag/compounds.rs"]
mod compounds;
#[path = "../../tests/flag/eval.rs"]
mod eval;
#[path = "../../tests/flag/synth.rs"]
mod synth;

use compounds::{COMPOUNDS, Role};
use eval::{Outcome, ParityOutcome, evaluate};
use mzcore::flag::FlagSettings;
use synth::Res;

fn main() {
    let seeds: u64 = std::env::args().nth(1).and_then(|s| s.parse().ok()).unwrap_or(10);
    let mut settings = FlagSettings::default();
    if let Some(p) = std::env::args().nth(2).and_then(|s| s.parse().ok()) {
        settings.min_halogen_probability = p;
    }
    let levels = [10.0, 20.0, 50.0, 200.0, 1000.0];
    println!("# flag_accuracy: {} compounds, {seeds} seeds per S/N level", COMPOUNDS.len());
    for (name, res) in
        [("high resolution (R 60000)", Res::High(60_000.0)), ("unit resolution (EI)", Res::Unit)]
    {
        println!("\n## {name}");
        println!(
            "{:>6} | {:>5} {:>5} {:>5} {:>5} | {:>7} {:>9} | {:>6} {:>6} | {:>6} {:>5} {:>6} {:>6} | {:>8}",
            "S/N",
            "TP",
            "FN",
            "FP",
            "TN",
            "recall",
            "precision",
            "exact",
            "wrong",
            "par_ok",
            "bad",
            "undec",
            "miss",
            "decoy_fl"
        );
        let mut by_role_missed: Vec<String> = Vec::new();
        let mut bands = [(0usize, 0usize); 5];
        for &snr in &levels {
            let mut outs: Vec<(&compounds::Compound, Outcome)> = Vec::new();
            for c in COMPOUNDS {
                for seed in 0..seeds {
                    outs.push((c, evaluate(c, res, snr, seed, &settings)));
                }
            }
            let hal = |o: &Outcome| o.role == Role::Halogenated;
            let tp = outs.iter().filter(|(_, o)| hal(o) && o.flagged).count();
            let fneg = outs.iter().filter(|(_, o)| hal(o) && !o.flagged).count();
            let fp = outs.iter().filter(|(_, o)| !hal(o) && o.flagged).count();
            let tn = outs.iter().filter(|(_, o)| !hal(o) && !o.flagged).count();
            let exact = outs.iter().filter(|(_, o)| hal(o) && o.counts == Some(o.truth)).count();
            let decoy_flagged =
                outs.iter().filter(|(_, o)| o.role == Role::Decoy && o.flagged).count();
            let count = |p: ParityOutcome| outs.iter().filter(|(_, o)| o.parity == p).count();
            println!(
                "{:>6} | {:>5} {:>5} {:>5} {:>5} | {:>7.3} {:>9.3} | {:>6} {:>6} | {:>6} {:>5} {:>6} {:>6} | {:>8}",
                snr,
                tp,
                fneg,
                fp,
                tn,
                tp as f64 / (tp + fneg).max(1) as f64,
                tp as f64 / (tp + fp).max(1) as f64,
                exact,
                tp - exact,
                count(ParityOutcome::Right),
                count(ParityOutcome::Wrong),
                count(ParityOutcome::Undecided),
                count(ParityOutcome::Missing),
                decoy_flagged,
            );
            for (c, o) in &outs {
                if snr >= 20.0 && ((hal(o) && o.counts != Some(o.truth)) || (!hal(o) && o.flagged))
                {
                    by_role_missed.push(format!(
                        "S/N {snr}: {} {} truth Cl{}Br{} got {:?}",
                        c.name, c.formula, o.truth.0, o.truth.1, o.counts
                    ));
                }
                if let Some(s) = o.score {
                    let band = ((s * 10.0).floor() as usize).saturating_sub(5).min(4);
                    bands[band].0 += 1;
                    if o.counts == Some(o.truth) {
                        bands[band].1 += 1;
                    }
                }
            }
        }
        println!("\nscore band of flagged ions: fraction with the exact (n_cl, n_br)");
        for (i, (n, ok)) in bands.iter().enumerate() {
            let lo = 0.5 + 0.1 * i as f64;
            println!("  [{lo:.1}, {:.1}{}: {ok}/{n}", lo + 0.1, if i == 4 { "]" } else { ")" });
        }
        println!("\nerrors at S/N >= 20 ({}):", by_role_missed.len());
        for line in by_role_missed.iter().take(400) {
            println!("  {line}");
        }
    }
}
