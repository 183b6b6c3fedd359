//! Formula candidates for real halogenated compounds (`tests/reference/formula_candidates.tsv`,
//! regenerated from molmass by `tests/reference/formula_candidates_reference.py`; the source of
//! each formula is named in its row): masses and low isotope shells against molmass, and the
//! ranking on simulated high-resolution clusters.
//!
//! Simulation (our own model, not a published one): the ion's isotope pattern at R 60,000
//! from `mzcore::chem::isotopes::pattern`, scaled so that M has S/N 50 over a Gaussian noise
//! of standard deviation 1; every peak gets that noise on its intensity (peaks below 3 are
//! lost) and a centroid error of width / (2 S/N) on its m/z; the whole cluster is shifted by
//! 2 ppm (sign drawn per compound). The neutral mass handed to the search comes from the
//! simulated M. Elements C H N O S P, plus F or I for the compounds that hold them (the
//! chemist requests them); Cl and Br counts and the nitrogen parity as the screening stage
//! would give them. Noise from `mzcore::synth::rng` seeded by the compound name.

use std::path::PathBuf;

use mzcore::chem::formula_search::{self, ElementSet, FormulaQuery, ObservedCluster, ObservedPeak};
use mzcore::chem::isotopes::{self, Resolution};
use mzcore::chem::{Formula, IonType, Parity};
use mzcore::synth::rng::{Rng, hash_text};

struct Row {
    category: String,
    name: String,
    formula: String,
    ion: String,
    mass: f64,
    m1: f64,
    m2: f64,
}

