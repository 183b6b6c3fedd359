//! Screening one acquisition end to end: the entry point for embedding.
//!
//! [`screen_file`] (or [`screen_reader`]) streams a file through the parallel pipeline
//! (decode, centroid, flag), groups flagged ions into features, and returns the same rows the
//! TSV reports hold ([`FileReport`]), as serde-serializable structs. [`ScreenConfig`] holds every
//! parameter; it reads from and writes to TOML. [`screen_file_traced`] also records
//! extracted-ion traces ([`TraceTarget`]) in the same pass, for checks such as [`crate::qc`].
//!
//! Flags are screening hints from isotope patterns and mass parity, not identifications.

use std::fs::File;
use std::io::{BufRead, BufReader, Read};
use std::path::Path;

use crate::hash::BackgroundDigest;
use serde::{Deserialize, Serialize};

use crate::centroid::CentroidParams;
use crate::compound::{self, ClusterRow, Compound, CompoundSettings, TraceRow};
use crate::error::{Error, ErrorKind, Result};
use crate::feature::{Feature, FeatureBuilder};
use crate::flag::{self, FlagSettings, FlaggedIon, OddNominal, SpectrumFlags};
use crate::mzml::{ChecksumStatus, Reader, ReaderOptions};
use crate::pipeline::{self, PipelineSettings, ProcessedSpectrum};
use crate::spectrum::Polarity;

/// The cautions that go with every report.
pub const CAUTION: &str = "Flags are screening hints from isotope patterns and mass parity, not \
identifications. Confirm any finding with reference standards and accredited methods before any \
regulatory, clinical or safety decision, and follow local regulations and laboratory practice.";

/// Limits and checks of the mzML reader, as configured.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct ReaderSettings {
    /// Verify the SHA-1 `fileChecksum` of indexed files.
    pub verify_checksum: bool,
    /// Ceiling on one XML event (a tag or one `<binary>` text), bytes.
    pub max_event_bytes: u64,
    /// Ceiling on a declared array length, values.
    pub max_array_length: usize,
    /// Ceiling on element nesting (inside a spectrum, and in the whole document).
    pub max_depth: usize,
    /// Ceiling on the encoded array text held for one spectrum, bytes.
    pub max_spectrum_bytes: u64,
    /// Ceiling on the elements of one spectrum (referenced cvParams included) and the
    /// cvParams of one param group.
    pub max_elements: usize,
    /// Ceiling on the decompression ratio of gzip input (checked after 64 MiB of output).
    pub max_gzip_ratio: u64,
}

impl Default for ReaderSettings {
    fn default() -> Self {
        let d = ReaderOptions::default();
        ReaderSettings {
            verify_checksum: true,
            max_event_bytes: d.max_event_bytes,
            max_array_length: d.max_array_length,
            max_depth: d.max_depth,
            max_spectrum_bytes: d.max_spectrum_bytes,
            max_elements: d.max_elements,
            max_gzip_ratio: d.max_gzip_ratio,
        }
    }
}

impl ReaderSettings {
    /// The reader options these settings mean.
    pub fn options(&self) -> ReaderOptions {
        ReaderOptions::default()
            .verify_checksum(self.verify_checksum)
            .max_event_bytes(self.max_event_bytes)
            .max_array_length(self.max_array_length)
            .max_depth(self.max_depth)
            .max_spectrum_bytes(self.max_spectrum_bytes)
            .max_elements(self.max_elements)
            .max_gzip_ratio(self.max_gzip_ratio)
    }
}

/// Every parameter of a screening run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize, Default)]
#[serde(deny_unknown_fields, default)]
pub struct ScreenConfig {
    /// Worker threads shared by all files and spectra (0: one per core).
    pub threads: usize,
    /// Reader limits and checksum verification.
    pub reader: ReaderSettings,
    /// Spectra in flight and the resolution decision.
    pub pipeline: PipelineSettings,
    /// Peak picking.
    pub centroid: CentroidParams,
    /// Halogen and nitrogen-rule flagging, and feature grouping.
    pub flag: FlagSettings,
    /// Grouping of features into compounds, and the evidence for halogen calls.
    pub compound: CompoundSettings,
    /// What the run writes besides the tables (`[report]`).
    pub report: crate::report::ReportSettings,
}

