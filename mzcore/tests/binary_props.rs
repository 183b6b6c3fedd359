//! Property tests: random arrays through every compression and numeric type and back, and
//! random bytes into every decoder.
//!
//! Error bounds checked (derivations in the comments of each arm):
//! - no compression / zlib: 64-bit floats exact (bit for bit); 32-bit floats equal to the
//!   value rounded to `f32`; integer types equal to the value rounded to the nearest integer.
//! - MS-Numpress linear (Teleman et al. 2014): absolute error at most `0.5 / fixed_point`.
//! - MS-Numpress pic: the value rounded to the nearest integer (halves up), for values >= 0.
//! - MS-Numpress slof: `|y - x| <= (x + 1) * (exp(0.5 / fixed_point) - 1)`.

use mzcore::ErrorKind;
use mzcore::mzml::binary::{BinaryEncoding, Compression, NumericType, decode_into, encode};
use mzcore::mzml::numpress;
use proptest::prelude::*;

const NUMERIC: [NumericType; 4] =
    [NumericType::F32, NumericType::F64, NumericType::I32, NumericType::I64];

/// Values the encoding can carry: what each codec is specified for.
fn values_for(encoding: BinaryEncoding) -> BoxedStrategy<Vec<f64>> {
    let len = 0..300usize;
    match encoding.compression {
        Compression::None | Compression::Zlib => match encoding.numeric {
            NumericType::F64 => prop::collection::vec(
                prop::num::f64::NORMAL | prop::num::f64::SUBNORMAL | prop::num::f64::ZERO,
                len,
            )
            .boxed(),
            NumericType::F32 => prop::collection::vec(-3.0e38f64..3.0e38, len).boxed(),
            NumericType::I32 => prop::collection::vec(-2.1e9f64..2.1e9, len).boxed(),
            NumericType::I64 => prop::collection::vec(-9.0e18f64..9.0e18, len).boxed(),
        },
        Compression::NumpressLinear | Compression::NumpressLinearZlib => prop_oneof![
            // m/z-like: sorted, non-negative (the codec's domain: m/z, retention time).
            prop::collection::vec(0.0f64..5000.0, len.clone()).prop_map(|mut v| {
                v.sort_by(f64::total_cmp);
                v
            }),
            // anything non-negative, in any order, up to large magnitudes.
            prop::collection::vec(0.0f64..1.0e7, len),
        ]
        .boxed(),
        Compression::NumpressPic | Compression::NumpressPicZlib => prop_oneof![
            prop::collection::vec(0.0f64..2.0e9, len.clone()),
            prop::collection::vec((0u32..1000).prop_map(|n| f64::from(n) / 2.0), len),
        ]
        .boxed(),
        Compression::NumpressSlof | Compression::NumpressSlofZlib => prop_oneof![
            prop::collection::vec(0.0f64..1.0e7, len.clone()),
            prop::collection::vec(prop_oneof![Just(0.0f64), 0.0f64..1.0e15], len),
        ]
        .boxed(),
    }
}

fn every_encoding() -> impl Strategy<Value = BinaryEncoding> {
    (0..NUMERIC.len(), 0..Compression::ALL.len())
        .prop_map(|(n, c)| BinaryEncoding { numeric: NUMERIC[n], compression: Compression::ALL[c] })
}

