//! Parsing the body of one `<spectrum>` or `<chromatogram>` element into a [`Spectrum`].
//!
//! Semantic problems (a missing MS level, an unknown compression, a wrong `encodedLength`)
//! are remembered and returned once the element's end tag is reached, so that the reader
//! stays in step and the next element can be read.

use std::io::BufRead;

use quick_xml::events::{BytesStart, Event};

use super::params::{self, CvParam, Header};
use super::source::Tracked;
use crate::error::{Error, ErrorKind, Position, Result};
use crate::mzml::binary::{BinaryEncoding, Compression, NumericType};
use crate::mzml::cv;
use crate::spectrum::{
    ArrayKind, EncodedArray, Ionization, Polarity, Precursor, Representation, Spectrum,
};

/// The XML tokenizer over our tracked byte source.
pub(crate) type Xml<R> = quick_xml::Reader<Tracked<R>>;

/// Limits that apply while parsing one element.
#[derive(Debug, Clone, Copy)]
pub(crate) struct BodyLimits {
    pub max_depth: usize,
    pub max_array_length: usize,
    pub max_spectrum_bytes: u64,
    pub max_elements: usize,
    /// Offset of the tokenizer's byte 0 in the document.
    pub base: u64,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum Tag {
    Scan,
    Precursor,
    IsolationWindow,
    SelectedIon,
    BinaryDataArray,
    Binary,
    Product,
    Other,
}

impl Tag {
    fn of(local: &[u8]) -> Tag {
        match local {
            b"scan" => Tag::Scan,
            b"precursor" => Tag::Precursor,
            b"isolationWindow" => Tag::IsolationWindow,
            b"selectedIon" => Tag::SelectedIon,
            b"binaryDataArray" => Tag::BinaryDataArray,
            b"binary" => Tag::Binary,
            b"product" => Tag::Product,
            _ => Tag::Other,
        }
    }
}

/// The first bytes of an element's local name, kept on the stack to check nesting without
/// allocating.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
struct ShortName([u8; 32], usize);

impl ShortName {
    fn of(name: &[u8]) -> Self {
        let mut b = [0u8; 32];
        let n = name.len().min(32);
        b[..n].copy_from_slice(&name[..n]);
        ShortName(b, n)
    }
}

fn xml_err(msg: String) -> Error {
    Error::new(ErrorKind::Xml(msg))
}

/// What is being gathered for the binary array currently open.
#[derive(Default)]
struct ArrayState {
    kind: Option<ArrayKind>,
    numeric: Option<NumericType>,
    compression: Option<Compression>,
    unknown: Option<(String, String)>,
    skipped_name: Option<String>,
    array_length: Option<usize>,
    encoded_length: Option<usize>,
    offset: u64,
    time_factor: f64,
    slot: Option<usize>,
}

/// Extra facts gathered for chromatograms.
#[derive(Debug, Default, Clone, Copy)]
pub(crate) struct ChromFacts {
    /// MS:1000235 total ion current chromatogram was stated.
    pub is_tic: bool,
    /// Factor from the time array's unit to minutes.
    pub time_factor: f64,
}

/// Parser state for one element body.
struct Body<'h> {
    header: &'h Header,
    limits: BodyLimits,
    stack: Vec<(Tag, ShortName)>,
    first_error: Option<Error>,
    array: Option<ArrayState>,
    used_arrays: usize,
    scans_seen: usize,
    ms_level: Option<u8>,
    ms1_term: bool,
    config_ref: Option<String>,
    chrom: ChromFacts,
    is_chromatogram: bool,
    /// Elements seen so far (referenced param groups counted with their cvParams).
    elements: usize,
    /// Bytes of `<binary>` text held so far.
    held: u64,
}