impl ScreenConfig {
    /// Parses a TOML configuration; an unknown key or a wrong type is an error naming it.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::screen::ScreenConfig;
    /// let c = ScreenConfig::from_toml("threads = 2\n[flag]\nmin_snr = 20.0\n")?;
    /// assert_eq!((c.threads, c.flag.min_snr), (2, 20.0));
    /// assert!(ScreenConfig::from_toml("[flag]\nmin_snrr = 1.0\n").is_err());
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn from_toml(text: &str) -> Result<Self> {
        let c: ScreenConfig =
            toml::from_str(text).map_err(|e| Error::new(ErrorKind::Config(e.to_string())))?;
        c.validate()?;
        Ok(c)
    }

    /// The configuration as TOML.
    pub fn to_toml(&self) -> String {
        toml::to_string_pretty(self).expect("the configuration always serializes")
    }

    /// Checks every setting's range.
    pub fn validate(&self) -> Result<()> {
        self.centroid.validate()?;
        self.flag.validate()?;
        self.compound.validate()?;
        if self.pipeline.in_flight == 0 {
            return Err(Error::new(ErrorKind::Config(
                "pipeline.in_flight must be at least 1".into(),
            )));
        }
        Ok(())
    }

    fn pipeline_settings(&self) -> PipelineSettings {
        PipelineSettings { centroid: self.centroid, ..self.pipeline.clone() }
    }
}

/// How a file fared.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum FileStatus {
    /// Every spectrum read and processed.
    Ok,
    /// Some spectra were unreadable, or the file was cut off or failed a check after some
    /// spectra were read.
    Partial,
    /// Nothing could be read.
    Failed,
    /// Skipped (resume found complete reports for the unchanged input).
    Skipped,
}

impl FileStatus {
    /// The lower-case name used in reports.
    pub fn name(self) -> &'static str {
        match self {
            FileStatus::Ok => "ok",
            FileStatus::Partial => "partial",
            FileStatus::Failed => "failed",
            FileStatus::Skipped => "skipped",
        }
    }
}

/// A spectrum that could not be read or processed.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct UnreadableSpectrum {
    /// Index, when known.
    pub index: Option<usize>,
    /// Native id, when known.
    pub id: Option<String>,
    /// Why.
    pub error: String,
}

/// One row of `spectra.tsv`.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct SpectrumRow {
    /// Zero-based index in the file.
    pub index: usize,
    /// Native id.
    pub id: String,
    /// `ok` or `unreadable`.
    pub status: &'static str,
    /// MS level.
    pub ms_level: Option<u8>,
    /// `+`, `-` or empty.
    pub polarity: &'static str,
    /// How the data was treated: `profile` or `centroid`.
    pub representation: &'static str,
    /// Scan start time, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_min: Option<f64>,
    /// Decoded points.
    pub points: Option<usize>,
    /// Picked peaks.
    pub peaks: Option<usize>,
    /// Sum of decoded intensities.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub intensity_sum: Option<f64>,
    /// m/z of the most intense point.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub base_peak_mz: Option<f64>,
    /// Intensity of the most intense point.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub base_peak_intensity: Option<f64>,
    /// `unit`, `high` or `unknown`.
    pub resolution: &'static str,
    /// Isotope clusters found.
    pub clusters: Option<usize>,
    /// Ions flagged (halogen clusters and the molecular-ion candidate).
    pub flagged_ions: Option<usize>,
    /// A halogen signature was found.
    pub has_halogen: Option<bool>,
    /// m/z of the best halogen assignment.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub best_mz: Option<f64>,
    /// Chlorine atoms of the best assignment.
    pub best_n_cl: Option<u8>,
    /// Bromine atoms of the best assignment.
    pub best_n_br: Option<u8>,
    /// Posterior probability of the best assignment.
    #[serde(serialize_with = "crate::report::digits::probability")]
    pub best_score: Option<f64>,
    /// Nitrogen rule of the molecular-ion candidate: `true`, `false` or `undecided`.
    pub odd_nominal: Option<OddNominal>,
    /// Why the spectrum is unreadable (escaped text).
    pub error: String,
}

/// Column names of `spectra.tsv` (for an empty table).
pub const SPECTRUM_COLUMNS: &[&str] = &[
    "index",
    "id",
    "status",
    "ms_level",
    "polarity",
    "representation",
    "rt_min",
    "points",
    "peaks",
    "intensity_sum",
    "base_peak_mz",
    "base_peak_intensity",
    "resolution",
    "clusters",
    "flagged_ions",
    "has_halogen",
    "best_mz",
    "best_n_cl",
    "best_n_br",
    "best_score",
    "odd_nominal",
    "error",
];

