//! `mzsift check`: the QC gate for new data.
//!
//! Reads the rules (`mzcore::qc::QcRules`), screens every input once (the pipeline of `run`,
//! plus the extracted-ion traces the required compounds need), evaluates the rules, and writes
//! `check.tsv`, `check.junit.xml` and `check.mzQC` (or `check.tsv` on stdout without `-o`). One summary line
//! goes to stderr. Exit code 0: every rule passed or warned; 1: some rule failed; 2: usage or
//! rules error.

use std::path::PathBuf;

use anyhow::Context;
use mzcore::mzqc::{self, MzQc, RunInput};
use mzcore::qc::{self, QC_COLUMNS, QcRules, QcStatus};
use mzcore::report;
use mzcore::screen;

use crate::batch::discover;
use crate::output;

/// Arguments of `mzsift check`.
#[derive(clap::Args, Debug)]
pub struct CheckArgs {
    /// Input files or folders (folders are searched recursively for .mzML and .mzML.gz).
    #[arg(required = true, value_hint = clap::ValueHint::AnyPath)]
    pub inputs: Vec<PathBuf>,
    /// The rules (TOML; see fixtures/qc-rules.toml).
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub rules: PathBuf,
    /// Output folder for check.tsv and check.junit.xml (default: check.tsv on stdout).
    #[arg(short = 'o', long = "out", value_hint = clap::ValueHint::DirPath)]
    pub out: Option<PathBuf>,
    /// Screening configuration (see `mzsift config`).
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub config: Option<PathBuf>,
    /// Worker threads (default: the config's, else one per core).
    #[arg(short = 'j', long = "jobs")]
    pub jobs: Option<usize>,
    /// Print only the summary line (not each failed or warning rule).
    #[arg(short, long)]
    pub quiet: bool,
}

fn load_rules(path: &std::path::Path) -> anyhow::Result<QcRules> {
    let text = std::fs::read_to_string(path).with_context(|| path.display().to_string())?;
    QcRules::from_toml(&text).with_context(|| path.display().to_string())
}

/// Runs `mzsift check`; returns the exit code.
pub fn run(args: &CheckArgs, stdout: &mut dyn std::io::Write) -> anyhow::Result<u8> {
    let setup = load_rules(&args.rules).and_then(|rules| {
        let config = crate::cmd::run::load_config(args.config.as_deref(), args.jobs)?;
        Ok((rules, config))
    });
    let (rules, config) = match setup {
        Ok(s) => s,
        Err(e) => {
            eprintln!("mzsift: {e:#}");
            return Ok(output::USAGE);
        }
    };
    let inputs = discover(&args.inputs)?;
    if inputs.is_empty() {
        eprintln!("mzsift: no .mzML or .mzML.gz files found under the inputs given");
        return Ok(output::USAGE);
    }
    let pool = mzcore::pipeline::thread_pool(config.threads)?;
    let mut rows = Vec::new();
    let mut runs = Vec::new();
    for input in &inputs {
        let file = input.path.display().to_string();
        let targets = rules.trace_targets(&file);
        let mine = match screen::screen_file_traced(&input.path, &config, &pool, &targets) {
            Ok(r) => {
                if config.output.mzqc {
                    let now = std::time::SystemTime::now();
                    let run = RunInput::new(&input.name, &input.path, now);
                    runs.push(mzqc::run_quality(&run, &r));
                }
                rules.evaluate(&file, &r)
            }
            Err(e) => {
                output::report(&input.path, &e);
                rules.unreadable_file(&file, &e.to_string())
            }
        };
        if !args.quiet {
            for r in mine.iter().filter(|r| r.status != QcStatus::Pass) {
                eprintln!(
                    "mzsift: {}: {}: {} (observed {}, limit {}): {}",
                    input.path.display(),
                    r.rule,
                    r.status.name(),
                    r.observed,
                    r.limit,
                    report::unescape_text(&r.message)
                );
            }
        }
        rows.extend(mine);
    }
    match &args.out {
        Some(out) => {
            std::fs::create_dir_all(out).with_context(|| out.display().to_string())?;
            report::write_atomic(&out.join("check.tsv"), |w| {
                report::write_tsv(w, QC_COLUMNS, &rows)
            })?;
            report::write_atomic(&out.join("check.junit.xml"), |w| qc::write_junit(w, &rows))?;
        }
        None => report::write_tsv(&mut *stdout, QC_COLUMNS, &rows)?,
    }
    let (pass, warn, fail) = qc::tally(&rows);
    let verdict = format!(
        "mzsift check: {} files, {} rule results: {pass} pass, {warn} warn, {fail} fail: {}",
        inputs.len(),
        rows.len(),
        if fail == 0 { "PASSED" } else { "FAILED" }
    );
    if let (Some(out), true) = (&args.out, config.output.mzqc) {
        // The rule verdicts have no PSI-MS QC term: the summary goes into the free-text
        // description, each rule's verdict stays in check.tsv / check.junit.xml.
        let description = format!(
            "{verdict}. Per-rule verdicts are in check.tsv and check.junit.xml (no PSI-MS QC term exists for them)."
        );
        let path = out.join("check.mzQC");
        MzQc::new(runs, Some(description), std::time::SystemTime::now())
            .write(&path)
            .with_context(|| path.display().to_string())?;
    }
    eprintln!("{verdict}");
    Ok(if fail == 0 { output::OK } else { output::SOME_FAILED })
}
