//! One run made concrete: the compound ions with their isotope patterns, the scan schedule
//! (MS1 and data-dependent MS2), and the spectra themselves, generated on demand and
//! deterministically from the run's seed and the scan number.

use std::io::Write;

use rayon::prelude::*;

use super::rng::{self, Rng};
use super::scenario::{
    Background, Instrument, Output, ResolvingPower, Run, ScanPolarity, Scenario, Source, config,
    parse_encoding,
};
use super::shape::Elution;
use crate::chem::{Formula, IonType, isotopes};
use crate::error::Result;
use crate::mzml::binary::BinaryEncoding;
use crate::mzml::{EncodedPeaks, Writer, WriterOptions};
use crate::spectrum::{Ionization, Peaks, Polarity, Precursor, Representation, SpectrumMeta};

/// Relative threshold of the fine structure computed for every ion (1e-5 of the tallest).
const FINE_THRESHOLD: f64 = 1e-5;
/// Most profile points one spectrum may have on its full grid.
pub const MAX_GRID_POINTS: usize = 50_000_000;
/// 4 ln 2: a Gaussian of FWHM w is `exp(-GAUSS * (x - m)^2 / w^2)`.
const GAUSS: f64 = 4.0 * std::f64::consts::LN_2;
/// Half-width of the window a peak is sampled over, in FWHM (the tail there is 3e-8).
const WINDOW_FWHM: f64 = 2.5;

/// Size and encoding overrides for benchmark inputs.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct SizeOptions {
    /// MS1 scans per run (each possibly followed by MS2 scans), instead of scan rate x time.
    pub ms1_scans: Option<usize>,
    /// Points per spectrum: profile spectra are written on the full m/z grid with exactly
    /// this many points (no dropped zeros); centroid spectra are filled up with noise peaks.
    pub points: Option<usize>,
    /// Encoding of m/z arrays instead of the instrument's.
    pub mz_encoding: Option<BinaryEncoding>,
    /// Encoding of intensity arrays instead of the instrument's.
    pub intensity_encoding: Option<BinaryEncoding>,
}

/// A compound ion of one run with its isotope pattern and elution profile.
#[derive(Debug, Clone)]
pub struct Species {
    /// Compound name.
    pub name: String,
    /// Neutral formula.
    pub formula: Formula,
    /// Ion type.
    pub ion: IonType,
    /// Monoisotopic ion m/z.
    pub mz: f64,
    /// m/z of the tallest peak of the molecular ion's cluster (the MS2 precursor).
    pub precursor_mz: f64,
    /// Elution profile.
    pub elution: Elution,
    /// Apex height of the tallest peak of the molecular ion's cluster.
    pub abundance: f64,
    /// Molecular ion cluster as (m/z, height relative to its tallest peak).
    pub cluster: Vec<(f64, f64)>,
    /// Fragment peaks in MS1 (electron ionization), relative to the cluster's tallest peak.
    pub ms1_fragments: Vec<(f64, f64)>,
    /// Monoisotopic product ions in MS2, relative intensity (1 = 100 %).
    pub products: Vec<(f64, f64)>,
    /// `molecular` for the compound's main ion, `adduct` for a further ion of the run.
    pub role: &'static str,
    /// Elemental composition of the ion.
    pub ion_formula: Formula,
    /// EI fragment ions given by formula: monoisotopic m/z and composition.
    pub fragment_ions: Vec<(f64, Formula)>,
}

impl Species {
    /// Height of the monoisotopic peak relative to the cluster's tallest peak: the cluster
    /// entry nearest the monoisotopic m/z.
    pub fn mono_relative(&self) -> f64 {
        self.cluster
            .iter()
            .min_by(|a, b| (a.0 - self.mz).abs().total_cmp(&(b.0 - self.mz).abs()))
            .map_or(0.0, |&(_, r)| r)
    }
}

/// What a scheduled scan is.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Scan {
    /// A survey scan at a retention time (minutes).
    Ms1 {
        /// Retention time in minutes.
        rt: f64,
    },
    /// A product-ion scan of one species.
    Ms2 {
        /// Retention time in minutes.
        rt: f64,
        /// Index into [`Acquisition::species`].
        species: usize,
        /// Selected precursor m/z.
        precursor_mz: f64,
    },
}

/// The m/z sampling grid of profile spectra.
#[derive(Debug, Clone, Copy, PartialEq)]
enum Grid {
    /// Constant relative spacing (constant resolving power): `mz0 * exp(k * ln_step)`.
    Relative { mz0: f64, ln_step: f64 },
    /// Constant spacing (unit resolution): `mz0 + k * step`.
    Linear { mz0: f64, step: f64 },
}

