//! Binary data arrays: numeric types, compressions, and base64 decoding and encoding.
//!
//! mzML 1.1.0 (section "binaryDataArray") stores every array as base64 text of little-endian
//! values, optionally zlib-compressed or MS-Numpress-encoded (Teleman et al., Mol. Cell.
//! Proteomics 13(6), 1537-1542, 2014), each possibly followed by zlib.

use std::cell::RefCell;

use base64::Engine;
use base64::engine::general_purpose::STANDARD;

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::numpress;
use libdeflater::{DecompressionError, Decompressor};

/// Numeric type of the values in a binary array.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, serde::Serialize)]
pub enum NumericType {
    /// MS:1000521 32-bit float.
    F32,
    /// MS:1000523 64-bit float.
    #[default]
    F64,
    /// MS:1000519 32-bit integer.
    I32,
    /// MS:1000522 64-bit integer.
    I64,
}

impl NumericType {
    /// Size of one value in bytes.
    pub fn width(self) -> usize {
        match self {
            NumericType::F32 | NumericType::I32 => 4,
            NumericType::F64 | NumericType::I64 => 8,
        }
    }

    /// The PSI-MS accession and name of this type.
    pub fn cv(self) -> (&'static str, &'static str) {
        match self {
            NumericType::F32 => ("MS:1000521", "32-bit float"),
            NumericType::F64 => ("MS:1000523", "64-bit float"),
            NumericType::I32 => ("MS:1000519", "32-bit integer"),
            NumericType::I64 => ("MS:1000522", "64-bit integer"),
        }
    }

    /// The type for a PSI-MS accession, if it is a binary data type.
    pub fn from_accession(acc: &str) -> Option<Self> {
        [NumericType::F32, NumericType::F64, NumericType::I32, NumericType::I64]
            .into_iter()
            .find(|t| t.cv().0 == acc)
    }
}

/// Compression of a binary array.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, serde::Serialize)]
pub enum Compression {
    /// MS:1000576 no compression.
    #[default]
    None,
    /// MS:1000574 zlib compression.
    Zlib,
    /// MS:1002312 MS-Numpress linear prediction compression.
    NumpressLinear,
    /// MS:1002313 MS-Numpress positive integer compression.
    NumpressPic,
    /// MS:1002314 MS-Numpress short logged float compression.
    NumpressSlof,
    /// MS:1002746 MS-Numpress linear prediction compression followed by zlib compression.
    NumpressLinearZlib,
    /// MS:1002747 MS-Numpress positive integer compression followed by zlib compression.
    NumpressPicZlib,
    /// MS:1002748 MS-Numpress short logged float compression followed by zlib compression.
    NumpressSlofZlib,
}

impl Compression {
    /// Every compression this crate reads and writes.
    pub const ALL: [Compression; 8] = [
        Compression::None,
        Compression::Zlib,
        Compression::NumpressLinear,
        Compression::NumpressPic,
        Compression::NumpressSlof,
        Compression::NumpressLinearZlib,
        Compression::NumpressPicZlib,
        Compression::NumpressSlofZlib,
    ];

    /// The PSI-MS accession and name of this compression.
    pub fn cv(self) -> (&'static str, &'static str) {
        match self {
            Compression::None => ("MS:1000576", "no compression"),
            Compression::Zlib => ("MS:1000574", "zlib compression"),
            Compression::NumpressLinear => {
                ("MS:1002312", "MS-Numpress linear prediction compression")
            }
            Compression::NumpressPic => ("MS:1002313", "MS-Numpress positive integer compression"),
            Compression::NumpressSlof => {
                ("MS:1002314", "MS-Numpress short logged float compression")
            }
            Compression::NumpressLinearZlib => (
                "MS:1002746",
                "MS-Numpress linear prediction compression followed by zlib compression",
            ),
            Compression::NumpressPicZlib => (
                "MS:1002747",
                "MS-Numpress positive integer compression followed by zlib compression",
            ),
            Compression::NumpressSlofZlib => (
                "MS:1002748",
                "MS-Numpress short logged float compression followed by zlib compression",
            ),
        }
    }

    /// The compression for a PSI-MS accession, if it is one of the compressions above.
    pub fn from_accession(acc: &str) -> Option<Self> {
        Compression::ALL.into_iter().find(|c| c.cv().0 == acc)
    }

