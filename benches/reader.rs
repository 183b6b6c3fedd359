//! Reader throughput on a generated 200 MB file (zlib, 64-bit m/z, 32-bit intensity, 20,000
//! points per spectrum), one thread, beside the bare work on the same bytes.
//!
//! - `bare_work`: read the file, find every `<binary>` with memchr, base64-decode it and
//!   inflate it (when its cvParams name zlib) with the same decoders the reader uses (`binary::bare_decode`); no XML.
//! - `reader_decode_all`: `mzml::Reader` over the file, every spectrum decoded to `f64` m/z and
//!   intensity (`Spectrum::decode_into`, buffers reused).
//!
//! Throughput is in file bytes. Goal: reader at 80 % or more of bare_work's MB/s.
//! Run: `cargo bench --bench reader` (the file is cached in target/bench-data/); set
//! `MZSIFT_BENCH_FILE` to measure another all-zlib file.

// criterion_group! generates an undocumented `pub fn`.
#![allow(missing_docs)]

#[path = "support/bigfile.rs"]
mod bigfile;

use std::hint::black_box;
use std::io::Read;

use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use mzcore::mzml::Reader;
use mzcore::mzml::binary;
use mzcore::spectrum::{Peaks, Spectrum};

fn bare_work(path: &std::path::Path) -> usize {
    let mut file = std::fs::File::open(path).unwrap();
    let mut chunk = vec![0u8; 1 << 20];
    let mut pending: Vec<u8> = Vec::with_capacity(4 << 20);
    let (mut scratch, mut out) = (Vec::new(), Vec::new());
    let mut total = 0;
    let open = memchr::memmem::Finder::new(b"<binary>");
    let close = memchr::memmem::Finder::new(b"</binary>");
    let zlib_name = memchr::memmem::Finder::new(b"zlib compression");
    loop {
        let n = file.read(&mut chunk).unwrap();
        if n == 0 {
            break;
        }
        pending.extend_from_slice(&chunk[..n]);
        let mut start = 0;
        while let Some(a) = open.find(&pending[start..]) {
            let text_at = start + a + 8;
            let Some(b) = close.find(&pending[text_at..]) else { break };
            // Inflate when the array's cvParams (between the previous </binary> and this
            // <binary>) name a zlib compression; base64 only otherwise.
            let zlib = zlib_name.find(&pending[start..text_at]).is_some();
            total +=
                binary::bare_decode(&pending[text_at..text_at + b], zlib, &mut scratch, &mut out)
                    .unwrap();
            start = text_at + b + 9;
        }
        pending.drain(..start);
    }
    total
}

fn reader_decode_all(path: &std::path::Path) -> usize {
    let mut reader = Reader::from_path(path).unwrap();
    let mut s = Spectrum::default();
    let mut p = Peaks::default();
    let mut total = 0;
    while reader.read_spectrum(&mut s).unwrap() {
        s.decode_into(&mut p).unwrap();
        total += p.len();
    }
    total
}

fn bench(c: &mut Criterion) {
    // MZSIFT_BENCH_FILE points the bench at another file whose every <binary> is zlib
    // (e.g. a `mzsift demo --spectra N --points M` output); default: the generated 200 MB one.
    let path =
        std::env::var_os("MZSIFT_BENCH_FILE").map_or_else(|| bigfile::cached(200), Into::into);
    let bytes = std::fs::metadata(&path).unwrap().len();
    let mut g = c.benchmark_group("reader_200mb");
    g.sample_size(10);
    g.throughput(Throughput::Bytes(bytes));
    g.bench_function("bare_work", |b| b.iter(|| black_box(bare_work(&path))));
    g.bench_function("reader_decode_all", |b| b.iter(|| black_box(reader_decode_all(&path))));
    g.finish();
}

criterion_group!(benches, bench);
criterion_main!(benches);
