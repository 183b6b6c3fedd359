//! The run folder as the page needs it: every report file read once, each part either loaded
//! or replaced by the sentence that says why it is missing.

use std::collections::{BTreeSet, HashMap};
use std::path::{Path, PathBuf};

use serde::Deserialize;
use serde::de::DeserializeOwned;

use super::table::{Table, file_name, missing, parse_num};
use crate::report::unescape_text;

/// A part of the page's input: loaded, or the sentence saying why it is not there.
pub type Loaded<T> = Result<T, String>;

/// Everything the page shows, read from one output folder of `mzsift run` (or `merge`).
#[derive(Debug, Clone)]
pub struct RunFolder {
    /// The output folder read.
    pub dir: PathBuf,
    /// `run.json`: tool, version, times, caution.
    pub run: Loaded<RunInfo>,
    /// `batch.tsv` with each file's own reports.
    pub files: Loaded<Vec<FileEntry>>,
    /// `check.tsv` of `mzsift check`, when it was written into this folder.
    pub check: Loaded<Vec<CheckRow>>,
    /// `batch_compounds.tsv`: compounds lined up across files.
    pub batch: Loaded<BatchMatrix>,
    /// `detections.tsv`: one row per batch compound and file.
    pub detections: Loaded<Vec<Detection>>,
    /// Evidence per halogenated batch compound (same order as their rows in the batch
    /// matrix); empty when the matrix is missing.
    pub halogenated: Vec<HalogenEvidence>,
}

/// What `run.json` tells the page.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct RunInfo {
    /// Tool name.
    pub tool: String,
    /// Tool version.
    pub version: String,
    /// Start of the run, UTC.
    pub started_utc: String,
    /// End of the run, UTC.
    pub finished_utc: String,
    /// The caution recorded with the run.
    pub caution: String,
    /// Inputs with their report folders.
    pub inputs: Vec<RunInput>,
}

/// One input of `run.json`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct RunInput {
    /// Path as given or found.
    pub path: String,
    /// Report folder name below the output folder.
    pub report_folder: String,
}

/// One row of `batch.tsv`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct BatchRow {
    /// Input path as given or found.
    pub file: String,
    /// `ok`, `partial`, `failed` or `skipped`.
    pub status: String,
    /// First error, if any.
    pub error: String,
    /// Spectra read.
    pub spectra: Option<u64>,
    /// MS1 spectra.
    pub ms1: Option<u64>,
    /// Spectra of MS level 2 or higher.
    pub ms2: Option<u64>,
    /// First retention time, minutes.
    pub rt_start_min: Option<f64>,
    /// Last retention time, minutes.
    pub rt_end_min: Option<f64>,
    /// Halogenated compounds (when the compound stage wrote the column).
    pub halogen_compounds: Option<u64>,
    /// Features with a Cl/Br assignment.
    pub halogen_features: Option<u64>,
    /// Spectra unreadable or never read.
    pub unreadable_spectra: Option<u64>,
}

/// One input of the batch: its `batch.tsv` row and its own reports.
#[derive(Debug, Clone)]
pub struct FileEntry {
    /// The `batch.tsv` row.
    pub row: BatchRow,
    /// Report folder name (from `run.json`, else guessed from the file name).
    pub folder: String,
    /// The file's chromatogram points from `spectra.tsv`.
    pub spectra: Loaded<Vec<SpectrumPoint>>,
    /// The file's `compounds.tsv`.
    pub compounds: Loaded<Vec<CompoundRow>>,
}

/// The columns of `spectra.tsv` a chromatogram needs.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct SpectrumPoint {
    /// `ok` or `unreadable`.
    pub status: String,
    /// MS level.
    pub ms_level: Option<u8>,
    /// `+`, `-` or empty.
    pub polarity: String,
    /// Retention time, minutes.
    pub rt_min: Option<f64>,
    /// Sum of decoded intensities (the TIC of the spectrum).
    pub intensity_sum: Option<f64>,
    /// Intensity of the most intense point.
    pub base_peak_intensity: Option<f64>,
}

