//! Malformed input: each case asserts the error kind, where it is reported, and that the
//! good spectra before and after it still arrive where the format allows.

use std::io::Cursor;

use mzcore::mzml::{IndexedReader, Reader, ReaderOptions, Writer, WriterOptions};
use mzcore::spectrum::{Peaks, SpectrumMeta};
use mzcore::{Error, ErrorKind};

const IDS: [&str; 3] = ["scan=1", "scan=2", "scan=3"];

/// A document of three MS1 spectra with four points each.
fn document(indexed: bool) -> String {
    let options = WriterOptions { spectrum_count: 3, indexed, ..Default::default() };
    let mut w = Writer::new(Vec::new(), options).unwrap();
    for (i, id) in IDS.iter().enumerate() {
        let meta = SpectrumMeta {
            id: (*id).into(),
            ms_level: 1,
            rt_min: Some(i as f64),
            ..Default::default()
        };
        let base = 100.0 + 10.0 * i as f64;
        let peaks = Peaks {
            mz: vec![base, base + 1.0, base + 2.0, base + 3.0],
            intensity: vec![10.0, 20.0, 30.0, 40.0],
        };
        w.write_spectrum(&meta, &peaks).unwrap();
    }
    String::from_utf8(w.finish().unwrap()).unwrap()
}

/// Start and end byte of spectrum `i` in `doc`.
fn spectrum_span(doc: &str, i: usize) -> (usize, usize) {
    let start = doc.match_indices("<spectrum ").nth(i).unwrap().0;
    let end = start + doc[start..].find("</spectrum>").unwrap() + "</spectrum>".len();
    (start, end)
}

/// Replaces the first `from` inside spectrum `i` by `to`.
fn edit_spectrum(doc: &str, i: usize, from: &str, to: &str) -> String {
    let (s, e) = spectrum_span(doc, i);
    let body = &doc[s..e];
    assert!(body.contains(from), "test setup: {from:?} not in spectrum {i}");
    format!("{}{}{}", &doc[..s], body.replacen(from, to, 1), &doc[e..])
}

/// What happened to each spectrum: `Ok(id)` when read and decoded, or the error.
fn outcomes(bytes: &[u8], options: ReaderOptions) -> Vec<Result<String, Error>> {
    outcomes_of(bytes, options)
}

fn outcomes_of<R: std::io::BufRead>(
    input: R,
    options: ReaderOptions,
) -> Vec<Result<String, Error>> {
    let mut r = Reader::with_options(input, options).unwrap();
    let mut out = Vec::new();
    for _ in 0..100 {
        match r.next() {
            None => return out,
            Some(Ok(s)) => out.push(s.decode().map(|_| s.meta.id.clone())),
            Some(Err(e)) => out.push(Err(e)),
        }
    }
    panic!("reader did not stop after 100 items");
}

fn ids_ok(outcomes: &[Result<String, Error>]) -> Vec<&str> {
    outcomes.iter().filter_map(|o| o.as_ref().ok().map(String::as_str)).collect()
}

fn only_error(outcomes: &[Result<String, Error>]) -> &Error {
    let errs: Vec<&Error> = outcomes.iter().filter_map(|o| o.as_ref().err()).collect();
    assert_eq!(errs.len(), 1, "expected exactly one error, got {errs:?}");
    errs[0]
}

/// Asserts the error names spectrum 1 (`scan=2`) and a byte offset inside it.
fn assert_in_second_spectrum(doc: &str, e: &Error) {
    let p = e.position();
    assert_eq!(p.spectrum_index, Some(1), "{e}");
    assert_eq!(p.spectrum_id.as_deref(), Some("scan=2"), "{e}");
    let (s, end) = spectrum_span(doc, 1);
    let at = p.byte_offset.expect("byte offset") as usize;
    assert!((s..end).contains(&at), "offset {at} not in {s}..{end}: {e}");
}

fn plain() -> ReaderOptions {
    ReaderOptions::default()
}