impl Grid {
    fn mz(&self, k: i64) -> f64 {
        match *self {
            Grid::Relative { mz0, ln_step } => mz0 * (k as f64 * ln_step).exp(),
            Grid::Linear { mz0, step } => mz0 + k as f64 * step,
        }
    }

    fn index(&self, mz: f64) -> f64 {
        match *self {
            Grid::Relative { mz0, ln_step } => (mz / mz0).ln() / ln_step,
            Grid::Linear { mz0, step } => (mz - mz0) / step,
        }
    }
}

/// A run ready to generate: instrument, species, background and the scan schedule.
#[derive(Debug, Clone)]
pub struct Acquisition {
    run: Run,
    instrument: Instrument,
    seed: u64,
    species: Vec<Species>,
    /// Background peaks as (m/z, height).
    background: Vec<(f64, f64)>,
    scans: Vec<Scan>,
    grid: Grid,
    /// Number of grid points when the full grid is written.
    full_grid: Option<usize>,
    /// Fill centroid spectra up to this many points.
    fill_centroids: Option<usize>,
    options: WriterOptions,
}

fn default_ion(inst: &Instrument) -> &'static str {
    match (inst.ionization, inst.polarity) {
        (Source::Ei, ScanPolarity::Positive) => "M+.",
        (Source::Ei, ScanPolarity::Negative) => "M-.",
        (Source::Esi, ScanPolarity::Positive) => "M+H",
        (Source::Esi, ScanPolarity::Negative) => "M-H",
    }
}

fn radical(inst: &Instrument) -> IonType {
    let name = if inst.polarity == ScanPolarity::Positive { "M+." } else { "M-." };
    IonType::parse(name).expect("built-in ion type parses")
}

/// Isotope cluster of `atoms` (ion composition) as (m/z, relative to tallest).
fn cluster(atoms: &Formula, ion: &IonType, inst: &Instrument) -> Result<Vec<(f64, f64)>> {
    let peaks: Vec<isotopes::Peak> = match inst.resolving_power {
        ResolvingPower::Named(_) => isotopes::shells(atoms, FINE_THRESHOLD)?,
        ResolvingPower::Value(r) => {
            let fine = isotopes::fine_structure(atoms, FINE_THRESHOLD)?;
            // Isotopologues closer than a quarter of the FWHM are indistinguishable in the
            // sampled shape: merge them to keep the stick list short.
            isotopes::aggregate(fine.peaks(), 4.0 * r)
        }
    };
    let max = peaks.iter().map(|p| p.abundance).fold(0.0, f64::max);
    Ok(peaks.iter().map(|p| (ion.mass_to_mz(p.mass), p.abundance / max)).collect())
}

fn tallest(c: &[(f64, f64)]) -> f64 {
    c.iter().copied().fold((0.0, -1.0), |b, p| if p.1 > b.1 { p } else { b }).0
}

fn check(ok: bool, msg: impl FnOnce() -> String) -> Result<()> {
    if ok { Ok(()) } else { Err(config(msg())) }
}

fn check_instrument(name: &str, i: &Instrument) -> Result<()> {
    let f = |v: f64| v.is_finite() && v > 0.0;
    check(f(i.mz_min) && i.mz_max > i.mz_min && i.mz_max.is_finite(), || {
        format!("instrument {name}: need 0 < mz_min < mz_max")
    })?;
    check(f(i.scan_rate_hz), || format!("instrument {name}: scan_rate_hz must be positive"))?;
    check(i.rt_end_min > i.rt_start_min && i.rt_start_min >= 0.0, || {
        format!("instrument {name}: need 0 <= rt_start_min < rt_end_min")
    })?;
    check(f(i.points_per_fwhm), || format!("instrument {name}: points_per_fwhm must be positive"))?;
    check(f(i.unit_fwhm), || format!("instrument {name}: unit_fwhm must be positive"))?;
    if let ResolvingPower::Value(r) = i.resolving_power {
        check(f(r), || format!("instrument {name}: resolving_power must be positive or \"unit\""))?;
    }
    let n = &i.noise;
    check(
        [n.shot, n.baseline, n.baseline_sd, n.grass_intensity, n.mz_sd_ppm, i.drop_below]
            .iter()
            .all(|v| v.is_finite() && *v >= 0.0),
        || format!("instrument {name}: noise levels and drop_below must be >= 0"),
    )?;
    check(i.ms2_isolation_width > 0.0 && i.ms2_exclusion_min >= 0.0, || {
        format!("instrument {name}: need ms2_isolation_width > 0 and ms2_exclusion_min >= 0")
    })
}

fn valid_name(s: &str) -> bool {
    !s.is_empty() && !s.contains(['\t', '\n', '\r'])
}

