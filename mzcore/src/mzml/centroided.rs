//! The centroided copy of an acquisition: an indexed mzML 1.1 file (SHA-1 `fileChecksum`)
//! holding every readable spectrum of the input with its metadata and precursors, profile
//! spectra replaced by the peaks the pipeline picked, spectra that were already centroided
//! passed through with their arrays as stored (bit for bit).
//!
//! Picked spectra also carry each peak's S/N (MS:1000517 signal to noise array) and resolving
//! power m/z over FWHM (MS:1002529 resolution array), 32-bit float, zlib: screening the centroided file again then keeps the picked peaks with their S/N
//! instead of re-estimating the noise from a list that holds peaks only (see
//! [`crate::pipeline::process_spectrum`]), so that it finds the same halogen features.
//!
//! Data flow: on a worker thread, [`CentroidedArrays::prepare`] encodes a processed spectrum's
//! picked peaks (m/z 64-bit, intensity 32-bit, zlib; or MS-Numpress) or copies the stored
//! arrays of a centroided one; on the collecting thread, [`CentroidedWriter::push`] renders the
//! `<spectrum>` element in file order and appends it to a spool file next to the output. The
//! header (spectrum count, ionization, source file and its SHA-256) is only known at the end,
//! so [`CentroidedWriter::finish`] writes header, spooled spectra, TIC chromatogram, index and
//! checksum into a temporary file and renames it over the final name. Memory holds one entry
//! per spectrum (id, level, time, TIC, length), never the arrays.
//!
//! Kept from the input: native id, MS level, polarity, representation (switched to MS:1000127
//! centroid spectrum for picked spectra), scan start time, stored TIC and base peak, precursors
//! (selected ion m/z, charge, isolation window), ionization type. Not kept: other cvParams and
//! userParams of the spectrum, scan windows, activation (written as "not stated"), arrays
//! other than m/z and intensity, chromatograms other than the TIC (rebuilt from the MS1
//! spectra). Spectra that could not be read are left out.

use std::fs::{self, File};
use std::io::{BufWriter, Read, Write};
use std::path::{Path, PathBuf};

use serde::{Deserialize, Serialize};

use crate::centroid::CentroidParams;
use crate::error::{Error, ErrorKind, Result};
use crate::mzml::binary::{self, BinaryEncoding, Compression, NumericType};
use crate::mzml::cv::{self, Term};
use crate::mzml::writer::{
    ArrayText, HeaderExtras, SPECTRUM_INDENT, SpectrumText, Writer, WriterOptions, cv_param,
    escape, render_spectrum,
};
use crate::pipeline::ProcessedSpectrum;
use crate::spectrum::{ArrayKind, Ionization, Representation, Spectrum, SpectrumMeta};

/// MS:1000035 peak picking.
pub const PEAK_PICKING: Term = ("MS:1000035", "peak picking");
/// MS:1000799 custom unreleased software tool (the PSI-MS term for software it does not list).
pub const CUSTOM_SOFTWARE: Term = ("MS:1000799", "custom unreleased software tool");
/// MS:1000584 mzML format.
pub const MZML_FORMAT: Term = ("MS:1000584", "mzML format");
/// MS:1003151 SHA-256.
pub const SHA256: Term = ("MS:1003151", "SHA-256");

/// Id of the `dataProcessing` of picked spectra (the spectrum list's default).
pub const PICKED_PROCESSING: &str = "mzsift_peak_picking";
/// Id of the `dataProcessing` of spectra passed through unchanged.
pub const PASSED_PROCESSING: &str = "mzsift_processing";

/// Array encodings of the centroided file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum CentroidedEncoding {
    /// m/z 64-bit float, intensity 32-bit float, both zlib (lossless for the picked values
    /// up to the 32-bit rounding of intensities).
    #[default]
    Zlib,
    /// m/z MS-Numpress linear prediction, intensity MS-Numpress short logged float, both
    /// followed by zlib (smaller; m/z within about 1e-9 relative, intensity within about
    /// 2e-4 relative; Teleman et al., Mol. Cell. Proteomics 13(6), 1537-1542, 2014).
    Numpress,
}

