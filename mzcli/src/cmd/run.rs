//! `mzsift run`: the overnight batch.
//!
//! Finds the inputs, screens each with one shared thread pool, writes each file's reports
//! into its own folder atomically (a temporary folder renamed into place, with a completion
//! record inside), and ends with `batch.tsv` and `run.json`. `--resume` reuses the folders
//! whose completion record matches the unchanged input and configuration.

use std::collections::HashSet;
use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::time::{Instant, SystemTime, UNIX_EPOCH};

use anyhow::Context;
use mzcore::report::{self, escape_text};
use mzcore::screen::{
    self, FEATURE_COLUMNS, FileReport, FileStatus, FileSummary, ION_COLUMNS, SPECTRUM_COLUMNS,
    ScreenConfig,
};
use serde::{Deserialize, Serialize};

use crate::output;

/// Arguments of `mzsift run`.
#[derive(clap::Args, Debug)]
pub struct RunArgs {
    /// Input files or folders (folders are searched recursively for .mzML and .mzML.gz).
    #[arg(required = true, value_hint = clap::ValueHint::AnyPath)]
    pub inputs: Vec<PathBuf>,
    /// Output folder.
    #[arg(short = 'o', long = "out", value_hint = clap::ValueHint::DirPath)]
    pub out: PathBuf,
    /// Worker threads shared by all files and spectra (default: the config's, else one per core).
    #[arg(short = 'j', long = "jobs")]
    pub jobs: Option<usize>,
    /// TOML configuration (see `mzsift config`).
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub config: Option<PathBuf>,
    /// Keep the reports of inputs that are unchanged since a complete earlier run.
    #[arg(long)]
    pub resume: bool,
    /// Stop at the first file that fails or is partial (the rest are marked skipped).
    #[arg(long)]
    pub fail_fast: bool,
    /// No progress lines.
    #[arg(short, long)]
    pub quiet: bool,
    /// Also print every unreadable spectrum.
    #[arg(short, long)]
    pub verbose: bool,
}

/// One input and where its reports go.
#[derive(Debug, Clone)]
struct Input {
    path: PathBuf,
    name: String,
}

/// One row of `batch.tsv`.
#[derive(Serialize)]
struct BatchRow<'a> {
    file: String,
    status: &'a str,
    error: String,
    spectra: Option<usize>,
    ms1: Option<usize>,
    ms2: Option<usize>,
    rt_start_min: Option<f64>,
    rt_end_min: Option<f64>,
    flagged_spectra: Option<usize>,
    halogen_features: Option<usize>,
    odd_nominal_features: Option<usize>,
    unreadable_spectra: Option<usize>,
    seconds: f64,
}

const BATCH_COLUMNS: &[&str] = &[
    "file",
    "status",
    "error",
    "spectra",
    "ms1",
    "ms2",
    "rt_start_min",
    "rt_end_min",
    "flagged_spectra",
    "halogen_features",
    "odd_nominal_features",
    "unreadable_spectra",
    "seconds",
];
/// The completion record kept in each report folder.
#[derive(Serialize, Deserialize, PartialEq)]
struct Completion {
    tool_version: String,
    input_bytes: u64,
    input_mtime_ns: u128,
    config: String,
    summary: FileSummary,
}

const COMPLETION_FILE: &str = "complete.json";

/// What happened to one input, for `batch.tsv` and `run.json`.
struct Outcome {
    input: Input,
    status: FileStatus,
    error: String,
    summary: Option<FileSummary>,
    seconds: f64,
    mtime_unix: Option<u64>,
}

#[derive(Serialize)]
struct RunRecord<'a> {
    tool: &'static str,
    version: &'static str,
    started_utc: String,
    finished_utc: String,
    seconds: f64,
    threads: usize,
    config: &'a ScreenConfig,
    inputs: Vec<InputRecord<'a>>,
    caution: &'static str,
}

#[derive(Serialize)]
struct InputRecord<'a> {
    path: String,
    report_folder: &'a str,
    status: &'static str,
    bytes: Option<u64>,
    mtime_unix: Option<u64>,
    sha256: Option<&'a str>,
    seconds: f64,
    error: &'a str,
}

fn is_mzml(name: &str) -> bool {
    let lower = name.to_ascii_lowercase();
    lower.ends_with(".mzml") || lower.ends_with(".mzml.gz")
}

fn strip_extension(rel: &str) -> String {
    let lower = rel.to_ascii_lowercase();
    for ext in [".mzml.gz", ".mzml"] {
        if lower.ends_with(ext) {
            return rel[..rel.len() - ext.len()].to_owned();
        }
    }
    rel.to_owned()
}