/// Parses the body of the element whose start tag `start` has just been read, up to and
/// including its end tag, into `out` (whose buffers are reused).
///
/// Returns the first semantic error found in the element, after consuming the whole element.
/// An XML error or the end of input is returned as soon as it happens (the caller decides
/// whether that is fatal).
#[allow(clippy::too_many_arguments)]
pub(crate) fn parse_body<R: BufRead>(
    xml: &mut Xml<R>,
    buf: &mut Vec<u8>,
    header: &Header,
    limits: BodyLimits,
    start: &BytesStart<'_>,
    empty: bool,
    start_offset: u64,
    out: &mut Spectrum,
    chrom: Option<&mut ChromFacts>,
) -> std::result::Result<(), BodyError> {
    let latin1 = header.latin1;
    let meta = &mut out.meta;
    meta.offset = start_offset;
    meta.ms_level = 0;
    meta.polarity = Polarity::Unknown;
    meta.representation = Representation::Unknown;
    meta.rt_min = None;
    meta.stored_tic = None;
    meta.stored_base_peak_mz = None;
    meta.stored_base_peak_intensity = None;
    meta.precursors.clear();
    meta.ionization = Ionization::Unknown;
    meta.skipped_arrays.clear();
    let mut body = Body {
        header,
        limits,
        stack: Vec::with_capacity(16),
        first_error: None,
        array: None,
        used_arrays: 0,
        scans_seen: 0,
        ms_level: None,
        ms1_term: false,
        config_ref: None,
        chrom: ChromFacts { is_tic: false, time_factor: 1.0 },
        is_chromatogram: chrom.is_some(),
        elements: 0,
        held: 0,
    };
    let element = if body.is_chromatogram { "chromatogram" } else { "spectrum" };
    // Attributes: id, index, defaultArrayLength are required (mzML 1.1.0 XSD, SpectrumType).
    match params::attr(start, b"id", latin1) {
        Ok(Some(id)) => meta.id = id,
        Ok(None) => {
            meta.id.clear();
            body.note(missing_attr(element, "id"), start_offset);
        }
        Err(e) => body.note(e, start_offset),
    }
    match params::num_attr::<usize>(start, b"index") {
        Ok(Some(i)) => meta.index = i,
        Ok(None) => body.note(missing_attr(element, "index"), start_offset),
        Err(e) => body.note(e, start_offset),
    }
    match params::num_attr::<usize>(start, b"defaultArrayLength") {
        Ok(Some(n)) => meta.default_array_length = n,
        Ok(None) => {
            meta.default_array_length = 0;
            body.note(missing_attr(element, "defaultArrayLength"), start_offset)
        }
        Err(e) => body.note(e, start_offset),
    }
    if !empty {
        body.run(xml, buf, out)?;
    }
    out.arrays.truncate(body.used_arrays);
    let meta = &mut out.meta;
    meta.ionization = header.ionization(body.config_ref.as_deref());
    if let Some(c) = chrom {
        *c = body.chrom;
    } else {
        match body.ms_level {
            Some(l) => meta.ms_level = l,
            None if body.ms1_term => meta.ms_level = 1,
            None => body.note(
                Error::new(ErrorKind::MissingCvParam(format!(
                    "{} '{}' (MS level is required)",
                    cv::MS_LEVEL.0,
                    cv::MS_LEVEL.1
                ))),
                start_offset,
            ),
        }
    }
    match body.first_error {
        Some(e) => Err(BodyError::Element(e)),
        None => Ok(()),
    }
}

/// Why parsing an element body stopped.
#[derive(Debug)]
pub(crate) enum BodyError {
    /// The element was read to its end but is malformed: skip it and go on.
    Element(Error),
    /// The XML tokenizer failed at this byte offset.
    Xml(quick_xml::Error, u64),
    /// The input ended inside the element.
    Eof(u64),
    /// The element broke a limit after which the document cannot be read on within bounded
    /// memory (nesting beyond `max_depth`: the tokenizer keeps the name of every open element,
    /// so stepping over the rest would grow with the input). At this byte offset.
    Fatal(Error, u64),
}