/// One row of a file's `compounds.tsv` (the columns the page shows).
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct CompoundRow {
    /// Compound number in the file.
    pub compound: u64,
    /// Apex retention time, minutes.
    pub rt_apex_min: f64,
    /// Neutral monoisotopic mass, u.
    pub neutral_mass: Option<f64>,
    /// Nominal mass of the neutral.
    pub nominal_mass: Option<i64>,
    /// Nitrogen rule: `true` odd, `false` even, `undecided`.
    pub odd_nominal: String,
    /// Chlorine atoms.
    pub n_cl: u8,
    /// Bromine atoms.
    pub n_br: u8,
    /// Carries Cl or Br.
    #[serde(deserialize_with = "tsv_bool")]
    pub halogen: bool,
    /// Probability that it carries Cl or Br.
    pub halogen_probability: Option<f64>,
    /// m/z of the molecular ion.
    pub molecular_ion_mz: f64,
    /// Ion type of the molecular ion.
    pub ion_type: String,
    /// Resolution class.
    pub resolution: String,
    /// Apex intensity of the molecular ion.
    pub apex_intensity: Option<f64>,
    /// Area of the molecular ion's trace.
    pub area: Option<f64>,
    /// Members: `feature:role` pairs, `;`-separated.
    pub members: String,
    /// Words behind the calls, `;`-separated.
    pub evidence: String,
    /// Formula candidates, when a later stage writes them (`;`-separated).
    #[serde(alias = "formulas")]
    pub formula_candidates: String,
    /// Cluster misfit, when the compound table carries it.
    pub misfit: Option<f64>,
}

/// One row of `check.tsv`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct CheckRow {
    /// The file, as given.
    pub file: String,
    /// Rule name.
    pub rule: String,
    /// `pass`, `warn` or `fail`.
    pub status: String,
    /// Observed value.
    pub observed: String,
    /// Limit.
    pub limit: String,
    /// What was compared.
    pub message: String,
}

/// One aligned compound of `batch_compounds.tsv`.
#[derive(Debug, Clone, Default)]
pub struct BatchCompound {
    /// Batch compound id.
    pub id: String,
    /// Neutral mass, u.
    pub neutral_mass: Option<f64>,
    /// Retention time, minutes.
    pub rt_min: Option<f64>,
    /// Polarity.
    pub polarity: String,
    /// Chlorine atoms.
    pub n_cl: String,
    /// Bromine atoms.
    pub n_br: String,
    /// Carries Cl or Br.
    pub halogen: bool,
    /// Nitrogen rule of the neutral.
    pub odd_nominal: String,
    /// Files where it was detected.
    pub files_detected: String,
    /// Present in a blank.
    pub in_blank: bool,
    /// Largest blank intensity.
    pub blank_max: Option<f64>,
    /// Above the blank by the configured factor.
    pub above_blank: bool,
    /// Formula candidates, when the table has them.
    pub formula_candidates: String,
}

/// `batch_compounds.tsv`: the compounds and their value per file (files x compounds).
#[derive(Debug, Clone, Default)]
pub struct BatchMatrix {
    /// The compounds, in the table's order.
    pub compounds: Vec<BatchCompound>,
    /// The file columns (report folder names).
    pub files: Vec<String>,
    /// `values[c * files.len() + f]`: area of compound `c` in file `f`, none when absent.
    pub values: Vec<Option<f64>>,
}

impl BatchMatrix {
    /// The value of compound `c` in file `f`.
    pub fn value(&self, c: usize, f: usize) -> Option<f64> {
        self.values[c * self.files.len() + f]
    }

    /// Compound positions, halogenated rows first, each group in the table's order.
    pub fn display_order(&self) -> Vec<usize> {
        let (mut h, n): (Vec<usize>, Vec<usize>) =
            (0..self.compounds.len()).partition(|&c| self.compounds[c].halogen);
        h.extend(n);
        h
    }
}

/// The fixed columns of `batch_compounds.tsv` before the file columns.
pub const BATCH_FIXED_COLUMNS: &[&str] = &[
    "batch_compound",
    "neutral_mass",
    "rt_min",
    "polarity",
    "n_cl",
    "n_br",
    "halogen",
    "odd_nominal",
    "files_detected",
    "in_blank",
    "blank_max",
    "above_blank",
];