fn walk(dir: &Path, root: &Path, out: &mut Vec<(PathBuf, String)>) -> std::io::Result<()> {
    let mut entries: Vec<_> = std::fs::read_dir(dir)?.collect::<Result<_, _>>()?;
    entries.sort_by_key(|e| e.file_name());
    for e in entries {
        let name = e.file_name().to_string_lossy().into_owned();
        if name.starts_with('.') {
            continue;
        }
        let path = e.path();
        if e.file_type()?.is_dir() {
            walk(&path, root, out)?;
        } else if is_mzml(&name) {
            let rel = path.strip_prefix(root).unwrap_or(&path).to_string_lossy().replace('\\', "/");
            out.push((path, rel));
        }
    }
    Ok(())
}

/// Lists the inputs with unique report-folder names.
fn discover(inputs: &[PathBuf]) -> anyhow::Result<Vec<Input>> {
    let mut found = Vec::new();
    for input in inputs {
        if input.is_dir() {
            walk(input, input, &mut found).with_context(|| input.display().to_string())?;
        } else {
            let rel =
                input.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
            found.push((input.clone(), rel));
        }
    }
    let mut used = HashSet::new();
    let mut out = Vec::new();
    for (path, rel) in found {
        let base = strip_extension(&rel);
        let base = if base.is_empty() { "input".to_owned() } else { base };
        let mut name = base.clone();
        let mut k = 2;
        while !used.insert(name.clone()) {
            name = format!("{base}-{k}");
            k += 1;
        }
        out.push(Input { path, name });
    }
    Ok(out)
}

fn mtime(path: &Path) -> Option<(u64, u128)> {
    let t = std::fs::metadata(path).ok()?.modified().ok()?.duration_since(UNIX_EPOCH).ok()?;
    Some((t.as_secs(), t.as_nanos()))
}

/// Formats a UNIX time as `YYYY-MM-DDTHH:MM:SSZ` (proleptic Gregorian calendar, UTC).
fn utc(t: SystemTime) -> String {
    let secs = t.duration_since(UNIX_EPOCH).map(|d| d.as_secs()).unwrap_or(0);
    let (days, rem) = ((secs / 86_400) as i64, secs % 86_400);
    // Civil-from-days conversion for the Gregorian calendar (era of 400 years).
    let z = days + 719_468;
    let era = z.div_euclid(146_097);
    let doe = z.rem_euclid(146_097);
    let yoe = (doe - doe / 1460 + doe / 36_524 - doe / 146_096) / 365;
    let doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    let mp = (5 * doy + 2) / 153;
    let day = doy - (153 * mp + 2) / 5 + 1;
    let month = if mp < 10 { mp + 3 } else { mp - 9 };
    let year = yoe + era * 400 + i64::from(month <= 2);
    format!(
        "{year:04}-{month:02}-{day:02}T{:02}:{:02}:{:02}Z",
        rem / 3600,
        (rem / 60) % 60,
        rem % 60
    )
}

fn write_reports(dir: &Path, report: &FileReport, completion: &Completion) -> mzcore::Result<()> {
    if let Some(parent) = dir.parent() {
        std::fs::create_dir_all(parent)?;
    }
    report::replace_dir_atomic(dir, |tmp| {
        let put = |name: &str, f: &dyn Fn(&mut dyn std::io::Write) -> mzcore::Result<()>| {
            report::write_atomic(&tmp.join(name), |w| f(w))
        };
        put("spectra.tsv", &|w| report::write_tsv(w, SPECTRUM_COLUMNS, &report.spectra))?;
        put("ions.tsv", &|w| report::write_tsv(w, ION_COLUMNS, &report.ions))?;
        put("features.tsv", &|w| report::write_tsv(w, FEATURE_COLUMNS, &report.features))?;
        report::write_json_atomic(&tmp.join(COMPLETION_FILE), completion)
    })
}

/// The completion record of an earlier run, if it matches the input and configuration.
fn reusable(dir: &Path, input: &Path, config_text: &str) -> Option<FileSummary> {
    let text = std::fs::read_to_string(dir.join(COMPLETION_FILE)).ok()?;
    let c: Completion = serde_json::from_str(&text).ok()?;
    let (_, mtime_ns) = mtime(input)?;
    let bytes = std::fs::metadata(input).ok()?.len();
    let same = c.tool_version == env!("CARGO_PKG_VERSION")
        && c.input_bytes == bytes
        && c.input_mtime_ns == mtime_ns
        && c.config == config_text;
    let files_there =
        ["spectra.tsv", "ions.tsv", "features.tsv"].iter().all(|f| dir.join(f).is_file());
    (same && files_there).then_some(c.summary)
}

