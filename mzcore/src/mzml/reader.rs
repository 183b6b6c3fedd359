//! Streaming mzML reader.
//!
//! [`Reader`] reads any [`BufRead`] (a file, stdin, memory; plain or gzip-compressed) and
//! hands out one [`Spectrum`] at a time in file order, its arrays still encoded. Memory use is
//! bounded by the largest single spectrum, whatever the file size.
//!
//! # Errors and recovery
//!
//! A malformed spectrum (bad attribute, missing MS level, unknown compression, wrong
//! `encodedLength`, improper nesting) yields `Err` for that spectrum alone: call
//! [`Reader::read_spectrum`] again (or keep iterating) to get the next one. An error that
//! leaves the document unreadable (input cut off, I/O failure, an element over the size
//! ceiling, XML the tokenizer cannot step over) is returned once; after it the reader behaves
//! as at end of input, so loops cannot spin. Index and checksum problems of an indexed file
//! are returned after the last spectrum.

mod body;
mod params;
mod source;

use std::collections::{HashMap, HashSet, VecDeque};
use std::fs::File;
use std::io::{BufRead, BufReader};
use std::path::Path;

use quick_xml::events::{BytesStart, Event};

pub(crate) use body::Xml;
use body::{BodyError, BodyLimits, ChromFacts};
pub(crate) use params::Header;
use source::{EventTooLarge, GzipRatioTooLarge, Inner, Tracked};

use crate::error::{Error, ErrorKind, Position, Result};
use crate::mzml::binary::BinaryEncoding;
use crate::mzml::cv;
use crate::spectrum::{ArrayKind, Chromatogram, Spectrum};

/// Options of a [`Reader`]; build one with [`ReaderOptions::default`] and the setters.
///
/// The `max_*` fields are resource limits: input that exceeds one gets a
/// [`ErrorKind::LimitExceeded`] error naming the limit (by its option name), the byte offset
/// and the spectrum, and memory stays bounded by the limits whatever the input. A limit met
/// inside a spectrum costs that spectrum only (the reader goes on with the next), except
/// nesting beyond `max_depth`; that one, and one met outside a spectrum or by the document as
/// a whole, ends the document (the tokenizer keeps every open element's name, so stepping
/// over deep nesting would not stay bounded).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ReaderOptions {
    /// Compute the SHA-1 of the document and compare it with `fileChecksum`.
    pub verify_checksum: bool,
    /// Ceiling on the bytes of one XML event (a tag with its attributes, or one run of text,
    /// e.g. one `<binary>`). Default 256 MiB.
    pub max_event_bytes: u64,
    /// Ceiling on element nesting inside a spectrum, and on nesting in the document as a
    /// whole. Default 64.
    pub max_depth: usize,
    /// Ceiling on a declared array length (number of values). Default 50 million.
    pub max_array_length: usize,
    /// Ceiling on the encoded array text held for one spectrum (all its `<binary>` texts
    /// together, however split by comments). Default 512 MiB.
    pub max_spectrum_bytes: u64,
    /// Ceiling on the elements of one spectrum (cvParams and userParams included, each
    /// referenced param group counted with all its cvParams), and on the cvParams of one
    /// `referenceableParamGroup`. Default 100,000.
    pub max_elements: usize,
    /// Ceiling on the ratio of decompressed to compressed bytes of gzip input, checked once
    /// 64 MiB have been decompressed (a gzip bomb). Default 100 (mzML files compress 3 to 6
    /// times; a bomb of repeated spectra 40 to 170 times, one of zeros 1000 times); `u64::MAX`
    /// turns it off.
    pub max_gzip_ratio: u64,
}

impl Default for ReaderOptions {
    fn default() -> Self {
        ReaderOptions {
            verify_checksum: false,
            max_event_bytes: 256 << 20,
            max_depth: 64,
            max_array_length: 50_000_000,
            max_spectrum_bytes: 512 << 20,
            max_elements: 100_000,
            max_gzip_ratio: 100,
        }
    }
}

impl ReaderOptions {
    /// Sets whether to verify the SHA-1 `fileChecksum`.
    pub fn verify_checksum(mut self, yes: bool) -> Self {
        self.verify_checksum = yes;
        self
    }

    /// Sets the ceiling on the bytes of one XML event.
    pub fn max_event_bytes(mut self, bytes: u64) -> Self {
        self.max_event_bytes = bytes;
        self
    }

    /// Sets the ceiling on a declared array length.
    pub fn max_array_length(mut self, values: usize) -> Self {
        self.max_array_length = values;
        self
    }

