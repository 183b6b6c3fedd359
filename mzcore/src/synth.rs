//! Synthetic acquisitions whose right answer is known: realistic enough spectra (isotope
//! patterns from [`crate::chem`], Gaussian peaks at the instrument's resolving power,
//! Gaussian or exponentially modified Gaussian elution, shot-like and baseline noise,
//! chemical background, data-dependent MS2, dropped-zero profile sampling), written as
//! indexed mzML with a ground-truth TSV beside each file.
//!
//! - [`Scenario`]: the TOML description of a batch (instruments, compound library, runs);
//! - [`Acquisition`]: one run made concrete: species, scan schedule, spectra on demand;
//! - [`generate`]: writes every run of a scenario into a directory;
//! - [`DEMO_SCENARIO`]: the demo batch shipped in `fixtures/demo`.
//!
//! Everything is deterministic for a scenario's seed: each spectrum draws from its own
//! random stream (seeded from the batch seed, the run's file name and the scan number), so
//! spectra can be generated on any number of threads and still come out bit for bit the same.
//!
//! Intensities: a compound's `abundance` is the apex height of the tallest peak of its
//! molecular ion cluster; every isotopologue (fine structure above 1e-5 of the tallest, or
//! nominal shells at unit resolution) is a Gaussian of FWHM m/R (or `unit_fwhm`), so summing
//! a profile spectrum over one nominal shell gives back the shell's share of the pattern.
//!
//! # Examples
//!
//! ```
//! use mzcore::synth::{Acquisition, Scenario, SizeOptions};
//! let scenario = Scenario::from_toml(r#"
//!     name = "tiny"
//!     seed = 1
//!     [instruments.lc]
//!     ionization = "esi"
//!     polarity = "negative"
//!     resolving_power = 60000
//!     mz_min = 100.0
//!     mz_max = 400.0
//!     output = "profile"
//!     dropped_zeros = true
//!     drop_below = 50.0
//!     scan_rate_hz = 2.0
//!     rt_start_min = 0.0
//!     rt_end_min = 1.0
//!     [[compound]]
//!     name = "triclosan"
//!     formula = "C12H7Cl3O2"
//!     [[run]]
//!     file = "sample"
//!     instrument = "lc"
//!     [[run.compound]]
//!     name = "triclosan"
//!     rt_apex_min = 0.5
//!     width_min = 0.1
//!     abundance = 1e6
//! "#)?;
//! let acq = Acquisition::new(&scenario, &scenario.runs[0], SizeOptions::default())?;
//! assert_eq!(acq.scans().len(), 120);
//! let truth = acq.truth();
//! assert_eq!((truth[0].ion_type.as_str(), truth[0].n_cl), ("M-H", 3));
//! let mut doc = Vec::new();
//! acq.write(&mut doc)?;
//! let first = mzcore::mzml::Reader::new(&doc[..])?.next().unwrap()?;
//! assert_eq!(first.meta.ms_level, 1);
//! # Ok::<_, mzcore::Error>(())
//! ```

mod acquire;
pub mod evaluate;
pub mod rng;
mod scenario;
pub mod shape;

use std::io::Write;
use std::path::{Path, PathBuf};

pub use acquire::{
    Acquisition, MAX_GRID_POINTS, Scan, SizeOptions, Species, TRUTH_COLUMNS, TruthRow,
    WriteSummary, write_truth,
};
pub use scenario::{
    Background, Compound, Encoding, ExtraIon, Fragment, Instrument, Noise, Output, ResolvingPower,
    Run, RunCompound, ScanPolarity, Scenario, SideLobes, Source, Unit, parse_encoding,
};

use crate::error::Result;

/// The demo batch: one night of a fictional regional water laboratory (TOML text).
pub const DEMO_SCENARIO: &str = include_str!("synth/demo.toml");

impl Scenario {
    /// The demo batch ([`DEMO_SCENARIO`]).
    pub fn demo() -> Scenario {
        Scenario::from_toml(DEMO_SCENARIO).expect("the demo scenario parses")
    }
}

/// What [`generate`] wrote for one run.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct RunSummary {
    /// The mzML file.
    pub mzml: PathBuf,
    /// The truth TSV.
    pub truth: PathBuf,
    /// Spectra written.
    pub spectra: usize,
    /// Points written.
    pub points: u64,
    /// Size of the mzML file in bytes.
    pub bytes: u64,
}

/// Writes `path` through a temporary file in the same directory, renamed into place at the end.
fn write_atomic(
    path: &Path,
    f: impl FnOnce(&mut std::io::BufWriter<std::fs::File>) -> Result<()>,
) -> Result<()> {
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let tmp = path.with_file_name(format!(".{name}.partial"));
    let result = (|| {
        let mut w = std::io::BufWriter::with_capacity(1 << 20, std::fs::File::create(&tmp)?);
        f(&mut w)?;
        w.flush()?;
        w.into_inner().map_err(|e| e.into_error())?.sync_all()?;
        std::fs::rename(&tmp, path)?;
        Ok(())
    })();
    if result.is_err() {
        let _ = std::fs::remove_file(&tmp);
    }
    result
}

/// Writes `<file>.mzML` and `<file>.truth.tsv` into `dir` (created if missing) for every run
/// of `scenario` whose file stem is in `only` (all runs when `only` is empty).
pub fn generate(
    scenario: &Scenario,
    dir: &Path,
    size: SizeOptions,
    only: &[String],
) -> Result<Vec<RunSummary>> {
    for name in only {
        if scenario.run(name).is_none() {
            return Err(scenario::config(format!("the scenario has no run '{name}'")));
        }
    }
    let mut seen = std::collections::BTreeSet::new();
    for r in &scenario.runs {
        if !seen.insert(r.file.as_str()) {
            return Err(scenario::config(format!("two runs write '{}'", r.file)));
        }
    }
    std::fs::create_dir_all(dir)?;
    let mut out = Vec::new();
    for run in scenario.runs.iter().filter(|r| only.is_empty() || only.contains(&r.file)) {
        let acq = Acquisition::new(scenario, run, size)?;
        let mzml = dir.join(format!("{}.mzML", run.file));
        let truth = dir.join(format!("{}.truth.tsv", run.file));
        let mut summary = None;
        write_atomic(&mzml, |w| {
            summary = Some(acq.write(w)?);
            Ok(())
        })?;
        write_atomic(&truth, |w| write_truth(&acq.truth(), w))?;
        let s = summary.expect("written");
        out.push(RunSummary {
            bytes: std::fs::metadata(&mzml)?.len(),
            mzml,
            truth,
            spectra: s.spectra,
            points: s.points,
        });
    }
    Ok(out)
}
