//! Nothing lost: for every good indexed file, `spectra.tsv` has one row per spectrum of the
//! file's index; for a damaged file, every spectrum the file announces that could not be read
//! is still listed, by index and (where the file tells it) id.
//!
//! The index is read here by plain text search (the `<offset` elements of
//! `<index name="spectrum">`), not by the reader under test.

use std::path::Path;
use std::process::Command;

use crate::util::{mzsift, repo, stderr, tsv};

/// The document text (gzip input decompressed by the system's `gzip`).
fn document(path: &Path) -> String {
    if path.extension().is_some_and(|e| e == "gz") {
        let o = Command::new("gzip").arg("-dc").arg(path).output().expect("gzip");
        assert!(o.status.success(), "gzip -dc {}", path.display());
        String::from_utf8(o.stdout).unwrap()
    } else {
        // Latin-1 fixtures: only the ASCII markup is searched.
        String::from_utf8_lossy(&std::fs::read(path).unwrap()).into_owned()
    }
}

/// The ids listed in `<index name="spectrum">`, in order (XML's predefined entities expanded).
fn index_ids(doc: &str) -> Vec<String> {
    let start = doc.find("<index name=\"spectrum\">").expect("a spectrum index");
    let end = start + doc[start..].find("</index>").expect("end of the index");
    doc[start..end]
        .split("<offset")
        .skip(1)
        .map(|o| {
            let v = o.split("idRef=\"").nth(1).expect("idRef").split('"').next().unwrap();
            v.replace("&lt;", "<")
                .replace("&gt;", ">")
                .replace("&quot;", "\"")
                .replace("&apos;", "'")
                .replace("&amp;", "&")
        })
        .collect()
}

/// `spectra.tsv` of one report folder as (index, id, status, error) rows.
fn spectra_rows(folder: &Path) -> Vec<(String, String, String, String)> {
    let text = std::fs::read_to_string(folder.join("spectra.tsv"))
        .unwrap_or_else(|e| panic!("{}: {e}", folder.display()));
    let (h, rows) = tsv(&text);
    let col = |n: &str| h.iter().position(|x| x == n).unwrap();
    let (i, id, st, err) = (col("index"), col("id"), col("status"), col("error"));
    rows.iter().map(|r| (r[i].clone(), r[id].clone(), r[st].clone(), r[err].clone())).collect()
}

#[test]
fn every_indexed_spectrum_of_the_demo_batch_and_fixtures_is_in_spectra_tsv() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    let mut files = Vec::new();
    for folder in ["fixtures/demo", "fixtures"] {
        for e in std::fs::read_dir(repo().join(folder)).unwrap() {
            let p = e.unwrap().path();
            let name = p.file_name().unwrap().to_string_lossy().into_owned();
            let is_mzml = name.ends_with(".mzML") || name.ends_with(".mzML.gz");
            if is_mzml && document(&p).contains("<index name=\"spectrum\">") {
                std::fs::copy(&p, inputs.join(&name)).unwrap();
                files.push(name);
            }
        }
    }
    files.sort();
    assert!(files.len() >= 8, "test setup: the six demo files and the indexed fixtures");
    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut total = 0;
    for name in &files {
        let ids = index_ids(&document(&inputs.join(name)));
        let stem = name.trim_end_matches(".gz").trim_end_matches(".mzML");
        let rows = spectra_rows(&dir.path().join("out").join(stem));
        assert_eq!(rows.len(), ids.len(), "{name}: rows of spectra.tsv vs entries of the index");
        let got: Vec<&str> = rows.iter().map(|r| r.1.as_str()).collect();
        assert_eq!(got, ids, "{name}: ids in index order");
        assert!(rows.iter().all(|r| r.2 == "ok"), "{name}: every spectrum read");
        total += rows.len();
    }
    println!("{} files, {total} spectra, all accounted for", files.len());
}

#[test]
fn spectra_a_damaged_file_announces_are_listed_even_when_unread() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    let original = repo().join("fixtures/demo/DRWL0417-01_gc_fennick-cross-tap.mzML");
    let doc = document(&original);
    let ids = index_ids(&doc);
    let n = ids.len();
    assert!(n > 20, "test setup");
    // (1) One spectrum's start tag damaged (same length, so every other offset stays right):
    // the reader never sees it as a spectrum; the index still lists it.
    let at = doc.find("<spectrum index=\"7\"").expect("spectrum 7");
    let mut hidden = doc.clone();
    hidden.replace_range(at..at + "<spectrum".len(), "<spectrun");
    std::fs::write(inputs.join("a-hidden.mzML"), &hidden).unwrap();
    // (2) Cut off in the middle of spectrum 12: the index is gone, the count is in
    // <spectrumList count="...">.
    let cut = doc.find("<spectrum index=\"12\"").unwrap() + 500;
    std::fs::write(inputs.join("b-cut.mzML"), &doc[..cut]).unwrap();

    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));

    let rows = spectra_rows(&dir.path().join("out/a-hidden"));
    assert_eq!(rows.len(), n, "a-hidden: one row per indexed spectrum");
    let bad: Vec<_> = rows.iter().filter(|r| r.2 != "ok").collect();
    assert_eq!(bad.len(), 1, "{bad:?}");
    assert_eq!((bad[0].0.as_str(), bad[0].1.as_str()), ("7", ids[7].as_str()), "{bad:?}");
    assert!(bad[0].3.contains("index"), "says why: {bad:?}");

    let rows = spectra_rows(&dir.path().join("out/b-cut"));
    assert_eq!(rows.len(), n, "b-cut: one row per announced spectrum");
    for (i, r) in rows.iter().enumerate() {
        assert_eq!(r.0, i.to_string(), "b-cut: rows in index order: {r:?}");
        assert_eq!(r.2 == "ok", i < 12, "b-cut: row {i}: {r:?}");
    }
    assert_eq!(rows[12].1, ids[12], "the spectrum cut in the middle keeps its id");
    assert!(rows[12].3.contains("truncated"), "{:?}", rows[12]);
    assert!(rows[13].1.is_empty() && rows[13].3.contains("not read"), "{:?}", rows[13]);
}
