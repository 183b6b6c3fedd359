//! mzML 1.1 writer: indexed (`indexedmzML` with byte offsets, `indexListOffset` and SHA-1
//! `fileChecksum`) or plain, with any array encoding this crate reads.

use std::io::Write;

use sha1::{Digest, Sha1};

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::binary::{self, BinaryEncoding, Compression, NumericType};
use crate::mzml::cv::{self, Term};
use crate::spectrum::{Ionization, Peaks, Polarity, Representation, SpectrumMeta};

/// How a [`Writer`] lays out the document.
#[derive(Debug, Clone, PartialEq)]
pub struct WriterOptions {
    /// Number of spectra that will be written (`spectrumList/@count` comes first in the file).
    pub spectrum_count: usize,
    /// Encoding of m/z arrays.
    pub mz_encoding: BinaryEncoding,
    /// Encoding of intensity arrays.
    pub intensity_encoding: BinaryEncoding,
    /// Write `indexedmzML` with an index and checksum (else a plain `mzML`).
    pub indexed: bool,
    /// Ionization type written into the instrument configuration's source.
    pub ionization: Ionization,
    /// Put the array encodings into `referenceableParamGroup`s referenced by each array.
    pub param_groups: bool,
    /// Append a total-ion-current chromatogram built from the MS1 spectra.
    pub tic_chromatogram: bool,
    /// The run's id.
    pub run_id: String,
    /// Write scan start times in seconds (UO:0000010) instead of minutes (UO:0000031).
    pub rt_in_seconds: bool,
}

impl Default for WriterOptions {
    fn default() -> Self {
        WriterOptions {
            spectrum_count: 1,
            mz_encoding: BinaryEncoding {
                numeric: NumericType::F64,
                compression: Compression::Zlib,
            },
            intensity_encoding: BinaryEncoding {
                numeric: NumericType::F32,
                compression: Compression::Zlib,
            },
            indexed: true,
            ionization: Ionization::Electrospray,
            param_groups: false,
            tic_chromatogram: true,
            run_id: "run1".into(),
            rt_in_seconds: false,
        }
    }
}

/// Counts and hashes what is written.
struct Sink<W: Write> {
    out: W,
    written: u64,
    hasher: Sha1,
}

impl<W: Write> Sink<W> {
    fn put(&mut self, s: &str) -> Result<()> {
        self.out.write_all(s.as_bytes())?;
        self.hasher.update(s.as_bytes());
        self.written += s.len() as u64;
        Ok(())
    }
}

/// Streaming mzML writer; see [`crate::mzml::Reader`] for a round-trip example.
pub struct Writer<W: Write> {
    sink: Sink<W>,
    options: WriterOptions,
    offsets: Vec<(String, u64)>,
    chromatogram_offsets: Vec<(String, u64)>,
    tic: Vec<(f64, f64)>,
    text: String,
    extras: Option<HeaderExtras>,
}

/// Header content that replaces the synthetic writer's defaults (used for derived files such
/// as the centroided copy of an acquisition): source file, software and data processing.
#[derive(Debug, Clone, Default)]
pub(crate) struct HeaderExtras {
    /// `<sourceFile>` lines (already rendered, indented by the caller's indent + 6).
    pub source_files: Vec<String>,
    /// Params of the `mzsift` software element (rendered lines, indented by indent + 6).
    pub software_params: Vec<String>,
    /// `(id, params)` of each `dataProcessing` (params: rendered lines, indent + 8); the first
    /// is the spectrum list's default.
    pub processing: Vec<(String, Vec<String>)>,
}

pub(crate) fn escape(s: &str) -> std::borrow::Cow<'_, str> {
    quick_xml::escape::escape(s)
}

pub(crate) fn cv_param(out: &mut String, indent: &str, term: Term, value: Option<&str>) {
    out.push_str(indent);
    out.push_str("<cvParam cvRef=\"MS\" accession=\"");
    out.push_str(term.0);
    out.push_str("\" name=\"");
    out.push_str(term.1);
    out.push_str("\" value=\"");
    if let Some(v) = value {
        out.push_str(&escape(v));
    }
    out.push_str("\"/>\n");
}

