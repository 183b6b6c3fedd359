//! Random access to spectra of a seekable `indexedmzML` file through its index.

use std::collections::HashMap;
use std::fs::File;
use std::io::{BufRead, BufReader, Read, Seek, SeekFrom};
use std::path::Path;

use crate::error::{Error, ErrorKind, Position, Result, Warning};
use crate::mzml::reader::{INDEX_SEARCH_BYTES, Reader, ReaderOptions};
use crate::spectrum::Spectrum;

/// Reads single spectra by native id or index through the `indexList` of an indexed mzML
/// (mzML 1.1.0 idx schema: `indexListOffset` gives the byte offset of `indexList`).
///
/// Offsets that miss their element by at most [`INDEX_SEARCH_BYTES`] (writers that point at the
/// indentation before it) are corrected by a search of that window; an index wrong beyond that
/// is replaced by one built from reading the file in order. Either is noted in
/// [`IndexedReader::warnings`].
///
/// # Examples
///
/// ```
/// use std::io::Cursor;
/// use mzcore::mzml::{IndexedReader, Writer, WriterOptions};
/// use mzcore::spectrum::{Peaks, SpectrumMeta};
///
/// let mut w = Writer::new(Vec::new(), WriterOptions { spectrum_count: 2, ..Default::default() })?;
/// for id in ["scan=1", "scan=2"] {
///     let meta = SpectrumMeta { id: id.into(), ms_level: 1, ..Default::default() };
///     w.write_spectrum(&meta, &Peaks { mz: vec![150.0], intensity: vec![1.0] })?;
/// }
/// let doc = w.finish()?;
/// let mut r = IndexedReader::new(Cursor::new(doc))?;
/// assert_eq!(r.len(), 2);
/// assert_eq!(r.by_id("scan=2")?.meta.index, 1);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub struct IndexedReader<R: BufRead + Seek> {
    inner: R,
    options: ReaderOptions,
    header: crate::mzml::reader::Header,
    index: Vec<(String, u64)>,
    by_id: HashMap<String, usize>,
    warnings: Vec<Warning>,
    scanned: bool,
}

impl IndexedReader<BufReader<File>> {
    /// Opens a plain (not gzip-compressed) indexed mzML file.
    pub fn from_path(path: impl AsRef<Path>) -> Result<Self> {
        IndexedReader::new(BufReader::new(File::open(path)?))
    }
}

impl<R: BufRead + Seek> IndexedReader<R> {
    /// Reads the header and the index of `inner`.
    pub fn new(inner: R) -> Result<Self> {
        Self::with_options(inner, ReaderOptions::default())
    }

    /// Reads the header and the index of `inner` with `options` for later spectra.
    pub fn with_options(mut inner: R, options: ReaderOptions) -> Result<Self> {
        let header = read_header(&mut inner, options)?;
        let declared = find_index_list_offset(&mut inner)?;
        let mut r = IndexedReader {
            inner,
            options,
            header,
            index: Vec::new(),
            by_id: HashMap::new(),
            warnings: Vec::new(),
            scanned: false,
        };
        let found = find_start_tag(&mut r.inner, declared, b"indexList")?;
        let listed = match found {
            Some(at) => {
                if at != declared {
                    r.warnings.push(Warning::at(
                        format!(
                            "indexListOffset {declared} is {} bytes from <indexList> (at {at}); \
                             found within the {INDEX_SEARCH_BYTES}-byte search window",
                            at.abs_diff(declared)
                        ),
                        Position { field: Some("indexListOffset".into()), ..Position::at_byte(at) },
                    ));
                }
                r.inner.seek(SeekFrom::Start(at))?;
                read_index_list(&mut r.inner, at, options).map_err(|e| e.to_string())
            }
            None => Err(format!(
                "no <indexList> within {INDEX_SEARCH_BYTES} bytes of indexListOffset {declared}"
            )),
        };
        match listed {
            Ok(index) => r.set_index(index),
            Err(why) => {
                r.warnings.push(Warning::at(
                    format!("{why}: the index is not used, spectra located by reading the file"),
                    Position {
                        field: Some("indexListOffset".into()),
                        ..Position::at_byte(declared)
                    },
                ));
                r.scan()?;
            }
        }
        Ok(r)
    }

    /// What was odd about the index and how it was worked around (offsets corrected by the
    /// bounded search, or the index replaced by a scan of the file).
    pub fn warnings(&self) -> &[Warning] {
        &self.warnings
    }

