//! Decode-path benchmark for one typical spectrum: 20,000 points, 64-bit m/z and 32-bit
//! intensity, both zlib-compressed, as mzML stores them (base64 text).
//!
//! Compares the candidate decoders for each step and in combination:
//! - base64: the `base64` crate vs `base64-simd`;
//! - inflate: flate2 with its default backend (miniz_oxide), zlib-rs (the backend flate2 uses
//!   with its `zlib-rs` feature, called directly because one build can hold only one flate2
//!   backend), and libdeflate through `libdeflater` (whole-buffer, the output size known);
//! - mzcore's `binary::bare_decode` (base64 + inflate only) and `binary::decode_into` (down to
//!   `f64` values), which use the chosen combination.
//!
//! Every throughput is counted in base64 input bytes of the spectrum (both arrays), so the
//! figures of all groups are comparable. Run: `cargo bench --bench codecs`.
//!
//! Time is the benchmark thread's CPU time (`CLOCK_THREAD_CPUTIME_ID`, through `cpu-time`)
//! where available, so that other processes on a shared machine do not skew the ratios; set
//! `CODECS_WALL_CLOCK=1` to measure wall-clock time instead (also the fallback elsewhere).

// criterion_group! generates an undocumented `pub fn`.
#![allow(missing_docs)]

use std::hint::black_box;
use std::io::Read;

use base64::Engine;
use criterion::measurement::{Measurement, ValueFormatter, WallTime};
use criterion::{Criterion, Throughput, criterion_group, criterion_main};
use mzcore::mzml::binary::{self, BinaryEncoding, Compression, NumericType};

const POINTS: usize = 20_000;

/// CPU time of the calling thread in nanoseconds (`clock_gettime(CLOCK_THREAD_CPUTIME_ID)`).
fn thread_cpu_ns() -> Option<u64> {
    cpu_time::ThreadTime::try_now().ok().map(|t| t.as_duration().as_nanos() as u64)
}

/// Criterion measurement of thread CPU time, falling back to wall-clock time.
struct CpuTime {
    cpu: bool,
}

impl CpuTime {
    fn new() -> Self {
        let wall = std::env::var_os("CODECS_WALL_CLOCK").is_some_and(|v| v != "0");
        CpuTime { cpu: !wall && thread_cpu_ns().is_some() }
    }
}

static WALL: WallTime = WallTime;

impl Measurement for CpuTime {
    type Intermediate = (u64, std::time::Instant);
    type Value = u64;

    fn start(&self) -> Self::Intermediate {
        (if self.cpu { thread_cpu_ns().unwrap_or(0) } else { 0 }, std::time::Instant::now())
    }

    fn end(&self, (cpu, wall): Self::Intermediate) -> u64 {
        if self.cpu {
            thread_cpu_ns().unwrap_or(cpu).saturating_sub(cpu)
        } else {
            wall.elapsed().as_nanos() as u64
        }
    }

    fn add(&self, a: &u64, b: &u64) -> u64 {
        a + b
    }

    fn zero(&self) -> u64 {
        0
    }

    fn to_f64(&self, v: &u64) -> f64 {
        *v as f64
    }

    fn formatter(&self) -> &dyn ValueFormatter {
        // Values are nanoseconds, as with wall time, so its formatting applies unchanged.
        WALL.formatter()
    }
}

/// Deterministic pseudo-random numbers in [0, 1) (64-bit LCG, Knuth's MMIX constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

