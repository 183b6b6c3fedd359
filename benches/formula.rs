//! Benchmark of the formula candidates: enumeration, rule filters and ranking against an
//! observed cluster, for a neutral mass near 800 u at 5 ppm with C H N O S P and Cl2Br1 fixed.

// criterion's macros generate undocumented items.
#![allow(missing_docs)]

use criterion::{Criterion, criterion_group, criterion_main};
use mzcore::chem::formula_search::{self, FormulaQuery, ObservedCluster, ObservedPeak};
use mzcore::chem::isotopes::{self, Resolution};
use mzcore::chem::{Formula, IonType};
use std::hint::black_box;

fn formula_candidates(c: &mut Criterion) {
    // An invented molecule of about 800 u with two Cl and one Br, seen as [M+H]+ at R 60,000.
    let f = Formula::parse("C32H38BrCl2N3O8PS").expect("formula");
    let ion = IonType::parse("M+H").expect("ion");
    let pattern = isotopes::pattern(&f, Some(&ion), Resolution::ResolvingPower(60_000.0), 1e-4)
        .expect("pattern");
    let mono_mz = pattern.iter().find(|p| p.shell == 0).expect("M").mz;
    let cluster = ObservedCluster {
        peaks: pattern
            .iter()
            .map(|p| ObservedPeak { mz: p.mz, intensity: 1e6 * p.abundance })
            .collect(),
        mono_mz,
        charge: 1,
        resolving_power: 60_000.0,
        noise: 100.0,
    };
    let query = FormulaQuery {
        neutral_mass: f.monoisotopic_mass() * (1.0 + 2e-6),
        ppm: 5.0,
        n_cl: 2,
        n_br: 1,
        ..FormulaQuery::default()
    };
    let n = formula_search::candidates(&query, Some(&cluster)).expect("search").len();
    // CPU time of this thread per call: on a shared machine wall time also counts the time
    // other processes hold the core.
    let calls = 200;
    let start = cpu_time::ThreadTime::now();
    for _ in 0..calls {
        black_box(
            formula_search::candidates(black_box(&query), Some(black_box(&cluster)))
                .expect("search"),
        );
    }
    let per_call = start.elapsed().as_secs_f64() / f64::from(calls);
    eprintln!(
        "{n} candidates for {:.4} u; {:.3} ms CPU per call (enumeration, rules, ranking)",
        query.neutral_mass,
        per_call * 1e3
    );
    let mut g = c.benchmark_group("formula_candidates");
    g.bench_function("800 u, 5 ppm, CHNOSP + Cl2Br1, ranked against a cluster", |b| {
        b.iter(|| {
            formula_search::candidates(black_box(&query), Some(black_box(&cluster)))
                .expect("search")
        })
    });
    g.bench_function("800 u, 5 ppm, CHNOSP + Cl2Br1, enumeration and rules only", |b| {
        b.iter(|| formula_search::candidates(black_box(&query), None).expect("search"))
    });
    g.finish();
}

criterion_group!(benches, formula_candidates);
criterion_main!(benches);