impl Acquisition {
    /// Prepares run `run` of `scenario` with optional size overrides.
    pub fn new(scenario: &Scenario, run: &Run, size: SizeOptions) -> Result<Acquisition> {
        check(
            valid_name(&run.file)
                && !run.file.contains(['/', '\\'])
                && run.file != "."
                && run.file != "..",
            || format!("run file '{}' must be a plain file stem", run.file),
        )?;
        let inst = scenario
            .instruments
            .get(&run.instrument)
            .ok_or_else(|| config(format!("run {}: no instrument '{}'", run.file, run.instrument)))?
            .clone();
        check_instrument(&run.instrument, &inst)?;
        let seed = rng::mix(scenario.seed, rng::hash_text(&run.file));
        let mut species = Vec::new();
        for rc in &run.compounds {
            let c = scenario.compound(&rc.name).ok_or_else(|| {
                config(format!("run {}: '{}' is not in the compound library", run.file, rc.name))
            })?;
            check(valid_name(&c.name), || format!("compound name '{}' is not usable", c.name))?;
            check(rc.width_min > 0.0 && rc.tailing_min >= 0.0 && rc.abundance >= 0.0, || {
                format!(
                    "run {}, {}: need width_min > 0, tailing_min >= 0, abundance >= 0",
                    run.file, rc.name
                )
            })?;
            let formula = Formula::parse(&c.formula)?;
            let ion = IonType::parse(rc.ion.as_deref().unwrap_or(default_ion(&inst)))?;
            let want = if inst.polarity == ScanPolarity::Positive { 1 } else { -1 };
            check(ion.charge().signum() == want, || {
                format!("run {}, {}: ion {ion} does not match the polarity", run.file, rc.name)
            })?;
            let mz = ion.mz(&formula)?;
            let cl = cluster(&ion.ion_formula(&formula)?, &ion, &inst)?;
            let rad = radical(&inst);
            let mut ms1_fragments = Vec::new();
            let mut products = Vec::new();
            let mut fragment_ions = Vec::new();
            for fr in &c.fragments {
                let rel = fr.relative / 100.0;
                match (&fr.formula, fr.mz) {
                    (Some(f), None) => {
                        let atoms = Formula::parse(f)?;
                        products.push((rad.mz(&atoms)?, rel));
                        fragment_ions.push((rad.mz(&atoms)?, atoms.clone()));
                        for (m, r) in cluster(&atoms, &rad, &inst)? {
                            ms1_fragments.push((m, r * rel));
                        }
                    }
                    (None, Some(m)) if m > 0.0 => {
                        products.push((m, rel));
                        ms1_fragments.push((m, rel));
                    }
                    _ => {
                        return Err(config(format!(
                            "compound {}: each fragment needs exactly one of formula or mz",
                            c.name
                        )));
                    }
                }
            }
            if inst.ionization != Source::Ei {
                ms1_fragments.clear();
                fragment_ions.clear();
            }
            let elution = Elution::new(rc.rt_apex_min, rc.width_min, rc.tailing_min);
            for extra in &rc.adducts {
                check(extra.relative >= 0.0, || {
                    format!("run {}, {}: adduct relative must be >= 0", run.file, rc.name)
                })?;
                let a = IonType::parse(&extra.ion)?;
                check(a.charge().signum() == want, || {
                    format!("run {}, {}: ion {a} does not match the polarity", run.file, rc.name)
                })?;
                let atoms = a.ion_formula(&formula)?;
                let acl = cluster(&atoms, &a, &inst)?;
                species.push(Species {
                    name: c.name.clone(),
                    precursor_mz: tallest(&acl),
                    formula: formula.clone(),
                    mz: a.mz(&formula)?,
                    ion: a,
                    elution,
                    abundance: rc.abundance * extra.relative / 100.0,
                    cluster: acl,
                    ms1_fragments: Vec::new(),
                    products: Vec::new(),
                    role: "adduct",
                    ion_formula: atoms,
                    fragment_ions: Vec::new(),
                });
            }
            species.push(Species {
                name: c.name.clone(),
                precursor_mz: tallest(&cl),
                ion_formula: ion.ion_formula(&formula)?,
                formula,
                ion,
                mz,
                elution,
                abundance: rc.abundance,
                cluster: cl,
                ms1_fragments,
                products,
                role: "molecular",
                fragment_ions,
            });
        }
        let mut background = Vec::new();
        for b in inst.background.iter().chain(&run.background) {
            background.extend(background_peaks(b, &inst)?);
        }
        background.retain(|p| p.0 >= inst.mz_min && p.0 <= inst.mz_max);

        let ppf = inst.points_per_fwhm;
        let mut grid = match inst.resolving_power {
            ResolvingPower::Value(r) => {
                Grid::Relative { mz0: inst.mz_min, ln_step: (1.0 / (r * ppf)).ln_1p() }
            }
            ResolvingPower::Named(_) => {
                Grid::Linear { mz0: inst.mz_min, step: inst.unit_fwhm / ppf }
            }
        };
        let profile = inst.output == Output::Profile;
        let mut full_grid = None;
        let mut fill_centroids = None;
        match (profile, size.points) {
            (true, Some(n)) => {
                check((2..=MAX_GRID_POINTS).contains(&n), || {
                    format!("points per spectrum must be 2 to {MAX_GRID_POINTS}")
                })?;
                let span = (n - 1) as f64;
                grid = match grid {
                    Grid::Relative { mz0, .. } => {
                        Grid::Relative { mz0, ln_step: (inst.mz_max / mz0).ln() / span }
                    }
                    Grid::Linear { mz0, .. } => {
                        Grid::Linear { mz0, step: (inst.mz_max - mz0) / span }
                    }
                };
                full_grid = Some(n);
            }
            (true, None) if !inst.dropped_zeros => {
                let n = grid.index(inst.mz_max).floor() as usize + 1;
                check(n <= MAX_GRID_POINTS, || {
                    format!(
                        "run {}: the full profile grid would have {n} points per spectrum; \
                         use dropped_zeros or fewer points_per_fwhm",
                        run.file
                    )
                })?;
                full_grid = Some(n);
            }
            (false, Some(n)) => fill_centroids = Some(n),
            _ => {}
        }
        let options = WriterOptions {
            spectrum_count: 0,
            mz_encoding: match size.mz_encoding {
                Some(e) => e,
                None => parse_encoding(&inst.encoding.mz)?,
            },
            intensity_encoding: match size.intensity_encoding {
                Some(e) => e,
                None => parse_encoding(&inst.encoding.intensity)?,
            },
            indexed: true,
            ionization: match inst.ionization {
                Source::Ei => Ionization::Electron,
                Source::Esi => Ionization::Electrospray,
            },
            param_groups: false,
            tic_chromatogram: true,
            run_id: run.file.clone(),
            rt_in_seconds: inst.rt_in_seconds,
        };
        let mut acq = Acquisition {
            run: run.clone(),
            instrument: inst,
            seed,
            species,
            background,
            scans: Vec::new(),
            grid,
            full_grid,
            fill_centroids,
            options,
        };
        acq.schedule(size.ms1_scans)?;
        acq.options.spectrum_count = acq.scans.len();
        Ok(acq)
    }