fn cv_param_unit(out: &mut String, indent: &str, term: Term, value: &str, unit: Term) {
    out.push_str(&format!(
        "{indent}<cvParam cvRef=\"MS\" accession=\"{}\" name=\"{}\" value=\"{}\" unitCvRef=\"UO\" unitAccession=\"{}\" unitName=\"{}\"/>\n",
        term.0, term.1, value, unit.0, unit.1
    ));
}

fn ionization_term(ion: Ionization) -> Option<Term> {
    match ion {
        Ionization::Electron => Some(cv::ELECTRON_IONIZATION),
        Ionization::Electrospray => Some(cv::ELECTROSPRAY_IONIZATION),
        Ionization::Chemical => Some(cv::CHEMICAL_IONIZATION),
        Ionization::AtmosphericPressureChemical => Some(cv::APCI),
        Ionization::AtmosphericPressurePhoto => Some(cv::APPI),
        Ionization::Maldi => Some(cv::MALDI),
        Ionization::Other | Ionization::Unknown => None,
    }
}

impl<W: Write> Writer<W> {
    /// The options in force.
    pub fn options(&self) -> &WriterOptions {
        &self.options
    }

    /// Starts a document: writes everything up to the first spectrum.
    pub fn new(out: W, options: WriterOptions) -> Result<Self> {
        Self::with_extras(out, options, None)
    }

    /// [`Writer::new`] with the header content of `extras` instead of the defaults.
    pub(crate) fn with_extras(
        out: W,
        options: WriterOptions,
        extras: Option<HeaderExtras>,
    ) -> Result<Self> {
        let mut w = Writer {
            sink: Sink { out, written: 0, hasher: Sha1::new() },
            options,
            offsets: Vec::new(),
            chromatogram_offsets: Vec::new(),
            tic: Vec::new(),
            text: String::with_capacity(1 << 16),
            extras,
        };
        w.header()?;
        Ok(w)
    }

