//! `mzsift run`: batch reports, failure isolation, thread-count independence, kill and resume.

use std::path::Path;

use crate::util::{fixture, mzsift, stderr, tsv};

fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// `batch.tsv` without its `seconds` column (timings differ between runs).
fn batch_without_seconds(out: &Path) -> String {
    let (header, rows) = tsv(&read(&out.join("batch.tsv")));
    let keep = header.len() - 1;
    assert_eq!(header[keep], "seconds");
    std::iter::once(header[..keep].join("\t"))
        .chain(rows.iter().map(|r| r[..keep].join("\t")))
        .collect::<Vec<_>>()
        .join("\n")
}

/// Every report of a run, for comparing runs (batch.tsv without timings).
fn reports(out: &Path) -> Vec<(String, String)> {
    let mut all = vec![("batch.tsv".to_owned(), batch_without_seconds(out))];
    let mut dirs: Vec<_> = walk(out);
    dirs.sort();
    for f in dirs {
        let name = f.strip_prefix(out).unwrap().display().to_string();
        if name.ends_with(".tsv") && name != "batch.tsv" {
            all.push((name, read(&f)));
        }
    }
    all
}

fn walk(dir: &Path) -> Vec<std::path::PathBuf> {
    let mut out = Vec::new();
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            out.extend(walk(&p));
        } else {
            out.push(p);
        }
    }
    out
}

fn copy_fixtures(to: &Path, names: &[&str]) {
    std::fs::create_dir_all(to).unwrap();
    for n in names {
        std::fs::copy(fixture(n), to.join(n)).unwrap();
    }
}

#[test]
fn reports_are_identical_for_one_and_two_threads() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    copy_fixtures(
        &inputs,
        &["variant-indexed-zlib.mzML", "encoding-numpress-zlib.mzML", "variant-plain.mzML"],
    );
    for j in ["1", "2"] {
        let o = mzsift(dir.path())
            .args(["run", "in", "-o", &format!("out{j}"), "-j", j, "-q"])
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    }
    let (a, b) = (reports(&dir.path().join("out1")), reports(&dir.path().join("out2")));
    assert_eq!(a.len(), 1 + 3 * 6, "{a:?}");
    assert_eq!(a, b);
    // run.json holds the version, the parameters, the inputs' SHA-256 and the caution.
    let run: serde_json::Value =
        serde_json::from_str(&read(&dir.path().join("out1/run.json"))).unwrap();
    assert_eq!(run["inputs"].as_array().unwrap().len(), 3);
    assert_eq!(run["inputs"][0]["sha256"].as_str().unwrap().len(), 64);
    assert!(run["caution"].as_str().unwrap().contains("not identifications"));
    assert!(run["config"]["flag"]["min_snr"].is_number());
}

#[test]
fn a_batch_with_bad_files_completes_the_good_ones() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    copy_fixtures(&inputs, &["variant-indexed-zlib.mzML"]);
    let good = read(&fixture("variant-plain.mzML"));
    // A file cut off in its third spectrum.
    let cut = good.match_indices("<spectrum ").nth(2).unwrap().0 + 300;
    std::fs::write(inputs.join("cut-off.mzML"), &good[..cut]).unwrap();
    // A file that is not mzML, named .mzML.
    std::fs::write(inputs.join("notes.MZML"), "sample list: river inlet, 3 replicates\n").unwrap();
    // An input that cannot be opened (a link to nowhere).
    std::os::unix::fs::symlink(dir.path().join("missing-target"), inputs.join("gone.mzML"))
        .unwrap();
    // Some corrupt spectra among good ones.
    let bad = good.replacen("name=\"ms level\" value=\"2\"", "name=\"ms level\" value=\"x\"", 1);
    std::fs::write(inputs.join("some-bad.mzML"), bad).unwrap();
    // Hidden entries are skipped.
    std::fs::write(inputs.join(".hidden.mzML"), "junk").unwrap();

    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let (header, rows) = tsv(&read(&dir.path().join("out/batch.tsv")));
    let col = |name: &str| header.iter().position(|h| h == name).unwrap();
    let status = |file: &str| -> (String, String) {
        let r = rows
            .iter()
            .find(|r| r[0].ends_with(file))
            .unwrap_or_else(|| panic!("{file}: {rows:?}"));
        (r[col("status")].clone(), r[col("error")].clone())
    };
    assert_eq!(rows.len(), 5, "{rows:?}");
    assert_eq!(status("variant-indexed-zlib.mzML").0, "ok");
    let (s, e) = status("cut-off.mzML");
    assert_eq!(s, "partial");
    assert!(e.contains("truncated") && e.contains("2 complete spectra"), "{e}");
    let (s, e) = status("notes.MZML");
    assert_eq!(s, "failed");
    assert!(e.contains("not an XML document: text that is not XML"), "{e}");
    let (s, e) = status("gone.mzML");
    assert_eq!(s, "failed");
    assert!(e.contains("No such file"), "{e}");
    let (s, e) = status("some-bad.mzML");
    assert_eq!(s, "partial");
    assert!(e.contains("spectrum 1 (id 'scan=2')"), "{e}");
    // The partial file lists its unreadable spectrum among the others.
    let (sh, srows) = tsv(&read(&dir.path().join("out/some-bad/spectra.tsv")));
    assert_eq!(srows.len(), 4);
    let st = sh.iter().position(|h| h == "status").unwrap();
    assert_eq!(srows[1][st], "unreadable");
    // Each bad file has its own line on stderr.
    let err = stderr(&o);
    for f in ["cut-off.mzML", "notes.MZML", "gone.mzML", "some-bad.mzML"] {
        assert!(err.lines().any(|l| l.starts_with("mzsift: ") && l.contains(f)), "{f}: {err}");
    }
}

