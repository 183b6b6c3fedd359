//! The batch view: which compounds are in which samples, above the blanks.
//!
//! Input is one [`BatchFile`] per acquisition: its identity (report folder name and input
//! path), its sample-sheet entry ([`assign_samples`]: sample, [`SampleKind`], acquisition
//! order), how it was acquired ([`AcquisitionClass`]) and its compounds
//! ([`crate::compound::Compound`], from a fresh run or read back from `compounds.tsv`: the
//! batch view does not care which). Then:
//!
//! 1. [`align`] matches compounds of files acquired the same way (polarity, ionization,
//!    resolution class) by mass (ppm at high resolution, u at unit resolution) and retention
//!    time: a first pass with a wide time window finds compounds present in most files, a
//!    monotone fit per file ([`DriftFit`]) maps its times onto the batch's, and a second pass
//!    with the tight window makes one row per compound, at most one compound per file.
//! 2. [`Alignment::fill_targets`] says, per file, which rows it lacks and where to look;
//!    [`fill_from_file`] extracts them from the file; a value found this way is marked filled,
//!    so a compound below the detection threshold is told apart from an absent one.
//! 3. [`Alignment::finish`] compares samples with blanks (largest blank area, ratios,
//!    `above_blank` at a configurable factor), replicate injections (detected k of n, RSD of
//!    areas) and flags carry-over (a blank right after a much stronger injection) into a
//!    [`BatchView`]: the rows, the long detection table, the files x compounds area matrix
//!    ([`BatchView::matrix`]) and the counts ([`BatchView::counts`]).
//!
//! [`build`] runs all three. Everything is deterministic: the same batch in any input order
//! gives the same rows (files are ordered by acquisition order, then name).
//!
//! Flags are screening hints, not identifications.
//!
//! # Examples
//!
//! ```
//! use mzcore::batch::{align, AcquisitionClass, BatchFile, BatchSettings, SampleKind};
//! use mzcore::compound::Compound;
//! use mzcore::flag::OddNominal;
//!
//! let compound = |mass: f64, rt: f64, area: f64| Compound {
//!     compound: 1, rt_apex_min: rt, rt_start_min: rt - 0.1, rt_end_min: rt + 0.1,
//!     polarity: "+".into(), ionization: "electrospray".into(), resolution: "high".into(),
//!     neutral_mass: Some(mass), nominal_mass: Some(mass.round() as i64),
//!     odd_nominal: OddNominal::False, n_cl: 1, n_br: 0, halogen: true,
//!     halogen_probability: 0.99, molecular_ion_mz: mass + 1.007276, ion_type: "[M+H]+".into(),
//!     charge: 1, apex_intensity: area * 10.0, area, members: String::new(), evidence: String::new(),
//! };
//! let file = |name: &str, kind, order, area| BatchFile {
//!     name: name.into(), path: None, sample: name.into(), kind, order,
//!     classes: vec![AcquisitionClass::new("+", "", "high")],
//!     compounds: if area > 0.0 { vec![compound(212.0478, 4.0 + order as f64 * 0.05, area)] } else { vec![] },
//! };
//! let files = vec![
//!     file("blank", SampleKind::Blank, 0, 100.0),
//!     file("river", SampleKind::Sample, 1, 5000.0),
//!     file("tap", SampleKind::Sample, 2, 0.0),
//! ];
//! let view = align(files, &BatchSettings::default()).finish(vec![None, None, None]);
//! assert_eq!(view.compounds().len(), 1);
//! let row = &view.compounds()[0];
//! assert!(row.in_blank && row.above_blank);
//! assert_eq!(view.matrix()[[1, 0]], 5000.0);
//! assert!(view.matrix()[[2, 0]].is_nan()); // not detected, not filled
//! assert_eq!(view.counts().above_blank, 1);
//! ```

mod align;
mod fill;
mod sheet;
mod tables;

use std::collections::{BTreeMap, HashMap};
use std::path::PathBuf;
use std::sync::Arc;

use ndarray::Array2;
use serde::{Deserialize, Serialize};

pub use align::{DriftFit, MassTolerance};
pub use fill::{FillResult, FillTarget, fill_from_file};
pub use sheet::{
    FileIdentity, SampleAssignment, SampleKind, SampleSheet, SheetEntry, assign_samples,
    natural_cmp,
};
pub use tables::{COMPOUND_FIXED_COLUMNS, DETECTION_COLUMNS, DRIFT_COLUMNS};