    /// Plans MS1 scans at the scan rate and data-dependent MS2 of the top N species.
    fn schedule(&mut self, ms1_scans: Option<usize>) -> Result<()> {
        let inst = &self.instrument;
        let duration = inst.rt_end_min - inst.rt_start_min;
        let n = match ms1_scans {
            Some(n) => n,
            None => (duration * 60.0 * inst.scan_rate_hz).round() as usize,
        }
        .max(1);
        check(n <= 100_000_000, || "too many scans".into())?;
        let cycle = duration / n as f64;
        let top_n = inst.ms2_top_n;
        let mut excluded_until = vec![f64::NEG_INFINITY; self.species.len()];
        let mut scans = Vec::with_capacity(n);
        for i in 0..n {
            let rt = inst.rt_start_min + i as f64 * cycle;
            scans.push(Scan::Ms1 { rt });
            if top_n == 0 {
                continue;
            }
            let mut cand: Vec<(f64, usize)> = self
                .species
                .iter()
                .enumerate()
                .filter(|(j, s)| {
                    excluded_until[*j] <= rt
                        && s.precursor_mz >= inst.mz_min
                        && s.precursor_mz <= inst.mz_max
                })
                .map(|(j, s)| (s.abundance * s.elution.at(rt), j))
                .filter(|(h, _)| *h > 0.0 && *h >= inst.ms2_min_intensity)
                .collect();
            cand.sort_by(|a, b| b.0.total_cmp(&a.0).then(a.1.cmp(&b.1)));
            for (k, &(_, j)) in cand.iter().take(top_n).enumerate() {
                let t = rt + (k + 1) as f64 * cycle / (top_n + 1) as f64;
                scans.push(Scan::Ms2 {
                    rt: t,
                    species: j,
                    precursor_mz: self.species[j].precursor_mz,
                });
                excluded_until[j] = rt + inst.ms2_exclusion_min;
            }
        }
        self.scans = scans;
        Ok(())
    }

    /// The run this acquisition was prepared from.
    pub fn run(&self) -> &Run {
        &self.run
    }