    /// True when the bytes are zlib-compressed (as the last step).
    pub fn has_zlib(self) -> bool {
        matches!(
            self,
            Compression::Zlib
                | Compression::NumpressLinearZlib
                | Compression::NumpressPicZlib
                | Compression::NumpressSlofZlib
        )
    }

    /// True for the MS-Numpress codecs (with or without zlib).
    pub fn is_numpress(self) -> bool {
        !matches!(self, Compression::None | Compression::Zlib)
    }
}

/// Numeric type plus compression: everything needed to decode an array.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, Default, serde::Serialize)]
pub struct BinaryEncoding {
    /// Type of the values (ignored by MS-Numpress, which always decodes to 64-bit floats).
    pub numeric: NumericType,
    /// Compression.
    pub compression: Compression,
}

impl BinaryEncoding {
    /// A short human-readable label such as `f64+zlib` or `numpress-linear+zlib`.
    pub fn label(self) -> String {
        let ty = match self.numeric {
            NumericType::F32 => "f32",
            NumericType::F64 => "f64",
            NumericType::I32 => "i32",
            NumericType::I64 => "i64",
        };
        match self.compression {
            Compression::None => ty.to_owned(),
            Compression::Zlib => format!("{ty}+zlib"),
            Compression::NumpressLinear => "numpress-linear".into(),
            Compression::NumpressPic => "numpress-pic".into(),
            Compression::NumpressSlof => "numpress-slof".into(),
            Compression::NumpressLinearZlib => "numpress-linear+zlib".into(),
            Compression::NumpressPicZlib => "numpress-pic+zlib".into(),
            Compression::NumpressSlofZlib => "numpress-slof+zlib".into(),
        }
    }
}

/// Decodes base64 text (no whitespace) with `encoding` into `out`, which is cleared first.
///
/// `expected_len` is the declared number of values; a different count is an error
/// ([`ErrorKind::LengthMismatch`]). The intermediate bytes live in per-thread buffers that are
/// reused from call to call, so decoding spectrum after spectrum allocates only when an array
/// is larger than any before it. A declared length the input cannot possibly reach (a zlib
/// stream inflates to at most [`MAX_INFLATE_RATIO`] times its size) allocates nothing extra.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::binary::{decode_into, encode, BinaryEncoding, Compression, NumericType};
/// let enc = BinaryEncoding { numeric: NumericType::F64, compression: Compression::Zlib };
/// let text = encode(&[100.0, 200.5], enc);
/// let mut out = Vec::new();
/// decode_into(text.as_bytes(), enc, 2, &mut out)?;
/// assert_eq!(out, [100.0, 200.5]);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn decode_into(
    base64: &[u8],
    encoding: BinaryEncoding,
    expected_len: usize,
    out: &mut Vec<f64>,
) -> Result<()> {
    out.clear();
    if base64.is_empty() {
        return check_len(0, expected_len);
    }
    SCRATCH.with(|cell| match cell.try_borrow_mut() {
        Ok(mut scratch) => {
            let result = decode_with(&mut scratch, base64, encoding, expected_len, out);
            scratch.trim();
            result
        }
        // Only reachable if decoding ever re-entered itself; stay correct with fresh buffers.
        Err(_) => decode_with(&mut Scratch::default(), base64, encoding, expected_len, out),
    })
}