    fn header(&mut self) -> Result<()> {
        let o = &self.options;
        let mut h = String::new();
        h.push_str("<?xml version=\"1.0\" encoding=\"utf-8\"?>\n");
        let ns = "xmlns=\"http://psi.hupo.org/ms/mzml\" xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\"";
        let indent = if o.indexed {
            h.push_str(&format!(
                "<indexedmzML {ns} xsi:schemaLocation=\"http://psi.hupo.org/ms/mzml http://psidev.info/files/ms/mzML/xsd/mzML1.1.0_idx.xsd\">\n  <mzML {ns} version=\"1.1.0\" id=\"{}\">\n",
                escape(&o.run_id)
            ));
            "  "
        } else {
            h.push_str(&format!(
                "<mzML {ns} xsi:schemaLocation=\"http://psi.hupo.org/ms/mzml http://psidev.info/files/ms/mzML/xsd/mzML1.1.0.xsd\" version=\"1.1.0\" id=\"{}\">\n",
                escape(&o.run_id)
            ));
            ""
        };
        let i1 = format!("{indent}  ");
        let i2 = format!("{indent}    ");
        let i3 = format!("{indent}      ");
        let i4 = format!("{indent}        ");
        h.push_str(&format!("{i1}<cvList count=\"2\">\n"));
        h.push_str(&format!("{i2}<cv id=\"MS\" fullName=\"Proteomics Standards Initiative Mass Spectrometry Ontology\" version=\"4.1.257\" URI=\"https://raw.githubusercontent.com/HUPO-PSI/psi-ms-CV/master/psi-ms.obo\"/>\n"));
        h.push_str(&format!("{i2}<cv id=\"UO\" fullName=\"Unit Ontology\" version=\"releases/2020-03-10\" URI=\"http://purl.obolibrary.org/obo/uo.obo\"/>\n"));
        h.push_str(&format!("{i1}</cvList>\n"));
        h.push_str(&format!("{i1}<fileDescription>\n{i2}<fileContent>\n"));
        cv_param(&mut h, &i3, cv::MS1_SPECTRUM, None);
        cv_param(&mut h, &i3, cv::MSN_SPECTRUM, None);
        h.push_str(&format!("{i2}</fileContent>\n"));
        if let Some(x) = self.extras.as_ref().filter(|x| !x.source_files.is_empty()) {
            h.push_str(&format!("{i2}<sourceFileList count=\"{}\">\n", x.source_files.len()));
            for f in &x.source_files {
                h.push_str(f);
            }
            h.push_str(&format!("{i2}</sourceFileList>\n"));
        }
        h.push_str(&format!("{i1}</fileDescription>\n"));
        if o.param_groups {
            h.push_str(&format!("{i1}<referenceableParamGroupList count=\"2\">\n"));
            for (id, enc, kind) in [
                ("mz_params", o.mz_encoding, cv::MZ_ARRAY),
                ("intensity_params", o.intensity_encoding, cv::INTENSITY_ARRAY),
            ] {
                h.push_str(&format!("{i2}<referenceableParamGroup id=\"{id}\">\n"));
                cv_param(&mut h, &i3, enc.numeric.cv(), None);
                cv_param(&mut h, &i3, enc.compression.cv(), None);
                cv_param(&mut h, &i3, kind, None);
                h.push_str(&format!("{i2}</referenceableParamGroup>\n"));
            }
            h.push_str(&format!("{i1}</referenceableParamGroupList>\n"));
        }
        let version = env!("CARGO_PKG_VERSION");
        match &self.extras {
            Some(x) => {
                h.push_str(&format!("{i1}<softwareList count=\"1\">\n{i2}<software id=\"mzsift\" version=\"{version}\">\n"));
                for p in &x.software_params {
                    h.push_str(p);
                }
                h.push_str(&format!("{i2}</software>\n{i1}</softwareList>\n"));
            }
            None => h.push_str(&format!("{i1}<softwareList count=\"1\">\n{i2}<software id=\"mzsift\" version=\"{version}\">\n{i3}<userParam name=\"mzsift synthetic acquisition writer\"/>\n{i2}</software>\n{i1}</softwareList>\n")),
        }
        h.push_str(&format!("{i1}<instrumentConfigurationList count=\"1\">\n{i2}<instrumentConfiguration id=\"IC1\">\n{i3}<componentList count=\"3\">\n{i4}<source order=\"1\">\n"));
        match ionization_term(o.ionization) {
            Some(t) => cv_param(&mut h, &format!("{i4}  "), t, None),
            None => h.push_str(&format!("{i4}  <userParam name=\"ionization not stated\"/>\n")),
        }
        h.push_str(&format!("{i4}</source>\n{i4}<analyzer order=\"2\">\n{i4}  <userParam name=\"mass analyzer\" value=\"synthetic\"/>\n{i4}</analyzer>\n{i4}<detector order=\"3\">\n{i4}  <userParam name=\"detector\" value=\"synthetic\"/>\n{i4}</detector>\n{i3}</componentList>\n{i2}</instrumentConfiguration>\n{i1}</instrumentConfigurationList>\n"));
        let default_processing = match &self.extras {
            Some(x) if !x.processing.is_empty() => {
                h.push_str(&format!("{i1}<dataProcessingList count=\"{}\">\n", x.processing.len()));
                for (id, params) in &x.processing {
                    h.push_str(&format!("{i2}<dataProcessing id=\"{}\">\n{i3}<processingMethod order=\"0\" softwareRef=\"mzsift\">\n", escape(id)));
                    for p in params {
                        h.push_str(p);
                    }
                    h.push_str(&format!("{i3}</processingMethod>\n{i2}</dataProcessing>\n"));
                }
                h.push_str(&format!("{i1}</dataProcessingList>\n"));
                x.processing[0].0.clone()
            }
            _ => {
                h.push_str(&format!("{i1}<dataProcessingList count=\"1\">\n{i2}<dataProcessing id=\"mzsift_processing\">\n{i3}<processingMethod order=\"0\" softwareRef=\"mzsift\">\n"));
                cv_param(&mut h, &i4, cv::CONVERSION_TO_MZML, None);
                h.push_str(&format!(
                    "{i3}</processingMethod>\n{i2}</dataProcessing>\n{i1}</dataProcessingList>\n"
                ));
                "mzsift_processing".to_owned()
            }
        };
        h.push_str(&format!(
            "{i1}<run id=\"{}\" defaultInstrumentConfigurationRef=\"IC1\">\n{i2}<spectrumList count=\"{}\" defaultDataProcessingRef=\"{}\">\n",
            escape(&o.run_id),
            o.spectrum_count,
            escape(&default_processing)
        ));
        self.sink.put(&h)
    }