/// Column names of `ions.tsv` (the fields of [`FlaggedIon`]).
pub const ION_COLUMNS: &[&str] = &[
    "scan",
    "spectrum_id",
    "rt_min",
    "mz",
    "charge",
    "intensity",
    "snr",
    "halogen",
    "molecular_candidate",
    "assignment",
    "n_cl",
    "n_br",
    "score",
    "halogen_probability",
    "second",
    "second_score",
    "misfit",
    "m2_ratio",
    "m2_expected",
    "m4_ratio",
    "m4_expected",
    "spacing",
    "m2_delta",
    "nominal_mass",
    "odd_nominal",
    "ion_type",
    "tolerance_da",
    "reason",
];

/// Column names of `features.tsv` (the fields of [`Feature`]).
pub const FEATURE_COLUMNS: &[&str] = &[
    "feature",
    "mz",
    "charge",
    "rt_apex_min",
    "rt_start_min",
    "rt_end_min",
    "scans",
    "apex_scan",
    "apex_intensity",
    "area",
    "halogen",
    "n_cl",
    "n_br",
    "assignment",
    "support",
    "halogen_score",
    "nominal_mass",
    "odd_nominal",
    "molecular_candidate",
    "compound",
];

impl SpectrumRow {
    fn of(p: &ProcessedSpectrum, f: &SpectrumFlags) -> Self {
        let m = &p.meta;
        SpectrumRow {
            index: m.index,
            id: crate::report::escape_text(&m.id),
            status: "ok",
            ms_level: Some(m.ms_level),
            polarity: m.polarity.symbol(),
            representation: p.treated_as.name(),
            rt_min: m.rt_min,
            points: Some(p.stats.points),
            peaks: Some(p.centroids.len()),
            intensity_sum: Some(p.stats.intensity_sum),
            base_peak_mz: p.stats.base_peak_mz,
            base_peak_intensity: p.stats.base_peak_intensity,
            resolution: p.resolution.name(),
            clusters: Some(f.clusters),
            flagged_ions: Some(f.ions.len()),
            has_halogen: Some(f.has_halogen),
            best_mz: f.best.map(|b| b.mz),
            best_n_cl: f.best.map(|b| b.n_cl),
            best_n_br: f.best.map(|b| b.n_br),
            best_score: f.best.map(|b| b.score),
            odd_nominal: f.molecular_ion.map(|_| f.odd_nominal),
            error: String::new(),
        }
    }

    fn unreadable(index: usize, u: &UnreadableSpectrum) -> Self {
        SpectrumRow {
            index,
            id: crate::report::escape_text(u.id.as_deref().unwrap_or("")),
            status: "unreadable",
            ms_level: None,
            polarity: "",
            representation: "",
            rt_min: None,
            points: None,
            peaks: None,
            intensity_sum: None,
            base_peak_mz: None,
            base_peak_intensity: None,
            resolution: "",
            clusters: None,
            flagged_ions: None,
            has_halogen: None,
            best_mz: None,
            best_n_cl: None,
            best_n_br: None,
            best_score: None,
            odd_nominal: None,
            error: crate::report::escape_text(&u.error),
        }
    }
}

/// What a file's screening found, summarised (one row of `batch.tsv`, plus detail).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FileSummary {
    /// How the file fared.
    pub status: FileStatus,
    /// The first file-level error (escaped), empty when none.
    pub error: String,
    /// Spectra read (readable ones).
    pub spectra: usize,
    /// MS1 spectra.
    pub ms1: usize,
    /// MS2 and higher spectra.
    pub ms2: usize,
    /// Earliest scan start time, minutes.
    pub rt_start_min: Option<f64>,
    /// Latest scan start time, minutes.
    pub rt_end_min: Option<f64>,
    /// Spectra with a halogen signature.
    pub flagged_spectra: usize,
    /// Features with a halogen assignment.
    pub halogen_features: usize,
    /// Features whose molecular ion has an odd nominal mass.
    pub odd_nominal_features: usize,
    /// Compounds called halogenated (see [`crate::compound`]).
    #[serde(default)]
    pub halogen_compounds: usize,
    /// Compounds whose neutral has an odd nominal mass.
    #[serde(default)]
    pub odd_nominal_compounds: usize,
    /// Spectra that could not be read or processed.
    pub unreadable: Vec<UnreadableSpectrum>,
    /// Ids in the file's index that were never read (cut-off or skipped spectra).
    pub missing_from_index: Vec<String>,
    /// Entries in the file's index (indexed files read to the end).
    pub index_entries: Option<usize>,
    /// SHA-256 of the input bytes as stored (compressed or not), lower-case hex.
    pub sha256: String,
    /// Input size, bytes.
    pub bytes: u64,
    /// Outcome of the SHA-1 `fileChecksum` verification (`not_checked` when verification is
    /// off or the end of the document was not reached).
    #[serde(default)]
    pub checksum: ChecksumStatus,
    /// What was odd about the file but cost no data (escaped text; e.g. index offsets a few
    /// bytes off): the status stays `ok` for these.
    #[serde(default)]
    pub warnings: Vec<String>,
}

