//! `mzsift info`: a summary of one file.

use std::collections::BTreeMap;
use std::io::Write;
use std::path::PathBuf;

use mzcore::mzml::{ChecksumStatus, ReaderOptions};
use mzcore::spectrum::Spectrum;
use serde::Serialize;

use crate::output;

/// Output format of `mzsift info`.
#[derive(clap::ValueEnum, Clone, Copy, Debug, Default)]
pub enum InfoFormat {
    /// Aligned `key: value` lines for people.
    #[default]
    Text,
    /// Two columns, `key` and `value`, with a header row.
    Tsv,
    /// One JSON object.
    Json,
}

/// Arguments of `mzsift info`.
#[derive(clap::Args, Debug)]
pub struct InfoArgs {
    /// mzML file (plain or gzip-compressed); `-` reads stdin.
    #[arg(value_hint = clap::ValueHint::FilePath)]
    pub file: PathBuf,
    /// Verify the SHA-1 fileChecksum of an indexed file.
    #[arg(long)]
    pub verify: bool,
    /// Output format.
    #[arg(long, value_enum, default_value_t)]
    pub format: InfoFormat,
}

/// What `mzsift info` reports.
#[derive(Serialize, Default)]
struct Summary {
    file: String,
    spectra: usize,
    unreadable_spectra: usize,
    spectra_per_ms_level: BTreeMap<u8, usize>,
    #[serde(serialize_with = "mzcore::report::digits::minutes")]
    rt_start_min: Option<f64>,
    #[serde(serialize_with = "mzcore::report::digits::minutes")]
    rt_end_min: Option<f64>,
    polarity: Vec<&'static str>,
    representation: Vec<&'static str>,
    ionization: Vec<&'static str>,
    encodings: Vec<String>,
    gzip: bool,
    indexed: bool,
    index_entries: usize,
    tic_chromatogram_points: Option<usize>,
    checksum: &'static str,
    errors: Vec<String>,
    warnings: Vec<String>,
}

fn push_unique(v: &mut Vec<&'static str>, s: &'static str) {
    let s = if s.is_empty() { "unknown" } else { s };
    if !v.contains(&s) {
        v.push(s);
    }
}

/// Runs `mzsift info`, writing the summary to `out`; returns the exit code.
pub fn run(args: &InfoArgs, out: &mut dyn Write) -> anyhow::Result<u8> {
    let options = ReaderOptions::default().verify_checksum(args.verify);
    let mut reader = super::open(&args.file, options)?;
    let mut sum = Summary { file: args.file.display().to_string(), ..Default::default() };
    let mut s = Spectrum::default();
    loop {
        match reader.read_spectrum(&mut s) {
            Ok(true) => {
                let m = &s.meta;
                sum.spectra += 1;
                *sum.spectra_per_ms_level.entry(m.ms_level).or_default() += 1;
                if let Some(rt) = m.rt_min {
                    sum.rt_start_min = Some(sum.rt_start_min.map_or(rt, |v: f64| v.min(rt)));
                    sum.rt_end_min = Some(sum.rt_end_min.map_or(rt, |v: f64| v.max(rt)));
                }
                push_unique(&mut sum.polarity, m.polarity.symbol());
                push_unique(&mut sum.representation, m.representation.name());
                push_unique(&mut sum.ionization, m.ionization.name());
            }
            Ok(false) => break,
            Err(e) => {
                output::report(&args.file, &e);
                sum.errors.push(e.to_string());
                if e.position().spectrum_index.is_some() {
                    sum.unreadable_spectra += 1;
                }
            }
        }
    }
    for w in reader.warnings() {
        output::report(&args.file, w);
        sum.warnings.push(w.to_string());
    }
    sum.encodings = reader.encodings_seen().iter().map(|e| e.label()).collect();
    sum.gzip = reader.is_gzip();
    sum.indexed = reader.is_indexed();
    sum.index_entries = reader.index().len();
    sum.tic_chromatogram_points = reader.tic_chromatogram().map(|c| c.time_min.len());
    sum.checksum = match reader.checksum_status() {
        ChecksumStatus::NotChecked => "not checked",
        ChecksumStatus::Absent => "absent",
        ChecksumStatus::Verified => "verified",
        ChecksumStatus::Mismatch => "mismatch",
    };
    write_summary(&sum, args.format, out)?;
    // Warnings (an index a few bytes off, or not used) cost no data: exit code 0.
    Ok(if sum.errors.is_empty() { output::OK } else { output::SOME_FAILED })
}

fn fmt_opt(v: Option<f64>) -> String {
    v.map(|x| mzcore::report::digits::text(mzcore::report::digits::Kind::Minutes, x))
        .unwrap_or_default()
}

fn write_summary(s: &Summary, format: InfoFormat, out: &mut dyn Write) -> anyhow::Result<()> {
    let levels = s
        .spectra_per_ms_level
        .iter()
        .map(|(l, n)| format!("ms{l}={n}"))
        .collect::<Vec<_>>()
        .join(",");
    let pairs: Vec<(&str, String)> = vec![
        ("file", s.file.clone()),
        ("spectra", s.spectra.to_string()),
        ("unreadable_spectra", s.unreadable_spectra.to_string()),
        ("spectra_per_ms_level", levels),
        ("rt_start_min", fmt_opt(s.rt_start_min)),
        ("rt_end_min", fmt_opt(s.rt_end_min)),
        ("polarity", s.polarity.join(",")),
        ("representation", s.representation.join(",")),
        ("ionization", s.ionization.join(",")),
        ("encodings", s.encodings.join(",")),
        ("gzip", s.gzip.to_string()),
        ("indexed", s.indexed.to_string()),
        ("index_entries", s.index_entries.to_string()),
        (
            "tic_chromatogram_points",
            s.tic_chromatogram_points.map(|n| n.to_string()).unwrap_or_default(),
        ),
        ("checksum", s.checksum.to_string()),
        ("errors", s.errors.len().to_string()),
        ("warnings", s.warnings.len().to_string()),
    ];
    match format {
        InfoFormat::Json => {
            mzcore::report::digits::as_numbers(|| serde_json::to_writer_pretty(&mut *out, s))?;
            writeln!(out)?;
        }
        InfoFormat::Tsv => {
            let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
            w.write_record(["key", "value"])?;
            for (k, v) in &pairs {
                w.write_record([*k, v.as_str()])?;
            }
            w.flush()?;
        }
        InfoFormat::Text => {
            for (k, v) in &pairs {
                writeln!(out, "{k:<24}{v}")?;
            }
        }
    }
    Ok(())
}
