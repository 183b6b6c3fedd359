//! Flagging throughput: `flag_spectrum` on realistic high- and unit-resolution centroid lists,
//! and feature grouping, in centroids per second.
//!
//! Spectra come from the deterministic generator of `tests/flag/synth.rs`: 1,500 random
//! background centroids (S/N 3 + Exp(1.5)) between m/z 50 and ~900 plus eight compounds
//! (Cl1 to Cl6, Br2, Br4, ClBr, a plain drug and a siloxane) at S/N 20 to 2000.
//!
//! Times are CPU time of the benchmark thread (`CLOCK_THREAD_CPUTIME_ID`, through
//! `iter_custom`), so other load on a shared machine does not inflate them; set
//! `FLAG_WALL_CLOCK=1` for wall-clock time.

#[path = "../tests/flag/synth.rs"]
mod synth;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_main};
use mzcore::centroid::{Centroid, ResolutionClass};
use mzcore::feature::FeatureBuilder;
use mzcore::flag::{FlagSettings, flag_spectrum};
use mzcore::spectrum::{Ionization, Polarity, SpectrumMeta};
use std::hint::black_box;
use std::time::{Duration, Instant};
use synth::{Res, Spec, generate};

const COMPOUNDS: [(&str, &str); 8] = [
    ("C8H14ClN5", "[M+H]+"),
    ("C14H11Cl2NO2", "[M+H]+"),
    ("C12H7Cl3O2", "[M+H]+"),
    ("C12H4Cl6", "M+."),
    ("C12H6Br4O", "M+."),
    ("C7H3Br2NO", "[M+H]+"),
    ("C15H25NO3", "[M+H]+"),
    ("C12H36O6Si6", "M+."),
];

fn spectrum(seed: u64, res: Res, background: usize) -> Vec<Centroid> {
    let mut all = generate(&Spec {
        formula: "C36H74", // reaches m/z ~ 570 + 60; background spans 50 to ~630
        ion: "M+.",
        res,
        snr: 50.0,
        seed,
        background,
        fragments: false,
    })
    .centroids;
    for (i, (f, ion)) in COMPOUNDS.iter().enumerate() {
        let snr = [20.0, 2000.0, 150.0, 60.0, 400.0, 30.0, 800.0, 100.0][i];
        all.extend(
            generate(&Spec {
                formula: f,
                ion,
                res,
                snr,
                seed: seed * 31 + i as u64,
                background: 0,
                fragments: false,
            })
            .centroids,
        );
    }
    all.sort_by(|a, b| a.mz.total_cmp(&b.mz));
    all
}

/// Runs `f` `iters` times and returns the thread CPU time (or wall time, see the docs).
fn timed(iters: u64, mut f: impl FnMut()) -> Duration {
    let wall = std::env::var_os("FLAG_WALL_CLOCK").is_some_and(|v| v != "0");
    let cpu = || cpu_time::ThreadTime::try_now().ok().map(|t| t.as_duration());
    match (wall, cpu()) {
        (false, Some(t0)) => {
            for _ in 0..iters {
                f();
            }
            cpu().map_or(Duration::ZERO, |t1| t1.saturating_sub(t0))
        }
        _ => {
            let t0 = Instant::now();
            for _ in 0..iters {
                f();
            }
            t0.elapsed()
        }
    }
}

fn bench(c: &mut Criterion) {
    let settings = FlagSettings::default();
    let meta = SpectrumMeta {
        ms_level: 1,
        polarity: Polarity::Positive,
        ionization: Ionization::Electrospray,
        ..Default::default()
    };
    let mut group = c.benchmark_group("flag_spectrum");
    for (name, res, class, background) in [
        ("high_res_1500", Res::High(60_000.0), ResolutionClass::High, 1500),
        ("unit_res_400", Res::Unit, ResolutionClass::Unit, 400),
    ] {
        let spectra: Vec<Vec<Centroid>> = (0..8).map(|s| spectrum(s, res, background)).collect();
        let n: usize = spectra.iter().map(Vec::len).sum();
        eprintln!("{name}: {} centroids per spectrum on average", n / spectra.len());
        group.throughput(Throughput::Elements(n as u64));
        group.bench_function(BenchmarkId::from_parameter(name), |b| {
            b.iter_custom(|iters| {
                timed(iters, || {
                    let mut flagged = 0;
                    for s in &spectra {
                        flagged += flag_spectrum(&meta, black_box(s), class, &settings).ions.len();
                    }
                    black_box(flagged);
                })
            })
        });
    }
    group.finish();

    // Feature grouping: 200 scans of flags from 8 distinct spectra.
    let spectra: Vec<Vec<Centroid>> =
        (0..8).map(|s| spectrum(s, Res::High(60_000.0), 1500)).collect();
    let flags: Vec<_> =
        spectra.iter().map(|s| flag_spectrum(&meta, s, ResolutionClass::High, &settings)).collect();
    let mut group = c.benchmark_group("feature_builder");
    group.throughput(Throughput::Elements(200));
    group.bench_function("200_scans", |b| {
        b.iter_custom(|iters| {
            timed(iters, || {
                let mut fb = FeatureBuilder::new(&settings);
                for i in 0..200 {
                    let m =
                        SpectrumMeta { index: i, rt_min: Some(i as f64 * 0.01), ..meta.clone() };
                    fb.push(&m, &flags[i % 8]);
                }
                black_box(fb.finish().len());
            })
        })
    });
    group.finish();
}

mod harness {
    use super::bench;
    use criterion::criterion_group;
    criterion_group!(benches, bench);
}

criterion_main!(harness::benches);