#[test]
fn fail_fast_skips_the_rest() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    std::fs::write(inputs.join("a-broken.mzML"), "not xml").unwrap();
    copy_fixtures(&inputs, &["variant-plain.mzML"]);
    let o =
        mzsift(dir.path()).args(["run", "in", "-o", "out", "-q", "--fail-fast"]).output().unwrap();
    assert_eq!(o.status.code(), Some(1));
    let (_, rows) = tsv(&read(&dir.path().join("out/batch.tsv")));
    assert_eq!(rows[0][1], "failed");
    assert_eq!(rows[1][1], "skipped");
}

#[test]
fn a_bad_config_is_a_usage_error_naming_the_key() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("c.toml"), "[flag]\nmin_snrr = 3.0\n").unwrap();
    let f = fixture("variant-plain.mzML");
    let o = mzsift(dir.path())
        .args(["run", f.to_str().unwrap(), "-o", "out", "--config", "c.toml"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("min_snrr"), "{}", stderr(&o));
}

#[test]
fn config_prints_commented_defaults_that_read_back() {
    let dir = tempfile::tempdir().unwrap();
    let o = mzsift(dir.path()).args(["config"]).output().unwrap();
    assert!(o.status.success());
    let text = String::from_utf8(o.stdout).unwrap();
    assert!(text.lines().filter(|l| l.starts_with('#')).count() >= 20, "{text}");
    std::fs::write(dir.path().join("d.toml"), &text).unwrap();
    let o = mzsift(dir.path()).args(["config", "--check", "d.toml"]).output().unwrap();
    assert!(o.status.success(), "{}", stderr(&o));
    assert_eq!(String::from_utf8(o.stdout).unwrap(), text);
}

#[test]
fn killed_run_leaves_nothing_complete_looking_and_resume_equals_a_fresh_run() {
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    let base = read(&fixture("variant-plain.mzML"));
    // Many small files so that the kill lands mid-batch.
    for i in 0..60 {
        std::fs::write(inputs.join(format!("night-{i:02}.mzML")), &base).unwrap();
    }
    let out = dir.path().join("out");
    let mut child =
        mzsift(dir.path()).args(["run", "in", "-o", "out", "-q", "-j", "1"]).spawn().unwrap();
    // Wait until some reports are complete, then kill without warning.
    let start = std::time::Instant::now();
    loop {
        let done = std::fs::read_dir(&out).map(|d| d.count()).unwrap_or(0);
        if done >= 3 || start.elapsed().as_secs() > 60 {
            break;
        }
        std::thread::sleep(std::time::Duration::from_millis(5));
    }
    child.kill().unwrap(); // SIGKILL
    child.wait().unwrap();
    // No batch files; every report folder either has its completion record or is a
    // temporary (dot-named) folder.
    assert!(!out.join("batch.tsv").exists());
    assert!(!out.join("run.json").exists());
    for e in std::fs::read_dir(&out).unwrap() {
        let p = e.unwrap().path();
        let name = p.file_name().unwrap().to_string_lossy().into_owned();
        if !name.starts_with('.') {
            assert!(p.join("complete.json").is_file(), "{name} looks complete without its record");
        }
    }
    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q", "--resume"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let o = mzsift(dir.path()).args(["run", "in", "-o", "fresh", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0));
    // Leftover temporary folders of the killed run are not reports.
    let resumed: Vec<_> = reports(&out).into_iter().filter(|(n, _)| !n.starts_with('.')).collect();
    assert_eq!(resumed, reports(&dir.path().join("fresh")));
}

#[test]
fn example_programs_run_on_the_demo_data() {
    // The examples a lab pipeline would write (mzcore/examples): built by cargo for the test
    // profile, run here on one demo file.
    let demo =
        crate::util::repo().join("fixtures/demo/DRWL0417-04_lc-neg_fennick-cross-effluent.mzML");
    for example in ["flagged_features", "count_peaks"] {
        let o = std::process::Command::new(env!("CARGO"))
            .args(["run", "-q", "-p", "mzcore", "--example", example, "--"])
            .arg(&demo)
            .current_dir(crate::util::repo())
            .env("CARGO_TARGET_DIR", crate::util::repo().join("target"))
            .output()
            .unwrap();
        assert!(o.status.success(), "{example}: {}", stderr(&o));
        let out = String::from_utf8(o.stdout).unwrap();
        assert!(out.lines().count() >= 2, "{example}: {out}");
    }
}