    /// The instrument method.
    pub fn instrument(&self) -> &Instrument {
        &self.instrument
    }

    /// The compound ions, in the run's order.
    pub fn species(&self) -> &[Species] {
        &self.species
    }

    /// Background peaks as (m/z, height), present in every MS1 scan.
    pub fn background(&self) -> &[(f64, f64)] {
        &self.background
    }

    /// The scan schedule.
    pub fn scans(&self) -> &[Scan] {
        &self.scans
    }

    /// Writer options for this run (encodings, ionization, spectrum count).
    pub fn writer_options(&self) -> &WriterOptions {
        &self.options
    }

    /// Peak FWHM in m/z at `mz`.
    pub fn fwhm(&self, mz: f64) -> f64 {
        match self.instrument.resolving_power {
            ResolvingPower::Value(r) => mz / r,
            ResolvingPower::Named(_) => self.instrument.unit_fwhm,
        }
    }

    /// Noise-free peaks (m/z, height) of scan `i` before any m/z jitter.
    fn sticks(&self, i: usize, rng: &mut Rng, out: &mut Vec<(f64, f64)>) {
        out.clear();
        let inst = &self.instrument;
        let ppm = inst.noise.mz_sd_ppm * 1e-6;
        let jitter =
            |m: f64, rng: &mut Rng| if ppm > 0.0 { m * (1.0 + ppm * rng.normal()) } else { m };
        let (lo, hi) = (inst.mz_min, inst.mz_max);
        let grass = inst.noise.grass_peaks;
        match self.scans[i] {
            Scan::Ms1 { rt } => {
                for s in &self.species {
                    let h = s.abundance * s.elution.at(rt);
                    if h < 1e-3 {
                        continue;
                    }
                    for &(m, r) in s.cluster.iter().chain(&s.ms1_fragments) {
                        out.push((jitter(m, rng), h * r));
                    }
                }
                for &(m, h) in &self.background {
                    out.push((jitter(m, rng), h));
                }
                if let Some(lobes) = &inst.side_lobes {
                    let n = out.len();
                    for k in 0..n {
                        let (m, h) = out[k];
                        if h >= lobes.min_height {
                            let d = lobes.offset_fwhm * self.fwhm(m);
                            out.push((m - d, h * lobes.relative));
                            out.push((m + d, h * lobes.relative));
                        }
                    }
                }
                for _ in 0..grass {
                    let m = lo + (hi - lo) * rng.uniform();
                    out.push((m, inst.noise.grass_intensity * rng.exponential()));
                }
            }
            Scan::Ms2 { rt, species, precursor_mz } => {
                let s = &self.species[species];
                let h = s.abundance * s.elution.at(rt);
                out.push((jitter(precursor_mz, rng), h * inst.ms2_residual));
                for &(m, r) in &s.products {
                    if m < precursor_mz + 1.0 {
                        out.push((jitter(m, rng), h * inst.ms2_yield * r));
                    }
                }
                for _ in 0..grass / 4 {
                    let m = lo + (precursor_mz + 1.0 - lo).max(1.0) * rng.uniform();
                    out.push((m, inst.noise.grass_intensity * rng.exponential()));
                }
            }
        }
        out.retain(|p| p.0 >= lo && p.0 <= hi && p.1 > 0.0);
        out.sort_by(|a, b| a.0.total_cmp(&b.0));
    }

    /// Intensity with shot-like and baseline noise, never negative.
    fn noisy(&self, signal: f64, rng: &mut Rng) -> f64 {
        let n = &self.instrument.noise;
        let sd = (n.baseline_sd * n.baseline_sd + n.shot * n.shot * signal).sqrt();
        (signal + sd * rng.normal()).max(0.0)
    }

    fn centroid(&self, sticks: &[(f64, f64)], rng: &mut Rng) -> Peaks {
        // Peaks closer than one FWHM are not resolved: one centroid at their weighted mean.
        let mut merged: Vec<(f64, f64)> = Vec::with_capacity(sticks.len());
        for &(m, h) in sticks {
            if let Some(last) = merged.last_mut() {
                if m - last.0 < self.fwhm(last.0) {
                    let total = last.1 + h;
                    last.0 = (last.0 * last.1 + m * h) / total;
                    last.1 = total;
                    continue;
                }
            }
            merged.push((m, h));
        }
        let thr = self.instrument.drop_below;
        let mut peaks = Peaks::default();
        for (m, h) in merged {
            let v = self.noisy(h, rng);
            if v > thr {
                peaks.mz.push(m);
                peaks.intensity.push(v);
            }
        }
        if let Some(n) = self.fill_centroids {
            let inst = &self.instrument;
            let level = if inst.noise.grass_intensity > 0.0 {
                inst.noise.grass_intensity
            } else {
                thr.max(1.0)
            };
            let mut extra: Vec<(f64, f64)> = Vec::new();
            while peaks.len() + extra.len() < n {
                let m = inst.mz_min + (inst.mz_max - inst.mz_min) * rng.uniform();
                extra.push((m, thr + level * rng.exponential()));
            }
            if !extra.is_empty() {
                let mut all: Vec<(f64, f64)> =
                    peaks.mz.iter().copied().zip(peaks.intensity.iter().copied()).collect();
                all.extend(extra);
                all.sort_by(|a, b| a.0.total_cmp(&b.0));
                peaks.mz = all.iter().map(|p| p.0).collect();
                peaks.intensity = all.iter().map(|p| p.1).collect();
            }
        }
        peaks
    }