    /// Sets the ceiling on element nesting (inside a spectrum, and in the whole document).
    pub fn max_depth(mut self, depth: usize) -> Self {
        self.max_depth = depth;
        self
    }

    /// Sets the ceiling on the encoded array text held for one spectrum.
    pub fn max_spectrum_bytes(mut self, bytes: u64) -> Self {
        self.max_spectrum_bytes = bytes;
        self
    }

    /// Sets the ceiling on the elements of one spectrum and the cvParams of one param group.
    pub fn max_elements(mut self, elements: usize) -> Self {
        self.max_elements = elements;
        self
    }

    /// Sets the ceiling on the decompression ratio of gzip input.
    pub fn max_gzip_ratio(mut self, ratio: u64) -> Self {
        self.max_gzip_ratio = ratio;
        self
    }
}

/// Outcome of the `fileChecksum` verification.
#[derive(Debug, Clone, PartialEq, Eq, Default, serde::Serialize, serde::Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum ChecksumStatus {
    /// Verification was not requested (or the end of the document was not reached yet).
    #[default]
    NotChecked,
    /// The document has no `fileChecksum`.
    Absent,
    /// The stored checksum matches the contents.
    Verified,
    /// The stored checksum does not match.
    Mismatch,
}

#[derive(Debug, Clone, Copy, PartialEq, Eq)]
enum State {
    Start,
    Running,
    Finished,
}

/// Streaming mzML reader over any [`BufRead`].
///
/// # Examples
///
/// ```
/// use mzcore::mzml::{Reader, Writer, WriterOptions};
/// use mzcore::spectrum::{Peaks, SpectrumMeta};
///
/// // Write a one-spectrum document in memory, then read it back.
/// let mut doc = Vec::new();
/// let mut w = Writer::new(&mut doc, WriterOptions::default())?; // one spectrum by default
/// let meta = SpectrumMeta { id: "scan=1".into(), ms_level: 1, ..Default::default() };
/// w.write_spectrum(&meta, &Peaks { mz: vec![100.0, 101.0], intensity: vec![5.0, 7.0] })?;
/// w.finish()?;
///
/// let mut reader = Reader::new(&doc[..])?;
/// let spectrum = reader.next().unwrap()?;
/// assert_eq!(spectrum.meta.id, "scan=1");
/// assert_eq!(spectrum.decode()?.intensity, [5.0, 7.0]);
/// assert!(reader.next().is_none());
/// # Ok::<_, mzcore::Error>(())
/// ```
pub struct Reader<R: BufRead> {
    xml: Xml<R>,
    buf: Vec<u8>,
    options: ReaderOptions,
    header: Header,
    state: State,
    root_closed: bool,
    in_spectrum_list: bool,
    complete_spectra: usize,
    seen_ids: HashSet<String>,
    actual_offsets: HashMap<String, u64>,
    spectrum_index: Vec<(String, u64)>,
    index_list_at: Option<u64>,
    index_list_offset: Option<u64>,
    stored_checksum: Option<String>,
    computed_checksum: Option<String>,
    checksum: ChecksumStatus,
    tic: Option<Chromatogram>,
    encodings: Vec<BinaryEncoding>,
    trailing: VecDeque<Error>,
    gzip: bool,
    base: u64,
    last_start: Option<u64>,
    header_only: bool,
    depth: usize,
}

impl Reader<BufReader<File>> {
    /// Opens a file (plain or gzip-compressed) with default options.
    pub fn from_path(path: impl AsRef<Path>) -> Result<Self> {
        Self::from_path_with(path, ReaderOptions::default())
    }

    /// Opens a file (plain or gzip-compressed) with `options`.
    pub fn from_path_with(path: impl AsRef<Path>, options: ReaderOptions) -> Result<Self> {
        let file = File::open(path.as_ref())?;
        Reader::with_options(BufReader::with_capacity(256 * 1024, file), options)
    }
}

impl<R: BufRead> Reader<R> {
    /// A reader with default options. Gzip input is detected by its magic bytes.
    pub fn new(inner: R) -> Result<Self> {
        Self::with_options(inner, ReaderOptions::default())
    }

