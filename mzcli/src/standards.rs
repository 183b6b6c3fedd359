//! Outputs in open standard formats: each report folder's `quality.mzQC` and
//! `centroided.mzML`, and the batch's `run.mzQC` assembled from the folders (so that folders
//! kept by `--resume` contribute their metrics unchanged).

use std::path::{Path, PathBuf};
use std::time::SystemTime;

use anyhow::Context;
use mzcore::mzml::{CentroidedWriter, SourceFile};
use mzcore::mzqc::{self, MzQc, RunInput};
use mzcore::screen::{self, FileReport, FileStatus, ScreenConfig};

use crate::batch::Outcome;

/// The centroided copy inside a report folder.
pub const CENTROIDED_FILE: &str = "centroided.mzML";
/// The per-file mzQC document inside a report folder.
pub const QUALITY_FILE: &str = "quality.mzQC";
/// The batch's mzQC document.
pub const RUN_MZQC: &str = "run.mzQC";

/// Files of a report folder that the configuration asks for, besides the TSV reports.
pub fn folder_files(config: &ScreenConfig) -> Vec<&'static str> {
    let mut v = Vec::new();
    if config.output.mzqc {
        v.push(QUALITY_FILE);
    }
    if config.output.centroided_mzml {
        v.push(CENTROIDED_FILE);
    }
    v
}

/// What goes into a report folder besides the TSV reports, made while screening.
pub struct FolderExtras {
    centroided: Option<PathBuf>,
    quality: Option<MzQc>,
}

impl FolderExtras {
    /// Moves the staged centroided file into the folder being filled (`tmp`) and writes the
    /// folder's `quality.mzQC`.
    pub fn place(&self, tmp: &Path) -> mzcore::Result<()> {
        if let Some(staged) = &self.centroided {
            std::fs::rename(staged, tmp.join(CENTROIDED_FILE))
                .map_err(|e| mzcore::Error::from(e).in_field(&staged.display().to_string()))?;
        }
        if let Some(q) = &self.quality {
            q.write(&tmp.join(QUALITY_FILE))?;
        }
        Ok(())
    }

    /// Removes a staged file that was not placed.
    pub fn discard(&self) {
        if let Some(staged) = &self.centroided {
            let _ = std::fs::remove_file(staged);
        }
    }
}

/// Screens one input for `mzsift run` into its report and the extras for its folder `dir`
/// (the centroided copy is staged beside `dir` while the file is read).
pub fn screen_for_folder(
    path: &Path,
    name: &str,
    dir: &Path,
    config: &ScreenConfig,
    pool: &mzcore::pipeline::ThreadPool,
) -> mzcore::Result<(FileReport, FolderExtras)> {
    let (report, centroided) = if config.output.centroided_mzml {
        let folder = dir.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
        let staged =
            dir.with_file_name(format!(".{folder}.{CENTROIDED_FILE}-{}", std::process::id()));
        if let Some(parent) = staged.parent() {
            std::fs::create_dir_all(parent)?;
        }
        let mut w =
            CentroidedWriter::create(&staged, config.output.centroided_encoding, config.centroid)?;
        let report = screen::screen_file_centroided(path, config, pool, &[], &mut w)?;
        let source = SourceFile {
            name: path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default(),
            location: mzqc::file_uri(path.parent().unwrap_or(Path::new("."))),
            sha256: Some(report.summary.sha256.clone()).filter(|s| !s.is_empty()),
        };
        w.finish(&source)?;
        (report, Some(staged))
    } else {
        (screen::screen_file(path, config, pool)?, None)
    };
    let quality = config.output.mzqc.then(|| {
        let now = SystemTime::now();
        let run = mzqc::run_quality(&RunInput::new(name, path, now), &report);
        MzQc::new(vec![run], None, now)
    });
    Ok((report, FolderExtras { centroided, quality }))
}

/// Removes the `run.mzQC` of an earlier run.
pub fn remove_stale(out: &Path) -> anyhow::Result<()> {
    let p = out.join(RUN_MZQC);
    if p.exists() {
        std::fs::remove_file(&p).with_context(|| p.display().to_string())?;
    }
    Ok(())
}

/// Writes `out/run.mzQC` from the `quality.mzQC` of every report folder of `outcomes` (none
/// when no folder has one).
pub fn write_run_mzqc(out: &Path, outcomes: &[Outcome]) -> anyhow::Result<()> {
    let mut runs = Vec::new();
    for o in outcomes.iter().filter(|o| o.status != FileStatus::Skipped && o.summary.is_some()) {
        let p = out.join(&o.name).join(QUALITY_FILE);
        let Ok(text) = std::fs::read_to_string(&p) else { continue };
        let doc = MzQc::from_json(&text).with_context(|| p.display().to_string())?;
        runs.extend(doc.mzqc.run_qualities);
    }
    let description = format!(
        "mzsift run: quality metrics of {} of {} inputs (files that could not be screened have \
         none). Halogen and nitrogen-rule flags, unreadable spectra and file status have no \
         PSI-MS QC term and are in batch.tsv. {}",
        runs.len(),
        outcomes.len(),
        screen::CAUTION
    );
    let p = out.join(RUN_MZQC);
    MzQc::new(runs, Some(description), SystemTime::now())
        .write(&p)
        .with_context(|| p.display().to_string())?;
    Ok(())
}
