//! `mzcore`: the library behind `mzsift`.
//!
//! Data flows through these types:
//!
//! - [`mzml::Reader`] streams a document (plain or gzip, any `BufRead`) and hands out
//!   [`spectrum::Spectrum`]s: metadata plus arrays still encoded as base64 text, so that the
//!   expensive part, [`spectrum::Spectrum::decode`], can run on worker threads;
//! - [`spectrum::Peaks`] are the decoded m/z and intensity arrays;
//! - [`mzml::IndexedReader`] reads single spectra of indexed files at random;
//! - [`mzml::Writer`] writes indexed or plain mzML with any supported encoding;
//! - [`screen::screen_file`] screens one file end to end into a [`screen::FileReport`], and
//!   [`qc::QcRules`] evaluates a QC gate on it;
//! - [`mzqc`] turns a report into mzQC 1.0.0 quality metrics, and
//!   [`mzml::CentroidedWriter`] writes the centroided copy of an acquisition;
//! - [`Error`] carries an [`ErrorKind`] and a [`Position`] (byte offset, spectrum index and id).
//!
//! # Example
//!
//! ```
//! use mzcore::mzml::{Reader, Writer, WriterOptions};
//! use mzcore::spectrum::{Peaks, SpectrumMeta};
//!
//! let mut w = Writer::new(Vec::new(), WriterOptions { spectrum_count: 2, ..Default::default() })?;
//! for (i, mz) in [[120.0, 121.0], [240.0, 242.0]].into_iter().enumerate() {
//!     let meta = SpectrumMeta { id: format!("scan={}", i + 1), ms_level: 1, ..Default::default() };
//!     w.write_spectrum(&meta, &Peaks { mz: mz.to_vec(), intensity: vec![3.0, 1.0] })?;
//! }
//! let doc = w.finish()?;
//!
//! let mut total_points = 0;
//! for spectrum in Reader::new(&doc[..])? {
//!     total_points += spectrum?.decode()?.len();
//! }
//! assert_eq!(total_points, 4);
//! # Ok::<_, mzcore::Error>(())
//! ```

pub mod centroid;
pub mod chem;
pub mod compound;
pub mod error;
pub mod feature;
pub mod flag;
pub mod hash;
pub mod mzml;
pub mod mzqc;
pub mod pipeline;
pub mod qc;
pub mod report;
pub mod screen;
pub mod spectrum;
pub mod synth;

pub use error::{Error, ErrorKind, Position, Result};