use crate::compound::Compound;
use crate::error::{Error, ErrorKind, Result};
use crate::flag::OddNominal;
use crate::screen::ScreenConfig;
use crate::spectrum::Polarity;
use align::{Item, median_of};

/// Settings of the batch view (`[batch]` of the configuration).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct BatchSettings {
    /// Glob patterns (`*`, `?`, case-insensitive) on file names marking blanks, when no
    /// sample sheet says otherwise.
    pub blanks: Vec<String>,
    /// Glob patterns marking quality-control injections.
    pub qc: Vec<String>,
    /// Glob patterns marking standards.
    pub standards: Vec<String>,
    /// Mass tolerance at high resolution, ppm.
    pub mass_tolerance_ppm: f64,
    /// Mass tolerance at unit (or unknown) resolution, u.
    pub mass_tolerance_da: f64,
    /// Retention-time tolerance after drift correction, minutes.
    pub rt_tolerance_min: f64,
    /// Largest retention-time drift between injections (the first pass's window), minutes.
    pub rt_drift_max_min: f64,
    /// Fraction of a class's files a compound must be found in to anchor the drift fit.
    pub anchor_fraction: f64,
    /// A sample is above the blank when its area is at least this many times the largest
    /// blank area (3 is common practice in screening; no single source).
    pub blank_factor: f64,
    /// A blank's compound is a carry-over suspect when the injection before it had at least
    /// this many times its area.
    pub carry_over_factor: f64,
    /// Extract undetected compounds from the files (gap filling).
    pub fill: bool,
    /// Least scans with signal for a filled value.
    pub fill_min_scans: usize,
    /// Scans without signal bridged inside a filled peak.
    pub fill_max_gap: usize,
}

impl Default for BatchSettings {
    fn default() -> Self {
        BatchSettings {
            blanks: vec!["*blank*".into()],
            qc: Vec::new(),
            standards: Vec::new(),
            mass_tolerance_ppm: 5.0,
            mass_tolerance_da: 0.3,
            rt_tolerance_min: 0.05,
            rt_drift_max_min: 0.3,
            anchor_fraction: 0.6,
            blank_factor: 3.0,
            carry_over_factor: 10.0,
            fill: true,
            fill_min_scans: 3,
            fill_max_gap: 3,
        }
    }
}

impl BatchSettings {
    /// Checks every setting's range.
    pub fn validate(&self) -> Result<()> {
        let positive = [
            ("batch.mass_tolerance_ppm", self.mass_tolerance_ppm),
            ("batch.mass_tolerance_da", self.mass_tolerance_da),
            ("batch.rt_tolerance_min", self.rt_tolerance_min),
            ("batch.rt_drift_max_min", self.rt_drift_max_min),
            ("batch.blank_factor", self.blank_factor),
            ("batch.carry_over_factor", self.carry_over_factor),
        ];
        for (key, v) in positive {
            if !(v.is_finite() && v > 0.0) {
                return Err(Error::new(ErrorKind::Config(format!("{key} must be positive"))));
            }
        }
        if !(self.anchor_fraction > 0.0 && self.anchor_fraction <= 1.0) {
            return Err(Error::new(ErrorKind::Config(
                "batch.anchor_fraction must be in (0, 1]".into(),
            )));
        }
        if self.rt_drift_max_min < self.rt_tolerance_min {
            return Err(Error::new(ErrorKind::Config(
                "batch.rt_drift_max_min must be at least batch.rt_tolerance_min".into(),
            )));
        }
        Ok(())
    }

    fn tolerance(&self, class: &AcquisitionClass) -> MassTolerance {
        if class.resolution == "high" {
            MassTolerance::Ppm(self.mass_tolerance_ppm)
        } else {
            MassTolerance::Da(self.mass_tolerance_da)
        }
    }
}

/// How compounds were acquired: only compounds of one class are matched with each other.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize)]
pub struct AcquisitionClass {
    /// `+`, `-` or empty.
    pub polarity: String,
    /// `electron`, `electrospray`, ... or empty when unknown.
    pub ionization: String,
    /// `unit`, `high` or `unknown`.
    pub resolution: String,
}