    /// Index window [lo, hi] of grid points a peak at `m` touches.
    fn window(&self, m: f64) -> (i64, i64) {
        let w = WINDOW_FWHM * self.fwhm(m);
        (self.grid.index(m - w).ceil() as i64, self.grid.index(m + w).floor() as i64)
    }

    fn add_peak(&self, values: &mut [f64], first: i64, m: f64, h: f64, mzs: &dyn Fn(i64) -> f64) {
        let w = self.fwhm(m);
        let c = GAUSS / (w * w);
        let (a, b) = self.window(m);
        let end = first + values.len() as i64 - 1;
        for k in a.max(first)..=b.min(end) {
            let d = mzs(k) - m;
            values[(k - first) as usize] += h * (-c * d * d).exp();
        }
    }

    fn profile(&self, sticks: &[(f64, f64)], rng: &mut Rng) -> Peaks {
        let baseline = self.instrument.noise.baseline;
        if let Some(n) = self.full_grid {
            let mz: Vec<f64> = (0..n as i64).map(|k| self.grid.mz(k)).collect();
            let mut values = vec![0.0; n];
            for &(m, h) in sticks {
                self.add_peak(&mut values, 0, m, h, &|k| mz[k as usize]);
            }
            for v in &mut values {
                *v = self.noisy(baseline + *v, rng);
            }
            return Peaks { mz, intensity: values };
        }
        // Dropped zeros: sample only around peaks, keep points above the threshold and one
        // zero either side of each run of kept points.
        let n_grid = self.grid.index(self.instrument.mz_max).floor() as i64;
        let mut segments: Vec<(i64, i64)> = Vec::new();
        for &(m, _) in sticks {
            let (a, b) = self.window(m);
            let (a, b) = (a.max(0), b.min(n_grid));
            if a > b {
                continue;
            }
            match segments.last_mut() {
                Some(last) if a <= last.1 + 2 => last.1 = last.1.max(b),
                _ => segments.push((a, b)),
            }
        }
        let thr = self.instrument.drop_below;
        let mut peaks = Peaks::default();
        let mut values = Vec::new();
        let mut mzs = Vec::new();
        let mut next_stick = 0;
        let mut last_written = i64::MIN;
        for &(a, b) in &segments {
            mzs.clear();
            mzs.extend((a..=b).map(|k| self.grid.mz(k)));
            values.clear();
            values.resize((b - a + 1) as usize, 0.0);
            while next_stick < sticks.len() {
                let (m, h) = sticks[next_stick];
                if self.window(m).0.max(0) > b {
                    break;
                }
                self.add_peak(&mut values, a, m, h, &|k| mzs[(k - a) as usize]);
                next_stick += 1;
            }
            for v in &mut values {
                *v = self.noisy(baseline + *v, rng);
            }
            let keep = |k: i64| (a..=b).contains(&k) && values[(k - a) as usize] > thr;
            for k in a..=b {
                if !keep(k) {
                    continue;
                }
                if k - 1 > last_written && !keep(k - 1) && k > 0 {
                    peaks.mz.push(self.grid.mz(k - 1));
                    peaks.intensity.push(0.0);
                }
                peaks.mz.push(mzs[(k - a) as usize]);
                peaks.intensity.push(values[(k - a) as usize]);
                last_written = k;
                if !keep(k + 1) {
                    peaks.mz.push(self.grid.mz(k + 1));
                    peaks.intensity.push(0.0);
                    last_written = k + 1;
                }
            }
        }
        peaks
    }