/// Prints progress: a rewritten line on a terminal, timestamped lines otherwise.
struct Progress {
    quiet: bool,
    terminal: bool,
    total: usize,
    started: Instant,
    spectra: usize,
}

impl Progress {
    fn file_done(&mut self, done: usize, o: &Outcome) {
        self.spectra += o.summary.as_ref().map_or(0, |s| s.spectra);
        if self.quiet {
            return;
        }
        let elapsed = self.started.elapsed().as_secs_f64().max(1e-9);
        let rate = self.spectra as f64 / elapsed;
        let eta = elapsed / done as f64 * (self.total - done) as f64;
        if self.terminal {
            eprint!(
                "\r\x1b[2Kmzsift: {done}/{} files, {rate:.0} spectra/s, ETA {eta:.0} s ({}: {})",
                self.total,
                o.input.name,
                o.status.name()
            );
            if done == self.total {
                eprintln!();
            }
        } else {
            eprintln!(
                "{} mzsift: {}: {} ({done}/{} files, {:.1} s)",
                utc(SystemTime::now()),
                o.input.path.display(),
                o.status.name(),
                self.total,
                o.seconds
            );
        }
    }
}

/// Reads the configuration file (if any) and applies `-j`.
pub fn load_config(path: Option<&Path>, jobs: Option<usize>) -> anyhow::Result<ScreenConfig> {
    let mut config = match path {
        Some(p) => {
            let text = std::fs::read_to_string(p).with_context(|| p.display().to_string())?;
            ScreenConfig::from_toml(&text).with_context(|| p.display().to_string())?
        }
        None => ScreenConfig::default(),
    };
    if let Some(j) = jobs {
        config.threads = j;
    }
    Ok(config)
}

/// Runs `mzsift run`; returns the exit code.
pub fn run(args: &RunArgs) -> anyhow::Result<u8> {
    let config = match load_config(args.config.as_deref(), args.jobs) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            return Ok(output::USAGE);
        }
    };
    let config_text = config.to_toml();
    let inputs = discover(&args.inputs)?;
    if inputs.is_empty() && !args.quiet {
        eprintln!("mzsift: no .mzML or .mzML.gz files found under the inputs given");
    }
    let out = &args.out;
    std::fs::create_dir_all(out).with_context(|| out.display().to_string())?;
    // A run that is interrupted must not leave the batch files of an earlier run looking
    // like its own.
    for stale in ["batch.tsv", "run.json"] {
        let p = out.join(stale);
        if p.exists() {
            std::fs::remove_file(&p).with_context(|| p.display().to_string())?;
        }
    }
    let pool = mzcore::pipeline::thread_pool(config.threads)?;
    let started_at = SystemTime::now();
    let started = Instant::now();
    let mut progress = Progress {
        quiet: args.quiet,
        terminal: std::io::stderr().is_terminal(),
        total: inputs.len(),
        started,
        spectra: 0,
    };
    let mut outcomes: Vec<Outcome> = Vec::new();
    let mut stop = false;
    for (i, input) in inputs.into_iter().enumerate() {
        let t0 = Instant::now();
        let dir = out.join(&input.name);
        let mtimes = mtime(&input.path);
        let outcome = if stop {
            Outcome {
                input,
                status: FileStatus::Skipped,
                error: "not processed: an earlier file failed and --fail-fast is set".into(),
                summary: None,
                seconds: 0.0,
                mtime_unix: mtimes.map(|m| m.0),
            }
        } else if let Some(summary) =
            args.resume.then(|| reusable(&dir, &input.path, &config_text)).flatten()
        {
            Outcome {
                status: summary.status,
                error: summary.error.clone(),
                summary: Some(summary),
                input,
                seconds: t0.elapsed().as_secs_f64(),
                mtime_unix: mtimes.map(|m| m.0),
            }
        } else {
            match screen::screen_file(&input.path, &config, &pool) {
                Ok(report) => {
                    if args.verbose {
                        for u in &report.summary.unreadable {
                            output::report(&input.path, &u.error);
                        }
                    }
                    let completion = Completion {
                        tool_version: env!("CARGO_PKG_VERSION").into(),
                        input_bytes: report.summary.bytes,
                        input_mtime_ns: mtimes.map_or(0, |m| m.1),
                        config: config_text.clone(),
                        summary: report.summary.clone(),
                    };
                    let (status, error) = match write_reports(&dir, &report, &completion) {
                        Ok(()) => (report.summary.status, report.summary.error.clone()),
                        Err(e) => {
                            (FileStatus::Failed, escape_text(&format!("writing reports: {e}")))
                        }
                    };
                    if status != FileStatus::Ok {
                        output::report(&input.path, &error);
                    }
                    Outcome {
                        input,
                        status,
                        error,
                        summary: Some(report.summary),
                        seconds: t0.elapsed().as_secs_f64(),
                        mtime_unix: mtimes.map(|m| m.0),
                    }
                }
                Err(e) => {
                    output::report(&input.path, &e);
                    Outcome {
                        input,
                        status: FileStatus::Failed,
                        error: escape_text(&e.to_string()),
                        summary: None,
                        seconds: t0.elapsed().as_secs_f64(),
                        mtime_unix: mtimes.map(|m| m.0),
                    }
                }
            }
        };
        if args.fail_fast && matches!(outcome.status, FileStatus::Failed | FileStatus::Partial) {
            stop = true;
        }
        progress.file_done(i + 1, &outcome);
        outcomes.push(outcome);
    }
    write_batch(out, &outcomes)?;
    write_run_record(out, &config, pool.current_num_threads(), &outcomes, started_at, started)?;
    let all_ok = outcomes.iter().all(|o| o.status == FileStatus::Ok);
    Ok(if all_ok { output::OK } else { output::SOME_FAILED })
}

