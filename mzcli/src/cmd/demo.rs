//! `mzsift demo`: writes the demo batch (or any scenario) as mzML files with truth TSVs.

use std::io::Write;
use std::path::PathBuf;
use std::time::Instant;

use anyhow::Context;
use mzcore::synth::{self, Scenario, SizeOptions};

use crate::output;

/// Arguments of `mzsift demo`.
#[derive(clap::Args, Debug)]
#[command(after_long_help = "Examples:\n  \
    mzsift demo demo-batch\n  \
    mzsift demo big --run DRWL0417-04_lc-neg_fennick-cross-effluent --spectra 4000 --points 40000\n  \
    mzsift demo out --scenario my-scenario.toml\n\n\
    Writes <run>.mzML (indexed mzML 1.1) and <run>.truth.tsv for every run of the scenario \
    (the built-in demo batch of a fictional water laboratory unless --scenario is given; the \
    built-in scenario's text is also written as scenario.toml). The output is the same byte \
    for byte on every call. Prints one TSV row per file written: file, spectra, points, bytes.")]
pub struct DemoArgs {
    /// Directory to write into (created if missing).
    #[arg(value_hint = clap::ValueHint::DirPath)]
    pub outdir: PathBuf,
    /// Scenario TOML file (default: the built-in demo batch).
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub scenario: Option<PathBuf>,
    /// MS1 scans per run, spread over the run's time range (each may be followed by MS2).
    #[arg(long, value_name = "N")]
    pub spectra: Option<usize>,
    /// Points per spectrum: profile spectra on the full m/z grid of exactly N points,
    /// centroid spectra filled up with noise peaks to N.
    #[arg(long, value_name = "N")]
    pub points: Option<usize>,
    /// Encoding of m/z arrays instead of the scenario's: f32, f64, i32, i64 or
    /// numpress-linear, numpress-pic, numpress-slof, each optionally followed by -zlib.
    #[arg(long, value_name = "ENCODING")]
    pub mz_encoding: Option<String>,
    /// Encoding of intensity arrays instead of the scenario's (same names).
    #[arg(long, value_name = "ENCODING")]
    pub intensity_encoding: Option<String>,
    /// Write only this run (its file stem); may be repeated.
    #[arg(long, value_name = "NAME")]
    pub run: Vec<String>,
}

/// Runs `mzsift demo`; returns the exit code.
pub fn run(args: &DemoArgs, out: &mut dyn Write) -> anyhow::Result<u8> {
    let (scenario, builtin) = match &args.scenario {
        Some(path) => {
            let text =
                std::fs::read_to_string(path).with_context(|| format!("{}", path.display()))?;
            match Scenario::from_toml(&text) {
                Ok(s) => (s, false),
                Err(e) => {
                    output::report(path, &e);
                    return Ok(output::USAGE);
                }
            }
        }
        None => (Scenario::demo(), true),
    };
    let mut size =
        SizeOptions { ms1_scans: args.spectra, points: args.points, ..Default::default() };
    for (arg, slot) in [
        (&args.mz_encoding, &mut size.mz_encoding),
        (&args.intensity_encoding, &mut size.intensity_encoding),
    ] {
        if let Some(name) = arg {
            match synth::parse_encoding(name) {
                Ok(e) => *slot = Some(e),
                Err(e) => {
                    eprintln!("mzsift: {e}");
                    return Ok(output::USAGE);
                }
            }
        }
    }
    let started = Instant::now();
    let written = match synth::generate(&scenario, &args.outdir, size, &args.run) {
        Ok(w) => w,
        Err(e)
            if matches!(
                e.kind(),
                mzcore::ErrorKind::Config(_) | mzcore::ErrorKind::Parse { .. }
            ) =>
        {
            eprintln!("mzsift: {e}");
            return Ok(output::USAGE);
        }
        Err(e) => return Err(e).with_context(|| format!("{}", args.outdir.display())),
    };
    if builtin {
        let path = args.outdir.join("scenario.toml");
        std::fs::write(&path, synth::DEMO_SCENARIO)
            .with_context(|| format!("{}", path.display()))?;
    }
    let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
    w.write_record(["file", "spectra", "points", "bytes"])?;
    let mut bytes = 0;
    for r in &written {
        bytes += r.bytes;
        w.write_record([
            r.mzml.display().to_string(),
            r.spectra.to_string(),
            r.points.to_string(),
            r.bytes.to_string(),
        ])?;
    }
    w.flush()?;
    let secs = started.elapsed().as_secs_f64();
    eprintln!(
        "mzsift: wrote {} files, {:.1} MB in {:.2} s ({:.0} MB/s)",
        written.len(),
        bytes as f64 / 1e6,
        secs,
        bytes as f64 / 1e6 / secs.max(1e-9)
    );
    Ok(output::OK)
}
