//! What the fuzz targets share: each target in `fuzz_targets/` is a few lines that call one of
//! these functions, so a new target (for example a rules loader) is one small file plus one
//! `[[bin]]` entry in `Cargo.toml`.
//!
//! Every function here must never panic on any input; errors are fine. Where a property must
//! hold (a round trip, a bounded number of results) it is asserted, and a failed assertion is
//! a crash that libFuzzer records.

use std::io::{Cursor, Write};

use mzcore::mzml::binary::{self, BinaryEncoding, Compression, NumericType};
use mzcore::mzml::{IndexedReader, Reader, ReaderOptions};
use mzcore::spectrum::{Peaks, Spectrum};

/// Reader options for fuzzing: the defaults with checksum verification on, so that path runs
/// too.
pub fn options() -> ReaderOptions {
    ReaderOptions::default().verify_checksum(true)
}

/// Reads a whole document (plain or gzip) with the streaming reader, decoding every array of
/// every spectrum, then reads it again through the random-access reader.
///
/// Asserts that the streaming reader stops: it may return at most one result per input byte
/// (plus a few trailing index and checksum errors), never loop on the same error.
pub fn read_document(data: &[u8]) {
    stream(data);
    random_access(data);
}

/// The streaming pass of [`read_document`]; returns the number of results handed out.
pub fn stream(data: &[u8]) -> usize {
    let Ok(mut reader) = Reader::with_options(data, options()) else { return 0 };
    let mut spectrum = Spectrum::default();
    let mut peaks = Peaks::default();
    let mut results = 0usize;
    loop {
        match reader.read_spectrum(&mut spectrum) {
            Ok(false) => break,
            Ok(true) => {
                let _ = spectrum.decode_into(&mut peaks);
                let mut values = Vec::new();
                for a in &spectrum.arrays {
                    let _ = a.decode_into(&mut values);
                }
            }
            Err(e) => {
                // Display must work for every error (it is what users see).
                let _ = e.to_string();
            }
        }
        results += 1;
        assert!(
            results <= data.len() + 8,
            "reader handed out {results} results for {} input bytes: it does not stop",
            data.len()
        );
    }
    let _ = reader.tic_chromatogram();
    let _ = reader.checksum_status();
    results
}

/// The random-access pass of [`read_document`]: the index, then every listed spectrum (the
/// first 64) by position and by id.
pub fn random_access(data: &[u8]) {
    let Ok(mut reader) = IndexedReader::with_options(Cursor::new(data), options()) else {
        return;
    };
    let ids: Vec<String> = reader.index().iter().take(64).map(|(id, _)| id.clone()).collect();
    for (i, id) in ids.iter().enumerate() {
        if let Ok(s) = reader.by_index(i) {
            let _ = s.decode();
        }
        let _ = reader.by_id(id);
    }
}

/// The start of a minimal valid indexed-less mzML document, up to the opening `spectrumList`:
/// a param group and an instrument configuration, so references inside a spectrum resolve.
pub const SPECTRUM_PREFIX: &str = r#"<?xml version="1.0" encoding="utf-8"?>
<mzML xmlns="http://psi.hupo.org/ms/mzml" version="1.1.0">
<cvList count="1"><cv id="MS" fullName="PSI-MS" URI="psi-ms.obo"/></cvList>
<referenceableParamGroupList count="1"><referenceableParamGroup id="pg1"><cvParam cvRef="MS" accession="MS:1000130" name="positive scan"/><cvParam cvRef="MS" accession="MS:1000128" name="profile spectrum"/></referenceableParamGroup></referenceableParamGroupList>
<instrumentConfigurationList count="1"><instrumentConfiguration id="IC1"><componentList count="1"><source order="1"><cvParam cvRef="MS" accession="MS:1000073" name="electrospray ionization"/></source></componentList></instrumentConfiguration></instrumentConfigurationList>
<run id="fuzz" defaultInstrumentConfigurationRef="IC1"><spectrumList count="1" defaultDataProcessingRef="dp">
"#;

/// The end of the document that [`SPECTRUM_PREFIX`] opens.
pub const SPECTRUM_SUFFIX: &str = "\n</spectrumList></run></mzML>\n";

/// Reads `data` as the body of a `spectrumList` (normally one `<spectrum>` element) inside a
/// valid document.
pub fn read_spectrum_element(data: &[u8]) {
    let mut doc = Vec::with_capacity(SPECTRUM_PREFIX.len() + data.len() + SPECTRUM_SUFFIX.len());
    doc.extend_from_slice(SPECTRUM_PREFIX.as_bytes());
    doc.extend_from_slice(data);
    doc.extend_from_slice(SPECTRUM_SUFFIX.as_bytes());
    stream(&doc);
}

/// Every numeric type, in the order a selector byte picks them.
pub const NUMERIC: [NumericType; 4] =
    [NumericType::F32, NumericType::F64, NumericType::I32, NumericType::I64];

/// The encoding chosen by a selector byte: bits 0-1 the numeric type, bits 2-4 the compression
/// (all eight: none, zlib, MS-Numpress linear / pic / slof and each followed by zlib).
pub fn encoding_of(selector: u8) -> BinaryEncoding {
    BinaryEncoding {
        numeric: NUMERIC[usize::from(selector & 3)],
        compression: Compression::ALL[usize::from(selector >> 2 & 7)],
    }
}