impl AcquisitionClass {
    /// A class from its three words.
    pub fn new(polarity: &str, ionization: &str, resolution: &str) -> Self {
        AcquisitionClass {
            polarity: polarity.into(),
            ionization: ionization.into(),
            resolution: resolution.into(),
        }
    }

    /// The class of a compound.
    pub fn of(c: &Compound) -> Self {
        AcquisitionClass::new(&c.polarity, &c.ionization, &c.resolution)
    }

    /// True when a file acquired as `self` can hold compounds of `class` (an empty ionization
    /// matches any).
    pub fn covers(&self, class: &AcquisitionClass) -> bool {
        self.polarity == class.polarity
            && self.resolution == class.resolution
            && (self.ionization == class.ionization
                || self.ionization.is_empty()
                || class.ionization.is_empty())
    }

    fn scan_polarity(&self) -> Polarity {
        match self.polarity.as_str() {
            "+" => Polarity::Positive,
            "-" => Polarity::Negative,
            _ => Polarity::Unknown,
        }
    }
}

/// One acquisition of the batch.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchFile {
    /// Its report folder name (unique in the batch; names its column in the wide table).
    pub name: String,
    /// The input file, for gap filling (`None`: not available).
    pub path: Option<PathBuf>,
    /// Sample name (replicate injections share it).
    pub sample: String,
    /// Kind of injection.
    pub kind: SampleKind,
    /// Position in acquisition order.
    pub order: usize,
    /// How it was acquired (one entry per polarity / resolution it holds). Compounds of a
    /// class no entry covers still count: the file is then in that class too.
    pub classes: Vec<AcquisitionClass>,
    /// Its compounds.
    pub compounds: Vec<Compound>,
}

/// Compounds are matched on neutral mass; those without one on ion m/z, within their ion type.
#[derive(Debug, Clone, PartialEq, Eq, Hash, PartialOrd, Ord)]
struct GroupKey {
    class: AcquisitionClass,
    ion: Option<String>,
}

fn group_of(c: &Compound) -> GroupKey {
    GroupKey {
        class: AcquisitionClass::of(c),
        ion: c.neutral_mass.is_none().then(|| c.ion_type.clone()),
    }
}

/// One aligned row before blanks and fills.
#[derive(Debug, Clone)]
struct RowData {
    group: GroupKey,
    /// (file, compound) of each member, in file order.
    members: Vec<(usize, usize)>,
    mass: f64,
    ion_mz: f64,
    rt: f64,
    half_width: f64,
    /// The member with the largest area: chemistry words come from it.
    best: (usize, usize),
}

/// The drift fit of one file in one acquisition class.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DriftRecord {
    /// Report folder name of the file.
    pub file: String,
    /// The acquisition class.
    pub class: AcquisitionClass,
    /// The fit.
    pub fit: DriftFit,
}

/// Compounds matched across files, before gap filling (see [`align`]).
#[derive(Debug, Clone)]
pub struct Alignment {
    files: Vec<BatchFile>,
    rows: Vec<RowData>,
    drift: BTreeMap<(AcquisitionClass, usize), DriftFit>,
    /// Files of each class, by position.
    members_of_class: BTreeMap<AcquisitionClass, Vec<usize>>,
    settings: BatchSettings,
}