    /// A reader with `options`.
    pub fn with_options(inner: R, options: ReaderOptions) -> Result<Self> {
        let inner = Inner::detect(inner)?;
        let gzip = inner.is_gzip();
        let tracked = Tracked::new(
            inner,
            options.verify_checksum,
            options.max_event_bytes,
            options.max_gzip_ratio,
        );
        let mut xml = quick_xml::Reader::from_reader(tracked);
        let cfg = xml.config_mut();
        cfg.trim_text(false);
        cfg.check_end_names = false;
        cfg.expand_empty_elements = false;
        Ok(Reader {
            xml,
            buf: Vec::with_capacity(64 * 1024),
            options,
            header: Header::default(),
            state: State::Start,
            root_closed: false,
            in_spectrum_list: false,
            complete_spectra: 0,
            seen_ids: HashSet::new(),
            actual_offsets: HashMap::new(),
            spectrum_index: Vec::new(),
            index_list_at: None,
            index_list_offset: None,
            stored_checksum: None,
            computed_checksum: None,
            checksum: ChecksumStatus::NotChecked,
            tic: None,
            encodings: Vec::new(),
            trailing: VecDeque::new(),
            gzip,
            base: 0,
            last_start: None,
            header_only: false,
            depth: 0,
        })
    }

    /// The underlying reader.
    pub fn get_ref(&self) -> &R {
        self.xml.get_ref().inner.get_ref()
    }

    /// The underlying reader, mutably (reading from it desynchronises this reader).
    pub fn get_mut(&mut self) -> &mut R {
        self.xml.get_mut().inner.get_mut()
    }

    /// Unwraps the underlying reader.
    pub fn into_inner(self) -> R {
        self.xml.into_inner().inner.into_inner()
    }

    /// True when the input was gzip-compressed.
    pub fn is_gzip(&self) -> bool {
        self.gzip
    }

    /// True when the root element is `indexedmzML` (known once the first spectrum is read).
    pub fn is_indexed(&self) -> bool {
        self.header.indexed
    }

    /// The `count` attribute of the `spectrumList`, once it has been read.
    pub fn declared_spectrum_count(&self) -> Option<usize> {
        self.header.declared_spectra
    }

    /// Number of spectra that were read completely (well-formed or not) so far.
    pub fn complete_spectra(&self) -> usize {
        self.complete_spectra
    }

    /// The spectrum offsets listed in the index (filled once the index has been read).
    pub fn index(&self) -> &[(String, u64)] {
        &self.spectrum_index
    }

    /// The result of checksum verification (final once the reader returned `None`).
    pub fn checksum_status(&self) -> &ChecksumStatus {
        &self.checksum
    }

    /// The total-ion-current chromatogram, once read (chromatograms follow the spectra).
    pub fn tic_chromatogram(&self) -> Option<&Chromatogram> {
        self.tic.as_ref()
    }

    /// Binary encodings seen so far, in order of first appearance.
    pub fn encodings_seen(&self) -> &[BinaryEncoding] {
        &self.encodings
    }

    /// Current byte offset in the (decompressed) document.
    pub fn position(&self) -> u64 {
        self.base + self.xml.buffer_position()
    }

    pub(crate) fn header(&self) -> &Header {
        &self.header
    }

    fn limits(&self) -> BodyLimits {
        BodyLimits {
            max_depth: self.options.max_depth,
            max_array_length: self.options.max_array_length,
            max_spectrum_bytes: self.options.max_spectrum_bytes,
            max_elements: self.options.max_elements,
            base: self.base,
        }
    }

    /// A reader positioned at byte `base` of a document inside its `spectrumList`, with the
    /// header context already read (used for random access).
    pub(crate) fn continue_at(
        inner: R,
        options: ReaderOptions,
        header: Header,
        base: u64,
    ) -> Result<Self> {
        // A checksum covers the whole document: a reader that starts in the middle cannot
        // verify it, so it does not hash (nor start a hashing thread) at all.
        let options = options.verify_checksum(false);
        let mut r = Reader::with_options(inner, options)?;
        r.header = header;
        r.base = base;
        r.state = State::Running;
        r.in_spectrum_list = true;
        Ok(r)
    }

    /// Offset of the start tag of the spectrum read last.
    pub(crate) fn last_start(&self) -> Option<u64> {
        self.last_start
    }

    /// Reads up to the start of the `spectrumList`, gathering the header context.
    pub(crate) fn read_header(&mut self) -> Result<()> {
        self.header_only = true;
        let r = self.read_spectrum(&mut Spectrum::default());
        self.header_only = false;
        r.map(|_| ())
    }

