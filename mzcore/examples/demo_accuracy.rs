//! Screens every `*.mzML` of a folder that has a `*.truth.tsv` beside it and prints how the
//! halogen features and nitrogen-rule calls compare with the truth (matching rules in
//! `mzcore::synth::evaluate`).
//!
//! `cargo run --release -p mzcore --example demo_accuracy -- fixtures/demo`

use mzcore::screen::{ScreenConfig, screen_file};
use mzcore::synth::evaluate::{Evaluation, evaluate, read_truth};

fn main() -> Result<(), mzcore::Error> {
    let dir = std::env::args().nth(1).unwrap_or_else(|| "fixtures/demo".into());
    let pool = mzcore::pipeline::thread_pool(0)?;
    let mut files: Vec<_> =
        std::fs::read_dir(&dir)?.filter_map(|e| e.ok()).map(|e| e.path()).collect();
    files.sort();
    let mut total = Evaluation::default();
    for mzml in files.iter().filter(|p| p.extension().is_some_and(|e| e == "mzML")) {
        let truth_path = mzml.with_extension("truth.tsv");
        let Ok(text) = std::fs::read_to_string(&truth_path) else { continue };
        let truth = read_truth(&text)?;
        let report = screen_file(mzml, &ScreenConfig::default(), &pool)?;
        let e = evaluate(&truth, &report.features);
        println!("== {}", mzml.file_name().unwrap_or_default().to_string_lossy());
        for c in &e.compounds {
            let (cl, br) = c.truth;
            let found = match (cl + br, c.found_as) {
                (0, None) => "no halogen (right)".to_owned(),
                (0, Some((a, b))) => format!("DECOY FLAGGED as Cl{a}Br{b}"),
                (_, Some((a, b))) => format!("found as Cl{a}Br{b}"),
                (_, None) => "MISSED".to_owned(),
            };
            let parity = match c.parity_right {
                Some(true) => "parity right",
                Some(false) => "PARITY WRONG",
                None => "parity not decided",
            };
            println!(
                "  {:<30} Cl{cl}Br{br} (mono S/N {:>6.1}): {found}; {parity}",
                c.compound, c.mono_snr
            );
        }
        total.add(e);
    }
    println!(
        "halogenated compounds found {} of {} (recall {:.3}); false positives {} (decoys {}); precision {:.3}",
        total.found,
        total.found + total.missed,
        total.recall(),
        total.false_positives,
        total.decoys_flagged,
        total.precision()
    );
    println!("exact (n_cl, n_br): {} of {} found", total.exact, total.found);
    let (found, missed, exact) = total.strong;
    println!(
        "monoisotopic S/N >= {}: found {found} of {} (recall {:.3}), exact {exact} of {found}",
        mzcore::synth::evaluate::STRONG_SNR,
        found + missed,
        total.strong_recall()
    );
    println!(
        "halogenated compounds with a halogen feature on the molecular ion or a fragment at the apex: {} of {}",
        total.flagged_at_apex,
        total.found + total.missed
    );
    println!("other halogen features near halogenated compounds: {}", total.other_halogen_features);
    println!(
        "nitrogen rule: right {}, wrong {}, undecided {}",
        total.parity.0, total.parity.1, total.parity.2
    );
    Ok(())
}