impl FileSummary {
    /// The `warning` cell of `batch.tsv`: empty, `1 warning: <it>`, or
    /// `<n> warnings; first: <it>`.
    pub fn warning_cell(&self) -> String {
        match self.warnings.as_slice() {
            [] => String::new(),
            [one] => format!("1 warning: {one}"),
            [first, ..] => format!("{} warnings; first: {first}", self.warnings.len()),
        }
    }
}

/// Everything the reports of one file hold.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct FileReport {
    /// The summary.
    pub summary: FileSummary,
    /// One row per spectrum (unreadable ones included, with their error).
    pub spectra: Vec<SpectrumRow>,
    /// One row per flagged ion.
    pub ions: Vec<FlaggedIon>,
    /// One row per feature.
    pub features: Vec<Feature>,
    /// One row per compound (`compounds.tsv`).
    pub compounds: Vec<Compound>,
    /// Extracted-ion traces of the halogenated compounds (`traces.tsv`).
    pub compound_traces: Vec<TraceRow>,
    /// Apex isotope clusters of the halogenated compounds (`cluster.tsv`).
    pub compound_clusters: Vec<ClusterRow>,
    /// One extracted-ion trace per [`TraceTarget`] asked for (empty for [`screen_file`]).
    pub traces: Vec<Vec<TracePoint>>,
}

/// An extracted-ion trace to record while screening: for every readable MS1 spectrum whose
/// polarity matches, the most intense centroid within `tolerance` of `mz`.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct TraceTarget {
    /// Ion m/z.
    pub mz: f64,
    /// Half-width of the m/z window (Th).
    pub tolerance: f64,
    /// Spectra of this polarity only; [`Polarity::Unknown`] takes every spectrum. Spectra that
    /// do not state their polarity are always taken.
    pub polarity: Polarity,
}

impl TraceTarget {
    /// The most intense centroid within the window, 0 when there is none.
    fn intensity_in(&self, centroids: &[crate::centroid::Centroid]) -> f64 {
        centroids
            .iter()
            .filter(|c| (c.mz - self.mz).abs() <= self.tolerance)
            .map(|c| c.intensity)
            .fold(0.0, f64::max)
    }

    fn takes(&self, polarity: Polarity) -> bool {
        self.polarity == Polarity::Unknown
            || polarity == Polarity::Unknown
            || polarity == self.polarity
    }
}

/// One point of an extracted-ion trace.
#[derive(Debug, Clone, Copy, PartialEq, Serialize)]
pub struct TracePoint {
    /// Index of the spectrum in the file.
    pub index: usize,
    /// Its scan start time, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_min: Option<f64>,
    /// Most intense centroid within the window (0 when none).
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub intensity: f64,
}

/// Hashes (SHA-256) every byte read through it.
pub struct Sha256Reader<R> {
    inner: R,
    hasher: BackgroundDigest,
    bytes: u64,
    progress: Option<std::sync::Arc<std::sync::atomic::AtomicU64>>,
}

impl<R: BufRead> Sha256Reader<R> {
    /// Wraps `inner`.
    pub fn new(inner: R) -> Self {
        Sha256Reader {
            inner,
            hasher: BackgroundDigest::new::<sha2::Sha256>(),
            bytes: 0,
            progress: None,
        }
    }

    /// Wraps `inner`, also adding every byte read to `counter` (for a progress display on
    /// another thread while the file is screened).
    pub fn with_progress(inner: R, counter: std::sync::Arc<std::sync::atomic::AtomicU64>) -> Self {
        Sha256Reader { progress: Some(counter), ..Sha256Reader::new(inner) }
    }

    /// Bytes read through so far.
    pub fn bytes_read(&self) -> u64 {
        self.bytes
    }

