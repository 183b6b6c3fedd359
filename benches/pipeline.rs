//! Pipeline throughput (decode + centroid) on the generated 200 MB profile file with 1 and 2
//! worker threads. Goal: 2 threads at least 1.7 times the 1-thread rate.
//! Run: `cargo bench --bench pipeline` (the file is cached in target/bench-data/).

// criterion_group! generates an undocumented `pub fn`.
#![allow(missing_docs)]

#[path = "support/bigfile.rs"]
mod bigfile;

use std::hint::black_box;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use mzcore::mzml::Reader;
use mzcore::pipeline::{self, PipelineSettings};

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

criterion_group!(benches, bench);
criterion_main!(benches);
