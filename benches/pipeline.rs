//! Pipeline throughput (decode + centroid) on the generated 200 MB profile file with 1 and 2
//! worker threads. Goal: 2 threads at least 1.7 times the 1-thread rate.
//!
//! Second group: what flagging and feature grouping add, on a 200 MB synthetic
//! high-resolution acquisition (the demo's negative-mode LC run at 1,040 MS1 scans of 40,000
//! points, with its DDA scans): decode + centroid against decode + centroid + flag + features,
//! both with 2 workers. Goal: at most 20 % more time.
//!
//! Third: what the compound stage adds on top (related ions listed while flagging, then
//! co-elution grouping, relations and evidence): decode + centroid + flag + features against
//! the same plus compounds, as `mzsift run` does. Goal: at most 10 % more time.
//!
//! Run: `cargo bench --bench pipeline` (the files are cached in target/bench-data/).

// criterion_group! generates an undocumented `pub fn`.
#![allow(missing_docs)]

#[path = "support/bigfile.rs"]
mod bigfile;

use std::hint::black_box;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use mzcore::compound::{self, CompoundSettings, Relations};
use mzcore::feature::FeatureBuilder;
use mzcore::flag::{FlagSettings, flag_spectrum_related};
use mzcore::mzml::Reader;
use mzcore::pipeline::{self, PipelineSettings};
use mzcore::synth::{self, Scenario, SizeOptions};

fn run(path: &std::path::Path, pool: &rayon::ThreadPool) -> usize {
    let mut reader = Reader::from_path(path).unwrap();
    let mut peaks = 0;
    pipeline::run(
        &mut reader,
        pool,
        &PipelineSettings::default(),
        |_| (),
        |r| {
            peaks += r?.0.centroids.len();
            Ok(())
        },
    )
    .unwrap();
    peaks
}

/// The synthetic high-resolution acquisition of about 200 MB, generated once.
fn cached_hr() -> std::path::PathBuf {
    const RUN: &str = "DRWL0417-04_lc-neg_fennick-cross-effluent";
    let dir = std::path::Path::new(env!("CARGO_MANIFEST_DIR")).join("../target/bench-data/hr");
    let path = dir.join(format!("{RUN}.mzML"));
    if !path.exists() {
        let size =
            SizeOptions { ms1_scans: Some(1040), points: Some(40_000), ..Default::default() };
        synth::generate(&Scenario::demo(), &dir, size, &[RUN.to_owned()]).unwrap();
    }
    path
}

/// What [`screen`] does after decode + centroid.
#[derive(Clone, Copy, PartialEq)]
enum Stage {
    /// Nothing more.
    Centroid,
    /// Flagging on the workers and feature grouping in file order.
    Features,
    /// As `Features`, with related ions listed, then the compound stage.
    Compounds,
}

/// Decode + centroid and the stages of `stage`; returns the number of compounds, features or
/// centroids.
fn screen(path: &std::path::Path, pool: &rayon::ThreadPool, stage: Stage) -> usize {
    let mut reader = Reader::from_path(path).unwrap();
    let settings = FlagSettings::default();
    let mut features = FeatureBuilder::new(&settings);
    let relations = Relations::defaults();
    let mut centroids = 0;
    let mut ms1 = 0;
    pipeline::run(
        &mut reader,
        pool,
        &PipelineSettings::default(),
        move |p| {
            let related = (stage == Stage::Compounds).then_some(&relations);
            (stage != Stage::Centroid).then(|| {
                flag_spectrum_related(&p.meta, &p.centroids, p.resolution, &settings, related)
            })
        },
        |r| {
            let (p, flags) = r?;
            centroids += p.centroids.len();
            ms1 += usize::from(p.meta.ms_level <= 1);
            if let Some(f) = flags {
                features.push(&p.meta, &f);
            }
            Ok(())
        },
    )
    .unwrap();
    match stage {
        Stage::Centroid => centroids,
        Stage::Features => features.finish().len(),
        Stage::Compounds => {
            let mut f = features.finish();
            compound::group(&mut f, ms1, "esi", &CompoundSettings::default())
                .unwrap()
                .compounds
                .len()
        }
    }
}

fn bench_flagging(c: &mut Criterion) {
    let path = cached_hr();
    let bytes = std::fs::metadata(&path).unwrap().len();
    let pool = pipeline::thread_pool(2).unwrap();
    let mut g = c.benchmark_group("screening_hr_200mb");
    g.sample_size(10);
    g.throughput(Throughput::Bytes(bytes));
    g.bench_function("decode_centroid_2_threads", |b| {
        b.iter(|| black_box(screen(&path, &pool, Stage::Centroid)))
    });
    g.bench_function("decode_centroid_flag_features_2_threads", |b| {
        b.iter(|| black_box(screen(&path, &pool, Stage::Features)))
    });
    g.bench_function("decode_centroid_flag_features_compounds_2_threads", |b| {
        b.iter(|| black_box(screen(&path, &pool, Stage::Compounds)))
    });
    g.finish();
}

fn bench(c: &mut Criterion) {
    let path = bigfile::cached(200);
    let bytes = std::fs::metadata(&path).unwrap().len();
    let mut g = c.benchmark_group("pipeline_200mb");
    g.sample_size(10);
    g.throughput(Throughput::Bytes(bytes));
    for threads in [1, 2] {
        let pool = pipeline::thread_pool(threads).unwrap();
        g.bench_function(format!("decode_centroid_{threads}_threads"), |b| {
            b.iter(|| black_box(run(&path, &pool)))
        });
    }
    g.finish();
}

criterion_group!(benches, bench, bench_flagging);
criterion_main!(benches);
