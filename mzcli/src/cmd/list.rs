//! `mzsift list`: one TSV row per spectrum.

use std::io::Write;
use std::path::PathBuf;

use mzcore::pipeline::PointStats;
use mzcore::spectrum::{Peaks, Spectrum};
use serde::Serialize;

use crate::output;

/// Arguments of `mzsift list`.
#[derive(clap::Args, Debug)]
pub struct ListArgs {
    /// mzML file (plain or gzip-compressed); `-` reads stdin.
    #[arg(value_hint = clap::ValueHint::FilePath)]
    pub file: PathBuf,
}

/// One row of `mzsift list`; see the README for the columns.
#[derive(Serialize)]
struct Row<'a> {
    index: usize,
    id: &'a str,
    ms_level: u8,
    polarity: &'static str,
    representation: &'static str,
    #[serde(serialize_with = "mzcore::report::digits::minutes")]
    rt_min: Option<f64>,
    points: usize,
    #[serde(serialize_with = "mzcore::report::digits::intensity")]
    intensity_sum: f64,
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    mz_min: Option<f64>,
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    mz_max: Option<f64>,
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    base_peak_mz: Option<f64>,
    #[serde(serialize_with = "mzcore::report::digits::intensity")]
    base_peak_intensity: Option<f64>,
    #[serde(serialize_with = "mzcore::report::digits::mz")]
    precursor_mz: Option<f64>,
    precursor_charge: Option<i32>,
}

fn row<'a>(s: &'a Spectrum, p: &Peaks) -> Row<'a> {
    let m = &s.meta;
    let stats = PointStats::of(p);
    let precursor = m.precursors.first();
    Row {
        index: m.index,
        id: &m.id,
        ms_level: m.ms_level,
        polarity: m.polarity.symbol(),
        representation: m.representation.name(),
        rt_min: m.rt_min,
        points: stats.points,
        intensity_sum: stats.intensity_sum,
        mz_min: stats.mz_min,
        mz_max: stats.mz_max,
        base_peak_mz: stats.base_peak_mz,
        base_peak_intensity: stats.base_peak_intensity,
        precursor_mz: precursor.and_then(|p| p.selected_mz.or(p.isolation_target)),
        precursor_charge: precursor.and_then(|p| p.charge),
    }
}

/// Runs `mzsift list`, writing TSV to `out`; returns the exit code.
pub fn run(args: &ListArgs, out: &mut dyn Write) -> anyhow::Result<u8> {
    let mut reader = super::open(&args.file, Default::default())?;
    let mut tsv = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
    let mut spectrum = Spectrum::default();
    let mut peaks = Peaks::default();
    let mut code = output::OK;
    let mut wrote_header = false;
    loop {
        match reader.read_spectrum(&mut spectrum) {
            Ok(true) => match spectrum.decode_into(&mut peaks) {
                Ok(()) => {
                    tsv.serialize(row(&spectrum, &peaks))?;
                    wrote_header = true;
                }
                Err(e) => {
                    output::report(&args.file, &e);
                    code = output::SOME_FAILED;
                }
            },
            Ok(false) => break,
            Err(e) => {
                output::report(&args.file, &e);
                code = output::SOME_FAILED;
            }
        }
    }
    if !wrote_header {
        tsv.write_record(HEADER)?;
    }
    tsv.flush()?;
    Ok(code)
}

/// The column names, for an empty listing.
const HEADER: [&str; 14] = [
    "index",
    "id",
    "ms_level",
    "polarity",
    "representation",
    "rt_min",
    "points",
    "intensity_sum",
    "mz_min",
    "mz_max",
    "base_peak_mz",
    "base_peak_intensity",
    "precursor_mz",
    "precursor_charge",
];
