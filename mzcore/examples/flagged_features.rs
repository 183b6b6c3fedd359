//! Screens one acquisition the way a lab pipeline embedding mzcore would, and prints its
//! halogen features as TSV (m/z, apex time, Cl/Br counts, score).
//!
//! `cargo run --release -p mzcore --example flagged_features -- FILE [CONFIG.toml]`
//!
//! Flags are screening hints, not identifications.

use mzcore::screen::{ScreenConfig, screen_file};

fn main() -> Result<(), mzcore::Error> {
    let mut args = std::env::args().skip(1);
    let path = args.next().expect("usage: flagged_features FILE [CONFIG.toml]");
    let config = match args.next() {
        Some(c) => ScreenConfig::from_toml(&std::fs::read_to_string(c)?)?,
        None => ScreenConfig::default(),
    };
    let pool = mzcore::pipeline::thread_pool(config.threads)?;
    let report = screen_file(path.as_ref(), &config, &pool)?;
    println!("mz\trt_apex_min\tn_cl\tn_br\thalogen_score");
    for f in report.features.iter().filter(|f| f.halogen) {
        println!(
            "{:.5}\t{:.3}\t{}\t{}\t{:.3}",
            f.mz, f.rt_apex_min, f.n_cl, f.n_br, f.halogen_score
        );
    }
    eprintln!(
        "{path}: {} ({} spectra, {} halogen features)",
        report.summary.status.name(),
        report.summary.spectra,
        report.summary.halogen_features
    );
    Ok(())
}