    fn indent(&self) -> &'static str {
        if self.options.indexed { SPECTRUM_INDENT } else { "      " }
    }

    /// Writes one spectrum. `meta.index` is ignored: spectra are numbered in write order.
    /// Stored TIC and base peak are written when set in `meta`, else computed from `peaks`.
    pub fn write_spectrum(&mut self, meta: &SpectrumMeta, peaks: &Peaks) -> Result<()> {
        let encoded = EncodedPeaks::encode(peaks, &self.options)?;
        self.write_spectrum_with(meta, &encoded)
    }

    /// Writes one spectrum whose arrays were encoded beforehand with [`EncodedPeaks::encode`]
    /// and this writer's options (so that encoding can run on other threads).
    pub fn write_spectrum_with(
        &mut self,
        meta: &SpectrumMeta,
        encoded: &EncodedPeaks,
    ) -> Result<()> {
        let arrays = [
            ArrayText {
                kind: cv::MZ_ARRAY,
                encoding: self.options.mz_encoding,
                base64: encoded.mz.as_bytes(),
                group: self.options.param_groups.then_some("mz_params"),
            },
            ArrayText {
                kind: cv::INTENSITY_ARRAY,
                encoding: self.options.intensity_encoding,
                base64: encoded.intensity.as_bytes(),
                group: self.options.param_groups.then_some("intensity_params"),
            },
        ];
        let spectrum = SpectrumText {
            index: self.offsets.len(),
            meta,
            points: encoded.points,
            tic: meta.stored_tic.unwrap_or(encoded.tic),
            base_peak: match (meta.stored_base_peak_mz, meta.stored_base_peak_intensity) {
                (Some(m), Some(i)) => Some((m, i)),
                _ => encoded.base_peak,
            },
            arrays: &arrays,
            data_processing_ref: None,
            activation: Some(cv::CID),
        };
        let mut t = std::mem::take(&mut self.text);
        t.clear();
        render_spectrum(&mut t, self.indent(), &spectrum, self.options.rt_in_seconds);
        let r = self.write_rendered(&t, &meta.id, meta.ms_level, meta.rt_min, spectrum.tic);
        self.text = t;
        r
    }

    /// Appends one spectrum rendered by [`render_spectrum`] with [`SPECTRUM_INDENT`] (indexed
    /// documents) and the next index, recording its offset and its point of the TIC.
    pub(crate) fn write_rendered(
        &mut self,
        text: &str,
        id: &str,
        ms_level: u8,
        rt_min: Option<f64>,
        tic: f64,
    ) -> Result<()> {
        let ind = self.indent();
        self.offsets.push((id.to_owned(), self.sink.written + ind.len() as u64));
        if ms_level <= 1 {
            if let Some(rt) = rt_min {
                self.tic.push((rt, tic));
            }
        }
        self.sink.put(text)
    }

    /// Writes the chromatogram, index and checksum, and returns the underlying writer.
    pub fn finish(mut self) -> Result<W> {
        if self.offsets.len() != self.options.spectrum_count {
            return Err(Error::new(ErrorKind::LengthMismatch {
                what: "spectra written vs spectrum_count".into(),
                declared: self.options.spectrum_count,
                found: self.offsets.len(),
            }));
        }
        let ind = if self.options.indexed { "      " } else { "    " };
        let mut t = format!("{ind}</spectrumList>\n");
        if self.options.tic_chromatogram && !self.tic.is_empty() {
            let enc = BinaryEncoding { numeric: NumericType::F64, compression: Compression::None };
            t.push_str(&format!("{ind}<chromatogramList count=\"1\" defaultDataProcessingRef=\"mzsift_processing\">\n"));
            let times: Vec<f64> = self.tic.iter().map(|p| p.0).collect();
            let ints: Vec<f64> = self.tic.iter().map(|p| p.1).collect();
            self.sink.put(&t)?;
            t.clear();
            let c_ind = format!("{ind}  ");
            self.chromatogram_offsets.push(("TIC".into(), self.sink.written + c_ind.len() as u64));
            t.push_str(&format!(
                "{c_ind}<chromatogram index=\"0\" id=\"TIC\" defaultArrayLength=\"{}\">\n",
                times.len()
            ));
            let i1 = format!("{c_ind}  ");
            let i2 = format!("{c_ind}    ");
            let i3 = format!("{c_ind}      ");
            cv_param(&mut t, &i1, cv::TIC_CHROMATOGRAM, None);
            t.push_str(&format!("{i1}<binaryDataArrayList count=\"2\">\n"));
            for (values, kind) in [(&times, cv::TIME_ARRAY), (&ints, cv::INTENSITY_ARRAY)] {
                let text = binary::encode(values, enc);
                t.push_str(&format!("{i2}<binaryDataArray encodedLength=\"{}\">\n", text.len()));
                cv_param(&mut t, &i3, enc.numeric.cv(), None);
                cv_param(&mut t, &i3, enc.compression.cv(), None);
                if kind == cv::TIME_ARRAY {
                    cv_param_unit(&mut t, &i3, kind, "", cv::UO_MINUTE);
                } else {
                    cv_param(&mut t, &i3, kind, None);
                }
                t.push_str(&format!("{i3}<binary>{text}</binary>\n{i2}</binaryDataArray>\n"));
            }
            t.push_str(&format!(
                "{i1}</binaryDataArrayList>\n{c_ind}</chromatogram>\n{ind}</chromatogramList>\n"
            ));
        }
        let close =
            if self.options.indexed { "    </run>\n  </mzML>\n" } else { "  </run>\n</mzML>\n" };
        t.push_str(close);
        self.sink.put(&t)?;
        if self.options.indexed {
            let list_at = self.sink.written + 2; // "  <indexList": the offset of its `<`
            let mut t = String::from("  <indexList count=\"2\">\n    <index name=\"spectrum\">\n");
            for (id, off) in &self.offsets {
                t.push_str(&format!("      <offset idRef=\"{}\">{off}</offset>\n", escape(id)));
            }
            t.push_str("    </index>\n    <index name=\"chromatogram\">\n");
            for (id, off) in &self.chromatogram_offsets {
                t.push_str(&format!("      <offset idRef=\"{}\">{off}</offset>\n", escape(id)));
            }
            t.push_str(&format!(
                "    </index>\n  </indexList>\n  <indexListOffset>{list_at}</indexListOffset>\n  <fileChecksum>"
            ));
            self.sink.put(&t)?;
            let digest = std::mem::take(&mut self.sink.hasher).finalize();
            let hex: String = digest.iter().map(|b| format!("{b:02x}")).collect();
            self.sink.put(&format!("{hex}</fileChecksum>\n</indexedmzML>\n"))?;
        }
        self.sink.out.flush()?;
        Ok(self.sink.out)
    }
}

