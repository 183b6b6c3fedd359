//! Regenerates the reader fixtures in `fixtures/` (one small file per variant of the format).
//!
//! Run `cargo run -p mzcore --example make_fixtures -- fixtures`. Every file is deterministic;
//! `mzcore/tests/fixtures.rs` checks that the committed files equal a fresh generation.
//! Variants that need byte-level edits (prefixes, CRLF, Latin-1, wrapped base64, extra arrays)
//! are written as plain `mzML`, since the edits move every byte offset an index would hold.

use std::path::{Path, PathBuf};

use mzcore::mzml::binary::{BinaryEncoding, Compression, NumericType};
use mzcore::mzml::{Writer, WriterOptions};
use mzcore::spectrum::{Ionization, Peaks, Polarity, Precursor, Representation, SpectrumMeta};

/// The four spectra every fixture holds (same values in every variant).
fn spectra() -> Vec<(SpectrumMeta, Peaks)> {
    let profile = |centre: f64, height: f64| {
        let mz: Vec<f64> = (0..40).map(|i| centre - 0.2 + i as f64 * 0.01).collect();
        let intensity = mz
            .iter()
            .map(|m| (height * (-((m - centre) / 0.02f64).powi(2) / 2.0).exp()).round())
            .collect();
        Peaks { mz, intensity }
    };
    let mut first = profile(151.9904, 3000.0);
    let second = profile(153.9875, 1000.0);
    first.mz.extend(second.mz);
    first.intensity.extend(second.intensity);
    let ms1 = |index: usize, rt: f64| SpectrumMeta {
        index,
        id: format!("scan={}", index + 1),
        ms_level: 1,
        polarity: Polarity::Positive,
        representation: Representation::Profile,
        rt_min: Some(rt),
        ..Default::default()
    };
    vec![
        (ms1(0, 0.5), first),
        (
            SpectrumMeta {
                index: 1,
                id: "scan=2".into(),
                ms_level: 2,
                polarity: Polarity::Positive,
                representation: Representation::Centroid,
                rt_min: Some(0.51),
                precursors: vec![Precursor {
                    selected_mz: Some(151.9904),
                    charge: Some(1),
                    isolation_target: Some(151.99),
                    isolation_lower_offset: Some(0.5),
                    isolation_upper_offset: Some(0.5),
                }],
                ..Default::default()
            },
            Peaks {
                mz: vec![63.0, 91.0, 116.9637, 151.9904],
                intensity: vec![120.0, 850.0, 40.0, 310.0],
            },
        ),
        (ms1(2, 0.52), Peaks::default()),
        (ms1(3, 0.53), profile(199.9462, 12000.0)),
    ]
}

fn write(path: &Path, options: WriterOptions) -> Vec<u8> {
    let data = spectra();
    let options = WriterOptions { spectrum_count: data.len(), ..options };
    let mut w = Writer::new(Vec::new(), options).expect("in-memory writer");
    for (meta, peaks) in &data {
        w.write_spectrum(meta, peaks).expect("in-memory writer");
    }
    let bytes = w.finish().expect("in-memory writer");
    std::fs::write(path, &bytes).expect("write fixture");
    bytes
}

fn enc(numeric: NumericType, compression: Compression) -> BinaryEncoding {
    BinaryEncoding { numeric, compression }
}

fn plain(options: WriterOptions) -> WriterOptions {
    WriterOptions { indexed: false, ..options }
}

fn edit(dir: &Path, name: &str, f: impl Fn(String) -> String) {
    let base = write(&dir.join(name), plain(WriterOptions::default()));
    let text = f(String::from_utf8(base).expect("writer emits UTF-8"));
    std::fs::write(dir.join(name), text).expect("write fixture");
}

/// Wraps every `<binary>` text at 60 characters with CRLF-free newlines and indentation.
fn wrap_binary(s: String) -> String {
    let mut out = String::with_capacity(s.len() * 2);
    let mut rest = s.as_str();
    while let Some(i) = rest.find("<binary>") {
        let (head, tail) = rest.split_at(i + "<binary>".len());
        out.push_str(head);
        let end = tail.find("</binary>").expect("closed binary");
        let b64 = &tail[..end];
        for chunk in b64.as_bytes().chunks(60) {
            out.push_str("\n            ");
            out.push_str(std::str::from_utf8(chunk).expect("ascii"));
        }
        out.push_str("\n          ");
        rest = &tail[end..];
    }
    out.push_str(rest);
    out
}

/// Puts the prefix `ms:` on every element of the mzML namespace.
fn prefix_elements(s: String) -> String {
    let mut out = String::with_capacity(s.len() + s.len() / 8);
    let mut chars = s.char_indices().peekable();
    let bytes = s.as_bytes();
    while let Some((i, c)) = chars.next() {
        out.push(c);
        if c == '<' {
            let next = bytes.get(i + 1).copied().unwrap_or(b' ');
            if next == b'/' {
                chars.next();
                out.push_str("/ms:");
            } else if next.is_ascii_alphabetic() {
                out.push_str("ms:");
            }
        }
    }
    out.replace("xmlns=\"http://psi.hupo.org/ms/mzml\"", "xmlns:ms=\"http://psi.hupo.org/ms/mzml\"")
}

