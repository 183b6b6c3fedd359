//! Binary data arrays: numeric types, compressions, and base64 decoding and encoding.
//!
//! mzML 1.1.0 (section "binaryDataArray") stores every array as base64 text of little-endian
//! values, optionally zlib-compressed or MS-Numpress-encoded (Teleman et al., Mol. Cell.
//! Proteomics 13(6), 1537-1542, 2014), each possibly followed by zlib.

use std::io::Read;

use base64::Engine;
use base64::engine::general_purpose::STANDARD;

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::numpress;

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
/// `expected_len` is the declared number of values; a different count is an error.
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
    let raw = STANDARD.decode(base64).map_err(|e| Error::new(ErrorKind::Base64(e.to_string())))?;
    let bytes = if encoding.compression.has_zlib() {
        inflate(&raw, expected_hint(encoding, expected_len))?
    } else {
        raw
    };
    match encoding.compression {
        Compression::None | Compression::Zlib => {
            let width = encoding.numeric.width();
            if bytes.len() % width != 0 {
                return Err(Error::new(ErrorKind::LengthMismatch {
                    what: format!("decoded byte count (not a multiple of {width})"),
                    declared: expected_len * width,
                    found: bytes.len(),
                }));
            }
            check_len(bytes.len() / width, expected_len)?;
            out.reserve(expected_len);
            convert_le(&bytes, encoding.numeric, out);
        }
        Compression::NumpressLinear | Compression::NumpressLinearZlib => {
            numpress::decode_linear(&bytes, out)?;
            check_len(out.len(), expected_len)?;
        }
        Compression::NumpressPic | Compression::NumpressPicZlib => {
            numpress::decode_pic(&bytes, out)?;
            check_len(out.len(), expected_len)?;
        }
        Compression::NumpressSlof | Compression::NumpressSlofZlib => {
            numpress::decode_slof(&bytes, out)?;
            check_len(out.len(), expected_len)?;
        }
    }
    Ok(())
}

fn expected_hint(encoding: BinaryEncoding, expected_len: usize) -> usize {
    if encoding.compression.is_numpress() {
        expected_len * 3 + 16
    } else {
        expected_len * encoding.numeric.width()
    }
}

fn check_len(found: usize, declared: usize) -> Result<()> {
    if found == declared {
        Ok(())
    } else {
        Err(Error::new(ErrorKind::LengthMismatch { what: "array length".into(), declared, found }))
    }
}

fn inflate(raw: &[u8], size_hint: usize) -> Result<Vec<u8>> {
    // Cap the initial reservation: a hostile declared length must not allocate by itself.
    let mut out = Vec::with_capacity(size_hint.min(64 << 20));
    flate2::read::ZlibDecoder::new(raw)
        .read_to_end(&mut out)
        .map_err(|e| Error::new(ErrorKind::Inflate(e.to_string())))?;
    Ok(out)
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

fn deflate(bytes: &[u8]) -> Vec<u8> {
    use std::io::Write;
    let mut enc = flate2::write::ZlibEncoder::new(Vec::new(), flate2::Compression::new(6));
    enc.write_all(bytes).expect("writing to a Vec cannot fail");
    enc.finish().expect("writing to a Vec cannot fail")
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
    fn accessions_round_trip() {
        for c in Compression::ALL {
            assert_eq!(Compression::from_accession(c.cv().0), Some(c));
        }
        assert_eq!(NumericType::from_accession("MS:1000519"), Some(NumericType::I32));
        assert_eq!(Compression::from_accession("MS:9999999"), None); // not-a-term
    }
}