/// Matches the compounds of `files` across files (see the module docs).
///
/// Files are put in acquisition order (then name) first: every later position refers to that
/// order ([`Alignment::files`]).
pub fn align(mut files: Vec<BatchFile>, settings: &BatchSettings) -> Alignment {
    files.sort_by(|a, b| a.order.cmp(&b.order).then_with(|| natural_cmp(&a.name, &b.name)));
    // Compounds by group; files by class.
    let mut groups: BTreeMap<GroupKey, Vec<(usize, usize)>> = BTreeMap::new();
    for (f, file) in files.iter().enumerate() {
        for (c, comp) in file.compounds.iter().enumerate() {
            let mass = comp.neutral_mass.unwrap_or(comp.molecular_ion_mz);
            if mass.is_finite() && comp.rt_apex_min.is_finite() {
                groups.entry(group_of(comp)).or_default().push((f, c));
            }
        }
    }
    let mut members_of_class: BTreeMap<AcquisitionClass, Vec<usize>> = BTreeMap::new();
    for key in groups.keys() {
        let in_class: Vec<usize> = (0..files.len())
            .filter(|&f| {
                files[f].classes.iter().any(|fc| fc.covers(&key.class))
                    || groups[key].iter().any(|&(g, _)| g == f)
            })
            .collect();
        let entry = members_of_class.entry(key.class.clone()).or_default();
        entry.extend(in_class);
        entry.sort_unstable();
        entry.dedup();
    }
    let item_of = |f: usize, c: usize, rt: f64| {
        let comp = &files[f].compounds[c];
        Item {
            file: f,
            compound: c,
            mass: comp.neutral_mass.unwrap_or(comp.molecular_ion_mz),
            rt,
            area: if comp.area.is_finite() { comp.area } else { 0.0 },
        }
    };
    // First pass, wide window: anchors for the drift fit, per class.
    let mut anchor_points: BTreeMap<(AcquisitionClass, usize), Vec<(f64, f64)>> = BTreeMap::new();
    for (key, list) in &groups {
        let items: Vec<Item> =
            list.iter().map(|&(f, c)| item_of(f, c, files[f].compounds[c].rt_apex_min)).collect();
        let n_files = members_of_class[&key.class].len();
        let need = ((settings.anchor_fraction * n_files as f64).ceil() as usize).max(2);
        for row in align::cluster(&items, settings.tolerance(&key.class), settings.rt_drift_max_min)
        {
            if row.len() < need {
                continue;
            }
            let mut rts: Vec<f64> = row.iter().map(|&i| items[i].rt).collect();
            let reference = median_of(&mut rts);
            for &i in &row {
                anchor_points
                    .entry((key.class.clone(), items[i].file))
                    .or_default()
                    .push((items[i].rt, reference));
            }
        }
    }
    let mut drift: BTreeMap<(AcquisitionClass, usize), DriftFit> = BTreeMap::new();
    for (class, fs) in &members_of_class {
        for &f in fs {
            let key = (class.clone(), f);
            let fit = anchor_points.get(&key).map_or_else(DriftFit::identity, |p| DriftFit::fit(p));
            drift.insert(key, fit);
        }
    }
    // Second pass on corrected times, tight window.
    let mut rows = Vec::new();
    for (key, list) in &groups {
        let items: Vec<Item> = list
            .iter()
            .map(|&(f, c)| {
                let rt = drift[&(key.class.clone(), f)].apply(files[f].compounds[c].rt_apex_min);
                item_of(f, c, rt)
            })
            .collect();
        for row in align::cluster(&items, settings.tolerance(&key.class), settings.rt_tolerance_min)
        {
            let members: Vec<(usize, usize)> =
                row.iter().map(|&i| (items[i].file, items[i].compound)).collect();
            let comp = |&(f, c): &(usize, usize)| &files[f].compounds[c];
            let mut masses: Vec<f64> = row.iter().map(|&i| items[i].mass).collect();
            let mut rts: Vec<f64> = row.iter().map(|&i| items[i].rt).collect();
            let mut ion: Vec<f64> = members.iter().map(|m| comp(m).molecular_ion_mz).collect();
            let mut widths: Vec<f64> = members
                .iter()
                .map(|m| 0.5 * (comp(m).rt_end_min - comp(m).rt_start_min).max(0.0))
                .collect();
            let best = *members
                .iter()
                .max_by(|a, b| comp(a).area.total_cmp(&comp(b).area).then(b.cmp(a)))
                .expect("rows are never empty");
            rows.push(RowData {
                group: key.clone(),
                mass: median_of(&mut masses),
                rt: median_of(&mut rts),
                ion_mz: median_of(&mut ion),
                half_width: median_of(&mut widths).max(settings.rt_tolerance_min),
                members,
                best,
            });
        }
    }
    rows.sort_by(|a, b| {
        a.group
            .class
            .cmp(&b.group.class)
            .then(a.rt.total_cmp(&b.rt))
            .then(a.mass.total_cmp(&b.mass))
            .then(a.group.ion.cmp(&b.group.ion))
            .then(a.members.cmp(&b.members))
    });
    Alignment { files, rows, drift, members_of_class, settings: settings.clone() }
}

/// One cell of the files x compounds table, before blanks.
#[derive(Debug, Clone, Copy, PartialEq)]
struct Cell {
    detected: Option<usize>,
    filled: Option<bool>,
    area: Option<f64>,
    apex: Option<f64>,
    rt: Option<f64>,
    mz_error_ppm: Option<f64>,
}

