//! `mzsift merge`: combines the output folders of separate runs (e.g. one cluster job per
//! input) into one batch with `batch.tsv`, `run.json` and every report folder.
//!
//! Runs made with a different tool version or different parameters are refused unless
//! `--allow-mixed` is given (the worker thread count is not a parameter of the results: the
//! reports are the same for any number of threads). Rows are ordered by input path, compared
//! component by component, which is the order `mzsift run` finds files in a folder; report
//! folders keep their names, made unique with `-2`, `-3`, ... on collision.

use std::collections::HashSet;
use std::path::{Path, PathBuf};

use anyhow::Context;
use mzcore::report;
use mzcore::screen::{self, FileStatus, ScreenConfig};

use crate::batch::{
    COMPLETION_FILE, Completion, InputRecord, MergedRun, Outcome, RunRecord, input_records,
    unique_name,
};
use crate::output;

/// Arguments of `mzsift merge`.
#[derive(clap::Args, Debug)]
pub struct MergeArgs {
    /// Output folders of finished runs (each with run.json).
    #[arg(required = true, value_hint = clap::ValueHint::DirPath)]
    pub dirs: Vec<PathBuf>,
    /// Output folder of the merged batch.
    #[arg(short = 'o', long = "out", value_hint = clap::ValueHint::DirPath)]
    pub out: PathBuf,
    /// Merge runs made with different tool versions or parameters (run.json then lists each
    /// run's own under `merged_from`).
    #[arg(long)]
    pub allow_mixed: bool,
    /// Sample sheet for the batch view (as for `mzsift run --samples`).
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub samples: Option<PathBuf>,
    /// No summary line.
    #[arg(short, long)]
    pub quiet: bool,
}

/// One input of one run, with what its report folder holds.
struct Entry {
    run: usize,
    record: InputRecord,
    completion: Option<Completion>,
}

/// What results depend on: the tool version and every parameter but the thread count.
fn settings_key(version: &str, config: &ScreenConfig) -> (String, String) {
    let mut c = config.clone();
    c.threads = 0;
    (version.to_owned(), c.to_toml())
}

fn read_run(dir: &Path) -> anyhow::Result<RunRecord> {
    let path = dir.join("run.json");
    let text = std::fs::read_to_string(&path)
        .with_context(|| format!("{}: not the output folder of a finished run", path.display()))?;
    serde_json::from_str(&text).with_context(|| path.display().to_string())
}

fn read_completion(dir: &Path) -> anyhow::Result<Completion> {
    let path = dir.join(COMPLETION_FILE);
    let text = std::fs::read_to_string(&path).with_context(|| path.display().to_string())?;
    serde_json::from_str(&text).with_context(|| path.display().to_string())
}

/// Copies the files of report folder `from` into `to`, atomically (a temporary folder renamed
/// into place).
fn copy_folder(from: &Path, to: &Path) -> mzcore::Result<()> {
    if let Some(parent) = to.parent() {
        std::fs::create_dir_all(parent)?;
    }
    report::replace_dir_atomic(to, |tmp| {
        let mut entries: Vec<_> = std::fs::read_dir(from)?.collect::<Result<_, _>>()?;
        entries.sort_by_key(|e| e.file_name());
        for e in entries {
            if e.file_type()?.is_file() {
                std::fs::copy(e.path(), tmp.join(e.file_name()))?;
            }
        }
        Ok(())
    })
}

fn same_folder(a: &Path, b: &Path) -> bool {
    match (a.canonicalize(), b.canonicalize()) {
        (Ok(x), Ok(y)) => x == y,
        _ => false,
    }
}

/// Runs `mzsift merge`; returns the exit code.
pub fn run(args: &MergeArgs) -> anyhow::Result<u8> {
    // Input and settings problems are usage errors, found before anything is written.
    let (runs, entries) = match plan(args) {
        Ok(p) => p,
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            return Ok(output::USAGE);
        }
    };
    let ids: Vec<(String, String)> =
        entries.iter().map(|e| (e.record.report_folder.clone(), e.record.path.clone())).collect();
    let config = &runs[0].config;
    let sheet = match crate::batch_view::read_sheet(args.samples.as_deref())
        .and_then(|s| crate::batch_view::assign(&ids, s.as_ref(), config).map(|_| s))
    {
        Ok(s) => s,
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            return Ok(output::USAGE);
        }
    };
    write(args, &runs, entries, sheet)
}

