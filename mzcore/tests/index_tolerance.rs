//! Index offsets that miss their element: a few bytes off (whitespace before it, a few bytes
//! into it) is found by the bounded search and noted as a warning; far off, the index is not
//! used (streaming reads in file order anyway; random access rebuilds it by a scan). Only an
//! index entry naming a spectrum the document lacks is an error. Offsets per the mzML 1.1.0
//! idx schema: `indexListOffset` and each `<offset>` give the byte position of the element's `<`.

use std::io::Cursor;

use mzcore::mzml::{INDEX_SEARCH_BYTES, IndexedReader, Reader, Writer, WriterOptions};
use mzcore::spectrum::{Peaks, SpectrumMeta};
use mzcore::{Error, ErrorKind, Warning};

const IDS: [&str; 3] = ["scan=1", "scan=2", "scan=3"];

fn document() -> String {
    let options = WriterOptions { spectrum_count: 3, indexed: true, ..Default::default() };
    let mut w = Writer::new(Vec::new(), options).unwrap();
    for (i, id) in IDS.iter().enumerate() {
        let meta = SpectrumMeta {
            id: (*id).into(),
            ms_level: 1,
            rt_min: Some(i as f64),
            ..Default::default()
        };
        let mz: Vec<f64> = (0..40).map(|k| 100.0 + k as f64 + i as f64).collect();
        let peaks = Peaks { intensity: vec![10.0; mz.len()], mz };
        w.write_spectrum(&meta, &peaks).unwrap();
    }
    String::from_utf8(w.finish().unwrap()).unwrap()
}

fn spectrum_start(doc: &str, i: usize) -> usize {
    doc.match_indices("<spectrum ").nth(i).unwrap().0
}

fn set_list_offset(doc: &str, to: usize) -> String {
    let a = doc.find("<indexListOffset>").unwrap() + "<indexListOffset>".len();
    let b = a + doc[a..].find('<').unwrap();
    format!("{}{to}{}", &doc[..a], &doc[b..])
}

fn set_spectrum_offset(doc: &str, id: &str, to: usize) -> String {
    let tag = format!("<offset idRef=\"{id}\">");
    let a = doc.find(&tag).unwrap() + tag.len();
    let b = a + doc[a..].find('<').unwrap();
    format!("{}{to}{}", &doc[..a], &doc[b..])
}

/// Streams `doc`: ids read, errors, warnings.
fn stream(doc: &str) -> (Vec<String>, Vec<Error>, Vec<Warning>) {
    let mut r = Reader::new(doc.as_bytes()).unwrap();
    let (mut ids, mut errors) = (Vec::new(), Vec::new());
    for s in &mut r {
        match s {
            Ok(s) => ids.push(s.meta.id),
            Err(e) => errors.push(e),
        }
    }
    (ids, errors, r.warnings().to_vec())
}

/// Reads every spectrum by id through random access; returns the warnings.
fn random_access(doc: &str) -> Vec<Warning> {
    let mut r = IndexedReader::new(Cursor::new(doc.as_bytes().to_vec())).unwrap();
    assert_eq!(r.len(), 3);
    for id in IDS {
        assert_eq!(r.by_id(id).unwrap().meta.id, id);
    }
    for (i, id) in IDS.iter().enumerate() {
        assert_eq!(r.by_index(i).unwrap().meta.id, *id);
    }
    r.warnings().to_vec()
}

#[test]
fn untouched_index_gives_no_warning() {
    let doc = document();
    let (ids, errors, warnings) = stream(&doc);
    assert_eq!((ids.len(), errors.len(), warnings.len()), (3, 0, 0));
    assert!(random_access(&doc).is_empty());
}

#[test]
fn index_list_offset_on_the_whitespace_before_the_element() {
    let doc = document();
    let at = doc.find("<indexList ").unwrap();
    let ws = doc[..at].len() - doc[..at].trim_end().len();
    assert!(ws >= 2, "test setup: the writer indents <indexList>");
    let bad = set_list_offset(&doc, at - ws);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS);
    assert!(errors.is_empty(), "{errors:?}");
    assert_eq!(warnings.len(), 1);
    let w = warnings[0].to_string();
    assert!(
        w.contains(&format!("{ws} bytes from <indexList>")) && w.contains("search window"),
        "{w}"
    );
    let w = random_access(&bad);
    assert_eq!(w.len(), 1, "{w:?}");
    assert!(w[0].message.contains("found within"), "{}", w[0]);
}

