//! One self-contained HTML page per batch, read from the reports on disk.
//!
//! [`RunFolder::load`] reads an output folder of `mzsift run` (or `merge`): `run.json`,
//! `batch.tsv`, `check.tsv` when `mzsift check` wrote into it, the batch view
//! (`batch_compounds.tsv`, `detections.tsv`) and each file's `spectra.tsv`, `compounds.tsv`,
//! `traces.tsv`, `cluster.tsv` and `ions.tsv`. Every part that is missing or unreadable is
//! kept as the sentence the page shows in its place, so a page always renders.
//! [`render`] turns the model into one HTML document: inline CSS and SVG (plots drawn with
//! `plotters`, the page a `maud` template), no script, no font or file from elsewhere.
//! [`write_report`] does both and writes the page atomically.
//!
//! The page repeats the caution of every report: flags are screening hints, not
//! identifications.
//!
//! # Examples
//!
//! ```
//! let dir = tempfile::tempdir()?;
//! std::fs::write(dir.path().join("batch.tsv"), "file\tstatus\terror\tspectra\nnight-01.mzML\tfailed\tcut off\t0\n")?;
//! let page = mzcore::html::render(&mzcore::html::RunFolder::load(dir.path()));
//! assert!(page.contains("This file failed: cut off"));
//! assert!(page.contains("Screening hints, not identifications."));
//! assert!(!page.contains("<script"));
//! # Ok::<_, Box<dyn std::error::Error>>(())
//! ```

mod model;
mod page;
mod plot;
mod table;

use std::path::Path;

pub use model::{
    BatchCompound, BatchMatrix, BatchRow, CheckRow, ClusterShell, CompoundRow, Detection,
    FileEntry, FileEvidence, HalogenEvidence, Loaded, RunFolder, RunInfo, RunInput, SpectrumPoint,
    TracePoint,
};
pub use page::{TOL_YLORBR, number, render};
pub use plot::OKABE_ITO;
pub use table::{Row, Table};

use crate::Result;

/// What [`write_report`] wrote.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PageStats {
    /// Size of the page, bytes.
    pub bytes: usize,
    /// Files listed.
    pub files: usize,
    /// Sections of halogenated batch compounds.
    pub compound_sections: usize,
    /// Cells of the heat map (files x compounds).
    pub heat_map_cells: usize,
}

/// Reads the output folder `dir` and writes its page to `out` (atomically: a temporary
/// sibling renamed into place).
///
/// # Examples
///
/// ```
/// let dir = tempfile::tempdir()?;
/// let out = dir.path().join("report.html");
/// let stats = mzcore::html::write_report(dir.path(), &out)?;
/// assert_eq!((stats.files, stats.compound_sections), (0, 0));
/// assert!(std::fs::read_to_string(&out)?.contains("batch.tsv is not in"));
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn write_report(dir: &Path, out: &Path) -> Result<PageStats> {
    let folder = RunFolder::load(dir);
    let page = render(&folder);
    crate::report::write_atomic(out, |w| Ok(w.write_all(page.as_bytes())?))?;
    Ok(PageStats {
        bytes: page.len(),
        files: folder.files.as_ref().map_or(0, Vec::len),
        compound_sections: folder.halogenated.len(),
        heat_map_cells: folder.batch.as_ref().map_or(0, |m| m.values.len()),
    })
}