fn missing_attr(element: &str, attribute: &str) -> Error {
    Error::new(ErrorKind::MissingAttribute { element: element.into(), attribute: attribute.into() })
}

impl Body<'_> {
    fn note(&mut self, e: Error, offset: u64) {
        if self.first_error.is_none() {
            self.first_error = Some(e.at_byte(offset));
        }
    }

    fn run<R: BufRead>(
        &mut self,
        xml: &mut Xml<R>,
        buf: &mut Vec<u8>,
        out: &mut Spectrum,
    ) -> std::result::Result<(), BodyError> {
        loop {
            buf.clear();
            let pos = self.limits.base + xml.buffer_position();
            xml.get_mut().start_event();
            let event = match xml.read_event_into(buf) {
                Ok(ev) => ev,
                Err(e) => {
                    let at = self.limits.base + super::error_offset(xml, &e);
                    return Err(BodyError::Xml(e, at));
                }
            };
            if matches!(event, Event::Start(_) | Event::Empty(_)) {
                self.elements += 1;
                if let Some(e) = self.over_elements() {
                    return Err(self.give_up(e, pos));
                }
            }
            match event {
                Event::Start(e) => {
                    let local = e.local_name();
                    let tag = Tag::of(local.as_ref());
                    self.open(&e, tag, pos, out);
                    self.stack.push((tag, ShortName::of(local.as_ref())));
                    if self.stack.len() > self.limits.max_depth {
                        let kind = super::depth_exceeded(self.stack.len(), self.limits.max_depth);
                        return Err(BodyError::Fatal(Error::new(kind), pos));
                    }
                }
                Event::Empty(e) => {
                    let local = e.local_name();
                    match local.as_ref() {
                        b"cvParam" => match CvParam::from_element(&e) {
                            Ok(p) => self.apply(&p, pos, out),
                            Err(err) => self.note(err, pos),
                        },
                        b"referenceableParamGroupRef" => {
                            self.apply_group(&e, pos, out);
                            if let Some(e) = self.over_elements() {
                                return Err(self.give_up(e, pos));
                            }
                        }
                        b"userParam" => self.user_param(&e),
                        _ => {
                            let tag = Tag::of(local.as_ref());
                            self.open(&e, tag, pos, out);
                            self.close(tag, pos, out);
                        }
                    }
                }
                Event::Text(t) if self.stack.last().map(|t| t.0) == Some(Tag::Binary) => {
                    let kept = self.array.as_ref().and_then(|a| a.slot).is_some();
                    self.held += if kept { t.len() as u64 } else { 0 };
                    if self.held > self.limits.max_spectrum_bytes {
                        let e = Error::new(ErrorKind::LimitExceeded {
                            what: "encoded array text held for one spectrum, bytes (reader \
                                   option max_spectrum_bytes)"
                                .into(),
                            found: self.held,
                            limit: self.limits.max_spectrum_bytes,
                        });
                        // Release what this element holds: the caller skips it anyway.
                        out.arrays.iter_mut().for_each(|a| a.base64 = Vec::new());
                        return Err(self.give_up(e.in_field("binary"), pos));
                    }
                    self.binary_text(&t, out);
                }
                Event::End(e) => {
                    let local = e.local_name();
                    let name = local.as_ref();
                    if matches!(name, b"spectrum" | b"chromatogram") {
                        if let Some(&(_, open)) = self.stack.last() {
                            let open = String::from_utf8_lossy(&open.0[..open.1]).into_owned();
                            self.note(xml_err(format!("element <{open}> is not closed")), pos);
                        }
                        return Ok(());
                    }
                    let tag = Tag::of(name);
                    match self.stack.pop() {
                        Some((top, n)) if top == tag && n == ShortName::of(name) => {
                            self.close(tag, pos, out)
                        }
                        _ => {
                            let name = String::from_utf8_lossy(name).into_owned();
                            self.note(
                                xml_err(format!(
                                    "unexpected end tag </{name}> (elements not properly nested)"
                                )),
                                pos,
                            );
                            // Elements above the spectrum ended: give up on this element; the
                            // caller sees the error and goes on.
                            if matches!(
                                name.as_str(),
                                "spectrumList" | "chromatogramList" | "run" | "mzML"
                            ) {
                                return Ok(());
                            }
                        }
                    }
                }
                Event::Eof => return Err(BodyError::Eof(pos)),
                _ => {}
            }
        }
    }

    /// The error for more elements than allowed, if there are.
    fn over_elements(&self) -> Option<Error> {
        (self.elements > self.limits.max_elements).then(|| {
            Error::new(ErrorKind::LimitExceeded {
                what: "elements in one spectrum, referenced cvParams included (reader option \
                       max_elements)"
                    .into(),
                found: self.elements as u64,
                limit: self.limits.max_elements as u64,
            })
        })
    }

    /// Stops parsing this element at a limit: the element is malformed, and the reader goes
    /// on from here at the document level (where whatever is left of it is skipped).
    fn give_up(&mut self, e: Error, pos: u64) -> BodyError {
        self.note(e, pos);
        BodyError::Element(self.first_error.take().expect("just noted"))
    }

    fn open(&mut self, e: &BytesStart<'_>, tag: Tag, pos: u64, out: &mut Spectrum) {
        match tag {
            Tag::Scan => {
                self.scans_seen += 1;
                if self.scans_seen == 1 {
                    match params::attr(e, b"instrumentConfigurationRef", self.header.latin1) {
                        Ok(r) => self.config_ref = r,
                        Err(err) => self.note(err, pos),
                    }
                }
            }
            Tag::Precursor => out.meta.precursors.push(Precursor::default()),
            Tag::BinaryDataArray => {
                let mut st = ArrayState { offset: pos, time_factor: 1.0, ..Default::default() };
                match params::num_attr::<usize>(e, b"arrayLength") {
                    Ok(n) => st.array_length = n,
                    Err(err) => self.note(err, pos),
                }
                match params::num_attr::<usize>(e, b"encodedLength") {
                    Ok(n) => st.encoded_length = n,
                    Err(err) => self.note(err, pos),
                }
                self.array = Some(st);
            }
            Tag::Binary => self.begin_binary(pos, out),
            _ => {}
        }
    }

    fn close(&mut self, tag: Tag, pos: u64, out: &mut Spectrum) {
        if tag == Tag::BinaryDataArray {
            self.finish_array(pos, out);
        }
    }

    /// Called at `<binary>`: every cvParam of the array has been read (the XSD puts them
    /// first), so decide whether to keep its text.
    fn begin_binary(&mut self, pos: u64, out: &mut Spectrum) {
        if self.is_chromatogram && !self.chrom.is_tic {
            return;
        }
        let max_len = self.limits.max_array_length;
        let Some(st) = self.array.as_mut() else { return };
        let Some(kind) = st.kind else { return };
        let length = st.array_length.unwrap_or(out.meta.default_array_length);
        let array_at = st.offset;
        let encoding = if length > max_len {
            Err(Error::new(ErrorKind::LimitExceeded {
                what: "declared array length, values (reader option max_array_length)".into(),
                found: length as u64,
                limit: max_len as u64,
            }))
        } else {
            match (st.compression, st.numeric) {
                (None, _) => Err(match st.unknown.take() {
                    Some((acc, name)) => Error::new(ErrorKind::UnsupportedAccession {
                        what: format!("compression ({name})"),
                        accession: acc,
                    }),
                    None => Error::new(ErrorKind::MissingCvParam("compression type".into())),
                }),
                (Some(c), Some(t)) => Ok(BinaryEncoding { numeric: t, compression: c }),
                (Some(c), None) if c.is_numpress() => {
                    Ok(BinaryEncoding { numeric: NumericType::F64, compression: c })
                }
                (Some(_), None) => {
                    Err(Error::new(ErrorKind::MissingCvParam("binary data type".into())))
                }
            }
        };
        let encoding = match encoding {
            Ok(enc) => enc,
            Err(e) => {
                self.note(e.in_field("binaryDataArray"), array_at);
                return;
            }
        };
        let slot = self.used_arrays;
        self.used_arrays += 1;
        st.slot = Some(slot);
        if out.arrays.len() < self.used_arrays {
            out.arrays.push(EncodedArray {
                kind,
                encoding,
                length: 0,
                base64: Vec::new(),
                offset: 0,
            });
        }
        let a = &mut out.arrays[slot];
        a.kind = kind;
        a.encoding = encoding;
        a.length = length;
        a.base64.clear();
        a.offset = pos;
    }

    fn binary_text(&mut self, t: &[u8], out: &mut Spectrum) {
        let Some(slot) = self.array.as_ref().and_then(|a| a.slot) else { return };
        let dst = &mut out.arrays[slot].base64;
        append_without_whitespace(dst, t);
    }

    fn finish_array(&mut self, pos: u64, out: &mut Spectrum) {
        let Some(st) = self.array.take() else { return };
        match (st.kind, st.slot) {
            (None, _) => {
                let name = st
                    .skipped_name
                    .or(st.unknown.map(|(acc, name)| if name.is_empty() { acc } else { name }))
                    .unwrap_or_else(|| "unnamed array".into());
                out.meta.skipped_arrays.push(name);
            }
            (Some(_), Some(slot)) => {
                let found = out.arrays[slot].base64.len();
                if let Some(declared) = st.encoded_length {
                    if declared != found {
                        let e = Error::new(ErrorKind::LengthMismatch {
                            what: "encodedLength".into(),
                            declared,
                            found,
                        });
                        self.note(e.in_field("binaryDataArray"), st.offset);
                    }
                }
                if self.is_chromatogram {
                    self.chrom.time_factor = if st.kind == Some(ArrayKind::Time) {
                        st.time_factor
                    } else {
                        self.chrom.time_factor
                    };
                }
            }
            (Some(_), None) => {
                // No usable `<binary>` (already reported, or a chromatogram we skip).
                let _ = pos;
            }
        }
    }

    fn apply_group(&mut self, e: &BytesStart<'_>, pos: u64, out: &mut Spectrum) {
        let header = self.header;
        match params::attr(e, b"ref", header.latin1) {
            Ok(Some(r)) => match header.param_groups.get(&r) {
                Some(group) => {
                    self.elements = self.elements.saturating_add(group.len());
                    if self.elements > self.limits.max_elements {
                        return;
                    }
                    for p in group {
                        self.apply(&CvParam::from_owned(p), pos, out);
                    }
                }
                None => self.note(
                    Error::new(ErrorKind::InvalidValue {
                        field: "referenceableParamGroupRef".into(),
                        value: r,
                    }),
                    pos,
                ),
            },
            Ok(None) => self.note(missing_attr("referenceableParamGroupRef", "ref"), pos),
            Err(err) => self.note(err, pos),
        }
    }

    fn user_param(&mut self, e: &BytesStart<'_>) {
        if let Some(st) = self.array.as_mut() {
            if st.kind.is_none() && st.skipped_name.is_none() {
                st.skipped_name = params::attr(e, b"name", self.header.latin1).ok().flatten();
            }
        }
    }

    /// Applies one cvParam to whatever element is innermost.
    fn apply(&mut self, p: &CvParam<'_>, pos: u64, out: &mut Spectrum) {
        let r = match self.stack.last().map(|t| t.0) {
            None => self.apply_top(p, out),
            Some(Tag::Scan) if self.scans_seen == 1 => self.apply_scan(p, out),
            Some(Tag::IsolationWindow) if !self.stack.iter().any(|t| t.0 == Tag::Product) => {
                apply_isolation(p, out.meta.precursors.last_mut())
            }
            Some(Tag::SelectedIon) => apply_selected_ion(p, out.meta.precursors.last_mut()),
            Some(Tag::BinaryDataArray) => self.apply_array(p),
            _ => Ok(()),
        };
        if let Err(e) = r {
            self.note(e, pos);
        }
    }

    fn apply_top(&mut self, p: &CvParam<'_>, out: &mut Spectrum) -> Result<()> {
        let m = &mut out.meta;
        if p.is(cv::MS_LEVEL) {
            self.ms_level = Some(params::num_value(&p.value, &p.accession)?);
        } else if p.is(cv::MS1_SPECTRUM) {
            self.ms1_term = true;
        } else if p.is(cv::CENTROID_SPECTRUM) {
            m.representation = Representation::Centroid;
        } else if p.is(cv::PROFILE_SPECTRUM) {
            m.representation = Representation::Profile;
        } else if p.is(cv::POSITIVE_SCAN) {
            m.polarity = Polarity::Positive;
        } else if p.is(cv::NEGATIVE_SCAN) {
            m.polarity = Polarity::Negative;
        } else if p.is(cv::TOTAL_ION_CURRENT) {
            m.stored_tic = Some(params::num_value(&p.value, &p.accession)?);
        } else if p.is(cv::BASE_PEAK_MZ) {
            m.stored_base_peak_mz = Some(params::num_value(&p.value, &p.accession)?);
        } else if p.is(cv::BASE_PEAK_INTENSITY) {
            m.stored_base_peak_intensity = Some(params::num_value(&p.value, &p.accession)?);
        } else if p.is(cv::TIC_CHROMATOGRAM) {
            self.chrom.is_tic = true;
        }
        Ok(())
    }

    fn apply_scan(&mut self, p: &CvParam<'_>, out: &mut Spectrum) -> Result<()> {
        if p.is(cv::SCAN_START_TIME) {
            let v: f64 = params::num_value(&p.value, &p.accession)?;
            out.meta.rt_min = Some(v * time_factor(&p.unit, &p.name)?);
        } else if p.is(cv::POSITIVE_SCAN) {
            out.meta.polarity = Polarity::Positive;
        } else if p.is(cv::NEGATIVE_SCAN) {
            out.meta.polarity = Polarity::Negative;
        }
        Ok(())
    }

    fn apply_array(&mut self, p: &CvParam<'_>) -> Result<()> {
        let Some(st) = self.array.as_mut() else { return Ok(()) };
        let acc = std::str::from_utf8(&p.accession).unwrap_or("");
        if let Some(t) = NumericType::from_accession(acc) {
            st.numeric = Some(t);
        } else if let Some(c) = Compression::from_accession(acc) {
            st.compression = Some(c);
        } else if p.is(cv::MZ_ARRAY) {
            st.kind = Some(ArrayKind::Mz);
        } else if p.is(cv::INTENSITY_ARRAY) {
            st.kind = Some(ArrayKind::Intensity);
        } else if p.is(cv::SIGNAL_TO_NOISE_ARRAY) && !self.is_chromatogram {
            st.kind = Some(ArrayKind::SignalToNoise);
        } else if p.is(cv::RESOLUTION_ARRAY) && !self.is_chromatogram {
            st.kind = Some(ArrayKind::Resolution);
        } else if p.is(cv::TIME_ARRAY) {
            if self.is_chromatogram {
                st.kind = Some(ArrayKind::Time);
                st.time_factor = time_factor(&p.unit, &p.name).unwrap_or(1.0);
            } else {
                st.skipped_name = Some(cv::TIME_ARRAY.1.into());
            }
        } else if p.is(cv::NON_STANDARD_ARRAY) {
            let v = String::from_utf8_lossy(&p.value).into_owned();
            st.skipped_name = Some(if v.is_empty() { cv::NON_STANDARD_ARRAY.1.into() } else { v });
        } else if st.unknown.is_none() {
            st.unknown = Some((acc.to_owned(), String::from_utf8_lossy(&p.name).into_owned()));
        }
        Ok(())
    }
}

