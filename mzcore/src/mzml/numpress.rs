//! MS-Numpress codecs (Teleman et al., Mol. Cell. Proteomics 13(6), 1537-1542, 2014).
//!
//! Three lossy codecs for mass-spectrometry arrays, each producing a byte stream that mzML
//! stores base64-encoded (PSI-MS MS:1002312, MS:1002313, MS:1002314):
//!
//! - **linear prediction** ([`encode_linear`]): values are scaled by a fixed point and rounded
//!   to integers; the first two are stored as 4-byte little-endian integers, every later one as
//!   the residual from the straight line through the two before it, in the half-byte integer
//!   code below. Suits smoothly increasing m/z and retention-time arrays.
//! - **positive integer compression** ([`encode_pic`]): values rounded to non-negative
//!   integers, each in the half-byte integer code. Suits ion counts.
//! - **short logged float** ([`encode_slof`]): `ln(x + 1)` scaled by a fixed point and stored
//!   as a 2-byte little-endian unsigned integer. Suits intensities.
//!
//! Byte layout (as the paper and the open MS-Numpress specification describe it): linear and
//! slof start with the fixed point as an 8-byte big-endian IEEE 754 double. The half-byte
//! integer code writes a 32-bit integer as a header nibble followed by its significant nibbles,
//! least significant first: a header `h <= 8` means the top `h` nibbles are zero (so `8` alone is
//! the value zero), a header `h > 8` means the top `h - 8` nibbles are all ones (negative
//! residuals). Nibbles fill each byte high half first; an odd count ends with a zero half.
//!
//! Decoders check every length and header and return [`ErrorKind::Numpress`] on anything
//! malformed; they never read out of bounds and never reserve more memory than a small
//! multiple of their input.

use crate::error::{Error, ErrorKind, Result};

/// Largest integer the linear codec's first two stored values and its residuals may take
/// (the reference encoder rejects anything beyond `i32::MAX`).
const INT_MAX: f64 = 2_147_483_647.0;

fn numpress_error(msg: impl Into<String>) -> Error {
    Error::new(ErrorKind::Numpress(msg.into()))
}

// ---------------------------------------------------------------------------------------------
// Half-byte integer code
// ---------------------------------------------------------------------------------------------

/// Collects half bytes (nibbles) and packs them high half first.
struct NibbleWriter {
    out: Vec<u8>,
    pending: Option<u8>,
}

impl NibbleWriter {
    fn push(&mut self, nibble: u8) {
        match self.pending.take() {
            None => self.pending = Some(nibble & 0xf),
            Some(high) => self.out.push((high << 4) | (nibble & 0xf)),
        }
    }

    /// Writes `x` in the half-byte integer code.
    fn push_int(&mut self, x: u32) {
        let top = x >> 28;
        if top == 0 {
            // Count the leading zero nibbles (8 for x == 0: the header alone).
            let lead = (x.leading_zeros() / 4) as usize;
            self.push(lead as u8);
            for i in 0..8 - lead {
                self.push((x >> (4 * i)) as u8);
            }
        } else if top == 0xf {
            // Count the leading all-ones nibbles, at most 7 (one nibble always follows).
            let lead = ((x.leading_ones() / 4) as usize).min(7);
            self.push(lead as u8 + 8);
            for i in 0..8 - lead {
                self.push((x >> (4 * i)) as u8);
            }
        } else {
            self.push(0);
            for i in 0..8 {
                self.push((x >> (4 * i)) as u8);
            }
        }
    }

    fn finish(mut self) -> Vec<u8> {
        if let Some(high) = self.pending.take() {
            self.out.push(high << 4);
        }
        self.out
    }
}

/// Reads half bytes from a slice, high half first.
struct NibbleReader<'a> {
    data: &'a [u8],
    /// Index of the next nibble (two per byte).
    pos: usize,
}

impl<'a> NibbleReader<'a> {
    fn new(data: &'a [u8]) -> Self {
        NibbleReader { data, pos: 0 }
    }

    fn remaining(&self) -> usize {
        self.data.len() * 2 - self.pos
    }

    /// True when no further value follows: no nibble left, or only the final low half of the
    /// last byte and it is the zero padding.
    fn at_end(&self) -> bool {
        match self.remaining() {
            0 => true,
            1 => self.data[self.data.len() - 1] & 0xf == 0,
            _ => false,
        }
    }

    /// The next nibble; the caller has checked that one remains.
    fn nibble(&mut self) -> u32 {
        let byte = self.data[self.pos / 2];
        let n = if self.pos % 2 == 0 { byte >> 4 } else { byte & 0xf };
        self.pos += 1;
        u32::from(n)
    }