impl CentroidedEncoding {
    /// Encodings of the m/z and the intensity array.
    pub fn encodings(self) -> (BinaryEncoding, BinaryEncoding) {
        let e = |numeric, compression| BinaryEncoding { numeric, compression };
        match self {
            CentroidedEncoding::Zlib => {
                (e(NumericType::F64, Compression::Zlib), e(NumericType::F32, Compression::Zlib))
            }
            CentroidedEncoding::Numpress => (
                e(NumericType::F64, Compression::NumpressLinearZlib),
                e(NumericType::F64, Compression::NumpressSlofZlib),
            ),
        }
    }
}

/// One spectrum's arrays for the centroided file, prepared on a worker thread.
#[derive(Debug, Clone, PartialEq)]
pub struct CentroidedArrays {
    mz: (BinaryEncoding, Vec<u8>),
    intensity: (BinaryEncoding, Vec<u8>),
    snr: Option<(BinaryEncoding, Vec<u8>)>,
    resolution: Option<(BinaryEncoding, Vec<u8>)>,
    points: usize,
    picked: bool,
    tic: f64,
    base_peak: Option<(f64, f64)>,
}

impl CentroidedArrays {
    /// The arrays of `done` (the result of processing `source`): its picked peaks when it was
    /// treated as profile data, else `source`'s stored arrays unchanged.
    pub fn prepare(
        source: &Spectrum,
        done: &ProcessedSpectrum,
        encoding: CentroidedEncoding,
    ) -> Self {
        let (mz_enc, int_enc) = encoding.encodings();
        let stored = (source.array(ArrayKind::Mz), source.array(ArrayKind::Intensity));
        if done.treated_as != Representation::Profile {
            if let (Some(m), Some(i)) = stored {
                let snr = source.array(ArrayKind::SignalToNoise);
                return CentroidedArrays {
                    mz: (m.encoding, m.base64.clone()),
                    intensity: (i.encoding, i.base64.clone()),
                    snr: snr.map(|a| (a.encoding, a.base64.clone())),
                    resolution: source
                        .array(ArrayKind::Resolution)
                        .map(|a| (a.encoding, a.base64.clone())),
                    points: done.stats.points,
                    picked: false,
                    tic: done.stats.intensity_sum,
                    base_peak: done.stats.base_peak_mz.zip(done.stats.base_peak_intensity),
                };
            }
        }
        let c = &done.centroids;
        let mz: Vec<f64> = c.iter().map(|c| c.mz).collect();
        let intensity: Vec<f64> = c.iter().map(|c| c.intensity).collect();
        let snr: Vec<f64> = c.iter().map(|c| c.snr).collect();
        let resolution: Vec<f64> =
            c.iter().map(|c| if c.fwhm > 0.0 { c.mz / c.fwhm } else { 0.0 }).collect();
        let snr_enc = BinaryEncoding { numeric: NumericType::F32, compression: Compression::Zlib };
        let best = c.iter().max_by(|a, b| a.intensity.total_cmp(&b.intensity));
        CentroidedArrays {
            mz: (mz_enc, binary::encode(&mz, mz_enc).into_bytes()),
            intensity: (int_enc, binary::encode(&intensity, int_enc).into_bytes()),
            snr: Some((snr_enc, binary::encode(&snr, snr_enc).into_bytes())),
            resolution: Some((snr_enc, binary::encode(&resolution, snr_enc).into_bytes())),
            points: c.len(),
            picked: done.treated_as == Representation::Profile,
            tic: intensity.iter().sum(),
            base_peak: best.map(|b| (b.mz, b.intensity)),
        }
    }

    /// True when the arrays are picked peaks (false: passed through as stored).
    pub fn is_picked(&self) -> bool {
        self.picked
    }
}

/// The input a centroided file is derived from, named in its `sourceFileList`.
#[derive(Debug, Clone, PartialEq, Default)]
pub struct SourceFile {
    /// File name.
    pub name: String,
    /// Folder as a URI (`file:///...`).
    pub location: String,
    /// SHA-256 of the input bytes as stored, lower-case hex (written when known).
    pub sha256: Option<String>,
}

