//! `mzsift report`: the batch's HTML page, rendered from the reports on disk.

use std::path::{Path, PathBuf};

use crate::output;

/// File name of the page in the output folder.
pub const PAGE: &str = "report.html";

/// Arguments of `mzsift report`.
#[derive(clap::Args, Debug)]
pub struct ReportArgs {
    /// Output folder of `mzsift run` or `mzsift merge`.
    #[arg(value_hint = clap::ValueHint::DirPath)]
    pub outdir: PathBuf,
    /// Where to write the page (default: OUTDIR/report.html).
    #[arg(short = 'o', long = "out", value_hint = clap::ValueHint::FilePath)]
    pub out: Option<PathBuf>,
}

/// Writes the page of `outdir` to `page`; a failure is reported on stderr and returned.
pub fn write_page(outdir: &Path, page: &Path, quiet: bool) -> bool {
    match mzcore::html::write_report(outdir, page) {
        Ok(stats) => {
            if !quiet {
                eprintln!(
                    "mzsift: {}: {} files, {} halogenated compound sections, {} kB",
                    page.display(),
                    stats.files,
                    stats.compound_sections,
                    stats.bytes / 1000
                );
            }
            true
        }
        Err(e) => {
            output::report(page, &e);
            false
        }
    }
}

/// Runs `mzsift report`; returns the exit code.
pub fn run(args: &ReportArgs) -> anyhow::Result<u8> {
    if !args.outdir.is_dir() {
        output::report(&args.outdir, &"not a folder");
        return Ok(output::USAGE);
    }
    let page = args.out.clone().unwrap_or_else(|| args.outdir.join(PAGE));
    Ok(if write_page(&args.outdir, &page, false) { output::OK } else { output::USAGE })
}