#[test]
fn bad_base64_spoils_one_spectrum() {
    let doc = document(false);
    let (s, e) = spectrum_span(&doc, 1);
    let b = s + doc[s..e].find("<binary>").unwrap() + 8;
    let bad = format!("{}@{}", &doc[..b], &doc[b + 1..]);
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Base64(_)), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn wrong_encoded_length_spoils_one_spectrum() {
    let doc = document(false);
    let (s, e) = spectrum_span(&doc, 1);
    let at = s + doc[s..e].find("encodedLength=\"").unwrap() + "encodedLength=\"".len();
    let bad = format!("{}9{}", &doc[..at], &doc[at..]);
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(
        matches!(e.kind(), ErrorKind::LengthMismatch { what, .. } if what == "encodedLength"),
        "{e}"
    );
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn corrupt_zlib_stream_spoils_one_spectrum() {
    // Valid base64 of bytes that are not a zlib stream ("AAAA" = three zero bytes), with a
    // matching encodedLength.
    let doc = document(false);
    let (s, e) = spectrum_span(&doc, 1);
    let body = &doc[s..e];
    let b0 = body.find("<binary>").unwrap() + 8;
    let b1 = body.find("</binary>").unwrap();
    let old_len = b1 - b0;
    let new_body = format!("{}AAAA{}", &body[..b0], &body[b1..]).replacen(
        &format!("encodedLength=\"{old_len}\""),
        "encodedLength=\"4\"",
        1,
    );
    let bad = format!("{}{}{}", &doc[..s], new_body, &doc[e..]);
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Inflate(_)), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn decoded_length_not_the_declared_length() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 1, "defaultArrayLength=\"4\"", "defaultArrayLength=\"5\"");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::LengthMismatch { declared: 5, found: 4, .. }), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn unknown_compression_accession() {
    let doc = document(false);
    let bad = edit_spectrum(
        &doc,
        1,
        "accession=\"MS:1000574\" name=\"zlib compression\"",
        "accession=\"MS:1009999\" name=\"future compression\"",
    );
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(
        matches!(e.kind(), ErrorKind::UnsupportedAccession { accession, .. } if accession == "MS:1009999"),
        "{e}"
    );
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn missing_ms_level() {
    let doc = document(false);
    let bad = edit_spectrum(
        &doc,
        1,
        "<cvParam cvRef=\"MS\" accession=\"MS:1000511\" name=\"ms level\" value=\"1\"/>",
        "",
    );
    let bad = bad.replacen(
        "<cvParam cvRef=\"MS\" accession=\"MS:1000579\" name=\"MS1 spectrum\" value=\"\"/>\n          <cvParam",
        "<cvParam",
        0,
    );
    // Also drop the "MS1 spectrum" term of that spectrum, which would imply level 1.
    let bad = edit_spectrum(
        &bad,
        1,
        "<cvParam cvRef=\"MS\" accession=\"MS:1000579\" name=\"MS1 spectrum\" value=\"\"/>",
        "",
    );
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::MissingCvParam(m) if m.contains("MS:1000511")), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn invalid_ms_level_value() {
    let doc = document(false);
    let bad =
        edit_spectrum(&doc, 1, "name=\"ms level\" value=\"1\"", "name=\"ms level\" value=\"one\"");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::InvalidValue { value, .. } if value == "one"), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn duplicate_ids() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 2, "id=\"scan=3\"", "id=\"scan=1\"");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=2"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::DuplicateId(id) if id == "scan=1"), "{e}");
    assert_eq!(e.position().spectrum_index, Some(2));
}

#[test]
fn index_offset_pointing_elsewhere_is_a_warning_not_an_error() {
    // Offsets a few bytes off (and far off) are covered case by case in index_tolerance.rs;
    // here: 7 bytes into the element, streaming and random access both read everything.
    let doc = document(true);
    let real = spectrum_span(&doc, 1).0;
    let bad = doc.replacen(
        &format!("<offset idRef=\"scan=2\">{real}</offset>"),
        &format!("<offset idRef=\"scan=2\">{}</offset>", real + 7),
        1,
    );
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), IDS);
    assert_eq!(o.len(), 3, "no error: {o:?}");
    let mut r = IndexedReader::new(Cursor::new(bad.into_bytes())).unwrap();
    for id in IDS {
        assert_eq!(r.by_id(id).unwrap().meta.id, id);
    }
    assert_eq!(r.warnings().len(), 1, "{:?}", r.warnings());
}

#[test]
fn index_list_deeply_nested_or_oversized_is_not_used_by_random_access() {
    // What follows <indexList> is read by the random-access reader alone: a crafted file must
    // not make that read unbounded (in nesting or in bytes). The index is then not used: a
    // warning names the limit, and the spectra are located by reading the file.
    let doc = document(true);
    let list = doc.find("<indexList").unwrap();
    let open_end = list + doc[list..].find('>').unwrap() + 1;
    let nested = format!("{}{}{}", &doc[..open_end], "<a>".repeat(100_000), &doc[open_end..]);
    let mut r = IndexedReader::new(Cursor::new(nested.into_bytes())).unwrap();
    let w = r.warnings()[0].to_string();
    assert!(w.contains("max_depth") && w.contains("not used"), "{w}");
    assert_eq!(r.len(), 3);
    assert_eq!(r.by_id("scan=3").unwrap().meta.id, "scan=3");
    let padded = format!("{}{}{}", &doc[..open_end], " ".repeat(100_000), &doc[open_end..]);
    let options = plain().max_event_bytes(50_000);
    let r = IndexedReader::with_options(Cursor::new(padded.clone().into_bytes()), options).unwrap();
    let w = r.warnings()[0].to_string();
    assert!(w.contains("max_event_bytes"), "{w}");
    assert_eq!(r.len(), 3);
    // Within the limits the same padded file reads through its index.
    let r = IndexedReader::new(Cursor::new(padded.into_bytes())).unwrap();
    assert_eq!(r.len(), 3);
    assert!(r.warnings().is_empty());
}