/// What a finished centroided file holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize)]
pub struct CentroidedSummary {
    /// Spectra written.
    pub spectra: usize,
    /// Of them, replaced by picked peaks.
    pub picked: usize,
    /// Of them, passed through with their stored arrays.
    pub passed_through: usize,
    /// Size of the file, bytes.
    pub bytes: u64,
}

struct Entry {
    id: String,
    ms_level: u8,
    rt_min: Option<f64>,
    tic: f64,
    len: usize,
}

/// Streams spectra into a centroided mzML file, written atomically at `finish`.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::{CentroidedEncoding, CentroidedWriter, Reader, SourceFile, Writer, WriterOptions};
/// use mzcore::pipeline::{process_spectrum, PipelineSettings};
/// use mzcore::spectrum::{Peaks, Representation, SpectrumMeta};
///
/// // A profile spectrum with one Gaussian peak at m/z 300.01.
/// let mz: Vec<f64> = (0..400).map(|i| 299.99 + 0.0001 * i as f64).collect();
/// let intensity: Vec<f64> = mz.iter().enumerate()
///     .map(|(i, m)| 10.0 + [0.0, 1.0, -1.0][i % 3] + 1e4 * (-((m - 300.01) / 0.002).powi(2) / 2.0).exp())
///     .collect();
/// let meta = SpectrumMeta { id: "scan=1".into(), ms_level: 1, rt_min: Some(0.5),
///     representation: Representation::Profile, ..Default::default() };
/// let mut w = Writer::new(Vec::new(), WriterOptions::default())?;
/// w.write_spectrum(&meta, &Peaks { mz, intensity })?;
/// let doc = w.finish()?;
///
/// let dir = tempfile::tempdir()?;
/// let path = dir.path().join("centroided.mzML");
/// let mut out = CentroidedWriter::create(&path, CentroidedEncoding::Zlib, Default::default())?;
/// for s in Reader::new(&doc[..])? {
///     let s = s?;
///     let done = process_spectrum(&s, &PipelineSettings::default())?;
///     out.push_processed(&s, &done)?;
/// }
/// let summary = out.finish(&SourceFile { name: "in.mzML".into(), ..Default::default() })?;
/// assert_eq!((summary.spectra, summary.picked), (1, 1));
///
/// let back = Reader::from_path(&path)?.next().unwrap()?;
/// assert_eq!(back.meta.representation, Representation::Centroid);
/// let peaks = back.decode()?;
/// assert_eq!(peaks.len(), 1);
/// assert!((peaks.mz[0] - 300.01).abs() < 1e-4);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub struct CentroidedWriter {
    path: PathBuf,
    spool_path: PathBuf,
    spool: Option<BufWriter<File>>,
    entries: Vec<Entry>,
    encoding: CentroidedEncoding,
    params: CentroidParams,
    ionization: Option<Ionization>,
    run_id: Option<String>,
    picked: usize,
    text: String,
    done: bool,
}

fn sibling(path: &Path, tag: &str) -> PathBuf {
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    path.with_file_name(format!(".{name}.{tag}-{}", std::process::id()))
}

impl CentroidedWriter {
    /// Starts a centroided file at `path` (nothing appears under that name before
    /// [`CentroidedWriter::finish`]); `params` are the peak-picking parameters in force, named
    /// in the file's `dataProcessing`.
    pub fn create(
        path: &Path,
        encoding: CentroidedEncoding,
        params: CentroidParams,
    ) -> Result<Self> {
        let spool_path = sibling(path, "spool");
        let at = |e: std::io::Error| {
            Error::new(ErrorKind::Io(e)).in_field(&spool_path.display().to_string())
        };
        let spool = BufWriter::with_capacity(1 << 20, File::create(&spool_path).map_err(at)?);
        Ok(CentroidedWriter {
            path: path.to_owned(),
            spool_path,
            spool: Some(spool),
            entries: Vec::new(),
            encoding,
            params,
            ionization: None,
            run_id: None,
            picked: 0,
            text: String::with_capacity(1 << 16),
            done: false,
        })
    }