    /// Reads the next spectrum into `spectrum`, reusing its buffers.
    ///
    /// Returns `Ok(true)` when a spectrum was read and `Ok(false)` at the end of the document.
    /// An `Err` concerns one spectrum (call again for the next) or, for a fatal error, the rest
    /// of the document (the next call returns `Ok(false)`).
    pub fn read_spectrum(&mut self, spectrum: &mut Spectrum) -> Result<bool> {
        if let Some(e) = self.trailing.pop_front() {
            return Err(e);
        }
        if self.state == State::Finished {
            return Ok(false);
        }
        loop {
            self.buf.clear();
            let pos = self.base + self.xml.buffer_position();
            self.xml.get_mut().start_event();
            let event = match self.xml.read_event_into(&mut self.buf) {
                Ok(ev) => ev,
                Err(e) => {
                    let at = self.base + error_offset(&self.xml, &e);
                    return Err(self.fatal_xml(e, at));
                }
            };
            match event {
                Event::Decl(d) => {
                    if let Some(Ok(enc)) = d.encoding() {
                        let enc = enc.to_ascii_lowercase();
                        self.header.latin1 = enc == b"iso-8859-1" || enc == b"latin1";
                    }
                }
                Event::Start(e) => {
                    let local = e.local_name().as_ref().to_vec();
                    // Elements read to their end tag by a helper do not stay open here.
                    if !reads_to_end(&local) {
                        self.depth += 1;
                        if self.depth > self.options.max_depth {
                            let kind = depth_exceeded(self.depth, self.options.max_depth);
                            return Err(self.fatal(kind, pos));
                        }
                    }
                    let owned = e.into_owned();
                    if let Some(done) = self.start(&local, &owned, pos, false, spectrum) {
                        return done;
                    }
                }
                Event::Empty(e) => {
                    let local = e.local_name().as_ref().to_vec();
                    let owned = e.into_owned();
                    if let Some(done) = self.start(&local, &owned, pos, true, spectrum) {
                        return done;
                    }
                }
                Event::End(e) => {
                    self.depth = self.depth.saturating_sub(1);
                    match e.local_name().as_ref() {
                        b"spectrumList" => self.in_spectrum_list = false,
                        b"indexedmzML" => self.root_closed = true,
                        b"mzML" if !self.header.indexed => self.root_closed = true,
                        _ => {}
                    }
                }
                Event::Text(t)
                    if self.state == State::Start && !t.iter().all(u8::is_ascii_whitespace) =>
                {
                    return Err(
                        self.fatal(ErrorKind::NotMzml("text before the root element".into()), pos)
                    );
                }
                Event::Eof => return self.end_of_input(pos),
                _ => {}
            }
        }
    }

    /// Handles a start tag at the document level. `Some(result)` ends `read_spectrum`.
    fn start(
        &mut self,
        local: &[u8],
        e: &BytesStart<'static>,
        pos: u64,
        empty: bool,
        spectrum: &mut Spectrum,
    ) -> Option<Result<bool>> {
        if self.state == State::Start {
            match local {
                b"indexedmzML" => self.header.indexed = true,
                b"mzML" => {}
                other => {
                    let name = String::from_utf8_lossy(other).into_owned();
                    return Some(Err(
                        self.fatal(ErrorKind::NotMzml(format!("root element is <{name}>")), pos)
                    ));
                }
            }
            self.state = State::Running;
            return None;
        }
        let latin1 = self.header.latin1;
        let r: Result<()> = match local {
            b"referenceableParamGroup" if !empty => self.read_param_group(e),
            b"instrumentConfiguration" if !empty => self.read_instrument_configuration(e),
            b"run" => {
                self.header.run_id = params::attr(e, b"id", latin1).ok().flatten();
                self.header.default_config =
                    params::attr(e, b"defaultInstrumentConfigurationRef", latin1).ok().flatten();
                Ok(())
            }
            b"spectrumList" => {
                self.in_spectrum_list = !empty;
                self.header.declared_spectra = params::num_attr(e, b"count").ok().flatten();
                if self.header_only {
                    return Some(Ok(false));
                }
                Ok(())
            }
            b"spectrum" => return Some(self.spectrum(e, pos, empty, spectrum)),
            b"chromatogram" => self.chromatogram(e, pos, empty),
            b"index" if !empty => self.read_index(e),
            b"indexList" => {
                self.index_list_at = Some(pos);
                Ok(())
            }
            b"indexListOffset" if !empty => self.read_text(b"indexListOffset").map(|t| {
                self.index_list_offset = t.trim().parse().ok();
            }),
            b"fileChecksum" if !empty => {
                // The checksum covers the document up to and including this start tag
                // (mzML 1.1.0 idx schema, element fileChecksum).
                self.computed_checksum = self.xml.get_mut().finish_hash();
                self.read_text(b"fileChecksum").map(|t| {
                    self.stored_checksum = Some(t.trim().to_ascii_lowercase());
                })
            }
            _ => Ok(()),
        };
        match r {
            Ok(()) => None,
            Err(err) => {
                // Outside a spectrum, a cut, an I/O failure or broken XML ends the document.
                if matches!(
                    err.kind(),
                    ErrorKind::Truncated { .. }
                        | ErrorKind::Io(_)
                        | ErrorKind::LimitExceeded { .. }
                        | ErrorKind::Xml(_)
                ) {
                    self.state = State::Finished;
                }
                Some(Err(err))
            }
        }
    }