/// Decodes one binary array.
///
/// Input layout: a selector byte (see [`encoding_of`]; bit 5 set means "the payload is raw
/// bytes: base64-encode it, and zlib-compress it first when the encoding says zlib", so the
/// fuzzer reaches the numeric and MS-Numpress decoders without having to invent valid base64
/// and zlib), two bytes of declared length (little-endian), then the payload.
///
/// Asserts that a successful decode yields exactly the declared number of values.
pub fn decode_array(data: &[u8]) {
    let [selector, l0, l1, payload @ ..] = data else { return };
    let encoding = encoding_of(*selector);
    let declared = usize::from(u16::from_le_bytes([*l0, *l1]));
    let text: Vec<u8> = if selector & 0x20 != 0 {
        let raw = if encoding.compression.has_zlib() { zlib(payload) } else { payload.to_vec() };
        base64_encode(&raw).into_bytes()
    } else {
        payload.to_vec()
    };
    let mut out = Vec::new();
    if binary::decode_into(&text, encoding, declared, &mut out).is_ok() {
        assert_eq!(out.len(), declared, "decoded length differs from the declared one");
    }
    // The MS-Numpress decoders on their own, on the raw payload.
    let mut values = Vec::new();
    let _ = mzcore::mzml::numpress::decode_linear(payload, &mut values);
    let _ = mzcore::mzml::numpress::decode_pic(payload, &mut values);
    let _ = mzcore::mzml::numpress::decode_slof(payload, &mut values);
}

fn zlib(bytes: &[u8]) -> Vec<u8> {
    let mut e = flate2::write::ZlibEncoder::new(Vec::new(), flate2::Compression::fast());
    e.write_all(bytes).expect("writing to memory");
    e.finish().expect("writing to memory")
}

/// Standard base64 with padding (RFC 4648 section 4), written here so the fuzz harness does not
/// share its encoder with the code under test.
pub fn base64_encode(bytes: &[u8]) -> String {
    const ALPHABET: &[u8; 64] = b"ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
    let mut out = String::with_capacity(bytes.len().div_ceil(3) * 4);
    for chunk in bytes.chunks(3) {
        let b = [chunk[0], *chunk.get(1).unwrap_or(&0), *chunk.get(2).unwrap_or(&0)];
        let n = u32::from(b[0]) << 16 | u32::from(b[1]) << 8 | u32::from(b[2]);
        for i in 0..4 {
            if i <= chunk.len() {
                out.push(ALPHABET[(n >> (18 - 6 * i) & 63) as usize] as char);
            } else {
                out.push('=');
            }
        }
    }
    out
}

/// Parses a formula; a parsed formula's masses are finite and its Hill notation parses back to
/// the same formula.
pub fn parse_formula(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(f) = mzcore::chem::Formula::parse(text) else { return };
    let _ = f.nominal_mass();
    let _ = f.nitrogen_rule();
    let mono = f.monoisotopic_mass();
    assert!(mono.is_finite(), "monoisotopic mass of {text:?} is {mono}");
    let hill = f.hill();
    let again = mzcore::chem::Formula::parse(&hill)
        .unwrap_or_else(|e| panic!("Hill form {hill:?} of {text:?} does not parse: {e}"));
    assert_eq!(again, f, "Hill form {hill:?} of {text:?} parses to another formula");
}

/// Parses an ion type (text before a `|`, if any, is also tried as a formula the ion is
/// applied to).
pub fn parse_ion_type(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let (formula, ion) = text.split_once('|').unwrap_or(("C6H4Cl2", text));
    let Ok(ion) = mzcore::chem::IonType::parse(ion) else { return };
    let _ = ion.charge();
    let _ = ion.is_radical();
    let _ = ion.adduct_mass();
    let _ = ion.shell_name();
    let _ = ion.mz_from_mass(200.0);
    if let Ok(m) = mzcore::chem::Formula::parse(formula) {
        let _ = ion.ion_formula(&m);
        let _ = ion.mz(&m);
        let _ = ion.nominal_mass(&m);
    }
}

/// Loads a screening configuration; an accepted one survives a round trip through its TOML.
pub fn load_config(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(config) = mzcore::screen::ScreenConfig::from_toml(text) else { return };
    let written = config.to_toml();
    let again = mzcore::screen::ScreenConfig::from_toml(&written)
        .unwrap_or_else(|e| panic!("written configuration does not load: {e}\n{written}"));
    // NaN never equals itself: compare the written forms, which is what users keep.
    assert_eq!(again.to_toml(), written, "configuration changes on a round trip");
}

/// Loads QC rules (`mzsift check --rules`): any text is accepted or refused with an error, and
/// accepted rules yield their trace targets and validate again without panicking.
pub fn load_rules(data: &[u8]) {
    let Ok(text) = std::str::from_utf8(data) else { return };
    let Ok(rules) = mzcore::qc::QcRules::from_toml(text) else { return };
    rules.validate().expect("rules that loaded validate");
    let _ = rules.trace_targets("blank-01.mzML");
}