/// One row of `detections.tsv`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct Detection {
    /// Batch compound id.
    pub batch_compound: String,
    /// The file (report folder name or input path).
    pub file: String,
    /// Sample name.
    pub sample: String,
    /// `sample`, `blank`, `qc` or `standard`.
    pub kind: String,
    /// Detected in this file.
    #[serde(deserialize_with = "tsv_bool")]
    pub detected: bool,
    /// Value extracted by gap filling.
    #[serde(deserialize_with = "tsv_bool")]
    pub filled: bool,
    /// Area.
    pub area: Option<f64>,
    /// Apex intensity.
    pub apex_intensity: Option<f64>,
    /// Retention time, minutes.
    pub rt_min: Option<f64>,
    /// Compound id in that file's `compounds.tsv`, when detected.
    pub compound: Option<u64>,
}

/// One row of `traces.tsv`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct TracePoint {
    /// Compound id in the file.
    pub compound: u64,
    /// `M`, `M+2` or `M+4`.
    pub shell: String,
    /// Centre m/z of the trace.
    pub mz: f64,
    /// Retention time, minutes.
    pub rt_min: f64,
    /// Most intense centroid within the tolerance (0 when none).
    pub intensity: f64,
}

/// One row of `cluster.tsv`.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
pub struct ClusterShell {
    /// Compound id in the file.
    pub compound: u64,
    /// Nominal shell (0 = M, 2 = M+2, ...).
    pub shell: u32,
    /// Observed, relative to the most intense shell.
    pub observed: f64,
    /// Expected for the assigned n_cl/n_br, same scaling.
    pub expected: f64,
}

/// One file's evidence for one compound.
#[derive(Debug, Clone)]
pub struct FileEvidence {
    /// Position of the file in [`RunFolder::files`].
    pub file: usize,
    /// The compound row of that file.
    pub compound: Option<CompoundRow>,
    /// Its traces (`traces.tsv`), or why there are none.
    pub traces: Loaded<Vec<TracePoint>>,
    /// Its cluster (`cluster.tsv`), or why there is none.
    pub cluster: Loaded<Vec<ClusterShell>>,
    /// Misfit of the cluster, and where it came from.
    pub misfit: Option<(f64, &'static str)>,
}

/// The evidence shown for one halogenated batch compound.
#[derive(Debug, Clone)]
pub struct HalogenEvidence {
    /// Position of the compound in [`BatchMatrix::compounds`].
    pub compound: usize,
    /// The file where it is strongest.
    pub strongest: Loaded<FileEvidence>,
    /// The strongest blank: its evidence, or a sentence (not in a blank, only gap-filled, ...).
    pub blank: Loaded<FileEvidence>,
}

impl RunFolder {
    /// Reads every report of the output folder `dir`. Never fails: a missing or unreadable
    /// file becomes the sentence shown in its place.
    ///
    /// # Examples
    ///
    /// ```
    /// let dir = tempfile::tempdir().unwrap();
    /// let folder = mzcore::html::RunFolder::load(dir.path());
    /// assert!(folder.files.unwrap_err().contains("batch.tsv"));
    /// ```
    pub fn load(dir: &Path) -> RunFolder {
        let run: Loaded<RunInfo> = read_json(&dir.join("run.json"));
        let folders: HashMap<String, String> = run
            .as_ref()
            .map(|r| r.inputs.iter().map(|i| (i.path.clone(), i.report_folder.clone())).collect())
            .unwrap_or_default();
        let files = read_rows::<BatchRow>(&dir.join("batch.tsv")).map(|rows| {
            rows.into_iter()
                .map(|mut row| {
                    row.file = unescape_text(&row.file);
                    row.error = unescape_text(&row.error);
                    let folder =
                        folders.get(&row.file).cloned().unwrap_or_else(|| guess_folder(&row.file));
                    let sub = dir.join(&folder);
                    let spectra = read_rows(&sub.join("spectra.tsv"));
                    let compounds = read_rows(&sub.join("compounds.tsv"));
                    FileEntry { row, folder, spectra, compounds }
                })
                .collect::<Vec<_>>()
        });
        let check = read_rows::<CheckRow>(&dir.join("check.tsv")).map(|mut rows| {
            for r in &mut rows {
                r.file = unescape_text(&r.file);
                r.message = unescape_text(&r.message);
            }
            rows
        });
        let batch = Table::read(&dir.join("batch_compounds.tsv")).and_then(|t| batch_matrix(&t));
        let detections = read_rows::<Detection>(&dir.join("detections.tsv"));
        let mut folder = RunFolder {
            dir: dir.to_owned(),
            run,
            files,
            check,
            batch,
            detections,
            halogenated: Vec::new(),
        };
        folder.halogenated = folder.gather_evidence();
        folder
    }

