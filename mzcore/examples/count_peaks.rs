//! Streams a file through the parallel pipeline and prints, per MS level, the number of
//! spectra and picked peaks: what a lab pipeline that embeds mzcore would write.
//!
//! `cargo run --release -p mzcore --example count_peaks -- FILE [THREADS]`

use std::collections::BTreeMap;

use mzcore::mzml::Reader;
use mzcore::pipeline::{self, PipelineSettings};

fn main() -> Result<(), mzcore::Error> {
    let mut args = std::env::args().skip(1);
    let path = args.next().expect("usage: count_peaks FILE [THREADS]");
    let threads: usize = args.next().and_then(|t| t.parse().ok()).unwrap_or(0);
    let pool = pipeline::thread_pool(threads)?;
    let mut reader = Reader::from_path(&path)?;
    let mut per_level: BTreeMap<u8, (usize, usize)> = BTreeMap::new();
    let mut bad = 0;
    pipeline::run(
        &mut reader,
        &pool,
        &PipelineSettings::default(),
        |_| (),
        |result| {
            match result {
                Ok((spectrum, ())) => {
                    let entry = per_level.entry(spectrum.meta.ms_level).or_default();
                    entry.0 += 1;
                    entry.1 += spectrum.centroids.len();
                }
                Err(e) => {
                    eprintln!("{path}: {e}");
                    bad += 1;
                }
            }
            Ok(())
        },
    )?;
    println!("ms_level\tspectra\tpeaks");
    for (level, (spectra, peaks)) in per_level {
        println!("{level}\t{spectra}\t{peaks}");
    }
    if bad > 0 {
        eprintln!("{path}: {bad} spectra could not be read");
    }
    Ok(())
}