fn rows() -> Vec<Row> {
    let path =
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../tests/reference/formula_candidates.tsv");
    let text = std::fs::read_to_string(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
    let num = |s: &str| -> f64 { s.parse().unwrap_or_else(|_| panic!("not a number: {s}")) };
    text.lines()
        .skip(1)
        .map(|l| {
            let c: Vec<&str> = l.split('\t').collect();
            assert_eq!(c.len(), 8, "{l}");
            Row {
                category: c[0].into(),
                name: c[1].into(),
                formula: c[2].into(),
                ion: c[3].into(),
                mass: num(c[4]),
                m1: num(c[5]),
                m2: num(c[6]),
            }
        })
        .collect()
}

#[test]
fn table_holds_sixty_halogenated_compounds() {
    let rows = rows();
    let halogenated = rows
        .iter()
        .filter(|r| {
            let f = Formula::parse(&r.formula).unwrap();
            f.count("Cl") + f.count("Br") + f.count("F") + f.count("I") > 0
        })
        .count();
    assert!(halogenated >= 60, "{halogenated}");
    for cat in ["pesticide", "pcb_dioxin", "flame_retardant", "dbp", "drug"] {
        assert!(rows.iter().filter(|r| r.category == cat).count() >= 5, "{cat}");
    }
}

#[test]
fn masses_and_low_shells_match_molmass() {
    for r in rows() {
        let f = Formula::parse(&r.formula).unwrap();
        assert_eq!(f.hill(), r.formula, "{}", r.name);
        let ours = f.monoisotopic_mass();
        assert!((ours - r.mass).abs() < 1e-6, "{}: {ours} vs molmass {}", r.name, r.mass);
        let shells = formula_search::low_shells(&f);
        let sum = |k: i32| shells.iter().filter(|p| p.shell == k).map(|p| p.abundance).sum::<f64>();
        assert!(
            (sum(1) - r.m1).abs() < 2e-5 * r.m1.max(1.0),
            "{}: M+1 {} vs {}",
            r.name,
            sum(1),
            r.m1
        );
        assert!(
            (sum(2) - r.m2).abs() < 2e-5 * r.m2.max(1.0),
            "{}: M+2 {} vs {}",
            r.name,
            sum(2),
            r.m2
        );
    }
}

const RESOLVING_POWER: f64 = 60_000.0;
const SNR: f64 = 50.0;
const PPM_ERROR: f64 = 2.0;

/// The simulated cluster and the neutral mass derived from its M.
fn simulate(r: &Row) -> (ObservedCluster, f64) {
    let f = Formula::parse(&r.formula).unwrap();
    let ion = IonType::parse(&r.ion).unwrap();
    let pattern =
        isotopes::pattern(&f, Some(&ion), Resolution::ResolvingPower(RESOLVING_POWER), 1e-5)
            .unwrap();
    let mono = pattern.iter().find(|p| p.shell == 0).expect("M").abundance;
    let mut rng = Rng::new(hash_text(&r.name));
    let sign = if rng.uniform() < 0.5 { -1.0 } else { 1.0 };
    let shift = 1.0 + sign * PPM_ERROR * 1e-6;
    let mut peaks = Vec::new();
    let mut mono_mz = None;
    for p in pattern.iter().filter(|p| (0..=4).contains(&p.shell)) {
        let intensity = p.abundance / mono * SNR + rng.normal();
        if intensity < 3.0 {
            continue;
        }
        let width = p.mz / RESOLVING_POWER;
        let mz = p.mz * shift + rng.normal() * width / (2.0 * intensity);
        if p.shell == 0 {
            mono_mz = Some(mz);
        }
        peaks.push(ObservedPeak { mz, intensity });
    }
    let mono_mz = mono_mz.expect("M above the detection limit at S/N 50");
    let neutral = ion.mass_from_mz(mono_mz);
    let charge = ion.charge();
    let cluster =
        ObservedCluster { peaks, mono_mz, charge, resolving_power: RESOLVING_POWER, noise: 1.0 };
    (cluster, neutral)
}

#[test]
fn true_formula_ranks_first_on_simulated_clusters() {
    let rows = rows();
    let mut ranks: Vec<Option<usize>> = Vec::new();
    let mut counts: Vec<usize> = Vec::new();
    let mut misses = Vec::new();
    for r in &rows {
        let f = Formula::parse(&r.formula).unwrap();
        let (cluster, neutral) = simulate(r);
        let mut spec = String::from("CHNOSP");
        for extra in ["F", "I"] {
            if f.count(extra) > 0 {
                spec.push_str(extra);
            }
        }
        let query = FormulaQuery {
            neutral_mass: neutral,
            ppm: 5.0,
            n_cl: f.count("Cl"),
            n_br: f.count("Br"),
            parity: Some(Parity::of(i64::from(f.count("N")))),
            elements: ElementSet::parse(&spec).unwrap(),
            ..FormulaQuery::default()
        };
        let found = formula_search::candidates(&query, Some(&cluster)).unwrap();
        let rank = found.iter().find(|c| c.formula == r.formula).map(|c| c.rank);
        if rank != Some(1) {
            let top: Vec<String> =
                found.iter().take(3).map(|c| format!("{}:{}", c.formula, c.score)).collect();
            misses.push(format!(
                "{} ({}): rank {rank:?} of {}; top {}",
                r.name,
                r.formula,
                found.len(),
                top.join(" ")
            ));
        }
        ranks.push(rank);
        counts.push(found.len());
    }
    let n = ranks.len() as f64;
    let first = ranks.iter().filter(|r| **r == Some(1)).count() as f64 / n;
    let top5 = ranks.iter().filter(|r| r.is_some_and(|k| k <= 5)).count() as f64 / n;
    counts.sort_unstable();
    let median = counts[counts.len() / 2];
    eprintln!(
        "formula candidates, {} compounds, R {RESOLVING_POWER}, S/N {SNR}, {PPM_ERROR} ppm error, \
         5 ppm window: first {:.1} %, top five {:.1} %, median candidates {median} (max {})",
        ranks.len(),
        100.0 * first,
        100.0 * top5,
        counts[counts.len() - 1]
    );
    for m in &misses {
        eprintln!("  {m}");
    }
    assert!(first >= 0.70, "true formula first for {:.1} %", 100.0 * first);
    assert!(top5 >= 0.95, "true formula in the top five for {:.1} %", 100.0 * top5);
}