/// The value an exact round trip of `x` must give back, or the allowed error, per encoding.
fn check(encoding: BinaryEncoding, input: &[f64], output: &[f64]) -> Result<(), TestCaseError> {
    prop_assert_eq!(output.len(), input.len());
    match encoding.compression {
        Compression::None | Compression::Zlib => {
            for (&x, &y) in input.iter().zip(output) {
                let want = match encoding.numeric {
                    NumericType::F64 => x,
                    NumericType::F32 => f64::from(x as f32),
                    NumericType::I32 | NumericType::I64 => x.round(),
                };
                prop_assert_eq!(y.to_bits(), want.to_bits(), "{:?}: {} -> {}", encoding, x, y);
            }
        }
        Compression::NumpressLinear | Compression::NumpressLinearZlib => {
            // Stored integer k = trunc(x * fp + 0.5) = round-half-up(x * fp) for x >= 0, so
            // |k / fp - x| <= 0.5 / fp (Teleman et al. 2014); the slack covers the rounding of
            // x * fp and of k / fp, a few ulps of x.
            let fp = numpress::optimal_linear_fixed_point(input);
            for (&x, &y) in input.iter().zip(output) {
                let bound = 0.5 / fp + 4.0 * f64::EPSILON * x.abs();
                prop_assert!((y - x).abs() <= bound, "{} -> {} at fp {}", x, y, fp);
            }
        }
        Compression::NumpressPic | Compression::NumpressPicZlib => {
            for (&x, &y) in input.iter().zip(output) {
                // Nearest integer with halves rounded up (the reference adds 0.5 and truncates).
                prop_assert_eq!(y, (x + 0.5).floor(), "{} -> {}", x, y);
                prop_assert!((y - x).abs() <= 0.5);
            }
        }
        Compression::NumpressSlof | Compression::NumpressSlofZlib => {
            // Stored k = round-half-up(ln(x + 1) * fp), so |k / fp - ln(x + 1)| <= 0.5 / fp and
            // the decoded y = exp(k / fp) - 1 satisfies (y + 1) / (x + 1) within
            // exp(+-0.5 / fp): |y - x| <= (x + 1) * expm1(0.5 / fp), a relative error of about
            // 0.5 / fp on x + 1. With the optimal fp = floor(65535 / ln(max + 1)) that is about
            // ln(max + 1) / 131070: 1.2e-4 for a maximum of 1e7, 2.6e-4 for 1e15.
            // The factor 1 + 1e-9 covers the rounding of ln, exp and the products.
            let fp = numpress::optimal_slof_fixed_point(input);
            let rel = (0.5 / fp).exp_m1() * (1.0 + 1e-9);
            for (&x, &y) in input.iter().zip(output) {
                let bound = (x + 1.0) * rel + 4.0 * f64::EPSILON * x;
                prop_assert!(
                    (y - x).abs() <= bound,
                    "{} -> {} at fp {} (bound {})",
                    x,
                    y,
                    fp,
                    bound
                );
            }
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 512, ..ProptestConfig::default() })]

    #[test]
    fn every_encoding_round_trips_within_its_bound(
        (encoding, values) in every_encoding().prop_flat_map(|e| (Just(e), values_for(e)))
    ) {
        let text = encode(&values, encoding);
        let mut out = Vec::new();
        decode_into(text.as_bytes(), encoding, values.len(), &mut out)
            .map_err(|e| TestCaseError::fail(format!("{encoding:?}: {e}")))?;
        check(encoding, &values, &out)?;
    }

    #[test]
    fn a_wrong_declared_length_is_a_length_mismatch(
        (encoding, values) in every_encoding().prop_flat_map(|e| (Just(e), values_for(e))),
        extra in 1usize..5,
    ) {
        let text = encode(&values, encoding);
        let err = decode_into(text.as_bytes(), encoding, values.len() + extra, &mut Vec::new())
            .expect_err("declared length too large");
        prop_assert!(matches!(err.kind(), ErrorKind::LengthMismatch { .. }), "{}", err);
    }

    #[test]
    fn numpress_decoders_survive_random_bytes(bytes in prop::collection::vec(any::<u8>(), 0..400)) {
        type Decoder = fn(&[u8], &mut Vec<f64>) -> mzcore::Result<()>;
        let decoders: [Decoder; 3] =
            [numpress::decode_linear, numpress::decode_pic, numpress::decode_slof];
        for decode in decoders {
            let mut out = Vec::new();
            if let Err(e) = decode(&bytes, &mut out) {
                prop_assert!(matches!(e.kind(), ErrorKind::Numpress(_)), "{}", e);
            }
            // At most two values per input byte (one half byte per value), amortised growth.
            prop_assert!(out.capacity() <= 4 * bytes.len() + 8, "{} for {} bytes", out.capacity(), bytes.len());
            prop_assert!(out.iter().all(|v| v.is_finite()));
        }
    }

    #[test]
    fn numpress_decoders_survive_valid_headers_with_random_bodies(
        fp in prop_oneof![Just(0.0), Just(f64::NAN), Just(1e-300), Just(-1.0), 0.0f64..1e9],
        body in prop::collection::vec(any::<u8>(), 0..200),
    ) {
        let mut bytes = fp.to_be_bytes().to_vec();
        bytes.extend_from_slice(&body);
        for decode in [numpress::decode_linear, numpress::decode_slof] {
            let mut out = Vec::new();
            if let Err(e) = decode(&bytes, &mut out) {
                prop_assert!(matches!(e.kind(), ErrorKind::Numpress(_)), "{}", e);
            } else {
                prop_assert!(out.iter().all(|v| v.is_finite()));
            }
        }
    }

    #[test]
    fn decode_into_survives_random_input(
        encoding in every_encoding(),
        payload in prop::collection::vec(any::<u8>(), 0..300),
        as_base64 in any::<bool>(),
        zlib_wrap in any::<bool>(),
        declared in prop_oneof![0usize..200, Just(usize::MAX / 16), Just(1usize << 40)],
    ) {
        use base64::Engine;
        // Random text, or valid base64 of random bytes, or of a valid zlib stream of them.
        let text: Vec<u8> = if !as_base64 {
            payload.clone()
        } else if zlib_wrap {
            use std::io::Write;
            let mut z = flate2::write::ZlibEncoder::new(Vec::new(), flate2::Compression::fast());
            z.write_all(&payload).unwrap();
            base64::engine::general_purpose::STANDARD.encode(z.finish().unwrap()).into_bytes()
        } else {
            base64::engine::general_purpose::STANDARD.encode(&payload).into_bytes()
        };
        let mut out = Vec::new();
        match decode_into(&text, encoding, declared, &mut out) {
            Ok(()) => prop_assert_eq!(out.len(), declared),
            Err(e) => prop_assert!(
                matches!(
                    e.kind(),
                    ErrorKind::Base64(_)
                        | ErrorKind::Inflate(_)
                        | ErrorKind::Numpress(_)
                        | ErrorKind::LengthMismatch { .. }
                ),
                "{}",
                e
            ),
        }
    }

    #[test]
    fn base64_acceptance_is_the_base64_crates(
        text in prop::collection::vec(prop::sample::select(b"AQgw/+=-_ \n".to_vec()), 0..24)
    ) {
        // The reader switched to base64-simd; RFC 4648 strictness (canonical padding, zero
        // trailing bits, no whitespace) must stay what the base64 crate enforces.
        use base64::Engine;
        let reference = base64::engine::general_purpose::STANDARD.decode(&text);
        let (mut scratch, mut out) = (Vec::new(), Vec::new());
        let ours = mzcore::mzml::binary::bare_decode(&text, false, &mut scratch, &mut out);
        match (ours, reference) {
            (Ok(n), Ok(bytes)) => prop_assert_eq!(&out[..n], &bytes[..]),
            (Err(e), Err(r)) => prop_assert_eq!(e.to_string(), format!("invalid base64: {}", r)),
            (a, b) => prop_assert!(false, "{:?}: ours {:?}, base64 crate {:?}", text, a.map(|_| ()), b),
        }
    }
}