impl Alignment {
    /// The files, in acquisition order (the order of every file position).
    pub fn files(&self) -> &[BatchFile] {
        &self.files
    }

    /// Number of aligned rows.
    pub fn len(&self) -> usize {
        self.rows.len()
    }

    /// True when no compound was aligned.
    pub fn is_empty(&self) -> bool {
        self.rows.is_empty()
    }

    /// Drift fits, one per file and acquisition class, by class then file order.
    pub fn drift(&self) -> Vec<DriftRecord> {
        self.drift
            .iter()
            .map(|((class, f), fit)| DriftRecord {
                file: self.files[*f].name.clone(),
                class: class.clone(),
                fit: fit.clone(),
            })
            .collect()
    }

    /// The rows file `file` (a position in [`Alignment::files`]) is in the class of but has
    /// no compound in, with where to look: (row position, target).
    pub fn fill_targets(&self, file: usize) -> Vec<(usize, FillTarget)> {
        let s = &self.settings;
        let mut out = Vec::new();
        for (r, row) in self.rows.iter().enumerate() {
            let class = &row.group.class;
            let in_class = self.members_of_class.get(class).is_some_and(|v| v.contains(&file));
            if !in_class || row.members.iter().any(|&(f, _)| f == file) {
                continue;
            }
            let fit = &self.drift[&(class.clone(), file)];
            let apex = fit.invert(row.rt);
            let reach = row.half_width + s.rt_tolerance_min;
            out.push((
                r,
                FillTarget {
                    mz: row.ion_mz,
                    tolerance: s.tolerance(class).width(row.ion_mz),
                    polarity: class.scan_polarity(),
                    rt_from_min: fit.invert(row.rt - reach).min(apex - reach),
                    rt_to_min: fit.invert(row.rt + reach).max(apex + reach),
                    rt_apex_min: apex,
                    apex_tolerance_min: s.rt_tolerance_min,
                    min_scans: s.fill_min_scans,
                    max_gap: s.fill_max_gap,
                },
            ));
        }
        out
    }

    /// Compares samples with blanks and replicates, using `fills[f]`: the results of
    /// [`fill_from_file`] for file `f`'s [`Alignment::fill_targets`], in their order, or
    /// `None` when the file could not be searched (its gaps stay unknown: `filled` empty).
    ///
    /// # Panics
    ///
    /// When `fills` does not have one entry per file, or a file's results do not match its
    /// targets in number.
    pub fn finish(self, fills: Vec<Option<Vec<FillResult>>>) -> BatchView {
        assert_eq!(fills.len(), self.files.len(), "one fill entry per file");
        let (n_files, n_rows) = (self.files.len(), self.rows.len());
        let mut cells: Vec<Vec<Option<Cell>>> = vec![vec![None; n_files]; n_rows];
        for (r, row) in self.rows.iter().enumerate() {
            for &(f, c) in &row.members {
                let comp = &self.files[f].compounds[c];
                let mass = comp.neutral_mass.unwrap_or(comp.molecular_ion_mz);
                cells[r][f] = Some(Cell {
                    detected: Some(comp.compound),
                    filled: Some(false),
                    area: comp.area.is_finite().then_some(comp.area),
                    apex: comp.apex_intensity.is_finite().then_some(comp.apex_intensity),
                    rt: Some(comp.rt_apex_min),
                    mz_error_ppm: Some((mass - row.mass) / row.mass * 1e6),
                });
            }
        }
        for (f, fill) in fills.into_iter().enumerate() {
            let targets = self.fill_targets(f);
            if let Some(results) = &fill {
                assert_eq!(results.len(), targets.len(), "one fill result per target");
            }
            for (k, (r, target)) in targets.iter().enumerate() {
                let cell = match fill.as_ref().map(|v| v[k]) {
                    Some(FillResult::Found { area, apex_intensity, rt_min, mz, .. }) => Cell {
                        detected: None,
                        filled: Some(true),
                        area: Some(area),
                        apex: Some(apex_intensity),
                        rt: Some(rt_min),
                        mz_error_ppm: Some((mz - target.mz) / target.mz * 1e6),
                    },
                    Some(FillResult::Absent) => Cell { filled: Some(false), ..EMPTY_CELL },
                    None => EMPTY_CELL,
                };
                cells[*r][f] = Some(cell);
            }
        }
        self.compare(cells)
    }

