//! The batch view of `run` and `merge`: reads every report folder's `compounds.tsv` (and the
//! polarity / resolution of its MS1 spectra from `spectra.tsv`) back from disk, so that a fresh
//! run, `--resume` and `merge` compute it from the same inputs, and writes
//! `batch_compounds.tsv`, `detections.tsv` and `rt_drift.tsv` atomically.

use std::collections::BTreeMap;
use std::path::{Path, PathBuf};

use mzcore::batch::{
    self, AcquisitionClass, BatchCounts, BatchFile, FileIdentity, SampleAssignment, SampleSheet,
};
use mzcore::compound::Compound;
use mzcore::report;
use mzcore::screen::{FileStatus, ScreenConfig};
use serde::Deserialize;

use crate::batch::Outcome;
use crate::output;

/// The tables the batch view writes into the output folder.
pub const BATCH_VIEW_FILES: [&str; 3] = ["batch_compounds.tsv", "detections.tsv", "rt_drift.tsv"];

/// Reads the sample sheet given with `--samples`; an error names the file and line.
pub fn read_sheet(path: Option<&Path>) -> anyhow::Result<Option<SampleSheet>> {
    Ok(match path {
        Some(p) => Some(SampleSheet::read(p)?),
        None => None,
    })
}

/// Sample, kind and acquisition order of each `(report folder, input path)`.
pub fn assign(
    files: &[(String, String)],
    sheet: Option<&SampleSheet>,
    config: &ScreenConfig,
) -> anyhow::Result<Vec<SampleAssignment>> {
    let ids: Vec<FileIdentity> = files
        .iter()
        .map(|(name, path)| FileIdentity { name: name.clone(), path: path.clone() })
        .collect();
    Ok(batch::assign_samples(&ids, sheet, &config.batch)?)
}

#[derive(Deserialize)]
struct SpectrumClass {
    status: String,
    ms_level: Option<u8>,
    polarity: String,
    resolution: String,
}

/// The acquisition classes of a report folder: per polarity of its MS1 spectra, the most
/// common resolution class (ionization left open: it comes with the compounds).
fn classes_of(dir: &Path) -> anyhow::Result<Vec<AcquisitionClass>> {
    let path = dir.join("spectra.tsv");
    let mut r = csv::ReaderBuilder::new().delimiter(b'\t').from_path(&path)?;
    let mut counts: BTreeMap<(String, String), usize> = BTreeMap::new();
    for (i, row) in r.deserialize::<SpectrumClass>().enumerate() {
        let row = row.map_err(|e| anyhow::anyhow!("{}: row {}: {e}", path.display(), i + 1))?;
        if row.status == "ok" && row.ms_level.unwrap_or(1) <= 1 {
            *counts.entry((row.polarity, row.resolution)).or_default() += 1;
        }
    }
    let mut best: BTreeMap<String, (usize, String)> = BTreeMap::new();
    for ((polarity, resolution), n) in counts {
        let rank = if resolution == "unknown" { 0 } else { n };
        let e = best.entry(polarity).or_insert((0, "unknown".into()));
        if rank > e.0 {
            *e = (rank, resolution);
        }
    }
    Ok(best.into_iter().map(|(p, (_, res))| AcquisitionClass::new(&p, "", &res)).collect())
}

fn compounds_of(dir: &Path) -> anyhow::Result<Vec<Compound>> {
    let path = dir.join("compounds.tsv");
    if !path.is_file() {
        // Report folders written before the compound stage have none.
        return Ok(Vec::new());
    }
    let mut r = csv::ReaderBuilder::new().delimiter(b'\t').from_path(&path)?;
    let mut out = Vec::new();
    for (i, row) in r.deserialize::<Compound>().enumerate() {
        let mut c = row.map_err(|e| anyhow::anyhow!("{}: row {}: {e}", path.display(), i + 1))?;
        c.members = report::unescape_text(&c.members);
        c.evidence = report::unescape_text(&c.evidence);
        out.push(c);
    }
    Ok(out)
}

/// Builds the batch view of the report folders in `out` named by `outcomes` (files `ok` or
/// `partial` only; gap filling reads the inputs at their recorded paths) and writes its
/// tables. A report folder that cannot be read is reported and left out; the rest go on.
/// Gap filling runs on the current rayon pool (call it inside `pool.install`).
pub fn write(
    out: &Path,
    outcomes: &[Outcome],
    sheet: Option<&SampleSheet>,
    config: &ScreenConfig,
) -> anyhow::Result<BatchCounts> {
    let usable: Vec<&Outcome> = outcomes
        .iter()
        .filter(|o| o.summary.is_some() && matches!(o.status, FileStatus::Ok | FileStatus::Partial))
        .collect();
    let ids: Vec<(String, String)> =
        outcomes.iter().map(|o| (o.name.clone(), o.path.clone())).collect();
    let assigned = assign(&ids, sheet, config)?;
    let mut files = Vec::new();
    for o in usable {
        let a = &assigned[outcomes.iter().position(|x| std::ptr::eq(x, o)).expect("listed")];
        let dir = out.join(&o.name);
        let read = classes_of(&dir).and_then(|classes| Ok((classes, compounds_of(&dir)?)));
        match read {
            Ok((classes, compounds)) => files.push(BatchFile {
                name: o.name.clone(),
                path: Some(PathBuf::from(&o.path)),
                sample: a.sample.clone(),
                kind: a.kind,
                order: a.order,
                classes,
                compounds,
            }),
            Err(e) => output::report(Path::new(&o.path), &format!("batch view: {e:#}")),
        }
    }
    let view = batch::build(files, &config.batch, config);
    for (name, e) in &view.fill_errors {
        output::report(Path::new(name), e);
    }
    let put = |name: &str, f: &dyn Fn(&mut dyn std::io::Write) -> mzcore::Result<()>| {
        report::write_atomic(&out.join(name), |w| f(w))
    };
    put(BATCH_VIEW_FILES[0], &|w| view.write_compounds(w))?;
    put(BATCH_VIEW_FILES[1], &|w| view.write_detections(w))?;
    put(BATCH_VIEW_FILES[2], &|w| view.write_drift(w))?;
    Ok(view.counts())
}

/// The end-of-run summary line of the batch view.
pub fn summary_line(c: &BatchCounts) -> String {
    format!(
        "mzsift: batch view: {} compounds aligned, {} above blank ({} halogenated), {} carry-over suspects, {} values gap-filled",
        c.compounds, c.above_blank, c.halogenated_above_blank, c.carry_over_suspects, c.filled
    )
}
