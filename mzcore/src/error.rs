//! The crate's error type: what went wrong, and where.
//!
//! Every error carries a [`Position`] (byte offset in the decompressed stream, spectrum index
//! and native id, and the field being read) that `Display` shows before the cause, so a message
//! names exactly the place to look at.

use std::fmt;

/// Where in an input an error happened. Every part is optional: fill in what is known.
#[derive(Debug, Clone, Default, PartialEq, Eq)]
pub struct Position {
    /// Byte offset in the (decompressed) document.
    pub byte_offset: Option<u64>,
    /// Zero-based index of the spectrum in file order.
    pub spectrum_index: Option<usize>,
    /// Native id of the spectrum.
    pub spectrum_id: Option<String>,
    /// The element, attribute or field being read (e.g. `binaryDataArray`, `formula`).
    pub field: Option<String>,
}

impl Position {
    /// A position at a byte offset.
    pub fn at_byte(offset: u64) -> Self {
        Position { byte_offset: Some(offset), ..Position::default() }
    }

    /// True when nothing is known about the position.
    pub fn is_empty(&self) -> bool {
        self.byte_offset.is_none()
            && self.spectrum_index.is_none()
            && self.spectrum_id.is_none()
            && self.field.is_none()
    }
}

impl fmt::Display for Position {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        let mut parts: Vec<String> = Vec::new();
        match (self.spectrum_index, &self.spectrum_id) {
            (Some(i), Some(id)) => parts.push(format!("spectrum {i} (id '{id}')")),
            (Some(i), None) => parts.push(format!("spectrum {i}")),
            (None, Some(id)) => parts.push(format!("spectrum id '{id}'")),
            (None, None) => {}
        }
        if let Some(b) = self.byte_offset {
            parts.push(format!("byte {b}"));
        }
        if let Some(field) = &self.field {
            parts.push(field.clone());
        }
        f.write_str(&parts.join(", "))
    }
}

/// The end of an `IndexMismatch` message: where the element really is, if it was found.
fn found_at(actual: u64) -> String {
    if actual == u64::MAX {
        "no spectrum with that id was found there".to_owned()
    } else {
        format!("the element starts at {actual}")
    }
}

/// What went wrong. New kinds may be added in any release.
#[derive(Debug, thiserror::Error)]
#[non_exhaustive]
pub enum ErrorKind {
    /// Reading or writing failed at the operating-system level.
    #[error("I/O error: {0}")]
    Io(#[from] std::io::Error),
    /// The document is not well-formed XML (or not XML at all).
    #[error("XML syntax error: {0}")]
    Xml(String),
    /// The input is well-formed but is not an mzML document.
    #[error("not an mzML document: {0}")]
    NotMzml(String),
    /// A required attribute is missing from an element.
    #[error("element <{element}> lacks required attribute '{attribute}'")]
    MissingAttribute {
        /// Element name.
        element: String,
        /// Attribute name.
        attribute: String,
    },
    /// A required controlled-vocabulary parameter is missing.
    #[error("missing cvParam: {0}")]
    MissingCvParam(String),
    /// A CV accession the reader does not know how to handle where one is required.
    #[error("unsupported {what} accession {accession}")]
    UnsupportedAccession {
        /// What the accession was meant to describe (e.g. "compression").
        what: String,
        /// The accession found.
        accession: String,
    },
    /// An attribute or parameter value could not be parsed.
    #[error("invalid value '{value}' for {field}")]
    InvalidValue {
        /// Field name.
        field: String,
        /// The offending text (possibly shortened).
        value: String,
    },
    /// Base64 text could not be decoded.
    #[error("invalid base64: {0}")]
    Base64(String),
    /// A zlib stream could not be inflated.
    #[error("invalid zlib stream: {0}")]
    Inflate(String),
    /// An MS-Numpress stream could not be decoded.
    #[error("invalid MS-Numpress data: {0}")]
    Numpress(String),
    /// A decoded array or the base64 text does not have its declared length.
    #[error("{what}: declared {declared}, found {found}")]
    LengthMismatch {
        /// Which length (e.g. "array length", "encodedLength").
        what: String,
        /// Declared length.
        declared: usize,
        /// Length found.
        found: usize,
    },
    /// Two spectra share a native id.
    #[error("duplicate spectrum id '{0}'")]
    DuplicateId(String),
    /// The index of an indexed mzML points somewhere other than where the element is.
    #[error("index offset for '{id}' is {indexed} but {}", found_at(*actual))]
    IndexMismatch {
        /// Native id.
        id: String,
        /// Offset in the index.
        indexed: u64,
        /// Actual offset (or `u64::MAX` when the element was not found there).
        actual: u64,
    },
    /// The SHA-1 `fileChecksum` does not match the file contents.
    #[error("fileChecksum mismatch: file says {stored}, contents hash to {computed}")]
    ChecksumMismatch {
        /// Checksum stored in the file.
        stored: String,
        /// Checksum computed over the file.
        computed: String,
    },
    /// The input ended in the middle of the document.
    #[error("file truncated: {complete_spectra} complete spectra before the cut")]
    Truncated {
        /// Number of spectra that were complete before the end of input.
        complete_spectra: usize,
    },
    /// A configured resource limit was exceeded (sizes of elements, arrays, nesting depth).
    #[error("limit exceeded: {what} is {found}, limit {limit}")]
    LimitExceeded {
        /// What was too large.
        what: String,
        /// Value found (or declared).
        found: u64,
        /// The limit in force.
        limit: u64,
    },
    /// The requested spectrum does not exist.
    #[error("no spectrum {0}")]
    NotFound(String),
    /// A chemical formula or ion type could not be parsed.
    #[error("invalid {what} '{text}' at character {at}: {reason}")]
    Parse {
        /// What was being parsed ("formula", "ion type").
        what: String,
        /// The input text.
        text: String,
        /// Zero-based character position.
        at: usize,
        /// Why it failed.
        reason: String,
    },
    /// The input is another format, or a draft or older version of mzML, that is not read:
    /// the message says which and what to do (e.g. `mzML 0.99.1 is a pre-release draft;
    /// convert to mzML 1.1`).
    #[error("{0}")]
    UnsupportedFormat(String),
    /// A configuration or scenario file is invalid.
    #[error("invalid configuration: {0}")]
    Config(String),
}

/// The error type of `mzcore`: an [`ErrorKind`] and the [`Position`] where it happened.
#[derive(Debug)]
pub struct Error {
    kind: Box<ErrorKind>,
    position: Position,
}

impl Error {
    /// An error of `kind` with no known position.
    pub fn new(kind: ErrorKind) -> Self {
        Error { kind: Box::new(kind), position: Position::default() }
    }