/// Indent of a `<spectrum>` in an indexed document.
pub(crate) const SPECTRUM_INDENT: &str = "        ";

/// One binary array ready to be written: its kind, encoding and base64 text.
pub(crate) struct ArrayText<'a> {
    pub kind: Term,
    pub encoding: BinaryEncoding,
    pub base64: &'a [u8],
    /// A `referenceableParamGroup` holding the encoding terms, instead of inline cvParams.
    pub group: Option<&'static str>,
}

/// What [`render_spectrum`] writes for one spectrum.
pub(crate) struct SpectrumText<'a> {
    pub index: usize,
    pub meta: &'a SpectrumMeta,
    pub points: usize,
    pub tic: f64,
    pub base_peak: Option<(f64, f64)>,
    pub arrays: &'a [ArrayText<'a>],
    /// The spectrum's `dataProcessingRef` (else the list's default applies).
    pub data_processing_ref: Option<&'a str>,
    /// The activation term of every precursor (`None`: a userParam saying it is not stated).
    pub activation: Option<Term>,
}

/// Renders one `<spectrum>` element (indented by `ind`) into `t`.
pub(crate) fn render_spectrum(
    t: &mut String,
    ind: &str,
    s: &SpectrumText<'_>,
    rt_in_seconds: bool,
) {
    let meta = s.meta;
    let i1 = format!("{ind}  ");
    let i2 = format!("{ind}    ");
    let i3 = format!("{ind}      ");
    t.push_str(&format!(
        "{ind}<spectrum index=\"{}\" id=\"{}\" defaultArrayLength=\"{}\"",
        s.index,
        escape(&meta.id),
        s.points
    ));
    if let Some(dp) = s.data_processing_ref {
        t.push_str(&format!(" dataProcessingRef=\"{}\"", escape(dp)));
    }
    t.push_str(">\n");
    cv_param(t, &i1, cv::MS_LEVEL, Some(&meta.ms_level.to_string()));
    cv_param(t, &i1, if meta.ms_level <= 1 { cv::MS1_SPECTRUM } else { cv::MSN_SPECTRUM }, None);
    match meta.representation {
        Representation::Profile => cv_param(t, &i1, cv::PROFILE_SPECTRUM, None),
        Representation::Centroid => cv_param(t, &i1, cv::CENTROID_SPECTRUM, None),
        Representation::Unknown => {}
    }
    match meta.polarity {
        Polarity::Positive => cv_param(t, &i1, cv::POSITIVE_SCAN, None),
        Polarity::Negative => cv_param(t, &i1, cv::NEGATIVE_SCAN, None),
        Polarity::Unknown => {}
    }
    cv_param(t, &i1, cv::TOTAL_ION_CURRENT, Some(&fmt_f64(s.tic)));
    if let Some((m, i)) = s.base_peak {
        cv_param(t, &i1, cv::BASE_PEAK_MZ, Some(&fmt_f64(m)));
        cv_param(t, &i1, cv::BASE_PEAK_INTENSITY, Some(&fmt_f64(i)));
    }
    t.push_str(&format!("{i1}<scanList count=\"1\">\n{i2}<scan>\n"));
    if let Some(rt) = meta.rt_min {
        if rt_in_seconds {
            cv_param_unit(t, &i3, cv::SCAN_START_TIME, &fmt_f64(rt * 60.0), cv::UO_SECOND);
        } else {
            cv_param_unit(t, &i3, cv::SCAN_START_TIME, &fmt_f64(rt), cv::UO_MINUTE);
        }
    }
    t.push_str(&format!("{i2}</scan>\n{i1}</scanList>\n"));
    if !meta.precursors.is_empty() {
        t.push_str(&format!("{i1}<precursorList count=\"{}\">\n", meta.precursors.len()));
        for p in &meta.precursors {
            t.push_str(&format!("{i2}<precursor>\n"));
            if p.isolation_target.is_some() {
                t.push_str(&format!("{i3}<isolationWindow>\n"));
                let i4 = format!("{i3}  ");
                for (term, v) in [
                    (cv::ISOLATION_TARGET, p.isolation_target),
                    (cv::ISOLATION_LOWER, p.isolation_lower_offset),
                    (cv::ISOLATION_UPPER, p.isolation_upper_offset),
                ] {
                    if let Some(v) = v {
                        cv_param(t, &i4, term, Some(&fmt_f64(v)));
                    }
                }
                t.push_str(&format!("{i3}</isolationWindow>\n"));
            }
            t.push_str(&format!("{i3}<selectedIonList count=\"1\">\n{i3}  <selectedIon>\n"));
            let i5 = format!("{i3}    ");
            if let Some(mz) = p.selected_mz {
                cv_param(t, &i5, cv::SELECTED_ION_MZ, Some(&fmt_f64(mz)));
            }
            if let Some(z) = p.charge {
                cv_param(t, &i5, cv::CHARGE_STATE, Some(&z.to_string()));
            }
            t.push_str(&format!(
                "{i3}  </selectedIon>\n{i3}</selectedIonList>\n{i3}<activation>\n"
            ));
            match s.activation {
                Some(term) => cv_param(t, &format!("{i3}  "), term, None),
                None => t.push_str(&format!(
                    "{i3}  <userParam name=\"activation not stated (not carried over from the source file)\"/>\n"
                )),
            }
            t.push_str(&format!("{i3}</activation>\n{i2}</precursor>\n"));
        }
        t.push_str(&format!("{i1}</precursorList>\n"));
    }
    t.push_str(&format!("{i1}<binaryDataArrayList count=\"{}\">\n", s.arrays.len()));
    for a in s.arrays {
        t.push_str(&format!("{i2}<binaryDataArray encodedLength=\"{}\">\n", a.base64.len()));
        match a.group {
            Some(group) => {
                t.push_str(&format!("{i3}<referenceableParamGroupRef ref=\"{group}\"/>\n"))
            }
            None => {
                cv_param(t, &i3, a.encoding.numeric.cv(), None);
                cv_param(t, &i3, a.encoding.compression.cv(), None);
                cv_param(t, &i3, a.kind, None);
            }
        }
        t.push_str(&format!("{i3}<binary>"));
        // Base64 text is ASCII.
        t.push_str(std::str::from_utf8(a.base64).unwrap_or(""));
        t.push_str(&format!("</binary>\n{i2}</binaryDataArray>\n"));
    }
    t.push_str(&format!("{i1}</binaryDataArrayList>\n{ind}</spectrum>\n"));
}

