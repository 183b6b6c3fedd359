//! Reading and writing mzML 1.1 (HUPO-PSI; Martens et al., Mol. Cell. Proteomics 10(1),
//! R110.000133, 2011).
//!
//! - [`Reader`]: streaming, constant-memory reader over any `BufRead` (plain or gzip);
//! - [`IndexedReader`]: random access by id or index in seekable indexed files;
//! - [`Writer`]: indexed or plain mzML with any array encoding;
//! - [`CentroidedWriter`]: the centroided copy of an acquisition (picked peaks, metadata kept);
//! - [`binary`]: array encodings; [`cv`]: the PSI-MS terms used.

pub mod binary;
mod centroided;
pub mod cv;
mod indexed;
pub mod numpress;
mod reader;
mod writer;

pub use centroided::{
    CUSTOM_SOFTWARE, CentroidedArrays, CentroidedEncoding, CentroidedSummary, CentroidedWriter,
    MZML_FORMAT, PASSED_PROCESSING, PEAK_PICKING, PICKED_PROCESSING, SHA256, SourceFile,
};
pub use indexed::IndexedReader;
pub use reader::{ChecksumStatus, INTERPRETED_TERMS, Reader, ReaderOptions};
pub use writer::{EncodedPeaks, Writer, WriterOptions};