    /// Reads the rest of the input and returns its SHA-256 (hex) and byte count.
    pub fn finish(mut self) -> std::io::Result<(String, u64)> {
        std::io::copy(&mut self, &mut std::io::sink())?;
        Ok((self.hasher.finish(), self.bytes))
    }
}

impl<R: BufRead> Read for Sha256Reader<R> {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        let available = self.fill_buf()?;
        let n = available.len().min(buf.len());
        buf[..n].copy_from_slice(&available[..n]);
        self.consume(n);
        Ok(n)
    }
}

impl<R: BufRead> BufRead for Sha256Reader<R> {
    fn fill_buf(&mut self) -> std::io::Result<&[u8]> {
        self.inner.fill_buf()
    }

    fn consume(&mut self, amt: usize) {
        if let Ok(buf) = self.inner.fill_buf() {
            self.hasher.update(&buf[..amt.min(buf.len())]);
        }
        self.bytes += amt as u64;
        if let Some(p) = &self.progress {
            p.fetch_add(amt as u64, std::sync::atomic::Ordering::Relaxed);
        }
        self.inner.consume(amt);
    }
}

/// Screens the file at `path` with `config` on `pool`.
///
/// Only an input that cannot be opened is an `Err`; everything wrong inside the file is in
/// the report (status `failed` or `partial`, with the errors).
pub fn screen_file(
    path: &Path,
    config: &ScreenConfig,
    pool: &rayon::ThreadPool,
) -> Result<FileReport> {
    screen_file_traced(path, config, pool, &[])
}

/// [`screen_file`] that adds every input byte read to `counter` as it goes (bytes as stored,
/// compressed or not), so that another thread can show progress inside a large file.
pub fn screen_file_counted(
    path: &Path,
    config: &ScreenConfig,
    pool: &rayon::ThreadPool,
    counter: std::sync::Arc<std::sync::atomic::AtomicU64>,
) -> Result<FileReport> {
    let file = File::open(path)?;
    let input = Sha256Reader::with_progress(BufReader::with_capacity(256 * 1024, file), counter);
    screen_reader_traced(input, config, pool, &[])
}

/// [`screen_file`] that also records one extracted-ion trace per target in
/// [`FileReport::traces`], in the same pass over the file.
pub fn screen_file_traced(
    path: &Path,
    config: &ScreenConfig,
    pool: &rayon::ThreadPool,
    targets: &[TraceTarget],
) -> Result<FileReport> {
    // The caller names the file in its messages (as `std::fs` does).
    let file = File::open(path)?;
    let hashing = Sha256Reader::new(BufReader::with_capacity(256 * 1024, file));
    screen_reader_traced(hashing, config, pool, targets)
}

/// Screens an mzML stream (plain or gzip) read through a [`Sha256Reader`].
///
/// # Examples
///
/// ```
/// use mzcore::mzml::{Writer, WriterOptions};
/// use mzcore::screen::{screen_reader, FileStatus, ScreenConfig, Sha256Reader};
/// use mzcore::spectrum::{Peaks, SpectrumMeta};
///
/// let mut w = Writer::new(Vec::new(), WriterOptions::default())?;
/// let meta = SpectrumMeta { id: "scan=1".into(), ms_level: 1, rt_min: Some(1.0), ..Default::default() };
/// w.write_spectrum(&meta, &Peaks { mz: vec![100.0, 200.0], intensity: vec![10.0, 20.0] })?;
/// let doc = w.finish()?;
///
/// let pool = mzcore::pipeline::thread_pool(1)?;
/// let report = screen_reader(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool)?;
/// assert_eq!(report.summary.status, FileStatus::Ok);
/// assert_eq!(report.spectra.len(), 1);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn screen_reader<R: BufRead>(
    input: Sha256Reader<R>,
    config: &ScreenConfig,
    pool: &rayon::ThreadPool,
) -> Result<FileReport> {
    screen_reader_traced(input, config, pool, &[])
}