    /// Position in [`RunFolder::files`] of a file named by report folder or input path.
    pub fn file_index(&self, name: &str) -> Option<usize> {
        let files = self.files.as_ref().ok()?;
        files
            .iter()
            .position(|f| f.folder == name)
            .or_else(|| files.iter().position(|f| f.row.file == name))
    }

    /// Report folder names of the blanks, as `detections.tsv` gives their kind.
    pub fn blanks(&self) -> BTreeSet<String> {
        let Ok(d) = &self.detections else { return BTreeSet::new() };
        d.iter()
            .filter(|r| r.kind == "blank")
            .map(|r| {
                self.file_index(&r.file)
                    .and_then(|i| self.files.as_ref().ok().map(|f| f[i].folder.clone()))
                    .unwrap_or_else(|| r.file.clone())
            })
            .collect()
    }

    fn gather_evidence(&self) -> Vec<HalogenEvidence> {
        let Ok(batch) = &self.batch else { return Vec::new() };
        let mut out: Vec<HalogenEvidence> = batch
            .display_order()
            .into_iter()
            .filter(|&c| batch.compounds[c].halogen)
            .map(|c| {
                let id = &batch.compounds[c].id;
                let (strongest, blank) = match &self.detections {
                    Ok(d) => {
                        let rows: Vec<&Detection> =
                            d.iter().filter(|r| &r.batch_compound == id).collect();
                        (self.strongest(&rows, false), self.strongest(&rows, true))
                    }
                    Err(e) => (Err(e.clone()), Err(e.clone())),
                };
                HalogenEvidence { compound: c, strongest, blank }
            })
            .collect();
        // Read each file's traces, clusters and ions once, for all compounds that need them.
        let mut wanted: HashMap<usize, BTreeSet<u64>> = HashMap::new();
        for e in &out {
            for ev in [&e.strongest, &e.blank].into_iter().flatten() {
                if let Some(c) = &ev.compound {
                    wanted.entry(ev.file).or_default().insert(c.compound);
                }
            }
        }
        let files = self.files.as_ref().map(Vec::as_slice).unwrap_or(&[]);
        let mut per_file: HashMap<usize, FileExtras> = HashMap::new();
        for (&f, ids) in &wanted {
            per_file.insert(f, FileExtras::read(&self.dir.join(&files[f].folder), ids));
        }
        for e in &mut out {
            for ev in [&mut e.strongest, &mut e.blank].into_iter().flatten() {
                let Some(c) = ev.compound.clone() else { continue };
                let Some(x) = per_file.get(&ev.file) else { continue };
                ev.traces = x
                    .traces
                    .as_ref()
                    .map(|m| m.get(&c.compound).cloned().unwrap_or_default())
                    .map_err(Clone::clone);
                ev.cluster = x
                    .cluster
                    .as_ref()
                    .map(|m| m.get(&c.compound).cloned().unwrap_or_default())
                    .map_err(Clone::clone);
                ev.misfit = c
                    .misfit
                    .map(|m| (m, "compounds.tsv"))
                    .or_else(|| x.misfit.get(&c.compound).map(|&m| (m, "ions.tsv")));
            }
        }
        out
    }