    fn set_index(&mut self, index: Vec<(String, u64)>) {
        self.by_id = index.iter().enumerate().map(|(i, (id, _))| (id.clone(), i)).collect();
        self.index = index;
    }

    /// Replaces the index by the spectra's real offsets, read in file order.
    fn scan(&mut self) -> Result<()> {
        self.inner.seek(SeekFrom::Start(0))?;
        let mut reader =
            Reader::with_options(&mut self.inner, self.options.verify_checksum(false))?;
        let mut index = Vec::new();
        let mut s = Spectrum::default();
        loop {
            match reader.read_spectrum(&mut s) {
                Ok(true) => index.extend(reader.last_start().map(|at| (s.meta.id.clone(), at))),
                Ok(false) => break,
                // A bad spectrum keeps its place, so that asking for it gives its error.
                Err(e) => match (e.position().spectrum_id.clone(), reader.last_start()) {
                    (Some(id), Some(at)) if e.position().spectrum_index.is_some() => {
                        index.push((id, at));
                    }
                    _ => {}
                },
            }
        }
        drop(reader);
        self.scanned = true;
        self.set_index(index);
        Ok(())
    }

    /// Number of spectra in the index.
    pub fn len(&self) -> usize {
        self.index.len()
    }

    /// True when the index lists no spectra.
    pub fn is_empty(&self) -> bool {
        self.index.is_empty()
    }

    /// Native ids and offsets, in index order.
    pub fn index(&self) -> &[(String, u64)] {
        &self.index
    }

    /// The spectrum at position `i` of the index.
    pub fn by_index(&mut self, i: usize) -> Result<Spectrum> {
        let (id, offset) = self
            .index
            .get(i)
            .cloned()
            .ok_or_else(|| Error::new(ErrorKind::NotFound(format!("at index {i}"))))?;
        self.read_at(&id, offset)
    }

    /// The spectrum with native id `id`.
    pub fn by_id(&mut self, id: &str) -> Result<Spectrum> {
        let i = *self
            .by_id
            .get(id)
            .ok_or_else(|| Error::new(ErrorKind::NotFound(format!("with id '{id}'"))))?;
        self.by_index(i)
    }

    /// Reads the spectrum `id` at `offset`, else at the nearest `<spectrum>` tag within
    /// [`INDEX_SEARCH_BYTES`], else (once) through an index rebuilt by scanning the file.
    fn read_at(&mut self, id: &str, offset: u64) -> Result<Spectrum> {
        let candidates = nearby_start_tags(&mut self.inner, offset, b"spectrum")?;
        let mut first = None;
        if candidates.first() == Some(&offset) {
            // A spectrum starts right there: its own error (a bad spectrum) is the answer.
            match self.read_exactly_at(id, offset) {
                Err(e) if matches!(e.kind(), ErrorKind::IndexMismatch { .. }) => first = Some(e),
                other => return other,
            }
        }
        for &at in &candidates {
            if at == offset {
                continue;
            }
            if let Ok(s) = self.read_exactly_at(id, at) {
                // Corrected in place: the next lookup goes straight there, noted once.
                if let Some(&i) = self.by_id.get(id) {
                    self.index[i].1 = at;
                }
                self.warnings.push(Warning::at(
                    format!(
                        "index offset {offset} of '{id}' is {} bytes from its element (at {at}); \
                         found within the {INDEX_SEARCH_BYTES}-byte search window",
                        at.abs_diff(offset)
                    ),
                    Position { spectrum_id: Some(id.to_owned()), ..Position::at_byte(at) },
                ));
                return Ok(s);
            }
        }
        if self.scanned {
            return Err(first.unwrap_or_else(|| {
                Error::at(
                    ErrorKind::IndexMismatch {
                        id: id.to_owned(),
                        indexed: offset,
                        actual: u64::MAX,
                    },
                    Position { spectrum_id: Some(id.to_owned()), ..Position::at_byte(offset) },
                )
            }));
        }
        self.warnings.push(Warning::at(
            format!(
                "no spectrum '{id}' within {INDEX_SEARCH_BYTES} bytes of its index offset \
                 {offset}: the index is not used, spectra located by reading the file"
            ),
            Position { spectrum_id: Some(id.to_owned()), ..Position::at_byte(offset) },
        ));
        self.scan()?;
        match self.by_id.get(id).map(|&i| self.index[i].1) {
            Some(at) => self.read_exactly_at(id, at),
            None => Err(Error::at(
                ErrorKind::NotFound(format!("with id '{id}' (listed in the index only)")),
                Position { spectrum_id: Some(id.to_owned()), ..Position::at_byte(offset) },
            )),
        }
    }