    fn spectrum(
        &mut self,
        e: &BytesStart<'static>,
        pos: u64,
        empty: bool,
        spectrum: &mut Spectrum,
    ) -> Result<bool> {
        let limits = self.limits();
        let ordinal = self.complete_spectra;
        self.last_start = Some(pos);
        let r = body::parse_body(
            &mut self.xml,
            &mut self.buf,
            &self.header,
            limits,
            e,
            empty,
            pos,
            spectrum,
            None,
        );
        let meta = &spectrum.meta;
        let index = if meta.id.is_empty() && meta.index == 0 { ordinal } else { meta.index };
        match r {
            Ok(()) | Err(BodyError::Element(_)) => {
                self.complete_spectra += 1;
                for a in &spectrum.arrays {
                    if !self.encodings.contains(&a.encoding) {
                        self.encodings.push(a.encoding);
                    }
                }
            }
            _ => {}
        }
        match r {
            Ok(()) => {
                if !self.seen_ids.insert(meta.id.clone()) {
                    return Err(Error::at(
                        ErrorKind::DuplicateId(meta.id.clone()),
                        Position::at_byte(pos),
                    )
                    .in_spectrum(index, &meta.id));
                }
                self.actual_offsets.insert(meta.id.clone(), pos);
                Ok(true)
            }
            Err(BodyError::Element(err)) => {
                if !meta.id.is_empty() && self.seen_ids.insert(meta.id.clone()) {
                    self.actual_offsets.insert(meta.id.clone(), pos);
                }
                Err(err.in_spectrum(index, &meta.id))
            }
            Err(BodyError::Xml(err, at)) => {
                Err(self.fatal_xml(err, at).in_spectrum(index, &spectrum.meta.id.clone()))
            }
            Err(BodyError::Eof(at)) => Err(self
                .fatal(ErrorKind::Truncated { complete_spectra: self.complete_spectra }, at)
                .in_spectrum(index, &spectrum.meta.id.clone())),
            Err(BodyError::Fatal(err, at)) => {
                self.state = State::Finished;
                Err(err.at_byte(at).in_spectrum(index, &spectrum.meta.id.clone()))
            }
        }
    }

    fn chromatogram(&mut self, e: &BytesStart<'static>, pos: u64, empty: bool) -> Result<()> {
        let limits = self.limits();
        let mut scratch = Spectrum::default();
        let mut facts = ChromFacts::default();
        let r = body::parse_body(
            &mut self.xml,
            &mut self.buf,
            &self.header,
            limits,
            e,
            empty,
            pos,
            &mut scratch,
            Some(&mut facts),
        );
        let id = scratch.meta.id.clone();
        let with_id = |err: Error| err.in_field(&format!("chromatogram '{id}'"));
        match r {
            Ok(()) => {}
            Err(BodyError::Element(err)) => return Err(with_id(err)),
            Err(BodyError::Xml(err, at)) => return Err(with_id(self.fatal_xml(err, at))),
            Err(BodyError::Eof(at)) => {
                let kind = ErrorKind::Truncated { complete_spectra: self.complete_spectra };
                return Err(with_id(self.fatal(kind, at)));
            }
            Err(BodyError::Fatal(err, at)) => {
                self.state = State::Finished;
                return Err(with_id(err.at_byte(at)));
            }
        }
        if !facts.is_tic || self.tic.is_some() {
            return Ok(());
        }
        let mut chrom = Chromatogram { id: id.clone(), ..Default::default() };
        if let Some(t) = scratch.array(ArrayKind::Time) {
            t.decode_into(&mut chrom.time_min).map_err(with_id)?;
            chrom.time_min.iter_mut().for_each(|v| *v *= facts.time_factor);
        }
        if let Some(i) = scratch.array(ArrayKind::Intensity) {
            i.decode_into(&mut chrom.intensity).map_err(with_id)?;
        }
        if chrom.time_min.len() != chrom.intensity.len() {
            return Err(with_id(Error::at(
                ErrorKind::LengthMismatch {
                    what: "chromatogram intensity vs time array".into(),
                    declared: chrom.time_min.len(),
                    found: chrom.intensity.len(),
                },
                Position::at_byte(pos),
            )));
        }
        self.tic = Some(chrom);
        Ok(())
    }

