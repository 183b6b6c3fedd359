//! Fits the calibration of the compound stage's halogen probability
//! ([`mzcore::compound::CALIBRATION`]) by logistic regression on generated acquisitions with
//! known truth, and prints the reliability table on the training seeds and on held-out seeds.
//!
//! `cargo run --release -p mzcore --example calibrate_halogen -- OUTDIR [SCENARIO.toml ...]`
//!
//! Without scenario files it uses the demo batch, `tests/flag/acceptance.toml` and
//! `tests/compound/grouping.toml` (run from the repository root). Each scenario is generated
//! with seeds base+1 to base+3 (training) and base+4, base+5 (held out) into OUTDIR.

// Small dense linear algebra reads best with explicit indexes.
#![allow(clippy::needless_range_loop)]

use std::path::{Path, PathBuf};

use mzcore::compound::{
    self, CALIBRATION, CompoundSettings, calibrated_probability, calibration_inputs,
};
use mzcore::screen::{ScreenConfig, screen_file};
use mzcore::synth::evaluate::{halogen_truth, truth_runs};
use mzcore::synth::{Scenario, SizeOptions, generate};

type Sample = ([f64; 7], bool);

fn samples(
    dir: &Path,
    pool: &rayon::ThreadPool,
) -> Result<Vec<(Sample, compound::Evidence)>, Box<dyn std::error::Error>> {
    let config = ScreenConfig::default();
    let settings = CompoundSettings::default();
    let mut out = Vec::new();
    for (path, truth) in truth_runs(dir)? {
        let report = screen_file(&path, &config, pool)?;
        let ionization = report.compounds.first().map_or(String::new(), |c| c.ionization.clone());
        let mut features = report.features;
        let g = compound::group(&mut features, report.summary.ms1, &ionization, &settings)?;
        for (c, e) in g.compounds.iter().zip(&g.evidence) {
            if let Some(right) = halogen_truth(&truth, c) {
                out.push(((calibration_inputs(e), right), *e));
            }
        }
    }
    Ok(out)
}

/// Logistic regression by iteratively reweighted least squares with a small ridge.
fn fit(data: &[Sample]) -> [f64; 7] {
    let mut w = [0.0; 7];
    for _ in 0..50 {
        let mut g = [0.0; 7];
        let mut h = [[0.0; 7]; 7];
        for (x, y) in data {
            let z: f64 = w.iter().zip(x).map(|(a, b)| a * b).sum();
            let p = 1.0 / (1.0 + (-z).exp());
            let r = p - f64::from(u8::from(*y));
            let v = (p * (1.0 - p)).max(1e-9);
            for i in 0..7 {
                g[i] += r * x[i];
                for j in 0..7 {
                    h[i][j] += v * x[i] * x[j];
                }
            }
        }
        for i in 0..7 {
            g[i] += 1e-2 * w[i];
            h[i][i] += 1e-2;
        }
        let step = solve(h, g);
        for i in 0..7 {
            w[i] -= step[i];
        }
        if step.iter().map(|s| s.abs()).fold(0.0, f64::max) < 1e-9 {
            break;
        }
    }
    w
}

/// Solves `a x = b` by Gaussian elimination with partial pivoting.
fn solve(mut a: [[f64; 7]; 7], mut b: [f64; 7]) -> [f64; 7] {
    for c in 0..7 {
        let p = (c..7).max_by(|&i, &j| a[i][c].abs().total_cmp(&a[j][c].abs())).unwrap_or(c);
        a.swap(c, p);
        b.swap(c, p);
        let d = a[c][c];
        if d.abs() < 1e-12 {
            continue;
        }
        for r in 0..7 {
            if r != c {
                let f = a[r][c] / d;
                for k in 0..7 {
                    a[r][k] -= f * a[c][k];
                }
                b[r] -= f * b[c];
            }
        }
    }
    let mut x = [0.0; 7];
    for i in 0..7 {
        x[i] = if a[i][i].abs() < 1e-12 { 0.0 } else { b[i] / a[i][i] };
    }
    x
}

fn table(name: &str, data: &[(Sample, compound::Evidence)], w: &[f64; 7]) {
    println!("{name}: {} calls with a Cl/Br hypothesis", data.len());
    println!("   bin        calls  mean p  observed right");
    let edges = [0.0, 0.5, 0.7, 0.9, 0.99, 1.0];
    for k in 0..edges.len() - 1 {
        let (lo, hi) = (edges[k], edges[k + 1]);
        let last = k + 2 == edges.len();
        let inside: Vec<(f64, bool)> = data
            .iter()
            .map(|(s, e)| (calibrated_probability(e, w), s.1))
            .filter(|(p, _)| *p >= lo && (*p < hi || (last && *p <= hi)))
            .collect();
        let n = inside.len();
        let mean = inside.iter().map(|x| x.0).sum::<f64>() / n.max(1) as f64;
        let right = inside.iter().filter(|x| x.1).count() as f64 / n.max(1) as f64;
        println!("  {lo:.2}-{hi:.2}  {n:>6}  {mean:.3}   {right:.3}");
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let mut args = std::env::args().skip(1);
    let out =
        PathBuf::from(args.next().ok_or("usage: calibrate_halogen OUTDIR [SCENARIO.toml ...]")?);
    let mut scenarios: Vec<Scenario> = args
        .map(|p| Scenario::from_toml(&std::fs::read_to_string(p)?).map_err(Into::into))
        .collect::<Result<_, Box<dyn std::error::Error>>>()?;
    if scenarios.is_empty() {
        scenarios.push(Scenario::demo());
        for p in ["tests/flag/acceptance.toml", "tests/compound/grouping.toml"] {
            scenarios.push(Scenario::from_toml(&std::fs::read_to_string(p)?)?);
        }
    }
    let pool = mzcore::pipeline::thread_pool(0)?;
    let (mut train, mut held) = (Vec::new(), Vec::new());
    for (i, base) in scenarios.iter().enumerate() {
        for k in 1..=5u64 {
            let mut s = base.clone();
            s.seed = base.seed.wrapping_add(k);
            let dir = out.join(format!("s{i}-seed{k}"));
            if !dir.exists() {
                generate(&s, &dir, SizeOptions::default(), &[])?;
            }
            let got = samples(&dir, &pool)?;
            if k <= 3 { train.extend(got) } else { held.extend(got) }
        }
    }
    let data: Vec<Sample> = train.iter().map(|(s, _)| *s).collect();
    let w = fit(&data);
    println!("fitted coefficients: {w:?}");
    println!("in force (CALIBRATION): {CALIBRATION:?}");
    table("training seeds, in force", &train, &CALIBRATION);
    table("held-out seeds, in force", &held, &CALIBRATION);
    table("training seeds, fitted", &train, &w);
    table("held-out seeds, fitted", &held, &w);
    Ok(())
}