fn write_batch(out: &Path, outcomes: &[Outcome]) -> anyhow::Result<()> {
    let rows: Vec<BatchRow<'_>> = outcomes
        .iter()
        .map(|o| {
            let s = o.summary.as_ref();
            BatchRow {
                file: escape_text(&o.input.path.display().to_string()),
                status: o.status.name(),
                error: o.error.clone(),
                spectra: s.map(|s| s.spectra),
                ms1: s.map(|s| s.ms1),
                ms2: s.map(|s| s.ms2),
                rt_start_min: s.and_then(|s| s.rt_start_min),
                rt_end_min: s.and_then(|s| s.rt_end_min),
                flagged_spectra: s.map(|s| s.flagged_spectra),
                halogen_features: s.map(|s| s.halogen_features),
                odd_nominal_features: s.map(|s| s.odd_nominal_features),
                unreadable_spectra: s.map(|s| s.unreadable.len()),
                seconds: (o.seconds * 1000.0).round() / 1000.0,
            }
        })
        .collect();
    report::write_atomic(&out.join("batch.tsv"), |w| report::write_tsv(w, BATCH_COLUMNS, &rows))?;
    Ok(())
}

fn write_run_record(
    out: &Path,
    config: &ScreenConfig,
    threads: usize,
    outcomes: &[Outcome],
    started_at: SystemTime,
    started: Instant,
) -> anyhow::Result<()> {
    let record = RunRecord {
        tool: "mzsift",
        version: env!("CARGO_PKG_VERSION"),
        started_utc: utc(started_at),
        finished_utc: utc(SystemTime::now()),
        seconds: started.elapsed().as_secs_f64(),
        threads,
        config,
        inputs: outcomes
            .iter()
            .map(|o| InputRecord {
                path: o.input.path.display().to_string(),
                report_folder: &o.input.name,
                status: o.status.name(),
                bytes: o.summary.as_ref().map(|s| s.bytes),
                mtime_unix: o.mtime_unix,
                sha256: o.summary.as_ref().map(|s| s.sha256.as_str()),
                seconds: o.seconds,
                error: &o.error,
            })
            .collect(),
        caution: screen::CAUTION,
    };
    report::write_json_atomic(&out.join("run.json"), &record)?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn utc_formats_known_instants() {
        // 2000-03-01 is day 11017 after 1970-01-01; 2026-12-02T01:06:43Z is 1796173603 s.
        assert_eq!(utc(UNIX_EPOCH), "1970-01-01T00:00:00Z");
        assert_eq!(
            utc(UNIX_EPOCH + std::time::Duration::from_secs(11_017 * 86_400)),
            "2000-03-01T00:00:00Z"
        );
        assert_eq!(
            utc(UNIX_EPOCH + std::time::Duration::from_secs(1_796_173_603)),
            "2026-12-02T01:06:43Z"
        );
    }

    #[test]
    fn extensions_are_recognised_case_insensitively() {
        assert!(is_mzml("a.mzML") && is_mzml("b.MZML.GZ") && is_mzml("c.mzml"));
        assert!(!is_mzml("d.mzXML") && !is_mzml("e.mzML.bak"));
        assert_eq!(strip_extension("site/night.mzML.gz"), "site/night");
        assert_eq!(strip_extension("x.MZML"), "x");
    }
}
