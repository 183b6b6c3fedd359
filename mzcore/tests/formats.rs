//! Other formats and old versions of mzML fail once, with one line that says what the file is
//! and what to do, however many spectra it holds. The documents below are written by hand from
//! memory of each format's published description (root element, namespace, version
//! attribute, the spectrum elements inside); they are small but shaped like the real thing.

use mzcore::mzml::Reader;
use mzcore::{Error, ErrorKind};

fn errors(doc: &[u8]) -> Vec<Error> {
    let mut r = Reader::new(doc).unwrap();
    let mut out = Vec::new();
    for _ in 0..100 {
        match r.next() {
            None => return out,
            Some(Ok(s)) => panic!("spectrum {} read from a file that is not mzML 1.1", s.meta.id),
            Some(Err(e)) => out.push(e),
        }
    }
    panic!("reader did not stop");
}

/// The one error of `doc`, whose message must contain `says`.
fn one_error(doc: &str, says: &str) {
    let e = errors(doc.as_bytes());
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(matches!(e[0].kind(), ErrorKind::UnsupportedFormat(_)), "{}", e[0]);
    assert!(e[0].to_string().contains(says), "{}", e[0]);
    assert!(e[0].to_string().contains("convert to mzML 1.1"), "{}", e[0]);
}

/// Spectra of an mzML-like draft: no `index` attribute (0.99 drafts), 39 of them.
fn draft_spectra(n: usize) -> String {
    (0..n)
        .map(|i| {
            format!(
                "<spectrum id=\"S{i}\" scanNumber=\"{i}\" msLevel=\"1\"><spectrumDescription>\
                 <acquisitionList count=\"1\"><acquisition number=\"{i}\"/></acquisitionList>\
                 </spectrumDescription><binaryDataArrayList count=\"0\"/></spectrum>\n"
            )
        })
        .collect()
}

#[test]
fn mzml_0_99_1_draft() {
    let doc = format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n<mzML xmlns=\"http://psi.hupo.org/schema_revision/mzML_0.99.1\" \
         id=\"x\" version=\"0.99.1\">\n<run id=\"r\"><spectrumList count=\"39\">\n{}</spectrumList></run></mzML>\n",
        draft_spectra(39)
    );
    one_error(&doc, "mzML 0.99.1 is a pre-release draft");
}

#[test]
fn mzml_0_93_draft_by_version_attribute_alone() {
    let doc = format!(
        "<mzML version=\"0.93\"><run id=\"r\"><spectrumList count=\"3\">{}</spectrumList></run></mzML>",
        draft_spectra(3)
    );
    one_error(&doc, "mzML 0.93 is a pre-release draft");
}

#[test]
fn indexed_draft_is_found_on_the_inner_mzml() {
    let doc = format!(
        "<indexedmzML xmlns=\"http://psi.hupo.org/schema_revision/mzML_0.99.0\">\
         <mzML xmlns=\"http://psi.hupo.org/schema_revision/mzML_0.99.0\" version=\"0.99.0\">\
         <run id=\"r\"><spectrumList count=\"2\">{}</spectrumList></run></mzML></indexedmzML>",
        draft_spectra(2)
    );
    one_error(&doc, "mzML 0.99.0 is a pre-release draft");
}

#[test]
fn mzml_1_0_0() {
    let doc = format!(
        "<?xml version=\"1.0\" encoding=\"ISO-8859-1\"?>\n<mzML xmlns=\"http://psi.hupo.org/schema_revision/mzML_1.0.0\" \
         version=\"1.0.0\" id=\"x\"><run id=\"r\"><spectrumList count=\"5\">{}</spectrumList></run></mzML>",
        draft_spectra(5)
    );
    one_error(&doc, "mzML 1.0.0 is not read");
}

#[test]
fn mzxml_3_2() {
    let scans: String = (1..=20)
        .map(|i| {
            format!(
                "<scan num=\"{i}\" msLevel=\"1\" peaksCount=\"1\" retentionTime=\"PT{i}.0S\">\
                 <peaks precision=\"32\" byteOrder=\"network\" pairOrder=\"m/z-int\">Q8gAAEYcQAA=</peaks></scan>\n"
            )
        })
        .collect();
    let doc = format!(
        "<?xml version=\"1.0\" encoding=\"ISO-8859-1\"?>\n<mzXML xmlns=\"http://sashimi.sourceforge.net/schema_revision/mzXML_3.2\">\
         <msRun scanCount=\"20\">{scans}</msRun><index name=\"scan\"/></mzXML>"
    );
    one_error(&doc, "mzXML 3.2 is not read");
}

#[test]
fn mzdata_1_05() {
    let spectra: String = (1..=10)
        .map(|i| {
            format!(
                "<spectrum id=\"{i}\"><spectrumDesc><spectrumSettings><spectrumInstrument msLevel=\"1\"/>\
                 </spectrumSettings></spectrumDesc><mzArrayBinary><data precision=\"64\" endian=\"little\" length=\"0\"/>\
                 </mzArrayBinary></spectrum>"
            )
        })
        .collect();
    let doc = format!(
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?><mzData version=\"1.05\" accessionNumber=\"0\">\
         <description/><spectrumList count=\"10\">{spectra}</spectrumList></mzData>"
    );
    one_error(&doc, "mzData 1.05 is not read");
}

#[test]
fn binary_and_plain_text() {
    // A vendor raw file starts with binary bytes (these are invented, not any vendor's).
    let e = errors(b"\x01\xa1F\0i\0n\0n\0i\0g\0a\0n\0\0\0\0\x07\x08");
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(e[0].to_string().contains("binary data (first bytes 01 A1 46"), "{}", e[0]);
    let e = errors(b"mz\tintensity\n100.0\t5\n");
    assert_eq!(e.len(), 1, "{e:?}");
    assert!(e[0].to_string().contains("text that is not XML"), "{}", e[0]);
}

#[test]
fn mzml_1_1_is_read() {
    let mut w = mzcore::mzml::Writer::new(Vec::new(), Default::default()).unwrap();
    let meta =
        mzcore::spectrum::SpectrumMeta { id: "scan=1".into(), ms_level: 1, ..Default::default() };
    w.write_spectrum(&meta, &mzcore::spectrum::Peaks { mz: vec![1.0], intensity: vec![2.0] })
        .unwrap();
    let doc = w.finish().unwrap();
    assert!(String::from_utf8_lossy(&doc).contains("version=\"1.1"), "test setup");
    assert_eq!(Reader::new(&doc[..]).unwrap().filter(Result::is_ok).count(), 1);
}