    fn read_param_group(&mut self, e: &BytesStart<'static>) -> Result<()> {
        let latin1 = self.header.latin1;
        let id = params::attr(e, b"id", latin1)?.unwrap_or_default();
        let mut group = Vec::new();
        let mut depth = 0usize;
        let (max_depth, max_elements) = (self.options.max_depth, self.options.max_elements);
        loop {
            self.buf.clear();
            let at = self.base + self.xml.buffer_position();
            match self.next_event()? {
                Event::Start(_) => {
                    depth += 1;
                    if depth > max_depth {
                        return Err(self.fatal(depth_exceeded(depth, max_depth), at));
                    }
                }
                Event::Empty(ev) if ev.local_name().as_ref() == b"cvParam" => {
                    group.push(params::CvParam::from_element(&ev)?.to_owned_param(latin1)?);
                    if group.len() > max_elements {
                        let kind = ErrorKind::LimitExceeded {
                            what: format!(
                                "cvParams in referenceableParamGroup '{id}' (reader option \
                                 max_elements)"
                            ),
                            found: group.len() as u64,
                            limit: max_elements as u64,
                        };
                        return Err(self.fatal(kind, at));
                    }
                }
                Event::End(_) if depth == 0 => break,
                Event::End(_) => depth -= 1,
                Event::Eof => return Err(self.truncated()),
                _ => {}
            }
        }
        self.header.param_groups.insert(id, group);
        Ok(())
    }

    fn read_instrument_configuration(&mut self, e: &BytesStart<'static>) -> Result<()> {
        let latin1 = self.header.latin1;
        let id = params::attr(e, b"id", latin1)?.unwrap_or_default();
        let mut ionization = None;
        let mut in_source = false;
        let mut depth = 0usize;
        let max_depth = self.options.max_depth;
        loop {
            self.buf.clear();
            let at = self.base + self.xml.buffer_position();
            let ev = self.next_event()?;
            match ev {
                Event::Start(s) => {
                    depth += 1;
                    if s.local_name().as_ref() == b"source" {
                        in_source = true;
                    }
                    if depth > max_depth {
                        return Err(self.fatal(depth_exceeded(depth, max_depth), at));
                    }
                }
                Event::End(s) if depth == 0 => {
                    let _ = s;
                    break;
                }
                Event::End(s) => {
                    depth -= 1;
                    if s.local_name().as_ref() == b"source" {
                        in_source = false;
                    }
                }
                Event::Empty(s) if in_source || depth == 0 => {
                    let accessions: Vec<Vec<u8>> = match s.local_name().as_ref() {
                        b"cvParam" => vec![params::CvParam::from_element(&s)?.accession.to_vec()],
                        b"referenceableParamGroupRef" => {
                            let r = params::attr(&s, b"ref", latin1)?.unwrap_or_default();
                            self.header
                                .param_groups
                                .get(&r)
                                .map(|g| {
                                    g.iter().map(|p| p.accession.as_bytes().to_vec()).collect()
                                })
                                .unwrap_or_default()
                        }
                        _ => Vec::new(),
                    };
                    for acc in accessions {
                        if ionization.is_none() {
                            ionization = params::ionization_from_accession(&acc);
                        }
                    }
                }
                Event::Eof => return Err(self.truncated()),
                _ => {}
            }
        }
        if let Some(ion) = ionization {
            self.header.ionization_by_config.insert(id, ion);
        }
        Ok(())
    }

    fn read_index(&mut self, e: &BytesStart<'static>) -> Result<()> {
        let name = params::attr(e, b"name", false)?.unwrap_or_default();
        let keep = name == "spectrum";
        let latin1 = self.header.latin1;
        let mut depth = 0usize;
        let max_depth = self.options.max_depth;
        loop {
            self.buf.clear();
            let at = self.base + self.xml.buffer_position();
            let ev = self.next_event()?;
            match ev {
                Event::Start(s) if s.local_name().as_ref() == b"offset" => {
                    let id = params::attr(&s, b"idRef", latin1)?.unwrap_or_default();
                    let t = self.read_text(b"offset")?;
                    let off = t.trim().parse::<u64>().map_err(|_| {
                        Error::new(ErrorKind::InvalidValue {
                            field: format!("index offset of '{id}'"),
                            value: params::shorten(&t),
                        })
                    })?;
                    if keep {
                        self.spectrum_index.push((id, off));
                    }
                }
                Event::Start(_) => {
                    depth += 1;
                    if depth > max_depth {
                        return Err(self.fatal(depth_exceeded(depth, max_depth), at));
                    }
                }
                Event::End(s) if s.local_name().as_ref() == b"index" => return Ok(()),
                Event::End(_) => depth = depth.saturating_sub(1),
                Event::Eof => return Err(self.truncated()),
                _ => {}
            }
        }
    }