#[test]
fn checksum_mismatch() {
    let doc = document(true);
    // Change one digit of a value (same length, so offsets stay right).
    let bad = doc.replacen("value=\"1\"/>", "value=\"2\"/>", 1);
    let o = outcomes(bad.as_bytes(), plain().verify_checksum(true));
    assert_eq!(ids_ok(&o), IDS);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::ChecksumMismatch { .. }), "{e}");
    // Without verification nothing is reported.
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), IDS);
    assert_eq!(o.len(), 3);
}

#[test]
fn truncated_inside_binary() {
    let doc = document(true);
    let (s, e) = spectrum_span(&doc, 1);
    let cut = s + doc[s..e].find("<binary>").unwrap() + 12;
    let o = outcomes(&doc.as_bytes()[..cut], plain());
    assert_eq!(ids_ok(&o), ["scan=1"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Truncated { complete_spectra: 1 }), "{e}");
}

#[test]
fn truncated_between_spectra_and_before_index() {
    let doc = document(true);
    for cut in [spectrum_span(&doc, 2).0, doc.find("<indexList").unwrap()] {
        let o = outcomes(&doc.as_bytes()[..cut], plain());
        let e = only_error(&o);
        assert!(matches!(e.kind(), ErrorKind::Truncated { .. }), "{e}");
        assert_eq!(e.position().byte_offset, Some(cut as u64));
    }
}

#[test]
fn truncated_gzip() {
    let doc = document(true);
    let mut gz = flate2::write::GzEncoder::new(Vec::new(), flate2::Compression::fast());
    std::io::Write::write_all(&mut gz, doc.as_bytes()).unwrap();
    let gz = gz.finish().unwrap();
    // Cut inside the deflate data, short of the 8-byte trailer (RFC 1952).
    let o = outcomes(&gz[..gz.len() - 40], plain());
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Truncated { .. }), "{e}");
    assert!(!ids_ok(&o).is_empty(), "spectra before the cut arrive");
}

#[test]
fn not_xml_and_empty_and_wrong_root() {
    for (input, what) in [
        (&b"\x89PNG\r\n\x1a\n\0\0\0\rIHDR"[..], "binary garbage"),
        (b"mass list\n100.0\t5\n", "plain text"),
        (b"", "empty"),
        (b"<?xml version=\"1.0\"?><html><body/></html>", "other XML"),
    ] {
        let o = outcomes(input, plain());
        assert_eq!(o.len(), 1, "{what}: {o:?}");
        let e = only_error(&o);
        assert!(
            matches!(
                e.kind(),
                ErrorKind::NotMzml(_) | ErrorKind::Xml(_) | ErrorKind::UnsupportedFormat(_)
            ),
            "{what}: {e}"
        );
    }
}

#[test]
fn undefined_entity_in_an_attribute() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 1, "id=\"scan=2\"", "id=\"scan=2&bogus;\"");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Xml(m) if m.contains("entity")), "{e}");
    assert_eq!(e.position().spectrum_index, Some(1));
}

#[test]
fn garbage_nesting_spoils_one_spectrum() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 1, "</scan>", "</precursor>");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Xml(m) if m.contains("</precursor>")), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn unclosed_element_inside_a_spectrum() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 1, "</scanList>", "");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::Xml(_)), "{e}");
    assert_eq!(e.position().spectrum_index, Some(1));
}

#[test]
fn oversized_element_hits_the_ceiling() {
    let doc = document(false);
    // A small read buffer, as a large file would give: the ceiling is checked whenever the
    // tokenizer asks for more bytes of the same event.
    let small = std::io::BufReader::with_capacity(16, doc.as_bytes());
    let mut r = Reader::with_options(small, plain().max_event_bytes(64)).unwrap();
    let o: Vec<Result<String, Error>> = r.by_ref().map(|s| s.map(|s| s.meta.id)).collect();
    let e = o.iter().find_map(|o| o.as_ref().err()).expect("an error");
    assert!(matches!(e.kind(), ErrorKind::LimitExceeded { limit: 64, .. }), "{e}");
    assert!(o.len() <= 2, "fatal: reader stops after it");
}

#[test]
fn absurd_declared_array_length() {
    let doc = document(false);
    let bad =
        edit_spectrum(&doc, 1, "defaultArrayLength=\"4\"", "defaultArrayLength=\"4000000000\"");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(matches!(e.kind(), ErrorKind::LimitExceeded { .. }), "{e}");
    assert_in_second_spectrum(&bad, e);
}

#[test]
fn missing_required_attribute() {
    let doc = document(false);
    let bad = edit_spectrum(&doc, 1, "index=\"1\" ", "");
    let o = outcomes(bad.as_bytes(), plain());
    assert_eq!(ids_ok(&o), ["scan=1", "scan=3"]);
    let e = only_error(&o);
    assert!(
        matches!(e.kind(), ErrorKind::MissingAttribute { attribute, .. } if attribute == "index"),
        "{e}"
    );
}

#[test]
fn reader_stops_after_a_fatal_error() {
    let doc = document(false);
    let mut r = Reader::new(&doc.as_bytes()[..doc.len() / 2]).unwrap();
    let mut errors = 0;
    for item in r.by_ref() {
        errors += usize::from(item.is_err());
    }
    assert_eq!(errors, 1);
    assert!(r.next().is_none());
}