/// [`screen_reader`] that also records one extracted-ion trace per target (see
/// [`screen_file_traced`]). The traces are computed on the workers, beside the flagging.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::{Writer, WriterOptions};
/// use mzcore::screen::{screen_reader_traced, ScreenConfig, Sha256Reader, TraceTarget};
/// use mzcore::spectrum::{Peaks, Polarity, Representation, SpectrumMeta};
///
/// let mut w = Writer::new(Vec::new(), WriterOptions::default())?;
/// let meta = SpectrumMeta {
///     id: "scan=1".into(), ms_level: 1, rt_min: Some(2.0),
///     representation: Representation::Centroid, ..Default::default()
/// };
/// let mz: Vec<f64> = (0..50).map(|i| 100.0 + i as f64).collect();
/// let mut intensity: Vec<f64> = (0..50).map(|i| 10.0 + (i % 5) as f64).collect();
/// intensity[20] = 5000.0;
/// w.write_spectrum(&meta, &Peaks { mz, intensity })?;
/// let doc = w.finish()?;
///
/// let pool = mzcore::pipeline::thread_pool(1)?;
/// let target = TraceTarget { mz: 120.001, tolerance: 0.01, polarity: Polarity::Unknown };
/// let report = screen_reader_traced(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool, &[target])?;
/// assert_eq!(report.traces[0][0].intensity, 5000.0);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn screen_reader_traced<R: BufRead>(
    input: Sha256Reader<R>,
    config: &ScreenConfig,
    pool: &rayon::ThreadPool,
    targets: &[TraceTarget],
) -> Result<FileReport> {
    config.validate()?;
    let mut summary = FileSummary {
        status: FileStatus::Ok,
        error: String::new(),
        spectra: 0,
        ms1: 0,
        ms2: 0,
        rt_start_min: None,
        rt_end_min: None,
        flagged_spectra: 0,
        halogen_features: 0,
        odd_nominal_features: 0,
        halogen_compounds: 0,
        odd_nominal_compounds: 0,
        unreadable: Vec::new(),
        missing_from_index: Vec::new(),
        index_entries: None,
        sha256: String::new(),
        bytes: 0,
        checksum: ChecksumStatus::NotChecked,
        warnings: Vec::new(),
    };
    let mut traces: Vec<Vec<TracePoint>> = vec![Vec::new(); targets.len()];
    let mut spectra = Vec::new();
    let mut ions = Vec::new();
    let mut features = FeatureBuilder::new(&config.flag);
    let mut file_errors: Vec<String> = Vec::new();
    let mut stopped = false;
    let mut unplaced: Vec<UnreadableSpectrum> = Vec::new();
    let mut reader = Reader::with_options(input, config.reader.options())?;
    let flag_settings = config.flag.clone();
    let relations = std::sync::Arc::new(config.compound.validate()?);
    let mut ionization = crate::spectrum::Ionization::Unknown;
    let shared_targets: std::sync::Arc<[TraceTarget]> = targets.into();
    let extra = move |p: &ProcessedSpectrum| {
        let flags = flag::flag_spectrum_related(
            &p.meta,
            &p.centroids,
            p.resolution,
            &flag_settings,
            Some(&relations),
        );
        let traced: Vec<Option<f64>> = shared_targets
            .iter()
            .map(|t| {
                (p.meta.ms_level <= 1 && t.takes(p.meta.polarity))
                    .then(|| t.intensity_in(&p.centroids))
            })
            .collect();
        (flags, traced)
    };
    pipeline::run(&mut reader, pool, &config.pipeline_settings(), extra, |result| {
        match result {
            Ok((p, (flags, traced))) => {
                for (trace, intensity) in traces.iter_mut().zip(traced) {
                    if let Some(intensity) = intensity {
                        trace.push(TracePoint {
                            index: p.meta.index,
                            rt_min: p.meta.rt_min,
                            intensity,
                        });
                    }
                }
                summary.spectra += 1;
                if ionization == crate::spectrum::Ionization::Unknown {
                    ionization = p.meta.ionization;
                }
                if p.meta.ms_level <= 1 {
                    summary.ms1 += 1;
                } else {
                    summary.ms2 += 1;
                }
                if let Some(rt) = p.meta.rt_min {
                    summary.rt_start_min =
                        Some(summary.rt_start_min.map_or(rt, |v: f64| v.min(rt)));
                    summary.rt_end_min = Some(summary.rt_end_min.map_or(rt, |v: f64| v.max(rt)));
                }
                summary.flagged_spectra += usize::from(flags.has_halogen);
                spectra.push(SpectrumRow::of(&p, &flags));
                features.push(&p.meta, &flags);
                ions.extend(flags.ions.into_iter().map(|mut ion| {
                    ion.spectrum_id = crate::report::escape_text(&ion.spectrum_id);
                    ion.reason = crate::report::escape_text(&ion.reason);
                    ion
                }));
            }
            Err(e) => {
                let pos = e.position();
                if pos.spectrum_index.is_some() || pos.spectrum_id.is_some() {
                    let u = UnreadableSpectrum {
                        index: pos.spectrum_index,
                        id: pos.spectrum_id.clone(),
                        error: e.to_string(),
                    };
                    match u.index {
                        Some(index) => {
                            spectra.push(SpectrumRow::unreadable(index, &u));
                            summary.unreadable.push(u);
                        }
                        // Known by id only (an index entry that leads nowhere): placed once
                        // the index is known.
                        None => unplaced.push(u),
                    }
                }
                // Problems of the file as a whole (index, checksum, a cut, an I/O failure, a
                // limit) are file errors, whether or not they also cost a spectrum.
                let whole_file = pos.spectrum_index.is_none()
                    || matches!(
                        e.kind(),
                        ErrorKind::Truncated { .. }
                            | ErrorKind::Io(_)
                            | ErrorKind::LimitExceeded { .. }
                    );
                if whole_file {
                    file_errors.push(e.to_string());
                }
                // Reading stopped before the end (a cut, an I/O failure, a limit).
                stopped |= matches!(
                    e.kind(),
                    ErrorKind::Truncated { .. }
                        | ErrorKind::Io(_)
                        | ErrorKind::LimitExceeded { .. }
                );
            }
        }
        Ok(())
    })?;
    let index: Vec<String> = reader.index().iter().map(|(id, _)| id.clone()).collect();
    let declared = reader.declared_spectrum_count();
    if !index.is_empty() {
        summary.index_entries = Some(index.len());
        let seen: std::collections::HashSet<&str> = spectra
            .iter()
            .filter(|r| r.status == "ok")
            .map(|r| r.id.as_str())
            .chain(summary.unreadable.iter().filter_map(|u| u.id.as_deref()))
            .chain(unplaced.iter().filter_map(|u| u.id.as_deref()))
            .collect();
        summary.missing_from_index = index
            .iter()
            .filter(|id| !seen.contains(crate::report::escape_text(id).as_str()))
            .cloned()
            .collect();
    }
    summary.checksum = reader.checksum_status().clone();
    summary.warnings =
        reader.warnings().iter().map(|w| crate::report::escape_text(&w.to_string())).collect();
    list_missing(&mut spectra, &mut summary, unplaced, &index, declared.filter(|_| stopped));
    // The rest of the input is read for its SHA-256. An input that fails now (or failed
    // while the reader read it) keeps its report: the spectra read are kept, no hash.
    let mut hashing = reader.into_inner();
    match std::io::copy(&mut hashing, &mut std::io::sink()) {
        Ok(_) => (summary.sha256, summary.bytes) = hashing.finish()?,
        Err(e) => {
            summary.bytes = hashing.bytes_read();
            let e = Error::new(ErrorKind::Io(e)).in_field("SHA-256 of the input");
            if file_errors.is_empty() {
                file_errors.push(e.to_string());
            }
        }
    }
    let mut features = features.finish();
    let grouping =
        compound::group(&mut features, summary.ms1, ionization.name(), &config.compound)?;
    summary.halogen_compounds = grouping.compounds.iter().filter(|c| c.halogen).count();
    summary.odd_nominal_compounds =
        grouping.compounds.iter().filter(|c| c.odd_nominal == OddNominal::True).count();
    summary.halogen_features = features.iter().filter(|f| f.n_cl + f.n_br > 0).count();
    summary.odd_nominal_features =
        features.iter().filter(|f| f.odd_nominal == OddNominal::True).count();
    summary.status =
        if summary.spectra == 0 && !(file_errors.is_empty() && summary.unreadable.is_empty()) {
            FileStatus::Failed
        } else if !file_errors.is_empty()
            || !summary.unreadable.is_empty()
            || !summary.missing_from_index.is_empty()
        {
            FileStatus::Partial
        } else {
            FileStatus::Ok
        };
    let first = file_errors.first().cloned().or_else(|| {
        summary
            .unreadable
            .first()
            .map(|u| format!("{} unreadable spectra; first: {}", summary.unreadable.len(), u.error))
    });
    summary.error = crate::report::escape_text(&first.unwrap_or_default());
    Ok(FileReport {
        summary,
        spectra,
        ions,
        features,
        traces,
        compounds: grouping.compounds,
        compound_traces: grouping.traces,
        compound_clusters: grouping.clusters,
    })
}