/// A profile-like spectrum: m/z on a slowly widening grid, intensity noise plus peaks.
fn spectrum() -> (Vec<f64>, Vec<f64>) {
    let mut rng = Lcg(42);
    let mut mz = Vec::with_capacity(POINTS);
    let mut x: f64 = 150.0;
    for _ in 0..POINTS {
        mz.push(x);
        x += 0.004 + 0.00003 * (x - 150.0).sqrt() + 0.0002 * rng.next();
    }
    let mut intensity = vec![0.0; POINTS];
    for v in intensity.iter_mut() {
        *v = (200.0 * rng.next()).floor();
    }
    for _ in 0..300 {
        let centre = (rng.next() * POINTS as f64) as usize;
        let height = 1.0e3 + 1.0e6 * rng.next().powi(3);
        for d in 0..12usize {
            let w = (-((d as f64) / 3.0).powi(2)).exp() * height;
            for i in [centre.saturating_sub(d), (centre + d).min(POINTS - 1)] {
                intensity[i] += w;
            }
        }
    }
    (mz, intensity)
}

/// Base64 text and decoded size of each array.
struct Payload {
    text: String,
    raw_zlib: Vec<u8>,
    encoding: BinaryEncoding,
    decoded_bytes: usize,
}

fn payloads() -> Vec<Payload> {
    let (mz, intensity) = spectrum();
    [(mz, NumericType::F64), (intensity, NumericType::F32)]
        .into_iter()
        .map(|(values, numeric)| {
            let encoding = BinaryEncoding { numeric, compression: Compression::Zlib };
            let text = binary::encode(&values, encoding);
            let raw_zlib = base64::engine::general_purpose::STANDARD.decode(&text).unwrap();
            Payload { text, raw_zlib, encoding, decoded_bytes: values.len() * numeric.width() }
        })
        .collect()
}

fn base64_crate(text: &[u8], buf: &mut Vec<u8>) -> usize {
    buf.clear();
    base64::engine::general_purpose::STANDARD.decode_vec(text, buf).unwrap();
    buf.len()
}

fn base64_simd(text: &[u8], buf: &mut Vec<u8>) -> usize {
    buf.clear();
    base64_simd::STANDARD.decode_append(text, buf).unwrap();
    buf.len()
}

/// flate2 (miniz_oxide) through its whole-buffer API into a buffer of the known size.
fn flate2_miniz(input: &[u8], out: &mut [u8], state: &mut flate2::Decompress) -> usize {
    state.reset(true);
    state.decompress(input, out, flate2::FlushDecompress::Finish).unwrap();
    state.total_out() as usize
}

/// flate2 (miniz_oxide) through `Read::read_to_end` into a fresh `Vec`: the reader's former path.
fn flate2_read_to_end(input: &[u8], size_hint: usize) -> usize {
    let mut out = Vec::with_capacity(size_hint);
    flate2::read::ZlibDecoder::new(input).read_to_end(&mut out).unwrap();
    out.len()
}

fn zlib_rs(input: &[u8], out: &mut [u8]) -> usize {
    let (decoded, rc) = zlib_rs::decompress_slice(out, input, zlib_rs::InflateConfig::default());
    assert_eq!(rc, zlib_rs::ReturnCode::Ok);
    decoded.len()
}

fn libdeflate(input: &[u8], out: &mut [u8], d: &mut libdeflater::Decompressor) -> usize {
    d.zlib_decompress(input, out).unwrap()
}

