//! `mzsift`: command-line batch screening of mzML acquisitions.
//!
//! The binary is a thin layer over `mzcore`: it parses arguments, writes data to stdout and
//! messages to stderr (`mzsift: <file>: <where>: <cause>`), and maps outcomes to exit codes.

mod batch;
mod cmd;
mod output;
mod standards;

use std::process::ExitCode;

use clap::{Parser, Subcommand};

/// Streams mzML acquisitions, centroids their spectra and flags chlorine/bromine isotope
/// signatures and odd nominal molecular ions. Flags are screening hints, not identifications.
#[derive(Parser, Debug)]
#[command(name = "mzsift", version, about, long_about = None)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

#[derive(Subcommand, Debug)]
enum Command {
    /// Screen a batch: every .mzML / .mzML.gz under the inputs, reports into OUTDIR.
    #[command(
        long_about = "Screens every input (folders are searched recursively for .mzML and .mzML.gz, \
hidden entries skipped) and writes OUTDIR/batch.tsv, OUTDIR/run.json and, per input, \
OUTDIR/<name>/{spectra,ions,features}.tsv. Every report is written to a temporary name and \
renamed when complete. Exit code 0: all files ok; 1: some failed or were partial; 2: usage or \
configuration error. Flags are screening hints, not identifications.",
        after_help = "Examples:\n  mzsift run fixtures/demo -o night-report\n  mzsift run /data/night-04 -o out -j 2 --config lab.toml --resume"
    )]
    Run(cmd::run::RunArgs),
    /// QC gate for new data: per-file rules, check.tsv, JUnit XML, exit code 0 pass / 1 fail.
    #[command(
        long_about = "Screens every input once and evaluates the rules of a TOML file (spectra and \
MS1 counts, retention-time coverage, scan-time gaps, median TIC, empty spectra, unreadable \
spectra, checksum, required compounds, carry-over into blanks). Each rule passes, warns or \
fails with the observed value and the limit. Writes OUTDIR/check.tsv and \
OUTDIR/check.junit.xml (without -o: check.tsv on stdout) and one summary line on stderr. Exit \
code 0: no rule failed (warnings allowed); 1: some rule failed; 2: usage or rules error (an \
unknown key or a wrong type names the key).",
        after_help = "Examples:\n  mzsift check fixtures/demo --rules fixtures/qc-rules.toml -o qc\n  mzsift check new/night-04.mzML --rules lab-qc.toml > check.tsv"
    )]
    Check(cmd::check::CheckArgs),
    /// Combine the output folders of separate runs into one batch (batch.tsv, run.json).
    #[command(
        long_about = "Combines the output folders of separate `mzsift run`s (e.g. one cluster job \
per input) into OUTDIR: every report folder (names made unique with -2, -3, ...), batch.tsv \
with rows ordered by input path, and run.json. Runs made with another tool version or other \
parameters (the thread count aside) are refused unless --allow-mixed is given. Exit code 0: \
every file ok; 1: some file failed, was partial or skipped; 2: usage error or refused.",
        after_help = "Examples:\n  mzsift merge parts/night-01 parts/night-02 -o night\n  mzsift merge jobs/* -o all --allow-mixed"
    )]
    Merge(cmd::merge::MergeArgs),
    /// Print the default configuration as commented TOML (or check a configuration file).
    #[command(
        after_help = "Examples:\n  mzsift config > lab.toml\n  mzsift config --check lab.toml"
    )]
    Config(cmd::config::ConfigArgs),
    /// One TSV row per spectrum, computed from the decoded arrays.
    #[command(
        after_help = "Examples:\n  mzsift list fixtures/variant-zlib-f64.mzML\n  mzsift list run.mzML.gz > spectra.tsv"
    )]
    List(cmd::list::ListArgs),
    /// Summary of a file: counts per MS level, RT range, polarity, encodings, index, checksum.
    #[command(
        after_help = "Examples:\n  mzsift info fixtures/variant-zlib-f64.mzML\n  mzsift info --verify --format json run.mzML"
    )]
    Info(cmd::info::InfoArgs),
    /// Peaks (mz intensity area snr fwhm) of one spectrum, or its decoded points with --raw.
    #[command(
        after_help = "Examples:\n  mzsift peaks run.mzML --index 12\n  mzsift peaks run.mzML --id scan=13 --raw"
    )]
    Peaks(cmd::peaks::PeaksArgs),
    /// Isotope pattern of a formula as TSV (shells, fine structure, or at a resolving power).
    #[command(
        after_help = "Examples:\n  mzsift pattern C12H7Cl3O2 --ion M+.\n  mzsift pattern C6Cl6 --shells\n  mzsift pattern C10H5Cl5 --ion M-H --resolution 60000"
    )]
    Pattern(cmd::pattern::PatternArgs),
    /// Monoisotopic, nominal and average mass, ion m/z and nitrogen-rule parity of a formula.
    #[command(after_help = "Examples:\n  mzsift mass C8H10N4O2 --ion M+H\n  mzsift mass C12Br10O")]
    Mass(cmd::mass::MassArgs),
    /// Writes the demo batch (or any scenario) as mzML with ground-truth TSVs.
    #[command(
        after_help = "Examples:\n  mzsift demo demo-batch\n  mzsift demo big --spectra 4000 --points 40000"
    )]
    Demo(cmd::demo::DemoArgs),
}

fn main() -> ExitCode {
    let cli = match Cli::try_parse() {
        Ok(cli) => cli,
        Err(e) => {
            let _ = e.print();
            return ExitCode::from(if e.use_stderr() { output::USAGE } else { output::OK });
        }
    };
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    let result = match &cli.command {
        Command::Run(a) => cmd::run::run(a),
        Command::Check(a) => cmd::check::run(a, &mut out),
        Command::Merge(a) => cmd::merge::run(a),
        Command::Config(a) => cmd::config::run(a, &mut out),
        Command::List(a) => cmd::list::run(a, &mut out),
        Command::Info(a) => cmd::info::run(a, &mut out),
        Command::Peaks(a) => cmd::peaks::run(a, &mut out),
        Command::Pattern(a) => output::input_error_is_usage(cmd::pattern::run(a, &mut out)),
        Command::Mass(a) => output::input_error_is_usage(cmd::mass::run(a, &mut out)),
        Command::Demo(a) => cmd::demo::run(a, &mut out),
    };
    let flushed = std::io::Write::flush(&mut out).map_err(anyhow::Error::from);
    output::finish(result.and_then(|code| flushed.map(|_| code)))
}