    /// Reads the text content up to the end tag `end`.
    fn read_text(&mut self, end: &[u8]) -> Result<String> {
        let mut text = String::new();
        loop {
            self.buf.clear();
            let latin1 = self.header.latin1;
            match self.next_event()? {
                Event::Text(t) => text.push_str(&params::text(&t, latin1)?),
                Event::End(e) if e.local_name().as_ref() == end => return Ok(text),
                Event::Eof => return Err(self.truncated()),
                Event::Start(_) | Event::End(_) => {
                    return Err(Error::new(ErrorKind::Xml(format!(
                        "unexpected element inside <{}>",
                        String::from_utf8_lossy(end)
                    ))));
                }
                _ => {}
            }
        }
    }

    fn next_event(&mut self) -> Result<Event<'_>> {
        next_event(
            &mut self.xml,
            &mut self.buf,
            self.base,
            self.options.max_event_bytes,
            self.complete_spectra,
        )
    }

    fn truncated(&mut self) -> Error {
        let at = self.base + self.xml.buffer_position();
        self.fatal(ErrorKind::Truncated { complete_spectra: self.complete_spectra }, at)
    }

    fn fatal(&mut self, kind: ErrorKind, at: u64) -> Error {
        self.state = State::Finished;
        Error::at(kind, Position::at_byte(at))
    }

    fn fatal_xml(&mut self, e: quick_xml::Error, at: u64) -> Error {
        self.state = State::Finished;
        xml_error(e, at, self.options.max_event_bytes, self.complete_spectra)
    }

    /// End of input: either a complete document (check index and checksum) or a cut.
    fn end_of_input(&mut self, pos: u64) -> Result<bool> {
        self.state = State::Finished;
        if !self.root_closed {
            if self.complete_spectra == 0 && pos == 0 {
                return Err(Error::at(
                    ErrorKind::NotMzml("empty input".into()),
                    Position::at_byte(0),
                ));
            }
            if self.header.run_id.is_none() && self.complete_spectra == 0 && !self.header.indexed {
                let seen_root = self.index_list_at.is_some() || pos > 0;
                if !seen_root {
                    return Err(Error::at(
                        ErrorKind::NotMzml("no <mzML> root element".into()),
                        Position::at_byte(pos),
                    ));
                }
            }
            return Err(Error::at(
                ErrorKind::Truncated { complete_spectra: self.complete_spectra },
                Position::at_byte(pos),
            ));
        }
        self.check_index();
        self.check_checksum();
        match self.trailing.pop_front() {
            Some(e) => Err(e),
            None => Ok(false),
        }
    }

    fn check_index(&mut self) {
        if let (Some(declared), Some(actual)) = (self.index_list_offset, self.index_list_at) {
            if declared != actual {
                self.trailing.push_back(Error::at(
                    ErrorKind::IndexMismatch { id: "indexList".into(), indexed: declared, actual },
                    Position { field: Some("indexListOffset".into()), ..Position::at_byte(actual) },
                ));
            }
        }
        let mut bad = self.spectrum_index.iter().filter_map(|(id, off)| {
            let actual = self.actual_offsets.get(id).copied().unwrap_or(u64::MAX);
            (actual != *off).then(|| (id.clone(), *off, actual))
        });
        if let Some((id, indexed, actual)) = bad.next() {
            let more = bad.count();
            let field = if more > 0 {
                format!("index ({more} more entries disagree)")
            } else {
                "index".to_owned()
            };
            self.trailing.push_back(Error::at(
                ErrorKind::IndexMismatch { id: id.clone(), indexed, actual },
                Position {
                    spectrum_id: Some(id),
                    field: Some(field),
                    ..Position::at_byte(indexed)
                },
            ));
        }
    }

    fn check_checksum(&mut self) {
        if !self.options.verify_checksum {
            return;
        }
        self.checksum = match (&self.stored_checksum, &self.computed_checksum) {
            (Some(stored), Some(computed)) if stored == computed => ChecksumStatus::Verified,
            (Some(stored), Some(computed)) => {
                self.trailing.push_back(Error::at(
                    ErrorKind::ChecksumMismatch {
                        stored: stored.clone(),
                        computed: computed.clone(),
                    },
                    Position { field: Some("fileChecksum".into()), ..Position::default() },
                ));
                ChecksumStatus::Mismatch
            }
            _ => ChecksumStatus::Absent,
        };
    }
}