    /// Reads one integer in the half-byte code.
    fn int(&mut self) -> Result<u32> {
        if self.remaining() == 0 {
            return Err(numpress_error("data ends before an integer header"));
        }
        let head = self.nibble();
        let (lead, mut value) = if head <= 8 {
            (head as usize, 0u32)
        } else {
            let lead = (head - 8) as usize;
            (lead, !(u32::MAX >> (4 * lead)))
        };
        let count = 8 - lead;
        if self.remaining() < count {
            return Err(numpress_error(format!(
                "integer header at half byte {} announces {count} half bytes, {} remain",
                self.pos - 1,
                self.remaining()
            )));
        }
        for i in 0..count {
            value |= self.nibble() << (4 * i);
        }
        Ok(value)
    }
}

/// Reads the 8-byte big-endian fixed point at the start of `bytes` and checks it is usable.
fn fixed_point(bytes: &[u8], codec: &str) -> Result<f64> {
    let Some(head) = bytes.first_chunk::<8>() else {
        return Err(numpress_error(format!(
            "{codec}: {} bytes, too short for the 8-byte fixed point",
            bytes.len()
        )));
    };
    let fp = f64::from_be_bytes(*head);
    if fp.is_finite() && fp > 0.0 {
        Ok(fp)
    } else {
        Err(numpress_error(format!("{codec}: fixed point {fp} is not a positive finite number")))
    }
}

fn check_finite(value: f64, index: usize, codec: &str) -> Result<f64> {
    if value.is_finite() {
        Ok(value)
    } else {
        Err(numpress_error(format!("{codec}: value {index} decodes to {value}")))
    }
}

// ---------------------------------------------------------------------------------------------
// Linear prediction
// ---------------------------------------------------------------------------------------------

/// Scales and rounds as the reference encoder does: add one half, truncate toward zero.
fn fixed(value: f64, fixed_point: f64) -> i64 {
    // `as` saturates (and maps NaN to 0), so hostile values cannot panic.
    (value * fixed_point + 0.5) as i64
}

/// Encodes with linear prediction at `fixed_point`.
///
/// Each value is stored as `trunc(x * fixed_point + 0.5)`, so the decoded value lies within
/// `0.5 / fixed_point` of the input for non-negative inputs. The codec is meant for
/// non-negative, smooth data (m/z, retention time); with a fixed point from
/// [`optimal_linear_fixed_point`] every such input is representable. Inputs whose first two
/// scaled values or residuals leave the 32-bit range (where the reference encoder gives up)
/// are stored truncated to 32 bits and do not decode to themselves.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::{decode_linear, encode_linear, optimal_linear_fixed_point};
/// let mz = [100.0, 100.01, 100.02, 100.035];
/// let fp = optimal_linear_fixed_point(&mz);
/// let bytes = encode_linear(&mz, fp);
/// let mut back = Vec::new();
/// decode_linear(&bytes, &mut back)?;
/// assert!(mz.iter().zip(&back).all(|(a, b)| (a - b).abs() <= 0.5 / fp));
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn encode_linear(data: &[f64], fixed_point: f64) -> Vec<u8> {
    let mut out = Vec::with_capacity(16 + data.len() * 5);
    out.extend_from_slice(&fixed_point.to_be_bytes());
    let Some((&first, rest)) = data.split_first() else {
        return out;
    };
    let mut prev2 = fixed(first, fixed_point);
    out.extend_from_slice(&(prev2 as u32).to_le_bytes());
    let Some((&second, rest)) = rest.split_first() else {
        return out;
    };
    let mut prev1 = fixed(second, fixed_point);
    out.extend_from_slice(&(prev1 as u32).to_le_bytes());
    let mut w = NibbleWriter { out, pending: None };
    for &v in rest {
        let next = fixed(v, fixed_point);
        let extrapolated = prev1.wrapping_add(prev1.wrapping_sub(prev2));
        let residual = next.wrapping_sub(extrapolated);
        w.push_int(residual as i32 as u32);
        prev2 = prev1;
        prev1 = next;
    }
    w.finish()
}