/// Base64-decodes one payload and, when `zlib`, inflates it: the bare work of decoding an
/// array, without interpreting the bytes.
///
/// The decoded bytes are `out[..n]` for the returned `n` (`out` may be longer: it is grown but
/// never shrunk or re-zeroed, so reusing it costs nothing). `scratch` receives the base64-decoded
/// bytes when `zlib` is set. Uses the same decoders as [`decode_into`]; benchmarks use it as the
/// baseline that the reader is compared with.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::binary::{bare_decode, encode, BinaryEncoding, Compression, NumericType};
/// let enc = BinaryEncoding { numeric: NumericType::F32, compression: Compression::Zlib };
/// let text = encode(&[1.0, 2.0, 3.0], enc);
/// let (mut scratch, mut out) = (Vec::new(), Vec::new());
/// let n = bare_decode(text.as_bytes(), true, &mut scratch, &mut out)?;
/// assert_eq!(n, 12);
/// assert_eq!(&out[..4], 1.0f32.to_le_bytes());
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn bare_decode(
    base64: &[u8],
    zlib: bool,
    scratch: &mut Vec<u8>,
    out: &mut Vec<u8>,
) -> Result<usize> {
    if !zlib {
        base64_decode(base64, out)?;
        return Ok(out.len());
    }
    base64_decode(base64, scratch)?;
    // Typical mzML arrays compress 1.2 to 3 times: start at 4 times, grow if needed.
    let guess = scratch.len().saturating_mul(4).max(out.len());
    INFLATER.with(|cell| match cell.try_borrow_mut() {
        Ok(mut inflater) => inflate_into(&mut inflater, scratch, guess, usize::MAX, out),
        Err(_) => inflate_into(&mut Decompressor::new(), scratch, guess, usize::MAX, out),
    })
}

/// The largest ratio of inflated to compressed size of a zlib stream.
///
/// Deflate (RFC 1951) codes at most 258 bytes per match in no fewer than 2 bits, so a stream
/// inflates to at most about 1032 times its size; the zlib wrapper (RFC 1950) only adds bytes.
pub const MAX_INFLATE_RATIO: usize = 1032;

/// Bytes a zlib stream may inflate to beyond what its declared array length needs, so that a
/// wrong declared length reports the true count (larger streams are refused unread).
pub const INFLATE_SLACK: usize = 16 << 20;

/// Per-thread buffers kept between calls of [`decode_into`] larger than this are released.
const KEEP_SCRATCH_BYTES: usize = 32 << 20;

/// Reusable per-thread buffers: base64-decoded bytes and inflated bytes.
#[derive(Default)]
struct Scratch {
    raw: Vec<u8>,
    inflated: Vec<u8>,
}

impl Scratch {
    /// Releases buffers that one unusually large array left behind.
    fn trim(&mut self) {
        for buf in [&mut self.raw, &mut self.inflated] {
            if buf.capacity() > KEEP_SCRATCH_BYTES {
                *buf = Vec::new();
            }
        }
    }
}

thread_local! {
    static SCRATCH: RefCell<Scratch> = RefCell::new(Scratch::default());
    static INFLATER: RefCell<Decompressor> = RefCell::new(Decompressor::new());
}

fn decode_with(
    scratch: &mut Scratch,
    base64: &[u8],
    encoding: BinaryEncoding,
    expected_len: usize,
    out: &mut Vec<f64>,
) -> Result<()> {
    base64_decode(base64, &mut scratch.raw)?;
    let bytes: &[u8] = if encoding.compression.has_zlib() {
        // The declared length bounds the inflated size: a stream that inflates far beyond it
        // is wrong whatever it holds, so a zlib bomb never allocates more than the declared
        // length needs (itself capped by `ReaderOptions::max_array_length`) or
        // `INFLATE_SLACK`, whichever is larger. Within the slack, a length mismatch still
        // reports the true count.
        let bound = decoded_size_bound(encoding, expected_len);
        let ceiling = bound.max(INFLATE_SLACK);
        let raw = &scratch.raw;
        let inflated = &mut scratch.inflated;
        let n = INFLATER.with(|cell| match cell.try_borrow_mut() {
            Ok(mut inflater) => inflate_into(&mut inflater, raw, bound, ceiling, inflated),
            Err(_) => inflate_into(&mut Decompressor::new(), raw, bound, ceiling, inflated),
        })?;
        &scratch.inflated[..n]
    } else {
        &scratch.raw
    };
    match encoding.compression {
        Compression::None | Compression::Zlib => {
            let width = encoding.numeric.width();
            if bytes.len() % width != 0 {
                return Err(Error::new(ErrorKind::LengthMismatch {
                    what: format!("decoded byte count (not a multiple of {width})"),
                    declared: expected_len.saturating_mul(width),
                    found: bytes.len(),
                }));
            }
            check_len(bytes.len() / width, expected_len)?;
            out.reserve(expected_len);
            convert_le(bytes, encoding.numeric, out);
        }
        Compression::NumpressLinear
        | Compression::NumpressLinearZlib
        | Compression::NumpressPic
        | Compression::NumpressPicZlib
        | Compression::NumpressSlof
        | Compression::NumpressSlofZlib => {
            // Every MS-Numpress value takes at least half a byte: reserve no more than that.
            out.reserve(expected_len.min(bytes.len().saturating_mul(2) + 2));
            match encoding.compression {
                Compression::NumpressLinear | Compression::NumpressLinearZlib => {
                    numpress::decode_linear(bytes, out)?
                }
                Compression::NumpressPic | Compression::NumpressPicZlib => {
                    numpress::decode_pic(bytes, out)?
                }
                _ => numpress::decode_slof(bytes, out)?,
            }
            check_len(out.len(), expected_len)?;
        }
    }
    Ok(())
}

