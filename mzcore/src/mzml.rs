//! Reading and writing mzML 1.1 (HUPO-PSI; Martens et al., Mol. Cell. Proteomics 10(1),
//! R110.000133, 2011).
//!
//! - [`Reader`]: streaming, constant-memory reader over any `BufRead` (plain or gzip);
//! - [`IndexedReader`]: random access by id or index in seekable indexed files;
//! - [`Writer`]: indexed or plain mzML with any array encoding;
//! - [`binary`]: array encodings; [`cv`]: the PSI-MS terms used.

pub mod binary;
pub mod cv;
mod indexed;
pub mod numpress;
mod reader;
mod writer;

pub use indexed::IndexedReader;
pub use reader::{ChecksumStatus, INDEX_SEARCH_BYTES, INTERPRETED_TERMS, Reader, ReaderOptions};
pub use writer::{EncodedPeaks, Writer, WriterOptions};