/// Most `unreadable` rows added for spectra that a file whose reading stopped early promises in
/// its `spectrumList` count (a damaged count attribute must not make the report itself huge).
pub const MAX_MISSING_LISTED: usize = 1_000_000;

/// Lists the spectra a file announces but that never arrived, so that none goes missing
/// silently: those known by id only (`unplaced`, placed at their index position), those its
/// index names (`index`: ids in index order; a row at the index position with the id), and,
/// when reading stopped early (`declared`: the `spectrumList` count), every position
/// not read (id unknown; at most [`MAX_MISSING_LISTED`]). Each becomes an `unreadable` row and
/// an entry of `summary.unreadable`; rows end in index order.
fn list_missing(
    spectra: &mut Vec<SpectrumRow>,
    summary: &mut FileSummary,
    unplaced: Vec<UnreadableSpectrum>,
    index: &[String],
    declared: Option<usize>,
) {
    let mut listed: std::collections::HashSet<usize> = spectra.iter().map(|r| r.index).collect();
    let missing: std::collections::HashSet<&str> =
        summary.missing_from_index.iter().map(String::as_str).collect();
    let position: std::collections::HashMap<&str, usize> =
        index.iter().enumerate().map(|(i, id)| (id.as_str(), i)).collect();
    let mut found = Vec::new();
    for mut u in unplaced {
        let at = u.id.as_deref().and_then(|id| position.get(id).copied());
        let i = at.unwrap_or(spectra.len() + found.len());
        u.index = Some(i);
        listed.insert(i);
        found.push(u);
    }
    for (i, id) in index.iter().enumerate() {
        if missing.contains(id.as_str()) {
            let error = "listed in the file's index but not found in the document".to_owned();
            found.push(UnreadableSpectrum { index: Some(i), id: Some(id.clone()), error });
            listed.insert(i);
        }
    }
    if let Some(count) = declared {
        let error =
            format!("not read: reading stopped before this spectrum (spectrumList count {count})");
        let unread = (0..count).filter(|i| !listed.contains(i)).take(MAX_MISSING_LISTED);
        found.extend(unread.map(|i| UnreadableSpectrum {
            index: Some(i),
            id: None,
            error: error.clone(),
        }));
    }
    for u in found {
        spectra.push(SpectrumRow::unreadable(u.index.unwrap_or(0), &u));
        summary.unreadable.push(u);
    }
    spectra.sort_by_key(|r| r.index);
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::centroid::{Centroid, ResolutionClass};
    use crate::chem::isotopes::{Resolution, pattern};
    use crate::chem::{Formula, IonType};
    use crate::spectrum::{Polarity, SpectrumMeta};

    fn header_of<T: Serialize>(row: &T) -> Vec<String> {
        let mut out = Vec::new();
        crate::report::write_tsv(&mut out, &[], std::slice::from_ref(row)).unwrap();
        let text = String::from_utf8(out).unwrap();
        text.lines().next().unwrap().split('\t').map(str::to_owned).collect()
    }

    #[test]
    fn empty_table_headers_match_the_rows() {
        // A dichlorobenzene [M+H]+ cluster, as centroids at S/N 1000.
        let f = Formula::parse("C6H4Cl2").unwrap();
        let ion = IonType::parse("M+H").unwrap();
        let peaks = pattern(&f, Some(&ion), Resolution::ResolvingPower(60_000.0), 1e-4).unwrap();
        let centroids: Vec<Centroid> = peaks
            .iter()
            .map(|p| Centroid {
                mz: p.mz,
                intensity: p.relative * 100.0,
                area: p.relative,
                snr: p.relative * 10.0,
                fwhm: p.mz / 60_000.0,
            })
            .collect();
        let settings = FlagSettings::default();
        let mut builder = FeatureBuilder::new(&settings);
        let mut ions = Vec::new();
        for i in 0..4 {
            let meta = SpectrumMeta {
                index: i,
                id: format!("scan={i}"),
                ms_level: 1,
                polarity: Polarity::Positive,
                rt_min: Some(i as f64 * 0.05),
                ..Default::default()
            };
            let flags = flag::flag_spectrum(&meta, &centroids, ResolutionClass::High, &settings);
            builder.push(&meta, &flags);
            ions.extend(flags.ions);
        }
        let features = builder.finish();
        assert!(!ions.is_empty() && !features.is_empty(), "test setup: nothing flagged");
        assert_eq!(header_of(&ions[0]), ION_COLUMNS);
        assert_eq!(header_of(&features[0]), FEATURE_COLUMNS);
    }
}