    /// The detection with the largest apex intensity (or area) among samples (`blank` false)
    /// or blanks (`blank` true).
    fn strongest(&self, rows: &[&Detection], blank: bool) -> Loaded<FileEvidence> {
        let strength = |r: &Detection| r.apex_intensity.or(r.area).unwrap_or(0.0);
        let candidates: Vec<&&Detection> =
            rows.iter().filter(|r| (r.kind == "blank") == blank).collect();
        let detected = candidates
            .iter()
            .filter(|r| r.detected)
            .max_by(|a, b| strength(a).total_cmp(&strength(b)));
        let Some(best) = detected else {
            let filled = candidates
                .iter()
                .filter(|r| r.filled && r.area.is_some())
                .max_by(|a, b| strength(a).total_cmp(&strength(b)));
            return Err(match (blank, filled, candidates.is_empty()) {
                (true, _, true) => "The batch has no blank.".to_owned(),
                (true, Some(f), _) => format!(
                    "Not detected in any blank; gap filling in {} found area {}.",
                    f.file,
                    super::page::number(f.area.unwrap_or(0.0))
                ),
                (true, None, _) => "Not detected in any blank.".to_owned(),
                (false, _, _) => "Detected in no sample file (blanks only).".to_owned(),
            });
        };
        let Some(file) = self.file_index(&best.file) else {
            return Err(format!("{} is named in detections.tsv but not in batch.tsv.", best.file));
        };
        let compound = best.compound.and_then(|id| {
            self.files.as_ref().ok()?[file]
                .compounds
                .as_ref()
                .ok()?
                .iter()
                .find(|c| c.compound == id)
                .cloned()
        });
        Ok(FileEvidence {
            file,
            compound,
            traces: Err("No traces for this compound.".into()),
            cluster: Err("No cluster for this compound.".into()),
            misfit: None,
        })
    }
}

/// Traces, clusters and misfits of the wanted compounds of one file.
struct FileExtras {
    traces: Loaded<HashMap<u64, Vec<TracePoint>>>,
    cluster: Loaded<HashMap<u64, Vec<ClusterShell>>>,
    misfit: HashMap<u64, f64>,
}

/// The columns of `ions.tsv` that tie a misfit to a compound's molecular ion.
#[derive(Debug, Clone, Default, Deserialize)]
#[serde(default)]
struct IonRow {
    rt_min: Option<f64>,
    mz: Option<f64>,
    misfit: Option<f64>,
    #[serde(deserialize_with = "tsv_bool")]
    halogen: bool,
}

impl FileExtras {
    fn read(sub: &Path, ids: &BTreeSet<u64>) -> FileExtras {
        let group = |rows: Vec<(u64, TracePoint)>| {
            let mut m: HashMap<u64, Vec<TracePoint>> = HashMap::new();
            for (id, t) in rows {
                m.entry(id).or_default().push(t);
            }
            m
        };
        let traces = read_rows_filtered::<TracePoint>(&sub.join("traces.tsv"), |t| {
            ids.contains(&t.compound)
        })
        .map(|v| group(v.into_iter().map(|t| (t.compound, t)).collect()));
        let cluster = read_rows_filtered::<ClusterShell>(&sub.join("cluster.tsv"), |c| {
            ids.contains(&c.compound)
        })
        .map(|v| {
            let mut m: HashMap<u64, Vec<ClusterShell>> = HashMap::new();
            for c in v {
                m.entry(c.compound).or_default().push(c);
            }
            m
        });
        // The misfit of the halogen ion nearest the molecular ion's apex (same m/z within
        // 0.02 Th at high resolution, 0.5 Th otherwise).
        let compounds: Vec<CompoundRow> = read_rows::<CompoundRow>(&sub.join("compounds.tsv"))
            .unwrap_or_default()
            .into_iter()
            .filter(|c| ids.contains(&c.compound) && c.misfit.is_none())
            .collect();
        let mut misfit: HashMap<u64, (f64, f64)> = HashMap::new();
        if !compounds.is_empty() {
            let _ = read_rows_filtered::<IonRow>(&sub.join("ions.tsv"), |ion| {
                let (Some(rt), Some(mz), Some(m)) = (ion.rt_min, ion.mz, ion.misfit) else {
                    return false;
                };
                if !ion.halogen {
                    return false;
                }
                for c in &compounds {
                    let tol = if c.resolution == "high" { 0.02 } else { 0.5 };
                    if (mz - c.molecular_ion_mz).abs() <= tol {
                        let d = (rt - c.rt_apex_min).abs();
                        let e = misfit.entry(c.compound).or_insert((f64::INFINITY, m));
                        if d < e.0 {
                            *e = (d, m);
                        }
                    }
                }
                false
            });
        }
        FileExtras { traces, cluster, misfit: misfit.into_iter().map(|(k, v)| (k, v.1)).collect() }
    }
}

/// `true` is true; anything else (`false`, an empty cell) is false.
fn tsv_bool<'de, D: serde::Deserializer<'de>>(d: D) -> Result<bool, D::Error> {
    let s = <std::borrow::Cow<'de, str>>::deserialize(d)?;
    Ok(s == "true")
}

fn read_json<T: DeserializeOwned>(path: &Path) -> Loaded<T> {
    let text = std::fs::read(path).map_err(|e| missing(path, &e))?;
    serde_json::from_slice(&text)
        .map_err(|e| format!("{} could not be read: {e}.", file_name(path)))
}

fn read_rows<T: DeserializeOwned>(path: &Path) -> Loaded<Vec<T>> {
    read_rows_filtered(path, |_| true)
}

/// Reads typed rows by column name, keeping those `keep` accepts; an error names the file
/// and the line.
fn read_rows_filtered<T: DeserializeOwned>(
    path: &Path,
    mut keep: impl FnMut(&T) -> bool,
) -> Loaded<Vec<T>> {
    let file = std::fs::File::open(path).map_err(|e| missing(path, &e))?;
    let mut r = csv::ReaderBuilder::new()
        .delimiter(b'\t')
        .flexible(true)
        .from_reader(std::io::BufReader::with_capacity(1 << 16, file));
    let mut out = Vec::new();
    for (i, row) in r.deserialize::<T>().enumerate() {
        let row = row.map_err(|e| {
            format!("{} could not be read at line {}: {e}.", file_name(path), i + 2)
        })?;
        if keep(&row) {
            out.push(row);
        }
    }
    Ok(out)
}

/// A report folder name from an input path when `run.json` is missing: the file name
/// without `.mzML` / `.mzML.gz`.
fn guess_folder(file: &str) -> String {
    let name = file.rsplit(['/', '\\']).next().unwrap_or(file);
    let lower = name.to_ascii_lowercase();
    for ext in [".mzml.gz", ".mzml"] {
        if lower.ends_with(ext) {
            return name[..name.len() - ext.len()].to_owned();
        }
    }
    name.to_owned()
}

fn batch_matrix(t: &Table) -> Loaded<BatchMatrix> {
    let name = "batch_compounds.tsv";
    for c in ["batch_compound", "halogen"] {
        if t.column(c).is_none() {
            return Err(format!("{name} has no column {c}."));
        }
    }
    // File columns: every column after the fixed ones (extra fixed columns a later version
    // adds before the files are recognised by name).
    let last_fixed = t
        .header()
        .iter()
        .rposition(|h| BATCH_FIXED_COLUMNS.contains(&h.as_str()) || h == "formula_candidates")
        .unwrap_or(0);
    let file_cols: Vec<usize> = (last_fixed + 1..t.header().len()).collect();
    let files: Vec<String> = file_cols.iter().map(|&i| t.header()[i].clone()).collect();
    let mut compounds = Vec::with_capacity(t.len());
    let mut values = Vec::with_capacity(t.len() * files.len());
    for r in t.rows() {
        compounds.push(BatchCompound {
            id: r.text("batch_compound").to_owned(),
            neutral_mass: r.num("neutral_mass"),
            rt_min: r.num("rt_min"),
            polarity: r.text("polarity").to_owned(),
            n_cl: r.text("n_cl").to_owned(),
            n_br: r.text("n_br").to_owned(),
            halogen: r.flag("halogen"),
            odd_nominal: r.text("odd_nominal").to_owned(),
            files_detected: r.text("files_detected").to_owned(),
            in_blank: r.flag("in_blank"),
            blank_max: r.num("blank_max"),
            above_blank: r.flag("above_blank"),
            formula_candidates: r.text("formula_candidates").to_owned(),
        });
        values.extend(file_cols.iter().map(|&i| parse_num(r.at(i))));
    }
    Ok(BatchMatrix { compounds, files, values })
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn folder_guessed_from_file_name() {
        assert_eq!(guess_folder("in/night-04.mzML.gz"), "night-04");
        assert_eq!(guess_folder("night-04.MZML"), "night-04");
    }

    #[test]
    fn matrix_has_file_columns_after_the_fixed_ones() {
        let t = Table::parse(b"batch_compound\tneutral_mass\thalogen\tabove_blank\ta\tb\n1\t100\ttrue\tfalse\t5\t\n2\t\tfalse\tfalse\t\t7\n").unwrap();
        let m = batch_matrix(&t).unwrap();
        assert_eq!(m.files, ["a", "b"]);
        assert_eq!((m.value(0, 0), m.value(0, 1), m.value(1, 1)), (Some(5.0), None, Some(7.0)));
        assert_eq!(m.display_order(), [0, 1]);
    }
}
