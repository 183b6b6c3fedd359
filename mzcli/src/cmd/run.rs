//! `mzsift run`: the overnight batch.
//!
//! Finds the inputs, screens each with one shared thread pool, writes each file's reports
//! into its own folder atomically (a temporary folder renamed into place, with a completion
//! record inside), and ends with `batch.tsv` and `run.json`. `--resume` reuses the folders
//! whose completion record matches the unchanged input and configuration.

use std::io::IsTerminal;
use std::path::{Path, PathBuf};
use std::time::{Instant, SystemTime};

use anyhow::Context;
use mzcore::compound::{CLUSTER_COLUMNS, COMPOUND_COLUMNS, TRACE_COLUMNS};
use mzcore::report::{self, escape_text};
use mzcore::screen::{
    self, FEATURE_COLUMNS, FileReport, FileStatus, FileSummary, ION_COLUMNS, SPECTRUM_COLUMNS,
    ScreenConfig,
};

use crate::batch::{
    COMPLETION_FILE, Completion, Outcome, REPORT_FILES, RunRecord, discover, input_records, mtime,
    utc,
};
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
    /// Also write each acquisition's centroided copy, OUTDIR/<name>/centroided.mzML
    /// (as `[output] centroided_mzml = true`).
    #[arg(long)]
    pub write_centroided: bool,
}

fn write_reports(
    dir: &Path,
    report: &FileReport,
    completion: &Completion,
    extras: &crate::standards::FolderExtras,
) -> mzcore::Result<()> {
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
        put("compounds.tsv", &|w| report::write_tsv(w, COMPOUND_COLUMNS, &report.compounds))?;
        put("traces.tsv", &|w| report::write_tsv(w, TRACE_COLUMNS, &report.compound_traces))?;
        put("cluster.tsv", &|w| report::write_tsv(w, CLUSTER_COLUMNS, &report.compound_clusters))?;
        extras.place(tmp)?;
        report::write_json_atomic(&tmp.join(COMPLETION_FILE), completion)
    })
}

/// The completion record of an earlier run, if it matches the input and configuration.
fn reusable(
    dir: &Path,
    input: &Path,
    config: &ScreenConfig,
    config_text: &str,
) -> Option<FileSummary> {
    let text = std::fs::read_to_string(dir.join(COMPLETION_FILE)).ok()?;
    let c: Completion = serde_json::from_str(&text).ok()?;
    let (_, mtime_ns) = mtime(input)?;
    let bytes = std::fs::metadata(input).ok()?.len();
    let same = c.tool_version == env!("CARGO_PKG_VERSION")
        && c.input_bytes == bytes
        && c.input_mtime_ns == mtime_ns
        && c.config == config_text;
    let files_there = REPORT_FILES
        .iter()
        .chain(&crate::standards::folder_files(config))
        .all(|f| dir.join(f).is_file());
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
                o.name,
                o.status.name()
            );
            if done == self.total {
                eprintln!();
            }
        } else {
            eprintln!(
                "{} mzsift: {}: {} ({done}/{} files, {:.1} s)",
                utc(SystemTime::now()),
                o.path,
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
    let mut config = match load_config(args.config.as_deref(), args.jobs) {
        Ok(c) => c,
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            return Ok(output::USAGE);
        }
    };
    config.output.centroided_mzml |= args.write_centroided;
    let config_text = config.to_toml();
    let inputs = discover(&args.inputs)?;
    if inputs.is_empty() && !args.quiet {
        eprintln!("mzsift: no .mzML or .mzML.gz files found under the inputs given");
    }
    let out = &args.out;
    std::fs::create_dir_all(out).with_context(|| out.display().to_string())?;
    crate::batch::remove_stale_batch_files(out)?;
    crate::standards::remove_stale(out)?;
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
        let (path, name) = (input.path.display().to_string(), input.name.clone());
        let outcome = if stop {
            Outcome {
                path,
                name,
                status: FileStatus::Skipped,
                error: "not processed: an earlier file failed and --fail-fast is set".into(),
                summary: None,
                seconds: 0.0,
                mtime_unix: mtimes.map(|m| m.0),
            }
        } else if let Some(summary) =
            args.resume.then(|| reusable(&dir, &input.path, &config, &config_text)).flatten()
        {
            Outcome {
                status: summary.status,
                error: summary.error.clone(),
                summary: Some(summary),
                path,
                name,
                seconds: t0.elapsed().as_secs_f64(),
                mtime_unix: mtimes.map(|m| m.0),
            }
        } else {
            match crate::standards::screen_for_folder(&input.path, &name, &dir, &config, &pool) {
                Ok((report, extras)) => {
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
                    let (status, error) = match write_reports(&dir, &report, &completion, &extras) {
                        Ok(()) => (report.summary.status, report.summary.error.clone()),
                        Err(e) => {
                            extras.discard();
                            (FileStatus::Failed, escape_text(&format!("writing reports: {e}")))
                        }
                    };
                    if status != FileStatus::Ok {
                        output::report(&input.path, &error);
                    }
                    Outcome {
                        path,
                        name,
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
                        path,
                        name,
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
    crate::batch::write_batch(out, &outcomes)?;
    let record = RunRecord {
        tool: "mzsift".into(),
        version: env!("CARGO_PKG_VERSION").into(),
        started_utc: utc(started_at),
        finished_utc: utc(SystemTime::now()),
        seconds: started.elapsed().as_secs_f64(),
        threads: pool.current_num_threads(),
        config: config.clone(),
        inputs: input_records(&outcomes),
        caution: screen::CAUTION.into(),
        merged_from: Vec::new(),
    };
    crate::batch::write_run_record(out, &record)?;
    if config.output.mzqc {
        crate::standards::write_run_mzqc(out, &outcomes)?;
    }
    let all_ok = outcomes.iter().all(|o| o.status == FileStatus::Ok);
    Ok(if all_ok { output::OK } else { output::SOME_FAILED })
}
