//! Benchmarks of the chemistry core: full fine structure of a large halogenated molecule and
//! one halogen cluster model lookup.

// criterion's macros generate undocumented items.
#![allow(missing_docs)]

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use mzcore::chem::{Formula, halogen, isotopes};
use std::hint::black_box;

fn fine_structure(c: &mut Criterion) {
    let f = Formula::parse("C100H200Cl6Br4N10O20S2").expect("formula");
    let n = isotopes::fine_structure(&f, 1e-6).expect("pattern").peaks().len();
    let mut g = c.benchmark_group("fine_structure");
    g.throughput(Throughput::Elements(n as u64));
    g.bench_function("C100H200Cl6Br4N10O20S2 threshold 1e-6", |b| {
        b.iter(|| isotopes::fine_structure(black_box(&f), black_box(1e-6)).expect("pattern"))
    });
    g.finish();
}

fn cluster_lookup(c: &mut Criterion) {
    let model = halogen::ClusterModel::global();
    c.bench_function("halogen cluster model lookup", |b| {
        b.iter(|| model.expected(black_box(612.37), black_box(1), black_box(3), black_box(2)))
    });
}

criterion_group!(benches, fine_structure, cluster_lookup);
criterion_main!(benches);