    fn read_exactly_at(&mut self, id: &str, offset: u64) -> Result<Spectrum> {
        self.inner.seek(SeekFrom::Start(offset))?;
        let mut reader =
            Reader::continue_at(&mut self.inner, self.options, self.header.clone(), offset)?;
        let mut s = Spectrum::default();
        let wrong_place = || {
            Error::at(
                ErrorKind::IndexMismatch { id: id.to_owned(), indexed: offset, actual: u64::MAX },
                Position { spectrum_id: Some(id.to_owned()), ..Position::at_byte(offset) },
            )
        };
        match reader.read_spectrum(&mut s) {
            Ok(true) if s.meta.id == id && reader.last_start() == Some(offset) => Ok(s),
            Ok(_) => Err(wrong_place()),
            Err(e) => Err(e),
        }
    }
}

/// Reads from the start up to the `spectrumList` start tag, gathering the header context.
fn read_header<R: BufRead + Seek>(
    inner: &mut R,
    options: ReaderOptions,
) -> Result<crate::mzml::reader::Header> {
    inner.seek(SeekFrom::Start(0))?;
    let mut reader = Reader::with_options(&mut *inner, options)?;
    reader.read_header()?;
    Ok(reader.header().clone())
}

/// Reads the bytes within [`INDEX_SEARCH_BYTES`] of `offset` (plus room for the tag name).
fn window<R: Read + Seek>(inner: &mut R, offset: u64, name: &[u8]) -> Result<(u64, Vec<u8>)> {
    let len = inner.seek(SeekFrom::End(0))?;
    let start = offset.saturating_sub(INDEX_SEARCH_BYTES).min(len);
    let end = offset.saturating_add(INDEX_SEARCH_BYTES + name.len() as u64 + 2).min(len);
    inner.seek(SeekFrom::Start(start))?;
    let mut buf = Vec::with_capacity((end - start) as usize);
    inner.take(end - start).read_to_end(&mut buf)?;
    Ok((start, buf))
}

/// Offsets of the start tags `<name` or `<prefix:name` (followed by white space, `>` or `/`)
/// within [`INDEX_SEARCH_BYTES`] of `offset`, nearest first.
fn nearby_start_tags<R: Read + Seek>(inner: &mut R, offset: u64, name: &[u8]) -> Result<Vec<u64>> {
    let (start, buf) = window(inner, offset, name)?;
    let mut found: Vec<u64> = start_tags(&buf, name).map(|i| start + i as u64).collect();
    found.retain(|at| at.abs_diff(offset) <= INDEX_SEARCH_BYTES);
    found.sort_by_key(|at| at.abs_diff(offset));
    Ok(found)
}

/// The nearest start tag `name` within [`INDEX_SEARCH_BYTES`] of `offset`.
fn find_start_tag<R: Read + Seek>(inner: &mut R, offset: u64, name: &[u8]) -> Result<Option<u64>> {
    Ok(nearby_start_tags(inner, offset, name)?.first().copied())
}

/// Positions of the `<` of every start tag with local name `name` in `buf`.
fn start_tags<'a>(buf: &'a [u8], name: &'a [u8]) -> impl Iterator<Item = usize> + 'a {
    memchr::memmem::find_iter(buf, name).filter_map(move |i| {
        let after = buf.get(i + name.len()).copied();
        if !matches!(after, Some(b' ' | b'\t' | b'\r' | b'\n' | b'>' | b'/')) {
            return None;
        }
        let mut j = i.checked_sub(1)?;
        if buf[j] == b':' {
            // A namespace prefix: letters, digits, `-`, `_`, `.` back to the `<`.
            while j > 0 && matches!(buf[j - 1], b'a'..=b'z' | b'A'..=b'Z' | b'0'..=b'9' | b'-' | b'_' | b'.') {
                j -= 1;
            }
            j = j.checked_sub(1)?;
        }
        (buf[j] == b'<').then_some(j)
    })
}

