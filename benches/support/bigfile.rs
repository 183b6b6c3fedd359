//! Writes large profile-like mzML files for benchmarks and memory measurements.
//!
//! Shared by `benches/reader.rs` and `mzcore/examples/bench_file.rs` through `#[path]`.

use std::io::BufWriter;
use std::path::{Path, PathBuf};

use mzcore::mzml::binary::{BinaryEncoding, Compression, NumericType};
use mzcore::mzml::{Writer, WriterOptions};
use mzcore::spectrum::{Peaks, Polarity, Representation, SpectrumMeta};

/// Points per spectrum, as the reader benchmark prescribes.
pub const POINTS: usize = 20_000;

/// Deterministic pseudo-random numbers in [0, 1) (64-bit LCG, Knuth's MMIX constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// One profile-like spectrum: m/z on a jittered grid, noisy baseline with a few peaks.
fn spectrum(rng: &mut Lcg, peaks: &mut Peaks) {
    peaks.mz.clear();
    peaks.intensity.clear();
    let mut mz = 100.0;
    for i in 0..POINTS {
        mz += 0.04 + 0.002 * rng.next();
        let peak =
            if i % 400 < 8 { 1e5 * (1.0 - ((i % 400) as f64 - 4.0).abs() / 4.0) } else { 0.0 };
        peaks.mz.push(mz);
        peaks.intensity.push((200.0 + 50.0 * rng.next() + peak).round());
    }
}

/// Writes an indexed mzML of about `megabytes` MB (zlib, 64-bit m/z, 32-bit intensity,
/// 20,000 points per spectrum) to `path` and returns its size in bytes.
pub fn write(path: &Path, megabytes: u64) -> std::io::Result<u64> {
    // About 204 kB of base64 per spectrum with this data.
    let spectra = ((megabytes * 1_000_000) / 204_000).max(1) as usize;
    let options = WriterOptions {
        spectrum_count: spectra,
        mz_encoding: BinaryEncoding { numeric: NumericType::F64, compression: Compression::Zlib },
        intensity_encoding: BinaryEncoding {
            numeric: NumericType::F32,
            compression: Compression::Zlib,
        },
        // Every <binary> of the file is then a zlib array, as the bare-work baseline assumes.
        tic_chromatogram: false,
        ..WriterOptions::default()
    };
    let file = BufWriter::with_capacity(1 << 20, std::fs::File::create(path)?);
    let mut w = Writer::new(file, options).map_err(std::io::Error::other)?;
    let mut rng = Lcg(7);
    let mut peaks = Peaks::default();
    for i in 0..spectra {
        spectrum(&mut rng, &mut peaks);
        let meta = SpectrumMeta {
            id: format!("scan={}", i + 1),
            ms_level: 1,
            polarity: Polarity::Positive,
            representation: Representation::Profile,
            rt_min: Some(i as f64 * 0.01),
            ..SpectrumMeta::default()
        };
        w.write_spectrum(&meta, &peaks).map_err(std::io::Error::other)?;
    }
    w.finish().map_err(std::io::Error::other)?;
    Ok(std::fs::metadata(path)?.len())
}

/// A cached benchmark file of about `megabytes` MB under `target/bench-data/`.
pub fn cached(megabytes: u64) -> PathBuf {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../target/bench-data");
    std::fs::create_dir_all(&dir).expect("create target/bench-data");
    let path = dir.join(format!("profile-{megabytes}mb.mzML"));
    if !path.exists() {
        let tmp = path.with_extension("tmp");
        write(&tmp, megabytes).expect("write benchmark file");
        std::fs::rename(&tmp, &path).expect("rename benchmark file");
    }
    path
}
