//! Files as other writers make them: index offsets a few bytes off (warnings, status `ok`),
//! a far-off index (not used), a checksum mismatch (still `partial`).

use std::path::Path;

use sha1::Digest;

use crate::util::{fixture, mzsift, stderr, stdout, tsv};

/// Recomputes the SHA-1 `fileChecksum` (mzML 1.1.0 idx schema: from the first byte through the
/// `<fileChecksum>` start tag), as a writer that got its offsets wrong still hashes correctly.
pub fn rechecksum(doc: &str) -> String {
    let tag = "<fileChecksum>";
    let end = doc.find(tag).unwrap() + tag.len();
    let hex: String =
        sha1::Sha1::digest(&doc.as_bytes()[..end]).iter().map(|b| format!("{b:02x}")).collect();
    let close = end + doc[end..].find('<').unwrap();
    format!("{}{hex}{}", &doc[..end], &doc[close..])
}

/// The fixture with `indexListOffset` on the whitespace before `<indexList>` and the offset of
/// `scan=2` on the whitespace before its element.
fn offsets_on_whitespace() -> String {
    let doc = std::fs::read_to_string(fixture("variant-indexed-zlib.mzML")).unwrap();
    let ws = |at: usize| doc[..at].len() - doc[..at].trim_end().len();
    let list = doc.find("<indexList ").unwrap();
    let spec = doc.match_indices("<spectrum ").nth(1).unwrap().0;
    let set = |d: &str, tag: &str, to: usize| {
        let a = d.find(tag).unwrap() + tag.len();
        let b = a + d[a..].find('<').unwrap();
        format!("{}{to}{}", &d[..a], &d[b..])
    };
    let d = set(&doc, "<indexListOffset>", list - ws(list));
    let d = set(&d, "<offset idRef=\"scan=2\">", spec - ws(spec));
    rechecksum(&d)
}

fn batch_rows(out: &Path) -> (Vec<String>, Vec<Vec<String>>) {
    tsv(&std::fs::read_to_string(out.join("batch.tsv")).unwrap())
}

#[test]
fn offsets_on_whitespace_are_ok_with_warnings_and_a_checksum_mismatch_stays_partial() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir(&inputs).unwrap();
    let good = offsets_on_whitespace();
    std::fs::write(inputs.join("a-whitespace.mzML"), &good).unwrap();
    // Same length edit of one value: the checksum no longer matches.
    let bad = good.replacen("value=\"1\"/>", "value=\"2\"/>", 1);
    std::fs::write(inputs.join("b-checksum.mzML"), bad).unwrap();
    let o = mzsift(dir.path()).args(["run", "in", "-o", "out"]).output().unwrap();
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1), "{err}");
    let (header, rows) = batch_rows(&dir.path().join("out"));
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    assert_eq!(rows[0][col("status")], "ok", "{rows:?}");
    assert_eq!(rows[0][col("error")], "");
    assert!(rows[0][col("warning")].starts_with("2 warnings; first: "), "{rows:?}");
    assert!(rows[0][col("warning")].contains("search window"), "{rows:?}");
    assert_eq!(rows[0][col("unreadable_spectra")], "0");
    assert_eq!(rows[1][col("status")], "partial", "{rows:?}");
    assert!(rows[1][col("error")].contains("fileChecksum mismatch"), "{rows:?}");
    assert!(err.contains("a-whitespace.mzML: ") && err.contains("warning: "), "{err}");

    // `info` shows the warnings and exits 0.
    std::fs::write(dir.path().join("w.mzML"), &good).unwrap();
    let o = mzsift(dir.path())
        .args(["info", "w.mzML", "--verify", "--format", "tsv"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let out = stdout(&o);
    assert!(out.contains("warnings\t2") && out.contains("checksum\tverified"), "{out}");
    assert_eq!(stderr(&o).matches("warning: ").count(), 2, "{}", stderr(&o));
    // `peaks` finds the spectrum through the corrected index.
    let o =
        mzsift(dir.path()).args(["peaks", "w.mzML", "--id", "scan=2", "--raw"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(stdout(&o).lines().count() > 1);
}

#[test]
fn other_formats_fail_with_one_line_each_and_the_batch_goes_on() {
    // Written by hand from memory of each format's published description (see
    // mzcore/tests/formats.rs): a 0.99.1 draft of 39 spectra without `index` attributes, an
    // mzXML file and a binary file, all named .mzML as a converter left them.
    let spectra: String = (0..39)
        .map(|i| format!("<spectrum id=\"S{i}\" scanNumber=\"{i}\" msLevel=\"1\"/>\n"))
        .collect();
    let draft = format!(
        "<?xml version=\"1.0\"?>\n<mzML xmlns=\"http://psi.hupo.org/schema_revision/mzML_0.99.1\" \
         version=\"0.99.1\"><run id=\"r\"><spectrumList count=\"39\">{spectra}</spectrumList></run></mzML>\n"
    );
    let mzxml = "<?xml version=\"1.0\"?><mzXML xmlns=\"http://sashimi.sourceforge.net/schema_revision/mzXML_3.1\">\
                 <msRun scanCount=\"1\"><scan num=\"1\" msLevel=\"1\"/></msRun></mzXML>";
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir(&inputs).unwrap();
    std::fs::write(inputs.join("a-draft.mzML"), draft).unwrap();
    std::fs::write(inputs.join("b-mzxml.mzML"), mzxml).unwrap();
    std::fs::write(inputs.join("c-binary.mzML"), b"\x01\x02\x03\x04raw\0\0\0").unwrap();
    std::fs::copy(fixture("variant-indexed-zlib.mzML"), inputs.join("d-good.mzML")).unwrap();
    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q"]).output().unwrap();
    let err = stderr(&o);
    assert_eq!(o.status.code(), Some(1), "{err}");
    for (file, says) in [
        ("a-draft.mzML", "mzML 0.99.1 is a pre-release draft; convert to mzML 1.1"),
        ("b-mzxml.mzML", "mzXML 3.1 is not read"),
        ("c-binary.mzML", "not an XML document: binary data"),
    ] {
        let lines: Vec<&str> = err.lines().filter(|l| l.contains(file)).collect();
        assert_eq!(lines.len(), 1, "{file}: {err}");
        assert!(lines[0].contains(says), "{}", lines[0]);
    }
    let (header, rows) = batch_rows(&dir.path().join("out"));
    let status = header.iter().position(|h| h == "status").unwrap();
    let got: Vec<&str> = rows.iter().map(|r| r[status].as_str()).collect();
    assert_eq!(got, ["failed", "failed", "failed", "ok"]);
}