fn apply_isolation(p: &CvParam<'_>, pre: Option<&mut Precursor>) -> Result<()> {
    let Some(pre) = pre else { return Ok(()) };
    if p.is(cv::ISOLATION_TARGET) {
        pre.isolation_target = Some(params::num_value(&p.value, &p.accession)?);
    } else if p.is(cv::ISOLATION_LOWER) {
        pre.isolation_lower_offset = Some(params::num_value(&p.value, &p.accession)?);
    } else if p.is(cv::ISOLATION_UPPER) {
        pre.isolation_upper_offset = Some(params::num_value(&p.value, &p.accession)?);
    }
    Ok(())
}

fn apply_selected_ion(p: &CvParam<'_>, pre: Option<&mut Precursor>) -> Result<()> {
    let Some(pre) = pre else { return Ok(()) };
    if p.is(cv::SELECTED_ION_MZ) && pre.selected_mz.is_none() {
        pre.selected_mz = Some(params::num_value(&p.value, &p.accession)?);
    } else if p.is(cv::CHARGE_STATE) && pre.charge.is_none() {
        pre.charge = Some(params::num_value(&p.value, &p.accession)?);
    }
    Ok(())
}

/// Factor from a time unit to minutes (UO:0000010 second, UO:0000031 minute, UO:0000032
/// hour). A missing unit is read as minutes; a unit that is not a time is an error.
fn time_factor(unit: &[u8], name: &[u8]) -> Result<f64> {
    match unit {
        b"UO:0000010" => Ok(1.0 / 60.0),
        b"UO:0000031" | b"" => Ok(1.0),
        b"UO:0000032" => Ok(60.0),
        other => Err(Error::at(
            ErrorKind::UnsupportedAccession {
                what: format!("time unit ({})", String::from_utf8_lossy(name)),
                accession: String::from_utf8_lossy(other).into_owned(),
            },
            Position::default(),
        )),
    }
}