    fn compare(self, cells: Vec<Vec<Option<Cell>>>) -> BatchView {
        let s = &self.settings;
        let (n_files, n_rows) = (self.files.len(), self.rows.len());
        let mut matrix = Array2::from_elem((n_files, n_rows), f64::NAN);
        let mut compounds = Vec::with_capacity(n_rows);
        let mut detections = Vec::new();
        let names: Vec<Arc<str>> = self.files.iter().map(|f| Arc::from(f.name.as_str())).collect();
        let samples: Vec<Arc<str>> =
            self.files.iter().map(|f| Arc::from(f.sample.as_str())).collect();
        for (r, row) in self.rows.iter().enumerate() {
            let in_class = &self.members_of_class[&row.group.class];
            let area = |f: usize| cells[r][f].and_then(|c| c.area);
            for &f in in_class {
                if let Some(a) = area(f) {
                    matrix[[f, r]] = a;
                }
            }
            let blanks: Vec<usize> = in_class
                .iter()
                .copied()
                .filter(|&f| self.files[f].kind == SampleKind::Blank)
                .collect();
            let blank_areas: Vec<f64> = blanks.iter().filter_map(|&f| area(f)).collect();
            let blank_max = blank_areas.iter().copied().reduce(f64::max);
            let ratio = |a: f64| match blank_max {
                Some(b) if b > 0.0 => Some(a / b),
                _ => None,
            };
            let above = |f: usize| {
                let detected = cells[r][f].is_some_and(|c| c.detected.is_some());
                let a = area(f);
                detected
                    && a.is_some_and(|a| match blank_max {
                        Some(b) if b > 0.0 => a >= s.blank_factor * b,
                        _ => a > 0.0,
                    })
            };
            let above_blank =
                in_class.iter().any(|&f| self.files[f].kind == SampleKind::Sample && above(f));
            // Carry-over: a blank whose previous injection (of this class) was much stronger.
            let mut carry = vec![false; n_files];
            for (k, &f) in in_class.iter().enumerate() {
                if self.files[f].kind != SampleKind::Blank || k == 0 {
                    continue;
                }
                let prev = in_class[k - 1];
                if self.files[prev].kind == SampleKind::Blank {
                    continue;
                }
                if let (Some(b), Some(p)) = (area(f), area(prev)) {
                    carry[f] = b > 0.0 && p >= s.carry_over_factor * b;
                }
            }
            // Replicates: files of one sample name.
            let mut by_sample: BTreeMap<&str, Vec<usize>> = BTreeMap::new();
            for &f in in_class {
                by_sample.entry(self.files[f].sample.as_str()).or_default().push(f);
            }
            let mut replicate: HashMap<usize, ((usize, usize), Option<f64>)> = HashMap::new();
            for fs in by_sample.values() {
                let k = fs
                    .iter()
                    .filter(|&&f| cells[r][f].is_some_and(|c| c.detected.is_some()))
                    .count();
                let areas: Vec<f64> = fs.iter().filter_map(|&f| area(f)).collect();
                let rsd = rsd_percent(&areas);
                for &f in fs {
                    replicate.insert(f, ((k, fs.len()), rsd));
                }
            }
            let best = &self.files[row.best.0].compounds[row.best.1];
            let batch_compound = r + 1;
            let files_detected = row.members.len();
            compounds.push(AlignedCompound {
                batch_compound,
                class: row.group.class.clone(),
                neutral_mass: row.group.ion.is_none().then_some(row.mass),
                ion_mz: row.ion_mz,
                ion_type: best.ion_type.clone(),
                rt_min: row.rt,
                n_cl: best.n_cl,
                n_br: best.n_br,
                halogen: best.halogen,
                odd_nominal: best.odd_nominal,
                files_detected,
                in_blank: !blank_areas.is_empty(),
                blank_max,
                above_blank,
                carry_over: carry.iter().any(|&c| c),
            });
            for &f in in_class {
                let c = cells[r][f].unwrap_or(EMPTY_CELL);
                let file = &self.files[f];
                let ((replicates_detected, replicate_injections), replicate_rsd_percent) =
                    replicate.remove(&f).unwrap_or_default();
                detections.push(Detection {
                    batch_compound,
                    file: names[f].clone(),
                    sample: samples[f].clone(),
                    kind: file.kind,
                    detected: c.detected.is_some(),
                    filled: c.filled,
                    area: c.area,
                    apex_intensity: c.apex,
                    rt_min: c.rt,
                    mz_error_ppm: c.mz_error_ppm,
                    compound: c.detected,
                    blank_ratio: c.area.and_then(ratio),
                    replicates_detected,
                    replicate_injections,
                    replicate_rsd_percent,
                    carry_over: carry[f],
                });
            }
        }
        let drift = self.drift();
        BatchView {
            files: self
                .files
                .into_iter()
                .map(|f| FileEntry { name: f.name, sample: f.sample, kind: f.kind, order: f.order })
                .collect(),
            compounds,
            detections,
            drift,
            matrix,
            fill_errors: Vec::new(),
        }
    }
}