/// Adds a non-standard array after the intensity array of every spectrum.
fn extra_array(s: String) -> String {
    let extra = "          <binaryDataArray encodedLength=\"0\">\n            <cvParam cvRef=\"MS\" accession=\"MS:1000523\" name=\"64-bit float\" value=\"\"/>\n            <cvParam cvRef=\"MS\" accession=\"MS:1000576\" name=\"no compression\" value=\"\"/>\n            <cvParam cvRef=\"MS\" accession=\"MS:1000786\" name=\"non-standard data array\" value=\"drift time\"/>\n            <binary></binary>\n          </binaryDataArray>\n        </binaryDataArrayList>\n      </spectrum>";
    s.replace("<binaryDataArrayList count=\"2\">", "<binaryDataArrayList count=\"3\">")
        .replace("        </binaryDataArrayList>\n      </spectrum>", extra)
}

/// Moves each spectrum's length from `defaultArrayLength` onto its arrays' `arrayLength`.
fn array_lengths(s: String) -> String {
    let mut out = String::new();
    for part in s.split_inclusive("</spectrum>") {
        let Some(at) = part.find("defaultArrayLength=\"") else {
            out.push_str(part);
            continue;
        };
        let start = at + "defaultArrayLength=\"".len();
        let len: String = part[start..].chars().take_while(char::is_ascii_digit).collect();
        let part =
            part.replacen(&format!("defaultArrayLength=\"{len}\""), "defaultArrayLength=\"7\"", 1);
        out.push_str(&part.replace(
            "<binaryDataArray encodedLength=",
            &format!("<binaryDataArray arrayLength=\"{len}\" encodedLength="),
        ));
    }
    out
}

/// Re-encodes as ISO-8859-1 with a Latin-1 character in the run id.
fn latin1(dir: &Path, name: &str) {
    let base = write(
        &dir.join(name),
        plain(WriterOptions { run_id: "run_Üfer".into(), ..Default::default() }),
    );
    let text = String::from_utf8(base)
        .expect("utf-8")
        .replace("encoding=\"utf-8\"", "encoding=\"ISO-8859-1\"");
    let bytes: Vec<u8> =
        text.chars().map(|c| u8::try_from(c as u32).expect("Latin-1 text")).collect();
    std::fs::write(dir.join(name), bytes).expect("write fixture");
}

fn main() {
    let dir = PathBuf::from(std::env::args().nth(1).unwrap_or_else(|| "fixtures".into()));
    std::fs::create_dir_all(&dir).expect("create fixture dir");
    let default = WriterOptions::default();
    // Reference: indexed, 64-bit m/z and 32-bit intensity, zlib.
    write(&dir.join("variant-indexed-zlib.mzML"), default.clone());
    write(&dir.join("variant-plain.mzML"), plain(default.clone()));
    // Gzip-compressed copy of the reference (offsets refer to the decompressed bytes).
    let reference = std::fs::read(dir.join("variant-indexed-zlib.mzML")).expect("read back");
    let mut gz = flate2::GzBuilder::new().mtime(0).write(Vec::new(), flate2::Compression::new(6));
    std::io::Write::write_all(&mut gz, &reference).expect("gzip");
    std::fs::write(dir.join("variant-indexed-zlib.mzML.gz"), gz.finish().expect("gzip"))
        .expect("write fixture");
    for (name, mz, it) in [
        (
            "encoding-f32-none",
            enc(NumericType::F32, Compression::None),
            enc(NumericType::F32, Compression::None),
        ),
        (
            "encoding-f64-none",
            enc(NumericType::F64, Compression::None),
            enc(NumericType::F64, Compression::None),
        ),
        (
            "encoding-int-zlib",
            enc(NumericType::F64, Compression::Zlib),
            enc(NumericType::I32, Compression::Zlib),
        ),
        (
            "encoding-int64-none",
            enc(NumericType::F64, Compression::None),
            enc(NumericType::I64, Compression::None),
        ),
        (
            "encoding-numpress-linear-pic",
            enc(NumericType::F64, Compression::NumpressLinear),
            enc(NumericType::F64, Compression::NumpressPic),
        ),
        (
            "encoding-numpress-linear-slof",
            enc(NumericType::F64, Compression::NumpressLinear),
            enc(NumericType::F64, Compression::NumpressSlof),
        ),
        (
            "encoding-numpress-zlib",
            enc(NumericType::F64, Compression::NumpressLinearZlib),
            enc(NumericType::F64, Compression::NumpressPicZlib),
        ),
        (
            "encoding-numpress-slof-zlib",
            enc(NumericType::F64, Compression::NumpressLinearZlib),
            enc(NumericType::F64, Compression::NumpressSlofZlib),
        ),
    ] {
        let o = WriterOptions { mz_encoding: mz, intensity_encoding: it, ..default.clone() };
        write(&dir.join(format!("{name}.mzML")), o);
    }
    write(
        &dir.join("variant-param-groups-seconds-ei.mzML"),
        WriterOptions {
            param_groups: true,
            rt_in_seconds: true,
            ionization: Ionization::Electron,
            ..default.clone()
        },
    );
    edit(&dir, "variant-crlf.mzML", |s| s.replace('\n', "\r\n"));
    edit(&dir, "variant-wrapped-base64.mzML", wrap_binary);
    edit(&dir, "variant-ns-prefix.mzML", prefix_elements);
    edit(&dir, "variant-extra-array.mzML", extra_array);
    edit(&dir, "variant-array-length.mzML", array_lengths);
    edit(&dir, "variant-escaped-ids.mzML", |s| {
        s.replace("id=\"scan=2\"", "id=\"scan=2 title=a&amp;b_x0020_c\"")
            .replace("idRef=\"scan=2\"", "idRef=\"scan=2 title=a&amp;b_x0020_c\"")
    });
    latin1(&dir, "variant-latin1.mzML");
}