    /// An error of `kind` at `position`.
    pub fn at(kind: ErrorKind, position: Position) -> Self {
        Error { kind: Box::new(kind), position }
    }

    /// What went wrong.
    pub fn kind(&self) -> &ErrorKind {
        &self.kind
    }

    /// Where it went wrong.
    pub fn position(&self) -> &Position {
        &self.position
    }

    /// Mutable access to the position, to add context while the error travels up.
    pub fn position_mut(&mut self) -> &mut Position {
        &mut self.position
    }

    /// Sets the spectrum index and id where they are not set yet.
    pub fn in_spectrum(mut self, index: usize, id: &str) -> Self {
        self.position.spectrum_index.get_or_insert(index);
        if self.position.spectrum_id.is_none() {
            self.position.spectrum_id = Some(id.to_owned());
        }
        self
    }

    /// Sets the byte offset where it is not set yet.
    pub fn at_byte(mut self, offset: u64) -> Self {
        self.position.byte_offset.get_or_insert(offset);
        self
    }

    /// Sets the field where it is not set yet.
    pub fn in_field(mut self, field: &str) -> Self {
        if self.position.field.is_none() {
            self.position.field = Some(field.to_owned());
        }
        self
    }
}

impl fmt::Display for Error {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.position.is_empty() {
            write!(f, "{}", self.kind)
        } else {
            write!(f, "{}: {}", self.position, self.kind)
        }
    }
}

impl std::error::Error for Error {
    fn source(&self) -> Option<&(dyn std::error::Error + 'static)> {
        match &*self.kind {
            ErrorKind::Io(e) => Some(e),
            _ => None,
        }
    }
}

impl From<ErrorKind> for Error {
    fn from(kind: ErrorKind) -> Self {
        Error::new(kind)
    }
}

impl From<std::io::Error> for Error {
    fn from(e: std::io::Error) -> Self {
        Error::new(ErrorKind::Io(e))
    }
}

/// Something odd about an input that costs no data: it is reported, the input is still read
/// in full (e.g. index offsets a few bytes off, found by a bounded search).
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Warning {
    /// Where it was noticed.
    pub position: Position,
    /// What was noticed and what the reader did about it.
    pub message: String,
}

impl Warning {
    /// A warning at `position`.
    pub fn at(message: impl Into<String>, position: Position) -> Self {
        Warning { position, message: message.into() }
    }
}

impl fmt::Display for Warning {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.position.is_empty() {
            write!(f, "warning: {}", self.message)
        } else {
            write!(f, "{}: warning: {}", self.position, self.message)
        }
    }
}

/// Result type of `mzcore`.
pub type Result<T, E = Error> = std::result::Result<T, E>;

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn display_names_spectrum_offset_and_field() {
        let e = Error::new(ErrorKind::Base64("bad symbol".into()))
            .in_spectrum(3, "scan=4")
            .at_byte(1200)
            .in_field("binary");
        assert_eq!(
            e.to_string(),
            "spectrum 3 (id 'scan=4'), byte 1200, binary: invalid base64: bad symbol"
        );
    }

    #[test]
    fn display_without_position_is_the_cause_alone() {
        let e = Error::new(ErrorKind::NotFound("7".into()));
        assert_eq!(e.to_string(), "no spectrum 7");
    }
}