/// Finds `<indexListOffset>N</indexListOffset>` in the last KiBs of the file.
fn find_index_list_offset<R: Read + Seek>(inner: &mut R) -> Result<u64> {
    let len = inner.seek(SeekFrom::End(0))?;
    let tail_len = len.min(4096);
    inner.seek(SeekFrom::Start(len - tail_len))?;
    let mut tail = Vec::with_capacity(tail_len as usize);
    inner.take(tail_len).read_to_end(&mut tail)?;
    let tag = b"indexListOffset>";
    let start = memchr::memmem::rfind(&tail, b"<indexListOffset>").ok_or_else(|| {
        Error::at(
            ErrorKind::NotMzml("no <indexListOffset> at the end of the file (not indexed)".into()),
            Position::at_byte(len),
        )
    })? + 1
        + tag.len();
    let end = start
        + memchr::memchr(b'<', &tail[start..]).ok_or_else(|| {
            Error::at(ErrorKind::Truncated { complete_spectra: 0 }, Position::at_byte(len))
        })?;
    let text = String::from_utf8_lossy(&tail[start..end]);
    let at = len - tail_len + start as u64;
    let offset: u64 = text.trim().parse().map_err(|_| {
        Error::at(
            ErrorKind::InvalidValue { field: "indexListOffset".into(), value: text.to_string() },
            Position::at_byte(at),
        )
    })?;
    // An offset beyond the end is searched for like any other; the index is then not used.
    Ok(offset)
}

/// Parses `<indexList>` at the current position: the spectrum index's ids and offsets.
///
/// The index list may take at most `options.max_event_bytes` bytes (an index of a million
/// spectra takes about 60 MB) and nest at most `options.max_depth` deep, so that a crafted
/// `indexListOffset` cannot make this read unbounded.
fn read_index_list<R: BufRead>(
    inner: &mut R,
    base: u64,
    options: ReaderOptions,
) -> Result<Vec<(String, u64)>> {
    use quick_xml::events::Event;
    let limit = options.max_event_bytes;
    let mut xml = quick_xml::Reader::from_reader(inner.take(limit));
    let mut buf = Vec::new();
    let mut out = Vec::new();
    let mut in_spectrum_index = false;
    let mut current: Option<String> = None;
    let mut seen_list = false;
    let mut depth = 0usize;
    loop {
        buf.clear();
        let ev = xml.read_event_into(&mut buf).map_err(|e| {
            Error::at(ErrorKind::Xml(e.to_string()), Position::at_byte(base + xml.error_position()))
        })?;
        match &ev {
            Event::Start(_) => depth += 1,
            Event::End(_) => depth = depth.saturating_sub(1),
            _ => {}
        }
        if depth > options.max_depth {
            let kind = crate::mzml::reader::depth_exceeded(depth, options.max_depth);
            return Err(Error::at(kind, Position::at_byte(base + xml.buffer_position())));
        }
        match ev {
            Event::Start(e) => match e.local_name().as_ref() {
                b"indexList" => seen_list = true,
                b"index" => {
                    in_spectrum_index = e
                        .try_get_attribute("name")
                        .ok()
                        .flatten()
                        .is_some_and(|a| a.value.as_ref() == b"spectrum");
                }
                b"offset" if in_spectrum_index => {
                    let id = e
                        .try_get_attribute("idRef")
                        .ok()
                        .flatten()
                        .and_then(|a| a.unescape_value().ok().map(|v| v.into_owned()))
                        .unwrap_or_default();
                    current = Some(id);
                }
                _ if !seen_list => {
                    return Err(Error::at(
                        ErrorKind::IndexMismatch {
                            id: "indexList".into(),
                            indexed: base,
                            actual: u64::MAX,
                        },
                        Position::at_byte(base),
                    ));
                }
                _ => {}
            },
            Event::Text(t) => {
                if let Some(id) = current.take() {
                    let s = String::from_utf8_lossy(&t);
                    let off = s.trim().parse().map_err(|_| {
                        Error::at(
                            ErrorKind::InvalidValue {
                                field: format!("index offset of '{id}'"),
                                value: s.to_string(),
                            },
                            Position::at_byte(base + xml.buffer_position()),
                        )
                    })?;
                    out.push((id, off));
                }
            }
            Event::End(e) if e.local_name().as_ref() == b"indexList" => return Ok(out),
            Event::Eof if xml.buffer_position() >= limit => {
                return Err(Error::at(
                    ErrorKind::LimitExceeded {
                        what: "size of the index list, bytes (reader option max_event_bytes)"
                            .into(),
                        found: limit + 1,
                        limit,
                    },
                    Position { field: Some("indexList".into()), ..Position::at_byte(base) },
                ));
            }
            Event::Eof => {
                return Err(Error::at(
                    ErrorKind::Truncated { complete_spectra: 0 },
                    Position::at_byte(base + xml.buffer_position()),
                ));
            }
            _ => {}
        }
    }
}
