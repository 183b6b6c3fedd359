//! Scale figure of the batch view: aligns N files x M compounds (constructed, with drift and
//! mass noise; no gap filling, which reads the files) on one thread and prints the time.
//!
//! `cargo run --release -p mzcore --example batch_scale -- 200 2000`
//! (peak memory: `/usr/bin/time -f %M target/release/examples/batch_scale 200 2000`).

use std::time::Instant;

use mzcore::batch::{AcquisitionClass, BatchFile, BatchSettings, SampleKind, align};
use mzcore::compound::Compound;
use mzcore::flag::OddNominal;

/// A small deterministic generator (SplitMix64).
fn next(state: &mut u64) -> f64 {
    *state = state.wrapping_add(0x9E37_79B9_7F4A_7C15);
    let mut z = *state;
    z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
    z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
    ((z ^ (z >> 31)) >> 11) as f64 / (1u64 << 53) as f64
}

fn main() {
    let args: Vec<usize> = std::env::args().skip(1).map(|a| a.parse().expect("a number")).collect();
    let (n_files, n_compounds) =
        (args.first().copied().unwrap_or(200), args.get(1).copied().unwrap_or(2000));
    let mut rng = 17u64;
    // The batch's compounds: masses 150-800 u, times 1-20 min.
    let library: Vec<(f64, f64)> = (0..n_compounds * 3 / 2)
        .map(|_| (150.0 + 650.0 * next(&mut rng), 1.0 + 19.0 * next(&mut rng)))
        .collect();
    let files: Vec<BatchFile> = (0..n_files)
        .map(|f| {
            let drift = 0.2 * f as f64 / n_files as f64;
            // Each file holds n_compounds of the library (a random two thirds).
            let mut compounds = Vec::with_capacity(n_compounds);
            for (i, &(mass, rt)) in library.iter().enumerate() {
                if compounds.len() == n_compounds || next(&mut rng) > 0.7 {
                    continue;
                }
                let m = mass * (1.0 + 1e-6 * (next(&mut rng) - 0.5));
                let t = rt * (1.0 + drift / 20.0) + 0.01 * (next(&mut rng) - 0.5);
                compounds.push(Compound {
                    compound: i + 1,
                    rt_apex_min: t,
                    rt_start_min: t - 0.1,
                    rt_end_min: t + 0.1,
                    polarity: "+".into(),
                    ionization: "electrospray".into(),
                    resolution: "high".into(),
                    neutral_mass: Some(m),
                    nominal_mass: Some(m.round() as i64),
                    odd_nominal: OddNominal::False,
                    n_cl: 0,
                    n_br: 0,
                    halogen: false,
                    halogen_probability: 0.0,
                    molecular_ion_mz: m + 1.007_276,
                    ion_type: "[M+H]+".into(),
                    charge: 1,
                    apex_intensity: 1e5 * next(&mut rng),
                    area: 1e4 * next(&mut rng),
                    members: String::new(),
                    evidence: String::new(),
                });
            }
            BatchFile {
                name: format!("file-{f:03}"),
                path: None,
                sample: format!("file-{f:03}"),
                kind: if f % 20 == 0 { SampleKind::Blank } else { SampleKind::Sample },
                order: f,
                classes: vec![AcquisitionClass::new("+", "", "high")],
                compounds,
            }
        })
        .collect();
    let total: usize = files.iter().map(|f| f.compounds.len()).sum();
    let t0 = Instant::now();
    let alignment = align(files, &BatchSettings::default());
    let t_align = t0.elapsed().as_secs_f64();
    let n = alignment.files().len();
    let view = alignment.finish(vec![None; n]);
    let t_all = t0.elapsed().as_secs_f64();
    println!(
        "{n_files} files x {n_compounds} compounds ({total} in all, {} library): {} rows; align {t_align:.2} s, with blanks and tables {t_all:.2} s",
        library.len(),
        view.compounds().len()
    );
}
