//! Faults while `mzsift run` writes or reads: an output folder that cannot be created, a
//! read-only file system, a full disk, an input cut off while it is being read. In every case:
//! a clear error, no report that looks complete without being so, and the rest of the batch
//! goes on. Tests run as root here, so permissions do not stop writes: the faults are made
//! with a path under a regular file, mounts of a small tmpfs (skipped, with the reason printed,
//! where mounting is not allowed), and a FIFO.

use std::path::{Path, PathBuf};
use std::process::Command;

use crate::util::{fixture, mzsift, stderr, tsv};

fn read(p: &Path) -> String {
    std::fs::read_to_string(p).unwrap_or_else(|e| panic!("{}: {e}", p.display()))
}

/// A tmpfs mounted at a fresh folder, unmounted when dropped.
struct Tmpfs {
    dir: tempfile::TempDir,
}

impl Tmpfs {
    /// Mounts a tmpfs with `options` (e.g. `size=64k`), or says why it cannot.
    fn mount(options: &str) -> Result<Tmpfs, String> {
        let dir = tempfile::tempdir().map_err(|e| e.to_string())?;
        let o = Command::new("mount")
            .args(["-t", "tmpfs", "-o", options, "tmpfs"])
            .arg(dir.path())
            .output()
            .map_err(|e| format!("cannot run mount: {e}"))?;
        if o.status.success() {
            Ok(Tmpfs { dir })
        } else {
            Err(format!("mount -t tmpfs failed: {}", String::from_utf8_lossy(&o.stderr).trim()))
        }
    }

    fn path(&self) -> &Path {
        self.dir.path()
    }
}

impl Drop for Tmpfs {
    fn drop(&mut self) {
        let _ = Command::new("umount").arg(self.dir.path()).status();
    }
}

/// Asserts that every report folder under `out` that looks complete is: it has its
/// completion record, its tables are whole (spectra.tsv has one row per spectrum the record
/// counts), and no temporary file or folder is left.
fn assert_only_complete_reports(out: &Path) {
    let Ok(entries) = std::fs::read_dir(out) else { return };
    for e in entries {
        let p = e.unwrap().path();
        let name = p.file_name().unwrap().to_string_lossy().into_owned();
        assert!(!name.starts_with('.'), "temporary entry left behind: {name}");
        if !p.is_dir() {
            continue;
        }
        let record: serde_json::Value = serde_json::from_str(&read(&p.join("complete.json")))
            .unwrap_or_else(|e| panic!("{name}: folder without a valid completion record: {e}"));
        let summary = &record["summary"];
        let counted = summary["spectra"].as_u64().unwrap()
            + summary["unreadable"].as_array().unwrap().len() as u64;
        let (_, rows) = tsv(&read(&p.join("spectra.tsv")));
        assert_eq!(rows.len() as u64, counted, "{name}: spectra.tsv is not whole");
        for f in ["ions.tsv", "features.tsv"] {
            assert!(p.join(f).is_file(), "{name}: {f} missing");
        }
    }
}

fn copy(from: &str, to: &Path) {
    std::fs::copy(fixture(from), to).unwrap();
}

#[test]
fn output_folder_under_a_regular_file_is_a_clear_error() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("notes"), "a regular file").unwrap();
    let input = fixture("variant-plain.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o", "notes/out", "-q"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let err = stderr(&o);
    assert!(err.starts_with("mzsift: ") && err.contains("notes/out"), "{err}");
    assert_eq!(read(&dir.path().join("notes")), "a regular file", "the file is untouched");
}

#[test]
fn read_only_output_is_a_clear_error_with_nothing_written() {
    let fs = match Tmpfs::mount("ro,size=64k") {
        Ok(fs) => fs,
        Err(why) => return println!("skipped: {why}"),
    };
    let dir = tempfile::tempdir().unwrap();
    let input = fixture("variant-plain.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o"])
        .arg(fs.path())
        .arg("-q")
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let err = stderr(&o);
    assert!(err.contains("Read-only file system"), "{err}");
    assert!(err.lines().all(|l| l.starts_with("mzsift: ")), "{err}");
    assert_eq!(std::fs::read_dir(fs.path()).unwrap().count(), 0);
}