    /// Metadata and peaks of scan `i` (0-based), the same every time for the same run.
    pub fn spectrum(&self, i: usize) -> (SpectrumMeta, Peaks) {
        let mut rng = Rng::new(rng::mix(self.seed, i as u64));
        let mut sticks = Vec::new();
        self.sticks(i, &mut rng, &mut sticks);
        let peaks = match self.instrument.output {
            Output::Profile => self.profile(&sticks, &mut rng),
            Output::Centroid => self.centroid(&sticks, &mut rng),
        };
        let (rt, ms_level, precursors) = match self.scans[i] {
            Scan::Ms1 { rt } => (rt, 1, Vec::new()),
            Scan::Ms2 { rt, species, precursor_mz } => {
                let half = self.instrument.ms2_isolation_width / 2.0;
                let p = Precursor {
                    selected_mz: Some(precursor_mz),
                    charge: Some(self.species[species].ion.charge().abs()),
                    isolation_target: Some(precursor_mz),
                    isolation_lower_offset: Some(half),
                    isolation_upper_offset: Some(half),
                };
                (rt, 2, vec![p])
            }
        };
        let meta = SpectrumMeta {
            index: i,
            id: format!("scan={}", i + 1),
            ms_level,
            polarity: match self.instrument.polarity {
                ScanPolarity::Positive => Polarity::Positive,
                ScanPolarity::Negative => Polarity::Negative,
            },
            representation: match self.instrument.output {
                Output::Profile => Representation::Profile,
                Output::Centroid => Representation::Centroid,
            },
            rt_min: Some(rt),
            precursors,
            ionization: self.options.ionization,
            ..Default::default()
        };
        (meta, peaks)
    }

    /// Writes the run as indexed mzML to `out`: spectra are generated and encoded on the
    /// rayon pool, chunk by chunk, while another thread writes the previous chunk in order.
    pub fn write<W: Write + Send>(&self, out: W) -> Result<WriteSummary> {
        let n = self.scans.len();
        let per_spectrum = self.full_grid.or(self.fill_centroids).unwrap_or(2_000).max(1);
        let chunk = (4_000_000 / per_spectrum).clamp(4, 256);
        let options = &self.options;
        let writer = Writer::new(out, options.clone())?;
        type Chunk = Vec<(SpectrumMeta, EncodedPeaks, usize)>;
        let (writer, points) = std::thread::scope(|scope| -> Result<(Writer<W>, u64)> {
            let (tx, rx) = std::sync::mpsc::sync_channel::<Chunk>(1);
            let handle = scope.spawn(move || -> Result<(Writer<W>, u64)> {
                let mut writer = writer;
                let mut points = 0u64;
                for chunk in rx {
                    for (meta, encoded, len) in chunk {
                        writer.write_spectrum_with(&meta, &encoded)?;
                        points += len as u64;
                    }
                }
                Ok((writer, points))
            });
            let mut produced = Ok(());
            for start in (0..n).step_by(chunk) {
                let end = (start + chunk).min(n);
                let batch: Result<Chunk> = (start..end)
                    .into_par_iter()
                    .map(|i| {
                        let (meta, peaks) = self.spectrum(i);
                        let encoded = EncodedPeaks::encode(&peaks, options)?;
                        Ok((meta, encoded, peaks.len()))
                    })
                    .collect();
                match batch {
                    Ok(b) => {
                        if tx.send(b).is_err() {
                            break; // the writer stopped on an error, reported below
                        }
                    }
                    Err(e) => {
                        produced = Err(e);
                        break;
                    }
                }
            }
            drop(tx);
            let written = handle.join().expect("writer thread panicked");
            produced?;
            written
        })?;
        writer.finish()?;
        Ok(WriteSummary { spectra: n, points })
    }

    /// The noise level that [`TruthRow::mono_snr`] divides by: the baseline noise standard
    /// deviation for profile output; for centroid output, whose list holds the random noise
    /// peaks rather than the baseline, the larger of that and the noise peaks' mean height
    /// (exponential heights: their standard deviation equals their mean).
    fn noise_level(&self) -> f64 {
        let n = &self.instrument.noise;
        let level = match self.instrument.output {
            Output::Profile => n.baseline_sd,
            Output::Centroid => n.baseline_sd.max(n.grass_intensity),
        };
        if level > 0.0 { level } else { 1.0 }
    }