/// Base64-decodes `text` into `buf` (cleared first), with the base64 crate's wording on errors.
fn base64_decode(text: &[u8], buf: &mut Vec<u8>) -> Result<()> {
    buf.clear();
    if base64_simd::STANDARD.decode_append(text, buf).is_ok() {
        return Ok(());
    }
    // Error path only: the base64 crate names the offending symbol and offset.
    let reason = match STANDARD.decode(text) {
        Err(e) => e.to_string(),
        Ok(_) => "rejected by the SIMD decoder".to_owned(),
    };
    Err(Error::new(ErrorKind::Base64(reason)))
}

/// The decoded size of an array of `expected_len` values before inflating: exact for plain
/// types, an upper bound for MS-Numpress (at most 4.5 bytes per value plus a 16-byte head).
fn decoded_size_bound(encoding: BinaryEncoding, expected_len: usize) -> usize {
    if encoding.compression.is_numpress() {
        expected_len.saturating_mul(5).saturating_add(16)
    } else {
        expected_len.saturating_mul(encoding.numeric.width())
    }
}

fn check_len(found: usize, declared: usize) -> Result<()> {
    if found == declared {
        Ok(())
    } else {
        Err(Error::new(ErrorKind::LengthMismatch { what: "array length".into(), declared, found }))
    }
}

/// Inflates the zlib stream `input` into `buf[..n]` and returns `n`.
///
/// Tries an output size of `guess` first (known exactly for plain arrays), then grows it four
/// times at a time up to what the stream can possibly produce (`MAX_INFLATE_RATIO`) or
/// `ceiling`, whichever is smaller, so neither a hostile declared length nor a zlib bomb
/// allocates more than that. `buf` is grown, never shrunk.
fn inflate_into(
    inflater: &mut Decompressor,
    input: &[u8],
    guess: usize,
    ceiling: usize,
    buf: &mut Vec<u8>,
) -> Result<usize> {
    let limit = input.len().saturating_mul(MAX_INFLATE_RATIO).saturating_add(64).min(ceiling);
    // A guess beyond what the stream can produce is wrong anyway: start small instead.
    let mut size = if guess <= limit { guess } else { input.len().saturating_mul(4).min(limit) };
    loop {
        if buf.len() < size {
            buf.resize(size, 0);
        }
        match inflater.zlib_decompress(input, &mut buf[..size]) {
            Ok(n) => return Ok(n),
            Err(DecompressionError::BadData) => {
                return Err(Error::new(ErrorKind::Inflate(
                    "corrupt or truncated zlib stream".into(),
                )));
            }
            Err(DecompressionError::InsufficientSpace) if size < limit => {
                size = size.saturating_mul(4).max(4096).min(limit);
            }
            Err(DecompressionError::InsufficientSpace) if limit == ceiling => {
                return Err(Error::new(ErrorKind::Inflate(format!(
                    "stream inflates beyond {ceiling} bytes, more than the declared array \
                     length allows"
                ))));
            }
            Err(DecompressionError::InsufficientSpace) => {
                return Err(Error::new(ErrorKind::Inflate(format!(
                    "stream inflates beyond {MAX_INFLATE_RATIO} times its {} bytes",
                    input.len()
                ))));
            }
        }
    }
}