/// The largest fixed point that keeps every value representable.
///
/// As the reference encoder computes it: `floor(i32::MAX / m)` where `m` is the largest of the
/// first two values and of `ceil(|r| + 1)` over the prediction residuals `r`; for one value,
/// `floor(i32::MAX / x)`; for no values, 0. Where that formula gives no usable fixed point
/// (all-zero or negative data, where the reference returns infinity or a negative number, or
/// values above `i32::MAX`, where it returns 0), this takes `m` over absolute values and at
/// least 1, and does not round a fixed point below 1 down to 0, so that [`encode_linear`]
/// followed by [`decode_linear`] succeeds for all finite data.
pub fn optimal_linear_fixed_point(data: &[f64]) -> f64 {
    let residuals = || {
        data.windows(3).map(|w| {
            let extrapolated = w[1] + (w[1] - w[0]);
            ((w[2] - extrapolated).abs() + 1.0).ceil()
        })
    };
    let reference = match data {
        [] => return 0.0,
        [x] => (INT_MAX / x).floor(),
        _ => (INT_MAX / residuals().fold(data[0].max(data[1]), f64::max)).floor(),
    };
    if reference.is_finite() && reference > 0.0 {
        return reference;
    }
    let first_two = data.iter().take(2).fold(1.0f64, |m, x| m.max(x.abs()));
    let fp = INT_MAX / residuals().fold(first_two, f64::max);
    if fp >= 1.0 { fp.floor() } else { fp }
}

/// Decodes linear-prediction bytes, appending to `out`.
///
/// Accepts 8 bytes (no values, any fixed point), 12 (one value), or 16 and more.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::decode_linear;
/// // Fixed point 10 (big-endian), then 10 and 20 as 4-byte integers, then residual 0 ("8").
/// let bytes = [0x40, 0x24, 0, 0, 0, 0, 0, 0, 10, 0, 0, 0, 20, 0, 0, 0, 0x80];
/// let mut out = Vec::new();
/// decode_linear(&bytes, &mut out)?;
/// assert_eq!(out, [1.0, 2.0, 3.0]);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn decode_linear(bytes: &[u8], out: &mut Vec<f64>) -> Result<()> {
    const CODEC: &str = "linear";
    match bytes.len() {
        0..8 => {
            return Err(numpress_error(format!(
                "{CODEC}: {} bytes, too short for the 8-byte fixed point",
                bytes.len()
            )));
        }
        8 => return Ok(()),
        9..=11 | 13..=15 => {
            return Err(numpress_error(format!(
                "{CODEC}: {} bytes: the first two values take 4 bytes each after the fixed point",
                bytes.len()
            )));
        }
        _ => {}
    }
    let fp = fixed_point(bytes, CODEC)?;
    let start = out.len();
    let read_u32 = |at: usize| {
        let b: [u8; 4] = bytes[at..at + 4].try_into().expect("length checked above");
        i64::from(u32::from_le_bytes(b))
    };
    let mut prev2 = read_u32(8);
    out.push(check_finite(prev2 as f64 / fp, 0, CODEC)?);
    if bytes.len() == 12 {
        return Ok(());
    }
    let mut prev1 = read_u32(12);
    out.push(check_finite(prev1 as f64 / fp, 1, CODEC)?);
    let mut r = NibbleReader::new(&bytes[16..]);
    while !r.at_end() {
        let residual = i64::from(r.int()? as i32);
        let next = prev1
            .checked_sub(prev2)
            .and_then(|slope| prev1.checked_add(slope))
            .and_then(|e| e.checked_add(residual))
            .ok_or_else(|| {
                numpress_error(format!(
                    "{CODEC}: value {} overflows 64-bit integers",
                    out.len() - start
                ))
            })?;
        out.push(check_finite(next as f64 / fp, out.len() - start, CODEC)?);
        prev2 = prev1;
        prev1 = next;
    }
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// Positive integer compression
// ---------------------------------------------------------------------------------------------

/// Encodes with positive-integer compression.
///
/// Each value is stored as `trunc(x + 0.5)`, that is rounded to the nearest integer with
/// halves rounded up. The reference encoder rejects values below -0.5 or above `i32::MAX`;
/// this one stores them clamped to `0` and `i32::MAX` (NaN as 0).
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::{decode_pic, encode_pic};
/// let bytes = encode_pic(&[0.0, 1.4, 15.0, 123456.0]);
/// let mut back = Vec::new();
/// decode_pic(&bytes, &mut back)?;
/// assert_eq!(back, [0.0, 1.0, 15.0, 123456.0]);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn encode_pic(data: &[f64]) -> Vec<u8> {
    let mut w = NibbleWriter { out: Vec::with_capacity(data.len() * 2), pending: None };
    for &v in data {
        let x = (v + 0.5).clamp(0.0, INT_MAX) as u32;
        w.push_int(x);
    }
    w.finish()
}