/// Elements whose start tag hands over to a helper that reads up to their end tag.
fn reads_to_end(local: &[u8]) -> bool {
    matches!(
        local,
        b"spectrum"
            | b"chromatogram"
            | b"referenceableParamGroup"
            | b"instrumentConfiguration"
            | b"index"
            | b"indexListOffset"
            | b"fileChecksum"
    )
}

/// The error for nesting deeper than `limit`.
pub(crate) fn depth_exceeded(depth: usize, limit: usize) -> ErrorKind {
    ErrorKind::LimitExceeded {
        what: "element nesting depth (reader option max_depth)".into(),
        found: depth as u64,
        limit: limit as u64,
    }
}

/// Reads one event, mapping a tokenizer error to ours.
fn next_event<'b, R: BufRead>(
    xml: &mut Xml<R>,
    buf: &'b mut Vec<u8>,
    base: u64,
    limit: u64,
    complete: usize,
) -> Result<Event<'b>> {
    xml.get_mut().start_event();
    match xml.read_event_into(buf) {
        Ok(ev) => Ok(ev),
        Err(e) => {
            let at = base + error_offset(xml, &e);
            Err(xml_error(e, at, limit, complete))
        }
    }
}

/// Where a tokenizer error happened: the start of the bad markup for syntax errors, the
/// current position for I/O errors (the tokenizer does not track those).
pub(crate) fn error_offset<R>(xml: &quick_xml::Reader<R>, e: &quick_xml::Error) -> u64 {
    match e {
        quick_xml::Error::Io(_) => xml.buffer_position(),
        _ => xml.error_position(),
    }
}

/// Maps a tokenizer error to ours (an over-large event becomes `LimitExceeded`).
fn xml_error(e: quick_xml::Error, at: u64, limit: u64, complete: usize) -> Error {
    let kind = match e {
        quick_xml::Error::Io(io) => {
            if io.get_ref().is_some_and(|inner| inner.is::<EventTooLarge>()) {
                ErrorKind::LimitExceeded {
                    what: "size of one XML element or text run, bytes (reader option \
                           max_event_bytes)"
                        .into(),
                    found: limit + 1,
                    limit,
                }
            } else if let Some(g) =
                io.get_ref().and_then(|inner| inner.downcast_ref::<GzipRatioTooLarge>())
            {
                ErrorKind::LimitExceeded {
                    what: "decompression ratio of the gzip input (reader option max_gzip_ratio)"
                        .into(),
                    found: g.ratio,
                    limit: g.limit,
                }
            } else if io.kind() == std::io::ErrorKind::UnexpectedEof {
                ErrorKind::Truncated { complete_spectra: complete }
            } else {
                ErrorKind::Io(std::io::Error::new(io.kind(), io.to_string()))
            }
        }
        // Every syntax error of the tokenizer is markup that the input ended inside of.
        quick_xml::Error::Syntax(_) => ErrorKind::Truncated { complete_spectra: complete },
        other => ErrorKind::Xml(other.to_string()),
    };
    Error::at(kind, Position::at_byte(at))
}

impl<R: BufRead> Iterator for Reader<R> {
    type Item = Result<Spectrum>;

    fn next(&mut self) -> Option<Self::Item> {
        let mut s = Spectrum::default();
        match self.read_spectrum(&mut s) {
            Ok(true) => Some(Ok(s)),
            Ok(false) => None,
            Err(e) => Some(Err(e)),
        }
    }
}

/// Accessions of the terms this module interprets, for documentation and cross-checks.
pub const INTERPRETED_TERMS: &[cv::Term] = &[
    cv::MS_LEVEL,
    cv::CENTROID_SPECTRUM,
    cv::PROFILE_SPECTRUM,
    cv::POSITIVE_SCAN,
    cv::NEGATIVE_SCAN,
    cv::SCAN_START_TIME,
    cv::TOTAL_ION_CURRENT,
    cv::BASE_PEAK_MZ,
    cv::BASE_PEAK_INTENSITY,
    cv::SELECTED_ION_MZ,
    cv::CHARGE_STATE,
    cv::ISOLATION_TARGET,
    cv::ISOLATION_LOWER,
    cv::ISOLATION_UPPER,
    cv::MZ_ARRAY,
    cv::INTENSITY_ARRAY,
    cv::TIME_ARRAY,
    cv::SIGNAL_TO_NOISE_ARRAY,
    cv::RESOLUTION_ARRAY,
    cv::TIC_CHROMATOGRAM,
];