    /// The array encodings in use.
    pub fn encoding(&self) -> CentroidedEncoding {
        self.encoding
    }

    /// Prepares and appends one processed spectrum (both steps on this thread; see
    /// [`CentroidedWriter::push`] to prepare on a worker).
    pub fn push_processed(&mut self, source: &Spectrum, done: &ProcessedSpectrum) -> Result<()> {
        let arrays = CentroidedArrays::prepare(source, done, self.encoding);
        self.push(&done.meta, &arrays)
    }

    /// Appends the next spectrum (in file order) with arrays from [`CentroidedArrays::prepare`].
    pub fn push(&mut self, meta: &SpectrumMeta, arrays: &CentroidedArrays) -> Result<()> {
        let mut meta_out = std::borrow::Cow::Borrowed(meta);
        if arrays.picked {
            meta_out.to_mut().representation = Representation::Centroid;
        }
        let mut array_texts = vec![
            ArrayText {
                kind: cv::MZ_ARRAY,
                encoding: arrays.mz.0,
                base64: &arrays.mz.1,
                group: None,
            },
            ArrayText {
                kind: cv::INTENSITY_ARRAY,
                encoding: arrays.intensity.0,
                base64: &arrays.intensity.1,
                group: None,
            },
        ];
        for (kind, extra) in
            [(cv::SIGNAL_TO_NOISE_ARRAY, &arrays.snr), (cv::RESOLUTION_ARRAY, &arrays.resolution)]
        {
            if let Some((encoding, base64)) = extra {
                array_texts.push(ArrayText { kind, encoding: *encoding, base64, group: None });
            }
        }
        let tic = meta.stored_tic.unwrap_or(arrays.tic);
        let spectrum = SpectrumText {
            index: self.entries.len(),
            meta: &meta_out,
            points: arrays.points,
            tic,
            base_peak: match (meta.stored_base_peak_mz, meta.stored_base_peak_intensity) {
                (Some(m), Some(i)) => Some((m, i)),
                _ => arrays.base_peak,
            },
            arrays: &array_texts,
            data_processing_ref: (!arrays.picked).then_some(PASSED_PROCESSING),
            activation: None,
        };
        let mut t = std::mem::take(&mut self.text);
        t.clear();
        render_spectrum(&mut t, SPECTRUM_INDENT, &spectrum, false);
        let spool = self.spool.as_mut().expect("spool open until finish");
        let r = spool.write_all(t.as_bytes());
        self.entries.push(Entry {
            id: meta.id.clone(),
            ms_level: meta.ms_level,
            rt_min: meta.rt_min,
            tic,
            len: t.len(),
        });
        self.text = t;
        self.picked += usize::from(arrays.picked);
        self.ionization.get_or_insert(meta.ionization);
        r.map_err(|e| Error::new(ErrorKind::Io(e)).in_field(&self.spool_path.display().to_string()))
    }

    /// Sets the run id written into the file (default: the source file name without its
    /// extension).
    pub fn set_run_id(&mut self, id: &str) {
        self.run_id = Some(id.to_owned());
    }

