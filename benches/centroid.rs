//! Centroiding throughput in profile points per second.
//!
//! Spectra: 20,000 points, resolving power 60,000, 7 points per FWHM, mostly baseline noise
//! with 150 peaks of S/N 5 to 2000 (see `tests/centroid/profiles.rs`).

#[path = "../tests/centroid/profiles.rs"]
mod profiles;

use criterion::{BenchmarkId, Criterion, Throughput, criterion_main};
use mzcore::centroid::{CentroidParams, Centroider, NoiseMethod};
use std::hint::black_box;

fn bench(c: &mut Criterion) {
    let spectra: Vec<profiles::Synth> =
        (0..8).map(|seed| profiles::busy(seed, 20_000, 150)).collect();
    let points: usize = spectra.iter().map(|s| s.mz.len()).sum();
    let mut group = c.benchmark_group("centroid_profile");
    group.throughput(Throughput::Elements(points as u64));
    for (name, noise) in
        [("global", NoiseMethod::Global), ("sliding_1000", NoiseMethod::Sliding { window: 1000 })]
    {
        let params = CentroidParams { noise, ..CentroidParams::default() };
        let mut picker = Centroider::new();
        let mut out = Vec::new();
        group.bench_function(BenchmarkId::from_parameter(name), |b| {
            b.iter(|| {
                let mut found = 0;
                for s in &spectra {
                    picker.centroid_profile(
                        black_box(&s.mz),
                        black_box(&s.intensity),
                        &params,
                        &mut out,
                    );
                    found += out.len();
                }
                black_box(found)
            })
        });
    }
    group.finish();
}

mod harness {
    use super::bench;
    use criterion::criterion_group;
    criterion_group!(benches, bench);
}

criterion_main!(harness::benches);