#[test]
fn a_full_disk_fails_one_file_and_the_batch_goes_on() {
    // 64 KiB: the reports of a small fixture fit (4 files of one 4 KiB page each), those of a
    // demo acquisition (about 90 kB) do not.
    let fs = match Tmpfs::mount("size=64k") {
        Ok(fs) => fs,
        Err(why) => return println!("skipped: {why}"),
    };
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    copy("variant-plain.mzML", &inputs.join("a-small.mzML"));
    std::fs::copy(
        crate::util::repo().join("fixtures/demo/DRWL0417-03_lc-pos_fennick-cross-effluent.mzML"),
        inputs.join("b-large.mzML"),
    )
    .unwrap();
    copy("variant-indexed-zlib.mzML", &inputs.join("c-small.mzML"));
    let out: PathBuf = fs.path().join("out");
    let o = mzsift(dir.path()).args(["run", "in", "-o"]).arg(&out).arg("-q").output().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let err = stderr(&o);
    assert!(
        err.lines().any(|l| l.contains("b-large.mzML") && l.contains("No space left on device")),
        "{err}"
    );
    let (header, rows) = tsv(&read(&out.join("batch.tsv")));
    let status = header.iter().position(|h| h == "status").unwrap();
    let by_file: Vec<(&str, &str)> =
        rows.iter().map(|r| (r[0].rsplit('/').next().unwrap(), r[status].as_str())).collect();
    assert_eq!(
        by_file,
        [("a-small.mzML", "ok"), ("b-large.mzML", "failed"), ("c-small.mzML", "ok")]
    );
    assert!(!out.join("b-large").exists(), "no report folder for the file that failed");
    assert!(out.join("run.json").is_file());
    assert_only_complete_reports(&out);
}

#[test]
fn input_cut_off_while_being_read_is_partial_and_the_batch_goes_on() {
    // A FIFO stands for a file that stops growing (or is truncated) while mzsift reads it: the
    // writer sends part of a good file and closes.
    let dir = tempfile::tempdir().unwrap();
    let inputs = dir.path().join("in");
    std::fs::create_dir_all(&inputs).unwrap();
    let fifo = inputs.join("a-growing.mzML");
    let made = Command::new("mkfifo").arg(&fifo).status();
    if !made.is_ok_and(|s| s.success()) {
        return println!("skipped: mkfifo is not available");
    }
    copy("variant-plain.mzML", &inputs.join("b-good.mzML"));
    let good = read(&fixture("variant-plain.mzML"));
    let cut = good.match_indices("<spectrum ").nth(2).unwrap().0 + 200;
    let part = good[..cut].to_owned();
    let writer = std::thread::spawn(move || std::fs::write(fifo, part));
    let o = mzsift(dir.path()).args(["run", "in", "-o", "out", "-q"]).output().unwrap();
    writer.join().unwrap().unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let out = dir.path().join("out");
    let (header, rows) = tsv(&read(&out.join("batch.tsv")));
    let col = |n: &str| header.iter().position(|h| h == n).unwrap();
    assert_eq!(rows[0][col("status")], "partial", "{rows:?}");
    assert!(rows[0][col("error")].contains("truncated"), "{rows:?}");
    assert_eq!(rows[0][col("spectra")], "2");
    assert_eq!(rows[1][col("status")], "ok", "{rows:?}");
    // The cut-off file's report is complete about what it says: two spectra read, the cut
    // one and the one never reached listed as unreadable, by index.
    let (sh, srows) = tsv(&read(&out.join("a-growing/spectra.tsv")));
    let (ix, st) = (
        sh.iter().position(|h| h == "index").unwrap(),
        sh.iter().position(|h| h == "status").unwrap(),
    );
    let listed: Vec<(&str, &str)> =
        srows.iter().map(|r| (r[ix].as_str(), r[st].as_str())).collect();
    assert_eq!(
        listed,
        [("0", "ok"), ("1", "ok"), ("2", "unreadable"), ("3", "unreadable")],
        "{srows:?}"
    );
    assert_only_complete_reports(&out);
}

#[test]
fn reader_limits_come_from_the_reader_section_of_the_config() {
    // Each spectrum of the fixture has more than five elements: with max_elements = 5 every
    // spectrum is refused, by name of the limit, and the file fails as a whole.
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("tight.toml"), "[reader]\nmax_elements = 5\n").unwrap();
    let input = fixture("variant-plain.mzML");
    let o = mzsift(dir.path())
        .args(["run", input.to_str().unwrap(), "-o", "out", "-q", "--config", "tight.toml"])
        .output()
        .unwrap();
    assert_eq!(o.status.code(), Some(1), "{}", stderr(&o));
    let (header, rows) = tsv(&read(&dir.path().join("out/batch.tsv")));
    let col = |n: &str| header.iter().position(|h| h == n).unwrap();
    assert_eq!(rows[0][col("status")], "failed", "{rows:?}");
    assert!(rows[0][col("error")].contains("max_elements"), "{rows:?}");
    assert_eq!(rows[0][col("unreadable_spectra")], "4", "{rows:?}");
    // The defaults read the same file whole.
    let o = mzsift(dir.path()).args(["run", input.to_str().unwrap(), "-o", "out2", "-q"]).output();
    assert_eq!(o.unwrap().status.code(), Some(0));
}