#[test]
fn index_list_offset_a_few_bytes_into_the_element() {
    let doc = document();
    let at = doc.find("<indexList ").unwrap();
    let bad = set_list_offset(&doc, at + 5);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS);
    assert!(errors.is_empty(), "{errors:?}");
    assert_eq!(warnings.len(), 1);
    let w = random_access(&bad);
    assert_eq!(w.len(), 1, "{w:?}");
    assert!(w[0].message.contains("5 bytes from <indexList>"), "{}", w[0]);
}

#[test]
fn index_list_offset_far_away_is_ignored_and_the_file_scanned() {
    let doc = document();
    let far = spectrum_start(&doc, 1) + 3;
    assert!(doc.find("<indexList ").unwrap() - far > INDEX_SEARCH_BYTES as usize);
    let bad = set_list_offset(&doc, far);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS);
    assert!(errors.is_empty(), "{errors:?}");
    assert_eq!(warnings.len(), 1);
    assert!(warnings[0].message.contains("the index is not used"), "{}", warnings[0]);
    let w = random_access(&bad);
    assert_eq!(w.len(), 1, "{w:?}");
    assert!(w[0].message.contains("located by reading the file"), "{}", w[0]);
    // Beyond the end of the file, likewise.
    let (ids, errors, _) = stream(&set_list_offset(&doc, 10 * doc.len()));
    assert_eq!((ids.len(), errors.len()), (3, 0));
    assert_eq!(random_access(&set_list_offset(&doc, 10 * doc.len())).len(), 1);
}

#[test]
fn spectrum_offset_on_the_whitespace_before_the_element() {
    let doc = document();
    let at = spectrum_start(&doc, 1);
    let ws = doc[..at].len() - doc[..at].trim_end().len();
    assert!(ws >= 2, "test setup: the writer indents <spectrum>");
    let bad = set_spectrum_offset(&doc, "scan=2", at - ws);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS);
    assert!(errors.is_empty(), "{errors:?}");
    assert_eq!(warnings.len(), 1);
    assert!(warnings[0].message.contains(&format!("off by up to {ws} bytes")), "{}", warnings[0]);
    let w = random_access(&bad);
    assert_eq!(w.len(), 1, "{w:?}");
    assert_eq!(w[0].position.spectrum_id.as_deref(), Some("scan=2"));
}

#[test]
fn spectrum_offset_far_away_rebuilds_the_index_by_a_scan() {
    let doc = document();
    // scan=2 indexed where scan=3 starts: a spectrum, but the wrong one, far away.
    let wrong = spectrum_start(&doc, 2);
    assert!(wrong - spectrum_start(&doc, 1) > INDEX_SEARCH_BYTES as usize);
    let bad = set_spectrum_offset(&doc, "scan=2", wrong);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS);
    assert!(errors.is_empty(), "{errors:?}");
    assert_eq!(warnings.len(), 1);
    assert!(warnings[0].message.contains("the index is not used"), "{}", warnings[0]);
    let w = random_access(&bad);
    assert_eq!(w.len(), 1, "{w:?}");
    assert!(w[0].message.contains("located by reading the file"), "{}", w[0]);
}

#[test]
fn index_entry_naming_an_absent_spectrum_is_an_error() {
    let doc = document();
    let tag = "<offset idRef=\"scan=3\">";
    let a = doc.find(tag).unwrap();
    let b = a + doc[a..].find("</offset>").unwrap() + "</offset>".len();
    let bad = format!("{}\n      <offset idRef=\"scan=9\">12</offset>{}", &doc[..b], &doc[b..]);
    let (ids, errors, warnings) = stream(&bad);
    assert_eq!(ids, IDS, "every spectrum of the document is read");
    assert!(warnings.is_empty(), "{warnings:?}");
    assert_eq!(errors.len(), 1);
    assert!(
        matches!(errors[0].kind(), ErrorKind::IndexMismatch { id, .. } if id == "scan=9"),
        "{}",
        errors[0]
    );
    let mut r = IndexedReader::new(Cursor::new(bad.into_bytes())).unwrap();
    assert_eq!(r.len(), 4);
    for id in IDS {
        assert_eq!(r.by_id(id).unwrap().meta.id, id);
    }
    let e = r.by_id("scan=9").unwrap_err();
    assert!(matches!(e.kind(), ErrorKind::NotFound(_)), "{e}");
}
