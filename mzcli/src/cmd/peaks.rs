//! `mzsift peaks`: the peaks (or decoded points) of one spectrum.

use std::io::Write;
use std::path::PathBuf;

use anyhow::{Context, bail};
use mzcore::mzml::IndexedReader;
use mzcore::pipeline::{PipelineSettings, process_spectrum};
use mzcore::spectrum::Spectrum;
use serde::Serialize;

use crate::output;

/// Arguments of `mzsift peaks`.
#[derive(clap::Args, Debug)]
#[command(group(clap::ArgGroup::new("which").required(true).args(["index", "id"])))]
pub struct PeaksArgs {
    /// mzML file (plain or gzip-compressed); `-` reads stdin.
    #[arg(value_hint = clap::ValueHint::FilePath)]
    pub file: PathBuf,
    /// Zero-based index of the spectrum in the file.
    #[arg(long)]
    pub index: Option<usize>,
    /// Native id of the spectrum, e.g. `scan=12`.
    #[arg(long)]
    pub id: Option<String>,
    /// Print the decoded points (`mz intensity`) instead of the picked peaks.
    #[arg(long)]
    pub raw: bool,
}

#[derive(Serialize)]
struct PeakRow {
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    mz: f64,
    #[serde(serialize_with = "mzcore::report::digits::intensity")]
    intensity: f64,
    #[serde(serialize_with = "mzcore::report::digits::intensity")]
    area: f64,
    #[serde(serialize_with = "mzcore::report::digits::ratio")]
    snr: f64,
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    fwhm: Option<f64>,
}

#[derive(Serialize)]
struct PointRow {
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    mz: f64,
    #[serde(serialize_with = "mzcore::report::digits::intensity")]
    intensity: f64,
}

impl PeaksArgs {
    fn matches(&self, s: &Spectrum) -> bool {
        match (&self.id, self.index) {
            (Some(id), _) => &s.meta.id == id,
            (None, Some(i)) => s.meta.index == i,
            (None, None) => false,
        }
    }

    fn describe(&self) -> String {
        match (&self.id, self.index) {
            (Some(id), _) => format!("spectrum with id '{id}'"),
            (None, Some(i)) => format!("spectrum {i}"),
            (None, None) => "spectrum".into(),
        }
    }
}

/// Finds the spectrum: through the index when the file is indexed and seekable, else by
/// streaming through the file.
fn find(args: &PeaksArgs) -> anyhow::Result<Spectrum> {
    let path = &args.file;
    if path.as_os_str() != "-" {
        if let Ok(mut r) = IndexedReader::from_path(path) {
            let found = match (&args.id, args.index) {
                (Some(id), _) => r.by_id(id),
                (None, Some(i)) => r.by_index(i),
                (None, None) => unreachable!("clap requires --index or --id"),
            };
            if let Ok(s) = found {
                return Ok(s);
            }
        }
    }
    let mut reader = super::open(path, Default::default())?;
    let mut s = Spectrum::default();
    loop {
        match reader.read_spectrum(&mut s) {
            Ok(true) if args.matches(&s) => return Ok(s),
            Ok(true) => {}
            Ok(false) => bail!("{}: no {}", path.display(), args.describe()),
            // A bad spectrum elsewhere does not hide the one asked for.
            Err(e) if e.position().spectrum_index.is_some() => {}
            Err(e) => return Err(e).with_context(|| path.display().to_string()),
        }
    }
}

/// Runs `mzsift peaks`, writing TSV to `out`; returns the exit code.
pub fn run(args: &PeaksArgs, out: &mut dyn Write) -> anyhow::Result<u8> {
    let spectrum = find(args)?;
    // The header is written explicitly, so that a spectrum without peaks still has one.
    let mut tsv = csv::WriterBuilder::new().delimiter(b'\t').has_headers(false).from_writer(out);
    let name = args.file.display().to_string();
    if args.raw {
        let peaks = spectrum.decode().with_context(|| name.clone())?;
        tsv.write_record(["mz", "intensity"])?;
        for (&mz, &intensity) in peaks.mz.iter().zip(&peaks.intensity) {
            tsv.serialize(PointRow { mz, intensity })?;
        }
    } else {
        let done = process_spectrum(&spectrum, &PipelineSettings::default())
            .with_context(|| name.clone())?;
        tsv.write_record(["mz", "intensity", "area", "snr", "fwhm"])?;
        for c in &done.centroids {
            let fwhm = (c.fwhm > 0.0).then_some(c.fwhm);
            tsv.serialize(PeakRow {
                mz: c.mz,
                intensity: c.intensity,
                area: c.area,
                snr: c.snr,
                fwhm,
            })?;
        }
    }
    tsv.flush()?;
    Ok(output::OK)
}