fn convert_le(bytes: &[u8], numeric: NumericType, out: &mut Vec<f64>) {
    match numeric {
        NumericType::F32 => out.extend(
            bytes.chunks_exact(4).map(|c| f32::from_le_bytes(c.try_into().unwrap()) as f64),
        ),
        NumericType::F64 => {
            out.extend(bytes.chunks_exact(8).map(|c| f64::from_le_bytes(c.try_into().unwrap())))
        }
        NumericType::I32 => out.extend(
            bytes.chunks_exact(4).map(|c| i32::from_le_bytes(c.try_into().unwrap()) as f64),
        ),
        NumericType::I64 => out.extend(
            bytes.chunks_exact(8).map(|c| i64::from_le_bytes(c.try_into().unwrap()) as f64),
        ),
    }
}

/// Encodes values with `encoding` and returns the base64 text.
///
/// Integer types round to the nearest integer. MS-Numpress codecs pick their optimal fixed
/// point for the data.
pub fn encode(values: &[f64], encoding: BinaryEncoding) -> String {
    let bytes: Vec<u8> = match encoding.compression {
        Compression::None | Compression::Zlib => {
            let mut b = Vec::with_capacity(values.len() * encoding.numeric.width());
            for &v in values {
                match encoding.numeric {
                    NumericType::F32 => b.extend_from_slice(&(v as f32).to_le_bytes()),
                    NumericType::F64 => b.extend_from_slice(&v.to_le_bytes()),
                    NumericType::I32 => b.extend_from_slice(&(v.round() as i32).to_le_bytes()),
                    NumericType::I64 => b.extend_from_slice(&(v.round() as i64).to_le_bytes()),
                }
            }
            b
        }
        Compression::NumpressLinear | Compression::NumpressLinearZlib => {
            numpress::encode_linear(values, numpress::optimal_linear_fixed_point(values))
        }
        Compression::NumpressPic | Compression::NumpressPicZlib => numpress::encode_pic(values),
        Compression::NumpressSlof | Compression::NumpressSlofZlib => {
            numpress::encode_slof(values, numpress::optimal_slof_fixed_point(values))
        }
    };
    let bytes = if encoding.compression.has_zlib() { deflate(&bytes) } else { bytes };
    STANDARD.encode(bytes)
}

thread_local! {
    /// Per-thread zlib compressor (libdeflate at level 6: several times faster than
    /// miniz_oxide for whole buffers, which is what the writer has).
    static DEFLATER: RefCell<libdeflater::Compressor> =
        RefCell::new(libdeflater::Compressor::new(libdeflater::CompressionLvl::new(6).expect("level 6 exists")));
}

fn deflate(bytes: &[u8]) -> Vec<u8> {
    let compress = |c: &mut libdeflater::Compressor| {
        let mut out = vec![0u8; c.zlib_compress_bound(bytes.len())];
        let n = c.zlib_compress(bytes, &mut out).expect("the bound always fits");
        out.truncate(n);
        out
    };
    DEFLATER.with(|cell| match cell.try_borrow_mut() {
        Ok(mut c) => compress(&mut c),
        Err(_) => {
            compress(&mut libdeflater::Compressor::new(libdeflater::CompressionLvl::default()))
        }
    })
}

#[cfg(test)]
mod tests {
    use super::*;

    fn enc(numeric: NumericType, compression: Compression) -> BinaryEncoding {
        BinaryEncoding { numeric, compression }
    }

    #[test]
    fn known_base64_of_little_endian_f64() {
        // 1.0f64 little-endian is 00 00 00 00 00 00 F0 3F, base64 "AAAAAAAA8D8=".
        let mut out = Vec::new();
        decode_into(b"AAAAAAAA8D8=", enc(NumericType::F64, Compression::None), 1, &mut out)
            .unwrap();
        assert_eq!(out, [1.0]);
    }

    #[test]
    fn integer_and_float_types_round_trip() {
        let values = [0.0, 1.0, 12345.0, 65535.0];
        for numeric in [NumericType::F32, NumericType::F64, NumericType::I32, NumericType::I64] {
            for compression in [Compression::None, Compression::Zlib] {
                let e = enc(numeric, compression);
                let mut out = Vec::new();
                decode_into(encode(&values, e).as_bytes(), e, values.len(), &mut out).unwrap();
                assert_eq!(out, values, "{e:?}");
            }
        }
    }

