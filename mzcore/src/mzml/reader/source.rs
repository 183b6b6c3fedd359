//! The byte source under the XML tokenizer: gzip detection, SHA-1 of consumed bytes, a
//! ceiling on the bytes one XML event may span, and a ceiling on the decompression ratio of
//! gzip input.

use std::io::{self, BufRead, BufReader, Read};

use crate::hash::BackgroundDigest;
use flate2::bufread::MultiGzDecoder;

/// Plain or gzip-decompressed input, chosen from the first two bytes (gzip magic 1F 8B,
/// RFC 1952 section 2.3.1).
pub(crate) enum Inner<R: BufRead> {
    Plain(R),
    Gzip(Box<BufReader<MultiGzDecoder<Counted<R>>>>),
}

/// Counts the bytes consumed from the compressed input of a gzip stream.
pub(crate) struct Counted<R> {
    inner: R,
    consumed: u64,
}

impl<R: BufRead> Read for Counted<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let n = self.inner.read(buf)?;
        self.consumed += n as u64;
        Ok(n)
    }
}

impl<R: BufRead> BufRead for Counted<R> {
    fn fill_buf(&mut self) -> io::Result<&[u8]> {
        self.inner.fill_buf()
    }

    fn consume(&mut self, amt: usize) {
        self.consumed += amt as u64;
        self.inner.consume(amt);
    }
}

impl<R: BufRead> Inner<R> {
    pub(crate) fn detect(mut reader: R) -> io::Result<Self> {
        let head = loop {
            match reader.fill_buf() {
                Ok(b) => break b,
                Err(e) if e.kind() == io::ErrorKind::Interrupted => continue,
                Err(e) => return Err(e),
            }
        };
        if head.len() >= 2 && head[0] == 0x1f && head[1] == 0x8b {
            Ok(Inner::Gzip(Box::new(BufReader::with_capacity(
                256 * 1024,
                MultiGzDecoder::new(Counted { inner: reader, consumed: 0 }),
            ))))
        } else {
            Ok(Inner::Plain(reader))
        }
    }

    pub(crate) fn is_gzip(&self) -> bool {
        matches!(self, Inner::Gzip(_))
    }

    /// Compressed bytes consumed so far (gzip input only).
    fn compressed_bytes(&self) -> Option<u64> {
        match self {
            Inner::Plain(_) => None,
            Inner::Gzip(g) => Some(g.get_ref().get_ref().consumed),
        }
    }

    pub(crate) fn get_ref(&self) -> &R {
        match self {
            Inner::Plain(r) => r,
            Inner::Gzip(g) => &g.get_ref().get_ref().inner,
        }
    }

    pub(crate) fn get_mut(&mut self) -> &mut R {
        match self {
            Inner::Plain(r) => r,
            Inner::Gzip(g) => &mut g.get_mut().get_mut().inner,
        }
    }

    pub(crate) fn into_inner(self) -> R {
        match self {
            Inner::Plain(r) => r,
            Inner::Gzip(g) => g.into_inner().into_inner().inner,
        }
    }
}

impl<R: BufRead> Read for Inner<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        match self {
            Inner::Plain(r) => r.read(buf),
            Inner::Gzip(g) => g.read(buf),
        }
    }
}

impl<R: BufRead> BufRead for Inner<R> {
    fn fill_buf(&mut self) -> io::Result<&[u8]> {
        match self {
            Inner::Plain(r) => r.fill_buf(),
            Inner::Gzip(g) => g.fill_buf(),
        }
    }

    fn consume(&mut self, amt: usize) {
        match self {
            Inner::Plain(r) => r.consume(amt),
            Inner::Gzip(g) => g.consume(amt),
        }
    }
}

/// Marker put in the `io::Error` raised when one event grows beyond the ceiling.
#[derive(Debug)]
pub(crate) struct EventTooLarge(pub(crate) u64);

impl std::fmt::Display for EventTooLarge {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "one XML element or text run exceeds {} bytes", self.0)
    }
}

impl std::error::Error for EventTooLarge {}

/// Marker put in the `io::Error` raised when gzip input inflates beyond the ratio ceiling.
#[derive(Debug)]
pub(crate) struct GzipRatioTooLarge {
    pub(crate) ratio: u64,
    pub(crate) limit: u64,
}

impl std::fmt::Display for GzipRatioTooLarge {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(f, "gzip input inflates {} times, more than {}", self.ratio, self.limit)
    }
}

impl std::error::Error for GzipRatioTooLarge {}

/// Decompressed bytes after which the gzip ratio ceiling is checked: below it no input is
/// refused, however well it compresses.
pub(crate) const GZIP_RATIO_CHECK_AFTER: u64 = 64 << 20;

/// Counts and optionally hashes every consumed byte; refuses to hand out more than
/// `event_limit` bytes between two calls of [`Tracked::start_event`].
pub(crate) struct Tracked<R: BufRead> {
    pub(crate) inner: Inner<R>,
    hasher: Option<BackgroundDigest>,
    consumed: u64,
    event_start: u64,
    event_limit: u64,
    gzip_ratio_limit: u64,
}

impl<R: BufRead> Tracked<R> {
    pub(crate) fn new(
        inner: Inner<R>,
        hash: bool,
        event_limit: u64,
        gzip_ratio_limit: u64,
    ) -> Self {
        Tracked {
            inner,
            hasher: hash.then(BackgroundDigest::new::<sha1::Sha1>),
            consumed: 0,
            event_start: 0,
            event_limit,
            gzip_ratio_limit,
        }
    }

    /// Marks the start of a new XML event for the size ceiling.
    pub(crate) fn start_event(&mut self) {
        self.event_start = self.consumed;
    }

    /// Stops hashing and returns the lower-case hex SHA-1 of everything consumed so far.
    pub(crate) fn finish_hash(&mut self) -> Option<String> {
        self.hasher.take().map(BackgroundDigest::finish)
    }
}

impl<R: BufRead> Read for Tracked<R> {
    fn read(&mut self, buf: &mut [u8]) -> io::Result<usize> {
        let available = self.fill_buf()?;
        let n = available.len().min(buf.len());
        buf[..n].copy_from_slice(&available[..n]);
        self.consume(n);
        Ok(n)
    }
}

impl<R: BufRead> BufRead for Tracked<R> {
    fn fill_buf(&mut self) -> io::Result<&[u8]> {
        if self.consumed - self.event_start > self.event_limit {
            return Err(io::Error::other(EventTooLarge(self.event_limit)));
        }
        if self.consumed > GZIP_RATIO_CHECK_AFTER {
            if let Some(compressed) = self.inner.compressed_bytes() {
                let ratio = self.consumed / compressed.max(1);
                if ratio > self.gzip_ratio_limit {
                    let limit = self.gzip_ratio_limit;
                    return Err(io::Error::other(GzipRatioTooLarge { ratio, limit }));
                }
            }
        }
        self.inner.fill_buf()
    }

    fn consume(&mut self, amt: usize) {
        if let Some(h) = &mut self.hasher {
            if let Ok(buf) = self.inner.fill_buf() {
                h.update(&buf[..amt.min(buf.len())]);
            }
        }
        self.consumed += amt as u64;
        self.inner.consume(amt);
    }
}
