//! A deterministic generator of centroid lists for flagging tests, the accuracy example and
//! the benchmark: formula + ion type + resolution + S/N in, centroids out.
//!
//! - Isotope peaks come from the chemistry core (`isotopes::pattern`, merged at the
//!   resolving power, or nominal shells at unit resolution), scaled so the monoisotopic peak
//!   has the requested S/N over a noise sigma of [`NOISE`].
//! - Intensity noise: additive Gaussian (sigma [`NOISE`]), shot-like Gaussian with variance
//!   `0.05 x height x NOISE`, and 2 % multiplicative; peaks below S/N 3 are dropped (a
//!   centroider's threshold).
//! - m/z noise: at high resolution a per-spectrum calibration offset (sigma 1.5 ppm) plus
//!   per-peak jitter `0.5 x FWHM / S/N + 0.3 ppm`; at unit resolution offset and jitter of
//!   0.05 u each.
//! - Background: random peaks with S/N `3 + Exp(mean 1.5)` (unit resolution: at nominal m/z
//!   plus a defect of 0 to 0.3), merged with neighbours closer than half a peak width.
//! - EI fragments (optional): M-Cl, M-Br, M-CH3 and M-HCl clusters at 20 % to 150 % of the
//!   molecular ion, when the formula has the atoms.

#![allow(dead_code)]

use mzcore::centroid::Centroid;
use mzcore::chem::isotopes::{self, Resolution};
use mzcore::chem::{Formula, IonType};

/// Noise sigma of generated spectra (intensity units).
pub const NOISE: f64 = 100.0;

/// splitmix64: small, fast, deterministic.
#[derive(Debug, Clone)]
pub struct Rng(u64);

impl Rng {
    /// A generator from a seed.
    pub fn new(seed: u64) -> Rng {
        Rng(seed ^ 0x9E37_79B9_7F4A_7C15)
    }
    /// Next 64 random bits.
    pub fn next_u64(&mut self) -> u64 {
        self.0 = self.0.wrapping_add(0x9E37_79B9_7F4A_7C15);
        let mut z = self.0;
        z = (z ^ (z >> 30)).wrapping_mul(0xBF58_476D_1CE4_E5B9);
        z = (z ^ (z >> 27)).wrapping_mul(0x94D0_49BB_1331_11EB);
        z ^ (z >> 31)
    }
    /// Uniform in [0, 1).
    pub fn uniform(&mut self) -> f64 {
        (self.next_u64() >> 11) as f64 / (1u64 << 53) as f64
    }
    /// Standard normal (Box-Muller).
    pub fn normal(&mut self) -> f64 {
        let u1 = self.uniform().max(1e-300);
        let u2 = self.uniform();
        (-2.0 * u1.ln()).sqrt() * (2.0 * std::f64::consts::PI * u2).cos()
    }
    /// Exponential with the given mean.
    pub fn exp(&mut self, mean: f64) -> f64 {
        -mean * (1.0 - self.uniform()).ln()
    }
}

/// Resolution of a generated spectrum.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Res {
    /// High resolution with this resolving power (m / FWHM).
    High(f64),
    /// Unit resolution (FWHM 0.6 u).
    Unit,
}

/// What to generate.
#[derive(Debug, Clone)]
pub struct Spec<'a> {
    /// Molecular formula.
    pub formula: &'a str,
    /// Ion type, e.g. `[M+H]+` or `M+.`.
    pub ion: &'a str,
    /// Resolution.
    pub res: Res,
    /// S/N of the monoisotopic peak.
    pub snr: f64,
    /// Random seed.
    pub seed: u64,
    /// Number of random background peaks.
    pub background: usize,
    /// Add EI fragment clusters.
    pub fragments: bool,
}

/// A generated spectrum and its truth.
#[derive(Debug, Clone)]
pub struct Generated {
    /// Centroids sorted by m/z.
    pub centroids: Vec<Centroid>,
    /// True m/z of the monoisotopic ion.
    pub mono_mz: f64,
    /// The molecule.
    pub formula: Formula,
}

