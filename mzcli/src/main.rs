//! `mzsift`: command-line batch screening of mzML acquisitions.

use std::io::Write;
use std::process::ExitCode;

use clap::{Parser, Subcommand};

mod cmd;

/// Command-line arguments.
#[derive(Debug, Parser)]
#[command(
    name = "mzsift",
    version,
    about = "Screens mzML acquisitions for halogen isotope signatures and odd nominal molecular ions"
)]
struct Cli {
    #[command(subcommand)]
    command: Command,
}

/// The subcommands.
#[derive(Debug, Subcommand)]
enum Command {
    /// Isotope pattern of a formula as TSV (shells, fine structure, or at a resolving power).
    Pattern(cmd::pattern::PatternArgs),
    /// Monoisotopic, nominal and average mass, ion m/z and nitrogen-rule parity of a formula.
    Mass(cmd::mass::MassArgs),
}

fn main() -> ExitCode {
    let cli = Cli::parse();
    let stdout = std::io::stdout();
    let mut out = std::io::BufWriter::new(stdout.lock());
    let result = match &cli.command {
        Command::Pattern(a) => cmd::pattern::run(a, &mut out),
        Command::Mass(a) => cmd::mass::run(a, &mut out),
    }
    .and_then(|()| out.flush().map_err(anyhow::Error::from));
    match result {
        Ok(()) => ExitCode::SUCCESS,
        Err(e) => {
            if let Some(io) = e.downcast_ref::<std::io::Error>() {
                if io.kind() == std::io::ErrorKind::BrokenPipe {
                    return ExitCode::SUCCESS;
                }
            }
            eprintln!("mzsift: {e:#}");
            ExitCode::from(2)
        }
    }
}