/// Appends base64 text to `dst`, dropping XML whitespace (space, tab, CR, LF).
fn append_without_whitespace(dst: &mut Vec<u8>, text: &[u8]) {
    let is_ws = |b: &u8| matches!(b, b' ' | b'\t' | b'\r' | b'\n');
    let start = text.iter().position(|b| !is_ws(b)).unwrap_or(text.len());
    let end = text.iter().rposition(|b| !is_ws(b)).map_or(start, |i| i + 1);
    let core = &text[start..end];
    if memchr::memchr3(b'\n', b'\r', b' ', core).is_none() && memchr::memchr(b'\t', core).is_none()
    {
        dst.extend_from_slice(core);
    } else {
        dst.extend(core.iter().filter(|b| !is_ws(b)));
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn whitespace_is_removed_from_base64() {
        for (input, want) in [
            (&b"AAAA"[..], &b"AAAA"[..]),
            (b"  AA\r\nAA \n", b"AAAA"),
            (b"\tA A\tA A", b"AAAA"),
            (b"", b""),
            (b" \n ", b""),
        ] {
            let mut v = Vec::new();
            append_without_whitespace(&mut v, input);
            assert_eq!(v, want, "{input:?}");
        }
    }

    #[test]
    fn time_units_convert_to_minutes() {
        assert_eq!(time_factor(b"UO:0000010", b"second").unwrap(), 1.0 / 60.0);
        assert_eq!(time_factor(b"UO:0000031", b"minute").unwrap(), 1.0);
        assert_eq!(time_factor(b"UO:0000032", b"hour").unwrap(), 60.0);
        assert!(time_factor(b"UO:0000008", b"meter").is_err());
    }
}