/// Pattern of `f` as `ion` at `res`: (m/z, abundance relative to the monoisotopic peak).
fn pattern(f: &Formula, ion: &IonType, res: Res) -> Vec<(f64, f64)> {
    let r = match res {
        Res::High(r) => Resolution::ResolvingPower(r),
        Res::Unit => Resolution::Shells,
    };
    let p = isotopes::pattern(f, Some(ion), r, 1e-5).expect("pattern");
    let mono = p.iter().filter(|q| q.shell == 0).map(|q| q.abundance).fold(0.0, f64::max);
    p.iter().map(|q| (q.mz, q.abundance / mono)).collect()
}

/// Generates one spectrum (see the module docs).
pub fn generate(spec: &Spec) -> Generated {
    let mut rng = Rng::new(spec.seed);
    let f = Formula::parse(spec.formula).expect("formula");
    let ion = IonType::parse(spec.ion).expect("ion type");
    let mono_mz = ion.mz(&f).expect("ion m/z");
    let top = spec.snr * NOISE;
    // True peaks: (m/z, height).
    let mut truth: Vec<(f64, f64)> =
        pattern(&f, &ion, spec.res).into_iter().map(|(mz, a)| (mz, a * top)).collect();
    if spec.fragments {
        let losses = [("Cl", "Cl"), ("Br", "Br"), ("CH3", "C"), ("HCl", "Cl")];
        for (loss, needs) in losses {
            if f.count(needs) == 0 || (loss.contains('H') && f.count("H") < 3) {
                continue;
            }
            let Ok(frag) = f.minus(&Formula::parse(loss).expect("loss")) else { continue };
            if frag.is_empty() || frag.monoisotopic_mass() < 30.0 {
                continue;
            }
            let scale = top * (0.2 + 1.3 * rng.uniform());
            for (mz, a) in pattern(&frag, &ion, spec.res) {
                truth.push((mz, a * scale));
            }
        }
    }
    let hi_mz = mono_mz + 60.0;
    for _ in 0..spec.background {
        let mz = match spec.res {
            Res::High(_) => 50.0 + rng.uniform() * (hi_mz - 50.0),
            Res::Unit => (50.0 + rng.uniform() * (hi_mz - 50.0)).floor() + 0.3 * rng.uniform(),
        };
        truth.push((mz, NOISE * (3.0 + rng.exp(1.5))));
    }
    let calib = match spec.res {
        Res::High(_) => 1.5e-6 * rng.normal(),
        Res::Unit => 0.05 * rng.normal(),
    };
    let mut out: Vec<Centroid> = Vec::with_capacity(truth.len());
    for (mz, h) in truth {
        let obs = h * (1.0 + 0.02 * rng.normal())
            + (0.05 * h * NOISE).sqrt() * rng.normal()
            + NOISE * rng.normal();
        let snr = obs / NOISE;
        if snr < 3.0 {
            continue;
        }
        let (mz_obs, fwhm) = match spec.res {
            Res::High(r) => {
                let w = mz / r;
                let s = 0.5 * w / (h / NOISE).max(1.0) + 0.3e-6 * mz;
                (mz * (1.0 + calib) + s * rng.normal(), w * (1.0 + 0.05 * rng.normal()))
            }
            Res::Unit => (mz + calib + 0.05 * rng.normal(), 0.6),
        };
        out.push(Centroid { mz: mz_obs, intensity: obs, area: obs * fwhm * 1.064, snr, fwhm });
    }
    out.sort_by(|a, b| a.mz.total_cmp(&b.mz));
    // Merge peaks closer than half a width (unresolved).
    let mut merged: Vec<Centroid> = Vec::with_capacity(out.len());
    for c in out {
        if let Some(last) = merged.last_mut() {
            if c.mz - last.mz < 0.5 * last.fwhm.max(c.fwhm) {
                let w = last.intensity + c.intensity;
                last.mz = (last.mz * last.intensity + c.mz * c.intensity) / w;
                last.intensity = w;
                last.area += c.area;
                last.snr = w / NOISE;
                continue;
            }
        }
        merged.push(c);
    }
    Generated { centroids: merged, mono_mz, formula: f }
}