const EMPTY_CELL: Cell =
    Cell { detected: None, filled: None, area: None, apex: None, rt: None, mz_error_ppm: None };

/// Relative standard deviation (sample standard deviation over the mean), percent; `None`
/// for fewer than two values or a zero mean.
fn rsd_percent(v: &[f64]) -> Option<f64> {
    if v.len() < 2 {
        return None;
    }
    let n = v.len() as f64;
    let mean = v.iter().sum::<f64>() / n;
    let var = v.iter().map(|x| (x - mean).powi(2)).sum::<f64>() / (n - 1.0);
    (mean != 0.0).then(|| 100.0 * var.sqrt() / mean.abs())
}

/// A file of the batch view.
#[derive(Debug, Clone, PartialEq, Eq, Serialize)]
pub struct FileEntry {
    /// Report folder name.
    pub name: String,
    /// Sample name.
    pub sample: String,
    /// Kind of injection.
    pub kind: SampleKind,
    /// Position in acquisition order as given.
    pub order: usize,
}

/// One aligned compound: a row of `batch_compounds.tsv`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct AlignedCompound {
    /// Row number, 1-based (by class, then retention time, then mass).
    pub batch_compound: usize,
    /// How its files were acquired.
    pub class: AcquisitionClass,
    /// Median neutral mass of the members, u (`None` when matched on ion m/z).
    pub neutral_mass: Option<f64>,
    /// Median molecular-ion m/z of the members.
    pub ion_mz: f64,
    /// Ion type of the strongest member.
    pub ion_type: String,
    /// Median drift-corrected apex retention time, minutes (the batch's time scale).
    pub rt_min: f64,
    /// Chlorine atoms (strongest member).
    pub n_cl: u8,
    /// Bromine atoms (strongest member).
    pub n_br: u8,
    /// Halogen call of the strongest member.
    pub halogen: bool,
    /// Nitrogen-rule call of the strongest member.
    pub odd_nominal: OddNominal,
    /// Files it was detected in (filled values not counted).
    pub files_detected: usize,
    /// True when some blank has an area for it (detected or filled).
    pub in_blank: bool,
    /// Largest blank area.
    pub blank_max: Option<f64>,
    /// True when some sample (kind `sample`) detected it with an area of at least
    /// `blank_factor` times the largest blank area (any area when no blank has it).
    pub above_blank: bool,
    /// True when a blank holds it right after a much stronger injection (carry-over suspect).
    pub carry_over: bool,
}

/// One file x compound cell: a row of `detections.tsv`.
#[derive(Debug, Clone, PartialEq)]
pub struct Detection {
    /// Row number of the aligned compound.
    pub batch_compound: usize,
    /// Report folder name of the file.
    pub file: Arc<str>,
    /// Its sample.
    pub sample: Arc<str>,
    /// Its kind.
    pub kind: SampleKind,
    /// Detected by the file's own compound stage.
    pub detected: bool,
    /// Extracted by gap filling: `true` found, `false` looked for and absent (or detected),
    /// `None` not looked for (the file could not be read).
    pub filled: Option<bool>,
    /// Area (detected or filled), intensity x minutes.
    pub area: Option<f64>,
    /// Apex intensity.
    pub apex_intensity: Option<f64>,
    /// Apex retention time in the file's own minutes.
    pub rt_min: Option<f64>,
    /// Mass error against the row, ppm (ion m/z for filled values).
    pub mz_error_ppm: Option<f64>,
    /// The compound's id in the file's `compounds.tsv` (detected only).
    pub compound: Option<usize>,
    /// Area over the largest blank area.
    pub blank_ratio: Option<f64>,
    /// Injections of this sample that detected it (`k` of `k/n`).
    pub replicates_detected: usize,
    /// Injections of this sample (`n` of `k/n`).
    pub replicate_injections: usize,
    /// RSD of the areas of this sample's injections, percent.
    pub replicate_rsd_percent: Option<f64>,
    /// This blank holds it right after a much stronger injection.
    pub carry_over: bool,
}

