//! Property tests: whole documents written by the writer read back unchanged, in every layout.

use std::io::Cursor;

use mzcore::mzml::binary::{BinaryEncoding, Compression, NumericType};
use mzcore::mzml::{ChecksumStatus, IndexedReader, Reader, ReaderOptions, Writer, WriterOptions};
use mzcore::spectrum::{Peaks, Polarity, Precursor, Representation, SpectrumMeta};
use proptest::prelude::*;

fn spectrum() -> impl Strategy<Value = (SpectrumMeta, Peaks)> {
    (
        1u8..=3,
        prop_oneof![Just(Polarity::Positive), Just(Polarity::Negative), Just(Polarity::Unknown)],
        prop_oneof![Just(Representation::Profile), Just(Representation::Centroid)],
        proptest::option::of(0.0f64..120.0),
        proptest::collection::vec((50.0f64..2000.0, 0.0f64..1e7), 0..40),
        proptest::option::of((50.0f64..2000.0, -3i32..=3)),
    )
        .prop_map(|(level, polarity, representation, rt, mut points, pre)| {
            points.sort_by(|a, b| a.0.total_cmp(&b.0));
            let precursors = pre
                .filter(|_| level > 1)
                .map(|(mz, z)| Precursor {
                    selected_mz: Some(mz),
                    charge: Some(z),
                    isolation_target: Some(mz),
                    isolation_lower_offset: Some(1.0),
                    isolation_upper_offset: Some(1.5),
                })
                .into_iter()
                .collect();
            let meta = SpectrumMeta {
                ms_level: level,
                polarity,
                representation,
                rt_min: rt,
                precursors,
                ..Default::default()
            };
            let peaks = Peaks {
                mz: points.iter().map(|p| p.0).collect(),
                intensity: points.iter().map(|p| p.1).collect(),
            };
            (meta, peaks)
        })
}

fn lossless_encoding() -> impl Strategy<Value = BinaryEncoding> {
    prop_oneof![Just(Compression::None), Just(Compression::Zlib)]
        .prop_map(|compression| BinaryEncoding { numeric: NumericType::F64, compression })
}

fn write(spectra: &[(SpectrumMeta, Peaks)], options: WriterOptions) -> Vec<u8> {
    let mut w = Writer::new(Vec::new(), WriterOptions { spectrum_count: spectra.len(), ..options })
        .unwrap();
    for (i, (meta, peaks)) in spectra.iter().enumerate() {
        let meta = SpectrumMeta { id: format!("scan={}", i + 1), ..meta.clone() };
        w.write_spectrum(&meta, peaks).unwrap();
    }
    w.finish().unwrap()
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 64, ..ProptestConfig::default() })]

    #[test]
    fn documents_round_trip(
        spectra in proptest::collection::vec(spectrum(), 0..8),
        mz_encoding in lossless_encoding(),
        intensity_encoding in lossless_encoding(),
        indexed in any::<bool>(),
        param_groups in any::<bool>(),
        rt_in_seconds in any::<bool>(),
        gzip in any::<bool>(),
    ) {
        let options = WriterOptions {
            mz_encoding, intensity_encoding, indexed, param_groups, rt_in_seconds,
            ..Default::default()
        };
        let doc = write(&spectra, options);
        let bytes = if gzip {
            let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
            std::io::Write::write_all(&mut gz, &doc).unwrap();
            gz.finish().unwrap()
        } else {
            doc.clone()
        };
        let mut r = Reader::with_options(&bytes[..], ReaderOptions::default().verify_checksum(true)).unwrap();
        let mut n = 0;
        for (i, item) in r.by_ref().enumerate() {
            let s = item.unwrap();
            let (meta, peaks) = &spectra[i];
            prop_assert_eq!(s.meta.index, i);
            prop_assert_eq!(&s.meta.id, &format!("scan={}", i + 1));
            prop_assert_eq!(s.meta.ms_level, meta.ms_level);
            prop_assert_eq!(s.meta.polarity, meta.polarity);
            prop_assert_eq!(s.meta.representation, meta.representation);
            prop_assert_eq!(&s.meta.precursors, &meta.precursors);
            match (s.meta.rt_min, meta.rt_min) {
                (Some(a), Some(b)) => prop_assert!((a - b).abs() <= 1e-12 * b.max(1.0)),
                (a, b) => prop_assert_eq!(a, b),
            }
            let p = s.decode().unwrap();
            prop_assert_eq!(&p, peaks);
            n += 1;
        }
        prop_assert_eq!(n, spectra.len());
        let expected = if indexed { ChecksumStatus::Verified } else { ChecksumStatus::Absent };
        prop_assert_eq!(r.checksum_status(), &expected);
        if indexed {
            let mut ir = IndexedReader::new(Cursor::new(doc)).unwrap();
            prop_assert_eq!(ir.len(), spectra.len());
            for i in (0..spectra.len()).rev() {
                let s = ir.by_id(&format!("scan={}", i + 1)).unwrap();
                prop_assert_eq!(&s.decode().unwrap(), &spectra[i].1);
            }
        }
    }
}