fn bench(c: &mut Criterion<CpuTime>) {
    let payloads = payloads();
    let text_bytes: usize = payloads.iter().map(|p| p.text.len()).sum();
    let max_decoded = payloads.iter().map(|p| p.decoded_bytes).max().unwrap();
    eprintln!(
        "spectrum: {POINTS} points, base64 {text_bytes} bytes, zlib {} bytes, decoded {} bytes",
        payloads.iter().map(|p| p.raw_zlib.len()).sum::<usize>(),
        payloads.iter().map(|p| p.decoded_bytes).sum::<usize>()
    );

    let mut g = c.benchmark_group("codecs");
    g.throughput(Throughput::Bytes(text_bytes as u64));
    g.warm_up_time(std::time::Duration::from_secs(1));
    g.measurement_time(std::time::Duration::from_secs(5));

    let mut buf = Vec::new();
    g.bench_function("base64/base64-0.22", |b| {
        b.iter(|| payloads.iter().map(|p| base64_crate(p.text.as_bytes(), &mut buf)).sum::<usize>())
    });
    g.bench_function("base64/base64-simd-0.8", |b| {
        b.iter(|| payloads.iter().map(|p| base64_simd(p.text.as_bytes(), &mut buf)).sum::<usize>())
    });

    let mut out = vec![0u8; max_decoded];
    let mut miniz = flate2::Decompress::new(true);
    g.bench_function("inflate/flate2-miniz_oxide", |b| {
        b.iter(|| {
            payloads.iter().map(|p| flate2_miniz(&p.raw_zlib, &mut out, &mut miniz)).sum::<usize>()
        })
    });
    g.bench_function("inflate/flate2-miniz_oxide-read_to_end", |b| {
        b.iter(|| {
            payloads.iter().map(|p| flate2_read_to_end(&p.raw_zlib, p.decoded_bytes)).sum::<usize>()
        })
    });
    g.bench_function("inflate/zlib-rs", |b| {
        b.iter(|| payloads.iter().map(|p| zlib_rs(&p.raw_zlib, &mut out)).sum::<usize>())
    });
    let mut ld = libdeflater::Decompressor::new();
    g.bench_function("inflate/libdeflater", |b| {
        b.iter(|| {
            payloads.iter().map(|p| libdeflate(&p.raw_zlib, &mut out, &mut ld)).sum::<usize>()
        })
    });

    // Both steps together, each base64 decoder with each inflater.
    type B64 = fn(&[u8], &mut Vec<u8>) -> usize;
    for (b64_name, b64) in [("base64-0.22", base64_crate as B64), ("base64-simd-0.8", base64_simd)]
    {
        g.bench_function(format!("both/{b64_name}+flate2-miniz_oxide"), |b| {
            b.iter(|| {
                payloads
                    .iter()
                    .map(|p| {
                        b64(p.text.as_bytes(), &mut buf);
                        flate2_miniz(&buf, &mut out, &mut miniz)
                    })
                    .sum::<usize>()
            })
        });
        g.bench_function(format!("both/{b64_name}+zlib-rs"), |b| {
            b.iter(|| {
                payloads
                    .iter()
                    .map(|p| {
                        b64(p.text.as_bytes(), &mut buf);
                        zlib_rs(&buf, &mut out)
                    })
                    .sum::<usize>()
            })
        });
        g.bench_function(format!("both/{b64_name}+libdeflater"), |b| {
            b.iter(|| {
                payloads
                    .iter()
                    .map(|p| {
                        b64(p.text.as_bytes(), &mut buf);
                        libdeflate(&buf, &mut out, &mut ld)
                    })
                    .sum::<usize>()
            })
        });
    }

    let (mut scratch, mut bytes) = (Vec::new(), Vec::new());
    g.bench_function("mzcore/bare_decode", |b| {
        b.iter(|| {
            payloads
                .iter()
                .map(|p| {
                    binary::bare_decode(
                        black_box(p.text.as_bytes()),
                        true,
                        &mut scratch,
                        &mut bytes,
                    )
                    .unwrap()
                })
                .sum::<usize>()
        })
    });
    let mut values = Vec::new();
    g.bench_function("mzcore/decode_into", |b| {
        b.iter(|| {
            for p in &payloads {
                binary::decode_into(black_box(p.text.as_bytes()), p.encoding, POINTS, &mut values)
                    .unwrap();
            }
            values.len()
        })
    });
    g.finish();
}

fn config() -> Criterion<CpuTime> {
    let m = CpuTime::new();
    eprintln!("measuring {}", if m.cpu { "thread CPU time" } else { "wall-clock time" });
    Criterion::default().with_measurement(m)
}

criterion_group! {
    name = benches;
    config = config();
    targets = bench
}
criterion_main!(benches);