/// Counts for the end-of-run summary.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
pub struct BatchCounts {
    /// Aligned compounds.
    pub compounds: usize,
    /// Of them above the blanks.
    pub above_blank: usize,
    /// Of those, with a Cl/Br call.
    pub halogenated_above_blank: usize,
    /// Carry-over suspects.
    pub carry_over_suspects: usize,
    /// Values recovered by gap filling.
    pub filled: usize,
}

/// The batch view: aligned compounds, detections, drift fits and the area matrix.
#[derive(Debug, Clone, PartialEq)]
pub struct BatchView {
    files: Vec<FileEntry>,
    compounds: Vec<AlignedCompound>,
    detections: Vec<Detection>,
    drift: Vec<DriftRecord>,
    matrix: Array2<f64>,
    /// Files whose gaps could not be filled, with why (report folder name, message).
    pub fill_errors: Vec<(String, String)>,
}

impl BatchView {
    /// The files, in acquisition order: the rows of [`BatchView::matrix`].
    pub fn files(&self) -> &[FileEntry] {
        &self.files
    }

    /// The aligned compounds: the columns of [`BatchView::matrix`].
    pub fn compounds(&self) -> &[AlignedCompound] {
        &self.compounds
    }

    /// One entry per aligned compound and file of its class.
    pub fn detections(&self) -> &[Detection] {
        &self.detections
    }

    /// Drift fits per file and class.
    pub fn drift(&self) -> &[DriftRecord] {
        &self.drift
    }

    /// Areas, files x compounds (detected or filled; NaN when absent, not searched, or the
    /// file is not of the compound's class).
    pub fn matrix(&self) -> &Array2<f64> {
        &self.matrix
    }

    /// The summary counts.
    pub fn counts(&self) -> BatchCounts {
        let above: Vec<&AlignedCompound> =
            self.compounds.iter().filter(|c| c.above_blank).collect();
        BatchCounts {
            compounds: self.compounds.len(),
            above_blank: above.len(),
            halogenated_above_blank: above.iter().filter(|c| c.halogen).count(),
            carry_over_suspects: self.compounds.iter().filter(|c| c.carry_over).count(),
            filled: self.detections.iter().filter(|d| d.filled == Some(true)).count(),
        }
    }
}

/// [`align`], [`fill_from_file`] for every file with a path (on the current rayon pool, one
/// file per task; skipped when `settings.fill` is off), and [`Alignment::finish`]. A file that
/// cannot be searched keeps its gaps unknown and is listed in [`BatchView::fill_errors`].
pub fn build(files: Vec<BatchFile>, settings: &BatchSettings, config: &ScreenConfig) -> BatchView {
    use rayon::prelude::*;
    let alignment = align(files, settings);
    let outcome: Vec<(Option<Vec<FillResult>>, Option<String>)> = (0..alignment.files.len())
        .into_par_iter()
        .map(|f| {
            let targets: Vec<FillTarget> =
                alignment.fill_targets(f).into_iter().map(|t| t.1).collect();
            let file = &alignment.files[f];
            match (&file.path, settings.fill) {
                _ if targets.is_empty() => (Some(Vec::new()), None),
                (Some(path), true) => match fill_from_file(path, &targets, config) {
                    Ok(v) => (Some(v), None),
                    Err(e) => (None, Some(format!("{}: gap filling: {e}", path.display()))),
                },
                (None, true) => (None, Some("gap filling: input file not known".into())),
                (_, false) => (None, None),
            }
        })
        .collect();
    let names: Vec<String> = alignment.files.iter().map(|f| f.name.clone()).collect();
    let mut errors = Vec::new();
    let mut fills = Vec::new();
    for (name, (fill, err)) in names.into_iter().zip(outcome) {
        if let Some(e) = err {
            errors.push((name, e));
        }
        fills.push(fill);
    }
    let mut view = alignment.finish(fills);
    view.fill_errors = errors;
    view
}

#[cfg(test)]
mod tests;