    /// The ground truth of the run: one row per ion of each compound (its main ion with role
    /// `molecular`, each further ion `adduct`, each EI fragment given by formula `fragment`),
    /// with the neutral's formula and counts on every row. `mono_snr` is the main ion's.
    pub fn truth(&self) -> Vec<TruthRow> {
        let noise = self.noise_level();
        let mut rows = Vec::new();
        for s in &self.species {
            let rule = s.formula.nitrogen_rule();
            let main = self
                .species
                .iter()
                .find(|m| m.name == s.name && m.role == "molecular")
                .unwrap_or(s);
            let row =
                |ion_type: String, charge: i32, mz: f64, role: &str, ion: &Formula| TruthRow {
                    compound: s.name.clone(),
                    formula: s.formula.hill(),
                    ion_type,
                    charge,
                    mz,
                    rt_apex_min: s.elution.apex(),
                    n_cl: s.formula.count("Cl"),
                    n_br: s.formula.count("Br"),
                    n_n: s.formula.count("N"),
                    nominal_mass: rule.nominal_mass,
                    odd_nominal: rule.nominal_mass % 2 != 0,
                    mono_snr: main.abundance * main.mono_relative() / noise,
                    role: role.to_string(),
                    ion_formula: ion.hill(),
                };
            rows.push(row(s.ion.shell_name(), s.ion.charge(), s.mz, s.role, &s.ion_formula));
            for (mz, f) in &s.fragment_ions {
                rows.push(row("fragment".into(), s.ion.charge(), *mz, "fragment", f));
            }
        }
        rows
    }
}

fn background_peaks(b: &Background, inst: &Instrument) -> Result<Vec<(f64, f64)>> {
    match (&b.formula, b.mz) {
        (Some(f), None) => {
            let formula = Formula::parse(f)?;
            let ion = IonType::parse(b.ion.as_deref().unwrap_or(default_ion(inst)))?;
            let atoms = ion.ion_formula(&formula)?;
            Ok(cluster(&atoms, &ion, inst)?
                .into_iter()
                .map(|(m, r)| (m, r * b.intensity))
                .collect())
        }
        (None, Some(m)) if m > 0.0 => Ok(vec![(m, b.intensity)]),
        _ => Err(config(format!("background ion '{}': give exactly one of formula or mz", b.name))),
    }
}

/// Counts of what [`Acquisition::write`] wrote.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct WriteSummary {
    /// Spectra written.
    pub spectra: usize,
    /// Points (m/z, intensity pairs) written.
    pub points: u64,
}

/// One row of a truth TSV.
#[derive(Debug, Clone, PartialEq, serde::Deserialize)]
pub struct TruthRow {
    /// Compound name.
    pub compound: String,
    /// Neutral formula in Hill order.
    pub formula: String,
    /// Ion type in shell notation (`M+H`, `M-H`, `M+.`).
    pub ion_type: String,
    /// Signed charge.
    pub charge: i32,
    /// Monoisotopic ion m/z.
    pub mz: f64,
    /// Apex retention time in minutes.
    pub rt_apex_min: f64,
    /// Chlorine atoms.
    pub n_cl: u32,
    /// Bromine atoms.
    pub n_br: u32,
    /// Nitrogen atoms.
    pub n_n: u32,
    /// Nominal mass of the neutral molecule.
    pub nominal_mass: i64,
    /// True when the nominal mass is odd.
    pub odd_nominal: bool,
    /// Expected S/N of the monoisotopic peak at the apex: its noise-free height over the
    /// instrument's noise level (baseline standard deviation; for centroid output at least the
    /// mean height of the random noise peaks).
    pub mono_snr: f64,
    /// `molecular` (the compound's main ion), `adduct` (a further ion) or `fragment` (an EI
    /// fragment given by formula).
    #[serde(default = "molecular_role")]
    pub role: String,
    /// Elemental composition of the ion (empty in files written before the column existed).
    #[serde(default)]
    pub ion_formula: String,
}

fn molecular_role() -> String {
    "molecular".into()
}

/// The header of a truth TSV.
pub const TRUTH_COLUMNS: [&str; 14] = [
    "compound",
    "formula",
    "ion_type",
    "charge",
    "mz",
    "rt_apex_min",
    "n_cl",
    "n_br",
    "n_n",
    "nominal_mass",
    "odd_nominal",
    "mono_snr",
    "role",
    "ion_formula",
];

/// Writes truth rows as TSV with a header line (m/z to 6 decimals).
pub fn write_truth<W: Write>(rows: &[TruthRow], mut out: W) -> Result<()> {
    let mut t = TRUTH_COLUMNS.join("\t");
    t.push('\n');
    for r in rows {
        t.push_str(&format!(
            "{}\t{}\t{}\t{}\t{:.6}\t{}\t{}\t{}\t{}\t{}\t{}\t{:.1}\t{}\t{}\n",
            r.compound,
            r.formula,
            r.ion_type,
            r.charge,
            r.mz,
            r.rt_apex_min,
            r.n_cl,
            r.n_br,
            r.n_n,
            r.nominal_mass,
            r.odd_nominal,
            r.mono_snr,
            r.role,
            r.ion_formula
        ));
    }
    out.write_all(t.as_bytes())?;
    out.flush()?;
    Ok(())
}
