//! MS-Numpress codecs (Teleman et al., Mol. Cell. Proteomics 13(6), 1537-1542, 2014).
//!
//! Placeholder signatures; the implementation lands in its own commit.

use crate::error::Result;

/// Encodes with linear prediction at `fixed_point`.
pub fn encode_linear(_data: &[f64], _fixed_point: f64) -> Vec<u8> {
    todo!("MS-Numpress linear")
}
/// The largest fixed point that keeps every value representable.
pub fn optimal_linear_fixed_point(_data: &[f64]) -> f64 {
    todo!("MS-Numpress linear")
}
/// Decodes linear-prediction bytes, appending to `out`.
pub fn decode_linear(_bytes: &[u8], _out: &mut Vec<f64>) -> Result<()> {
    todo!("MS-Numpress linear")
}
/// Encodes with positive-integer compression.
pub fn encode_pic(_data: &[f64]) -> Vec<u8> {
    todo!("MS-Numpress pic")
}
/// Decodes positive-integer bytes, appending to `out`.
pub fn decode_pic(_bytes: &[u8], _out: &mut Vec<f64>) -> Result<()> {
    todo!("MS-Numpress pic")
}
/// Encodes with short logged float at `fixed_point`.
pub fn encode_slof(_data: &[f64], _fixed_point: f64) -> Vec<u8> {
    todo!("MS-Numpress slof")
}
/// The fixed point that uses the full 16-bit range for this data.
pub fn optimal_slof_fixed_point(_data: &[f64]) -> f64 {
    todo!("MS-Numpress slof")
}
/// Decodes short-logged-float bytes, appending to `out`.
pub fn decode_slof(_bytes: &[u8], _out: &mut Vec<f64>) -> Result<()> {
    todo!("MS-Numpress slof")
}