    fn extras(&self, source: &SourceFile) -> HeaderExtras {
        let i = "        ";
        let mut file_params = String::new();
        cv_param(&mut file_params, &format!("{i}  "), MZML_FORMAT, None);
        if let Some(sha) = &source.sha256 {
            cv_param(&mut file_params, &format!("{i}  "), SHA256, Some(sha));
        }
        let source_file = format!(
            "{i}<sourceFile id=\"source\" name=\"{}\" location=\"{}\">\n{file_params}{i}</sourceFile>\n",
            escape(&source.name),
            escape(&source.location)
        );
        let mut software = String::new();
        cv_param(&mut software, i, CUSTOM_SOFTWARE, Some("mzsift"));
        let p = "          ";
        let mut picking = String::new();
        cv_param(&mut picking, p, PEAK_PICKING, None);
        if let Ok(serde_json::Value::Object(map)) = serde_json::to_value(self.params) {
            for (k, v) in map {
                let v = match v {
                    serde_json::Value::String(s) => s,
                    other => other.to_string(),
                };
                picking.push_str(&format!(
                    "{p}<userParam name=\"mzsift peak picking {}\" value=\"{}\"/>\n",
                    escape(&k),
                    escape(&v)
                ));
            }
        }
        let mut passed = String::new();
        cv_param(&mut passed, p, cv::CONVERSION_TO_MZML, None);
        passed.push_str(&format!(
            "{p}<userParam name=\"already centroided spectra: arrays passed through as stored\"/>\n"
        ));
        HeaderExtras {
            source_files: vec![source_file],
            software_params: vec![software],
            processing: vec![
                (PICKED_PROCESSING.to_owned(), vec![picking]),
                (PASSED_PROCESSING.to_owned(), vec![passed]),
            ],
        }
    }

    /// Writes the file: header, every spectrum pushed, TIC chromatogram, index and SHA-1
    /// checksum, into a temporary sibling renamed to the final path when complete.
    pub fn finish(mut self, source: &SourceFile) -> Result<CentroidedSummary> {
        let name = self.path.display().to_string();
        let tmp = sibling(&self.path, "partial");
        let result = self.assemble(source, &tmp);
        let _ = fs::remove_file(&self.spool_path);
        self.done = true;
        match result {
            Ok(bytes) => {
                fs::rename(&tmp, &self.path)
                    .map_err(|e| Error::new(ErrorKind::Io(e)).in_field(&name))?;
                let n = self.entries.len();
                Ok(CentroidedSummary {
                    spectra: n,
                    picked: self.picked,
                    passed_through: n - self.picked,
                    bytes,
                })
            }
            Err(e) => {
                let _ = fs::remove_file(&tmp);
                Err(e.in_field(&name))
            }
        }
    }

    fn assemble(&mut self, source: &SourceFile, tmp: &Path) -> Result<u64> {
        if let Some(mut spool) = self.spool.take() {
            spool.flush()?;
        }
        let run_id = self.run_id.clone().unwrap_or_else(|| {
            let stem = source.name.split('.').next().unwrap_or("");
            // An xs:ID must not start with a digit or contain spaces.
            let id: String = stem
                .chars()
                .map(|c| if c.is_ascii_alphanumeric() || "-_.".contains(c) { c } else { '_' })
                .collect();
            if id.starts_with(|c: char| c.is_ascii_alphabetic() || c == '_') {
                id
            } else {
                format!("run_{id}")
            }
        });
        let options = WriterOptions {
            spectrum_count: self.entries.len(),
            indexed: true,
            ionization: self.ionization.unwrap_or(Ionization::Unknown),
            param_groups: false,
            tic_chromatogram: true,
            run_id,
            rt_in_seconds: false,
            ..WriterOptions::default()
        };
        let file = File::create(tmp)?;
        let mut w = Writer::with_extras(
            BufWriter::with_capacity(1 << 20, file),
            options,
            Some(self.extras(source)),
        )?;
        let mut spool = std::io::BufReader::with_capacity(1 << 20, File::open(&self.spool_path)?);
        let mut buf = Vec::new();
        for e in &self.entries {
            buf.resize(e.len, 0);
            spool.read_exact(&mut buf)?;
            let text = std::str::from_utf8(&buf)
                .map_err(|_| Error::new(ErrorKind::Config("centroided spool: not UTF-8".into())))?;
            w.write_rendered(text, &e.id, e.ms_level, e.rt_min, e.tic)?;
        }
        let out = w.finish()?;
        let file = out.into_inner().map_err(|e| Error::new(ErrorKind::Io(e.into_error())))?;
        file.sync_all()?;
        Ok(file.metadata()?.len())
    }
}

impl Drop for CentroidedWriter {
    fn drop(&mut self) {
        if !self.done {
            self.spool.take();
            let _ = fs::remove_file(&self.spool_path);
        }
    }
}
