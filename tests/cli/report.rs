//! The HTML page: written by `mzsift run` (unless `[report] html = false`), rendered again by
//! `mzsift report`, one file with nothing fetched from elsewhere.

use crate::util::{fixture, mzsift, stderr};

#[test]
fn run_writes_the_page_and_report_renders_it_again() {
    let dir = tempfile::tempdir().unwrap();
    let input = fixture("variant-indexed-zlib.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o", "out", "-q"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let page = std::fs::read_to_string(dir.path().join("out/report.html")).unwrap();
    assert!(page.starts_with("<!DOCTYPE html>"));
    assert!(page.contains("Screening hints, not identifications."));
    assert!(page.contains("id=\"file-variant-indexed-zlib\""));
    assert!(!page.contains("<script") && !page.contains("src="));

    let o = mzsift(dir.path()).args(["report", "out", "-o", "again.html"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let again = std::fs::read_to_string(dir.path().join("again.html")).unwrap();
    assert_eq!(again, page, "the page depends only on the reports on disk");

    let o = mzsift(dir.path()).args(["report", "no-such-folder"]).output().unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("no-such-folder: not a folder"), "{}", stderr(&o));
}

#[test]
fn report_html_false_writes_no_page() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), "[report]\nhtml = false\n").unwrap();
    let input = fixture("variant-plain.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o", "out", "-q", "--config", "c.toml"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    assert!(dir.path().join("out/batch.tsv").is_file());
    assert!(!dir.path().join("out/report.html").exists());
}