/// A spectrum's arrays encoded as base64 text, plus what the writer derives from the values
/// (point count, TIC, base peak). Built on any thread, written by [`Writer::write_spectrum_with`].
#[derive(Debug, Clone, Default)]
pub struct EncodedPeaks {
    mz: String,
    intensity: String,
    points: usize,
    tic: f64,
    base_peak: Option<(f64, f64)>,
}

impl EncodedPeaks {
    /// Encodes `peaks` with the encodings of `options`.
    pub fn encode(peaks: &Peaks, options: &WriterOptions) -> Result<Self> {
        if peaks.mz.len() != peaks.intensity.len() {
            return Err(Error::new(ErrorKind::LengthMismatch {
                what: "intensity vs m/z array".into(),
                declared: peaks.mz.len(),
                found: peaks.intensity.len(),
            }));
        }
        let (bp_mz, bp_int) = base_peak(peaks);
        Ok(EncodedPeaks {
            mz: binary::encode(&peaks.mz, options.mz_encoding),
            intensity: binary::encode(&peaks.intensity, options.intensity_encoding),
            points: peaks.len(),
            tic: peaks.intensity.iter().sum(),
            base_peak: bp_mz.zip(bp_int),
        })
    }
}

fn base_peak(peaks: &Peaks) -> (Option<f64>, Option<f64>) {
    let mut best: Option<(f64, f64)> = None;
    for (&m, &i) in peaks.mz.iter().zip(&peaks.intensity) {
        if best.is_none_or(|(_, bi)| i > bi) {
            best = Some((m, i));
        }
    }
    (best.map(|b| b.0), best.map(|b| b.1))
}

/// Shortest decimal text that reads back as the same `f64`.
pub(crate) fn fmt_f64(v: f64) -> String {
    let mut s = format!("{v}");
    if s == "-0" {
        s = "0".into();
    }
    s
}
