//! Faults at the library level: a report writer whose disk fills after some bytes, and input
//! that fails or ends while being read. A failed write leaves no file under the final name and
//! no temporary file; input that stops early keeps what was read and lists every spectrum that
//! was not.

use std::io::{BufRead, BufReader, Read, Write};

use mzcore::mzml::{Writer, WriterOptions};
use mzcore::report;
use mzcore::screen::{FileStatus, ScreenConfig, Sha256Reader, screen_reader};
use mzcore::spectrum::{Peaks, SpectrumMeta};

/// A writer that accepts `room` bytes, then fails as a full disk does (ENOSPC).
struct FillsUp<W> {
    inner: W,
    room: usize,
}

impl<W: Write> Write for FillsUp<W> {
    fn write(&mut self, buf: &[u8]) -> std::io::Result<usize> {
        if self.room == 0 {
            return Err(std::io::Error::from_raw_os_error(28)); // ENOSPC (Linux errno 28)
        }
        let n = buf.len().min(self.room);
        self.room -= n;
        self.inner.write(&buf[..n])
    }

    fn flush(&mut self) -> std::io::Result<()> {
        self.inner.flush()
    }
}

#[test]
fn a_write_that_fills_the_disk_leaves_neither_the_file_nor_a_temporary() {
    let rows: Vec<(u32, String)> = (0..10_000).map(|i| (i, format!("scan={i}"))).collect();
    for room in [0, 1, 100, 8191, 8192, 8193, 60_000] {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("spectra.tsv");
        let r = report::write_atomic(&path, |w| {
            report::write_tsv(FillsUp { inner: w, room }, &["index", "id"], &rows)
        });
        let e = r.expect_err("the write must fail");
        assert!(e.to_string().contains("No space left on device"), "room {room}: {e}");
        assert!(e.to_string().contains("spectra.tsv"), "names the file: {e}");
        let left: Vec<_> = std::fs::read_dir(dir.path()).unwrap().collect();
        assert!(left.is_empty(), "room {room}: {left:?}");
    }
    // And an earlier complete file under the final name survives a failed rewrite.
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join("batch.tsv");
    report::write_atomic(&path, |w| Ok(w.write_all(b"old\tcomplete\n")?)).unwrap();
    let r = report::write_atomic(&path, |w| {
        report::write_tsv(FillsUp { inner: w, room: 10 }, &["index", "id"], &rows)
    });
    assert!(r.is_err());
    assert_eq!(std::fs::read(&path).unwrap(), b"old\tcomplete\n");
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 1);
}

/// Serves the first `until` bytes of `data`, then fails (`Some`) or ends (`None`).
struct Stops {
    data: Vec<u8>,
    at: usize,
    until: usize,
    error: Option<std::io::ErrorKind>,
}

impl Read for Stops {
    fn read(&mut self, buf: &mut [u8]) -> std::io::Result<usize> {
        if self.at >= self.until {
            return match self.error {
                Some(kind) => Err(std::io::Error::new(kind, "the file went away")),
                None => Ok(0),
            };
        }
        let n = buf.len().min(self.until - self.at);
        buf[..n].copy_from_slice(&self.data[self.at..self.at + n]);
        self.at += n;
        Ok(n)
    }
}

fn document(n: usize) -> Vec<u8> {
    let options = WriterOptions { spectrum_count: n, ..Default::default() };
    let mut w = Writer::new(Vec::new(), options).unwrap();
    for i in 0..n {
        let meta = SpectrumMeta {
            id: format!("scan={}", i + 1),
            ms_level: 1,
            rt_min: Some(i as f64 * 0.1),
            ..Default::default()
        };
        let peaks = Peaks { mz: vec![100.0, 101.0, 102.0], intensity: vec![5.0, 50.0, 5.0] };
        w.write_spectrum(&meta, &peaks).unwrap();
    }
    w.finish().unwrap()
}

fn screen(input: impl BufRead) -> mzcore::Result<mzcore::screen::FileReport> {
    let pool = mzcore::pipeline::thread_pool(1).unwrap();
    screen_reader(Sha256Reader::new(input), &ScreenConfig::default(), &pool)
}

#[test]
fn input_that_fails_or_ends_while_read_keeps_the_spectra_before_and_lists_the_rest() {
    let doc = document(10);
    let text = String::from_utf8(doc.clone()).unwrap();
    // Stop inside the sixth spectrum (index 5).
    let until = text.match_indices("<spectrum ").nth(5).unwrap().0 + 100;
    for error in [Some(std::io::ErrorKind::Other), Some(std::io::ErrorKind::NotFound), None] {
        let input = Stops { data: doc.clone(), at: 0, until, error };
        let report = screen(BufReader::with_capacity(64, input)).expect("a report");
        let s = &report.summary;
        assert_eq!(s.status, FileStatus::Partial, "{error:?}");
        assert_eq!(s.spectra, 5, "{error:?}: the spectra before the stop");
        let want = if error.is_some() { "the file went away" } else { "truncated" };
        assert!(s.error.contains(want), "{error:?}: {}", s.error);
        let listed: Vec<(usize, &str)> =
            report.spectra.iter().map(|r| (r.index, r.status)).collect();
        let expected: Vec<(usize, &str)> =
            (0..10).map(|i| (i, if i < 5 { "ok" } else { "unreadable" })).collect();
        assert_eq!(listed, expected, "{error:?}");
        assert_eq!(s.unreadable.len(), 5, "{error:?}");
    }
}