fn plan(args: &MergeArgs) -> anyhow::Result<(Vec<RunRecord>, Vec<Entry>)> {
    let mut runs = Vec::new();
    for dir in &args.dirs {
        if same_folder(dir, &args.out) {
            return Err(anyhow::anyhow!(
                "{}: the output folder cannot be one of the runs merged",
                dir.display()
            ));
        }
        runs.push(read_run(dir)?);
    }
    // Every run and every report folder must agree on the settings, unless told otherwise.
    let mut entries = Vec::new();
    let mut keys: Vec<((String, String), String)> = Vec::new();
    for (i, (dir, run)) in args.dirs.iter().zip(&runs).enumerate() {
        let key = settings_key(&run.version, &run.config);
        if !keys.iter().any(|(k, _)| *k == key) {
            keys.push((key.clone(), dir.display().to_string()));
        }
        for record in &run.inputs {
            let folder = dir.join(&record.report_folder);
            let completion = if folder.join(COMPLETION_FILE).is_file() {
                let c = read_completion(&folder)?;
                let config = ScreenConfig::from_toml(&c.config)
                    .with_context(|| folder.join(COMPLETION_FILE).display().to_string())?;
                let k = settings_key(&c.tool_version, &config);
                if !keys.iter().any(|(known, _)| *known == k) {
                    keys.push((k, folder.display().to_string()));
                }
                Some(c)
            } else {
                None
            };
            entries.push(Entry { run: i, record: record.clone(), completion });
        }
    }
    if keys.len() > 1 && !args.allow_mixed {
        let (first, rest) = (&keys[0], &keys[1..]);
        let mut why = Vec::new();
        for (k, place) in rest {
            let what = if k.0 != first.0.0 {
                format!("tool version {} vs {}", k.0, first.0.0)
            } else {
                "parameters".to_owned()
            };
            why.push(format!("{place} differs from {} in {what}", first.1));
        }
        return Err(anyhow::anyhow!(
            "refusing to merge runs made with different settings ({}); pass --allow-mixed to merge anyway",
            why.join("; ")
        ));
    }
    // The order `run` finds files in a folder: by path, component by component.
    entries.sort_by(|a, b| {
        let ka: Vec<&str> = a.record.path.split(['/', '\\']).collect();
        let kb: Vec<&str> = b.record.path.split(['/', '\\']).collect();
        ka.cmp(&kb)
    });
    Ok((runs, entries))
}

fn write(
    args: &MergeArgs,
    runs: &[RunRecord],
    entries: Vec<Entry>,
    sheet: Option<mzcore::batch::SampleSheet>,
) -> anyhow::Result<u8> {
    let out = &args.out;
    std::fs::create_dir_all(out).with_context(|| out.display().to_string())?;
    crate::batch::remove_stale_batch_files(out)?;
    let mut used = HashSet::new();
    let mut outcomes = Vec::new();
    for e in entries {
        let r = &e.record;
        let name = unique_name(&mut used, &r.report_folder);
        let mut outcome = Outcome {
            path: r.path.clone(),
            name: name.clone(),
            status: r.status,
            error: r.error.clone(),
            summary: None,
            seconds: r.seconds,
            mtime_unix: r.mtime_unix,
        };
        if let Some(c) = e.completion {
            let from = args.dirs[e.run].join(&r.report_folder);
            match copy_folder(&from, &out.join(&name)) {
                Ok(()) => outcome.summary = Some(c.summary),
                Err(err) => {
                    outcome.status = FileStatus::Failed;
                    outcome.error = report::escape_text(&format!("copying reports: {err}"));
                    output::report(Path::new(&r.path), &outcome.error);
                }
            }
        } else if matches!(r.status, FileStatus::Ok | FileStatus::Partial) {
            outcome.status = FileStatus::Failed;
            outcome.error = report::escape_text(&format!(
                "report folder {} has no {COMPLETION_FILE}",
                args.dirs[e.run].join(&r.report_folder).display()
            ));
            output::report(Path::new(&r.path), &outcome.error);
        }
        outcomes.push(outcome);
    }
    crate::batch::write_batch(out, &outcomes)?;
    let first = &runs[0];
    let pool = mzcore::pipeline::thread_pool(first.config.threads)?;
    let counts =
        pool.install(|| crate::batch_view::write(out, &outcomes, sheet.as_ref(), &first.config))?;
    if !args.quiet {
        eprintln!("{}", crate::batch_view::summary_line(&counts));
    }
    let record = RunRecord {
        tool: "mzsift".into(),
        version: first.version.clone(),
        started_utc: runs.iter().map(|r| r.started_utc.clone()).min().unwrap_or_default(),
        finished_utc: runs.iter().map(|r| r.finished_utc.clone()).max().unwrap_or_default(),
        seconds: runs.iter().map(|r| r.seconds).sum(),
        threads: runs.iter().map(|r| r.threads).max().unwrap_or(0),
        config: first.config.clone(),
        inputs: input_records(&outcomes),
        caution: screen::CAUTION.into(),
        merged_from: args
            .dirs
            .iter()
            .zip(runs)
            .map(|(d, r)| MergedRun {
                folder: d.display().to_string(),
                version: r.version.clone(),
                started_utc: r.started_utc.clone(),
                finished_utc: r.finished_utc.clone(),
                threads: r.threads,
                config: r.config.clone(),
            })
            .collect(),
    };
    crate::batch::write_run_record(out, &record)?;
    let all_ok = outcomes.iter().all(|o| o.status == FileStatus::Ok);
    Ok(if all_ok { output::OK } else { output::SOME_FAILED })
}
