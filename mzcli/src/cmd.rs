//! One module per subcommand, and what they share.

pub mod check;
pub mod config;
pub mod demo;
pub mod formula;
pub mod info;
pub mod list;
pub mod mass;
pub mod merge;
pub mod pattern;
pub mod peaks;
pub mod report;
pub mod run;

use std::io::BufRead;
use std::path::Path;

use anyhow::Context;
use mzcore::mzml::{Reader, ReaderOptions};

/// A reader over a file, or stdin for `-`.
pub type InputReader = Reader<Box<dyn BufRead + Send>>;

/// Opens `path` (or stdin for `-`) as an mzML reader; the error names the file.
pub fn open(path: &Path, options: ReaderOptions) -> anyhow::Result<InputReader> {
    let inner: Box<dyn BufRead + Send> = if path.as_os_str() == "-" {
        Box::new(std::io::BufReader::with_capacity(256 * 1024, std::io::stdin()))
    } else {
        let file = std::fs::File::open(path).with_context(|| format!("{}", path.display()))?;
        Box::new(std::io::BufReader::with_capacity(256 * 1024, file))
    };
    Reader::with_options(inner, options).with_context(|| format!("{}", path.display()))
}