    #[test]
    fn wrong_length_is_reported() {
        let e = enc(NumericType::F64, Compression::None);
        let text = encode(&[1.0, 2.0], e);
        let err = decode_into(text.as_bytes(), e, 3, &mut Vec::new()).unwrap_err();
        assert!(matches!(err.kind(), ErrorKind::LengthMismatch { declared: 3, found: 2, .. }));
    }

    #[test]
    fn bad_base64_and_bad_zlib_are_reported() {
        let e = enc(NumericType::F64, Compression::Zlib);
        let err = decode_into(b"@@@@", e, 1, &mut Vec::new()).unwrap_err();
        assert!(matches!(err.kind(), ErrorKind::Base64(_)));
        let err = decode_into(b"AAAAAAAA8D8=", e, 1, &mut Vec::new()).unwrap_err();
        assert!(matches!(err.kind(), ErrorKind::Inflate(_)));
    }

    #[test]
    fn simd_base64_accepts_what_the_base64_crate_accepts() {
        // The base64 crate (RFC 4648 section 4, canonical padding, zero trailing bits) is the
        // behaviour decode_into had before switching to base64-simd; the two must agree.
        let cases: [&[u8]; 16] = [
            b"AAAAAAAA8D8=",
            b"AAAAAAAA8D8",
            b"AAAAAAAA8D9=",
            b"AA==",
            b"AA=",
            b"AA",
            b"AB==",
            b"A===",
            b"A",
            b"AAAA====",
            b"AA==AAAA",
            b"AA AA",
            b"AA\nAA",
            b"-_-_",
            b"+/+/",
            b"////",
        ];
        for text in cases {
            let ours = base64_decode(text, &mut Vec::new()).map_err(|e| e.to_string());
            let reference = STANDARD.decode(text).map_err(|e| format!("invalid base64: {e}"));
            match (&ours, &reference) {
                (Ok(()), Ok(_)) => {
                    let mut buf = Vec::new();
                    base64_decode(text, &mut buf).unwrap();
                    assert_eq!(
                        buf,
                        reference.clone().unwrap(),
                        "{:?}",
                        String::from_utf8_lossy(text)
                    );
                }
                (Err(a), Err(b)) => assert_eq!(a, b),
                _ => panic!(
                    "{:?}: simd {ours:?}, base64 crate {reference:?}",
                    String::from_utf8_lossy(text)
                ),
            }
        }
    }

    #[test]
    fn zlib_length_mismatch_reports_the_true_count_either_way() {
        let e = enc(NumericType::F64, Compression::Zlib);
        let values: Vec<f64> = (0..5000).map(f64::from).collect();
        let text = encode(&values, e);
        // Declared shorter than the stream: the inflater runs out of room, retries larger.
        let err = decode_into(text.as_bytes(), e, 10, &mut Vec::new()).unwrap_err();
        assert!(matches!(err.kind(), ErrorKind::LengthMismatch { declared: 10, found: 5000, .. }));
        // Declared absurdly long: no such allocation is attempted (the stream cannot inflate
        // beyond MAX_INFLATE_RATIO times its size), and the true count is still reported.
        let huge = 1usize << 45;
        let err = decode_into(text.as_bytes(), e, huge, &mut Vec::new()).unwrap_err();
        assert!(matches!(err.kind(), ErrorKind::LengthMismatch { found: 5000, .. }), "{err}");
    }

    #[test]
    fn buffers_are_reused_across_calls() {
        let e = enc(NumericType::F32, Compression::Zlib);
        let small = encode(&[1.0; 10], e);
        let large = encode(&[2.0; 3000], e);
        let mut out = Vec::new();
        decode_into(large.as_bytes(), e, 3000, &mut out).unwrap();
        decode_into(small.as_bytes(), e, 10, &mut out).unwrap();
        assert_eq!(out, [1.0; 10]);
        decode_into(large.as_bytes(), e, 3000, &mut out).unwrap();
        assert!(out.iter().all(|&v| v == 2.0) && out.len() == 3000);
    }

    #[test]
    fn accessions_round_trip() {
        for c in Compression::ALL {
            assert_eq!(Compression::from_accession(c.cv().0), Some(c));
        }
        assert_eq!(NumericType::from_accession("MS:1000519"), Some(NumericType::I32));
        assert_eq!(Compression::from_accession("MS:9999999"), None); // not-a-term
    }
}