/// Decodes positive-integer bytes, appending to `out`.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::decode_pic;
/// // "8" is zero, "7 1" is one, and the final "0" is padding.
/// let mut out = Vec::new();
/// decode_pic(&[0x87, 0x10], &mut out)?;
/// assert_eq!(out, [0.0, 1.0]);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn decode_pic(bytes: &[u8], out: &mut Vec<f64>) -> Result<()> {
    let mut r = NibbleReader::new(bytes);
    while !r.at_end() {
        out.push(f64::from(r.int()?));
    }
    Ok(())
}

// ---------------------------------------------------------------------------------------------
// Short logged float
// ---------------------------------------------------------------------------------------------

/// Encodes with short logged float at `fixed_point`.
///
/// Each value is stored as `trunc(ln(x + 1) * fixed_point + 0.5)` in 16 bits. The reference
/// encoder rejects values whose scaled logarithm exceeds 65535 and leaves negative ones
/// undefined; this one clamps to `0..=65535` (so negative values decode to 0).
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::{decode_slof, encode_slof, optimal_slof_fixed_point};
/// let intensity = [0.0, 12.5, 3.0e6];
/// let fp = optimal_slof_fixed_point(&intensity);
/// let mut back = Vec::new();
/// decode_slof(&encode_slof(&intensity, fp), &mut back)?;
/// assert_eq!(back[0], 0.0);
/// assert!(((back[2] - 3.0e6) / 3.0e6).abs() < 1e-3);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn encode_slof(data: &[f64], fixed_point: f64) -> Vec<u8> {
    let mut out = Vec::with_capacity(8 + data.len() * 2);
    out.extend_from_slice(&fixed_point.to_be_bytes());
    for &v in data {
        let scaled = (v + 1.0).ln() * fixed_point + 0.5;
        let x = scaled.clamp(0.0, 65535.0) as u16;
        out.extend_from_slice(&x.to_le_bytes());
    }
    out
}

/// The fixed point that uses the full 16-bit range for this data.
///
/// As the reference encoder computes it: `floor(65535 / max(1, ln(x + 1) over all x))`, and 0
/// for no values.
pub fn optimal_slof_fixed_point(data: &[f64]) -> f64 {
    if data.is_empty() {
        return 0.0;
    }
    let max = data.iter().fold(1.0f64, |m, &x| m.max((x + 1.0).ln()));
    (65535.0 / max).floor()
}

/// Decodes short-logged-float bytes, appending to `out`.
///
/// Accepts the 8-byte fixed point followed by an even number of bytes.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::numpress::decode_slof;
/// // Fixed point 10, then the 16-bit values 0 and 7 (little-endian).
/// let mut out = Vec::new();
/// decode_slof(&[0x40, 0x24, 0, 0, 0, 0, 0, 0, 0, 0, 7, 0], &mut out)?;
/// assert_eq!(out[0], 0.0);
/// assert!((out[1] - (0.7f64.exp() - 1.0)).abs() < 1e-12);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn decode_slof(bytes: &[u8], out: &mut Vec<f64>) -> Result<()> {
    const CODEC: &str = "slof";
    if bytes.len() < 8 {
        return Err(numpress_error(format!(
            "{CODEC}: {} bytes, too short for the 8-byte fixed point",
            bytes.len()
        )));
    }
    if bytes.len() % 2 != 0 {
        return Err(numpress_error(format!(
            "{CODEC}: {} bytes: the values after the fixed point take 2 bytes each",
            bytes.len()
        )));
    }
    if bytes.len() == 8 {
        return Ok(());
    }
    let fp = fixed_point(bytes, CODEC)?;
    out.reserve((bytes.len() - 8) / 2);
    for (i, pair) in bytes[8..].chunks_exact(2).enumerate() {
        let x = f64::from(u16::from_le_bytes([pair[0], pair[1]]));
        out.push(check_finite((x / fp).exp() - 1.0, i, CODEC)?);
    }
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn hex(bytes: &[u8]) -> String {
        bytes.iter().map(|b| format!("{b:02x}")).collect()
    }

    // Byte strings below were produced by pynumpress 0.1.5 (the reference library from PyPI)
    // for these inputs; the generated table in tests/reference/numpress.tsv checks many more.
    #[test]
    fn pic_matches_reference_bytes() {
        assert_eq!(hex(&encode_pic(&[0.0, 1.0, 15.0, 16.0, 123456.0])), "8717f6013042e1");
        assert_eq!(hex(&encode_pic(&[2.5, 3.5, 0.49999])), "737480");
    }

    #[test]
    fn slof_and_linear_headers_are_big_endian() {
        assert_eq!(hex(&encode_slof(&[0.0, 1.0, 1000.0], 10.0)), "4024000000000000000007004500");
        assert_eq!(
            hex(&encode_linear(&[1.0, 2.0, 3.0, 5.0], 10.0)),
            "40240000000000000a0000001400000087a0"
        );
    }

    #[test]
    fn optimal_fixed_points_follow_reference_formula() {
        // pynumpress 0.1.5 values for the same inputs.
        assert_eq!(optimal_linear_fixed_point(&[1.0, 1e6]), 2147.0);
        assert_eq!(optimal_linear_fixed_point(&[1.0, 3.0, 2.0]), 536870911.0);
        assert_eq!(optimal_linear_fixed_point(&[1000.0]), 2147483.0);
        assert_eq!(optimal_slof_fixed_point(&[1e6]), 4743.0);
        assert_eq!(optimal_slof_fixed_point(&[0.0, 0.0]), 65535.0);
    }

    #[test]
    fn degenerate_linear_data_still_round_trips() {
        for data in [&[0.0][..], &[0.0, 0.0, 0.0], &[5.0, 5.0], &[3.0e9], &[1.0e12, 1.0e12 + 8.0]] {
            let fp = optimal_linear_fixed_point(data);
            assert!(fp.is_finite() && fp > 0.0, "{data:?} -> {fp}");
            let mut out = Vec::new();
            decode_linear(&encode_linear(data, fp), &mut out).unwrap();
            assert_eq!(out.len(), data.len());
            for (a, b) in out.iter().zip(data) {
                assert!((a - b).abs() <= 0.5 / fp + b * 1e-15, "{data:?}: {a} vs {b} at {fp}");
            }
        }
    }

    #[test]
    fn half_byte_code_round_trips_edge_integers() {
        let values: Vec<u32> = [0i64, 1, 15, 16, 255, 256, -1, -2, -15, -16, -17, -256, -257]
            .iter()
            .map(|&v| v as i32 as u32)
            .chain([u32::MAX, 0x8000_0000, 0x7fff_ffff, 0x1000_0000, 0xf000_0000, 0xffff_ff0f])
            .collect();
        let mut w = NibbleWriter { out: Vec::new(), pending: None };
        for &v in &values {
            w.push_int(v);
        }
        let bytes = w.finish();
        let mut r = NibbleReader::new(&bytes);
        let mut back = Vec::new();
        while !r.at_end() {
            back.push(r.int().unwrap());
        }
        assert_eq!(back, values);
    }

    #[test]
    fn malformed_input_is_an_error() {
        type Decoder = fn(&[u8], &mut Vec<f64>) -> Result<()>;
        let cases: [(&str, Decoder, &[u8]); 9] = [
            ("linear short header", decode_linear, &[0x40, 0x24]),
            ("linear one value cut", decode_linear, &[0x40, 0x24, 0, 0, 0, 0, 0, 0, 1, 0]),
            (
                "linear second value cut",
                decode_linear,
                &[0x40, 0x24, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 2],
            ),
            ("linear zero fixed point", decode_linear, &[0, 0, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0]),
            ("linear NaN fixed point", decode_linear, &[0x7f, 0xf8, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0]),
            (
                "linear truncated residual",
                decode_linear,
                &[0x40, 0x24, 0, 0, 0, 0, 0, 0, 1, 0, 0, 0, 2, 0, 0, 0, 0x30],
            ),
            ("pic truncated integer", decode_pic, &[0x8f]),
            ("slof odd length", decode_slof, &[0x40, 0x24, 0, 0, 0, 0, 0, 0, 7]),
            ("slof negative fixed point", decode_slof, &[0xc0, 0x24, 0, 0, 0, 0, 0, 0, 7, 0]),
        ];
        for (name, decode, bytes) in cases {
            let err = decode(bytes, &mut Vec::new()).expect_err(name);
            assert!(matches!(err.kind(), ErrorKind::Numpress(_)), "{name}: {err}");
        }
    }

    #[test]
    fn empty_payloads_decode_to_nothing() {
        // pynumpress writes an empty linear or slof array as a zero fixed point alone.
        let mut out = Vec::new();
        decode_linear(&[0; 8], &mut out).unwrap();
        decode_slof(&[0; 8], &mut out).unwrap();
        decode_pic(&[], &mut out).unwrap();
        assert!(out.is_empty());
    }
}
