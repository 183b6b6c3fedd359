//! Report writers: TSV through serde rows, JSON, and atomic replacement of files and folders.
//!
//! TSV conventions (documented for users in the README): a header row, tab-separated, `.` as the
//! decimal mark, an empty cell for a missing value, and in text cells the characters tab,
//! newline, carriage return and backslash written as `\t`, `\n`, `\r` and `\\`.

use std::fs;
use std::io::{BufWriter, Write};
use std::path::{Path, PathBuf};

use serde::Serialize;

use crate::error::{Error, ErrorKind, Result};

pub mod digits;
pub mod settings;
pub use settings::ReportSettings;

/// Escapes tab, newline, carriage return and backslash in a text cell.
///
/// # Examples
///
/// ```
/// assert_eq!(mzcore::report::escape_text("a\tb\\c\n"), "a\\tb\\\\c\\n");
/// ```
pub fn escape_text(s: &str) -> String {
    if !s.contains(['\t', '\n', '\r', '\\']) {
        return s.to_owned();
    }
    let mut out = String::with_capacity(s.len() + 8);
    for c in s.chars() {
        match c {
            '\t' => out.push_str("\\t"),
            '\n' => out.push_str("\\n"),
            '\r' => out.push_str("\\r"),
            '\\' => out.push_str("\\\\"),
            c => out.push(c),
        }
    }
    out
}

/// Reverses [`escape_text`]: `\t`, `\n`, `\r` and `\\` back to tab, newline, carriage
/// return and backslash (any other backslash pair is kept as written).
///
/// # Examples
///
/// ```
/// use mzcore::report::{escape_text, unescape_text};
/// let s = "a\tb\\c\n";
/// assert_eq!(unescape_text(&escape_text(s)), s);
/// ```
pub fn unescape_text(s: &str) -> String {
    if !s.contains('\\') {
        return s.to_owned();
    }
    let mut out = String::with_capacity(s.len());
    let mut chars = s.chars();
    while let Some(c) = chars.next() {
        if c != '\\' {
            out.push(c);
            continue;
        }
        match chars.next() {
            Some('t') => out.push('\t'),
            Some('n') => out.push('\n'),
            Some('r') => out.push('\r'),
            Some('\\') => out.push('\\'),
            Some(other) => {
                out.push('\\');
                out.push(other);
            }
            None => out.push('\\'),
        }
    }
    out
}

/// Writes `rows` as TSV to `out`, with `header` when there are no rows (serde writes the
/// header from the first row otherwise).
pub fn write_tsv<W: Write, T: Serialize>(out: W, header: &[&str], rows: &[T]) -> Result<()> {
    let mut w =
        csv::WriterBuilder::new().delimiter(b'\t').has_headers(!rows.is_empty()).from_writer(out);
    if rows.is_empty() {
        w.write_record(header).map_err(csv_error)?;
    }
    for r in rows {
        w.serialize(r).map_err(csv_error)?;
    }
    w.flush()?;
    Ok(())
}

fn csv_error(e: csv::Error) -> Error {
    match e.into_kind() {
        csv::ErrorKind::Io(io) => Error::new(ErrorKind::Io(io)),
        other => Error::new(ErrorKind::Config(format!("TSV writer: {other:?}"))),
    }
}

/// A temporary sibling name for `path` (same folder, so a rename is atomic).
pub fn temp_sibling(path: &Path) -> PathBuf {
    let name = path.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    path.with_file_name(format!(".{name}.partial-{}", std::process::id()))
}

/// Writes a file atomically: into a temporary sibling, then renamed over `path`. A reader (or
/// a run killed at any moment) sees the old file, no file, or the complete new one.
pub fn write_atomic(path: &Path, fill: impl FnOnce(&mut dyn Write) -> Result<()>) -> Result<()> {
    let tmp = temp_sibling(path);
    let result = (|| {
        let mut w = BufWriter::new(fs::File::create(&tmp)?);
        fill(&mut w)?;
        w.flush()?;
        w.into_inner().map_err(|e| Error::new(ErrorKind::Io(e.into_error())))?.sync_all()?;
        fs::rename(&tmp, path)?;
        Ok(())
    })();
    if result.is_err() {
        let _ = fs::remove_file(&tmp);
    }
    result.map_err(|e: Error| e.in_field(&path.display().to_string()))
}

/// Writes `value` as pretty JSON to `path` atomically.
pub fn write_json_atomic<T: Serialize>(path: &Path, value: &T) -> Result<()> {
    write_atomic(path, |w| {
        digits::as_numbers(|| serde_json::to_writer_pretty(&mut *w, value))
            .map_err(|e| Error::new(ErrorKind::Config(format!("JSON writer: {e}"))))?;
        writeln!(w)?;
        Ok(())
    })
}

/// Replaces the folder `dir` by a folder filled by `fill`, atomically: the new contents are
/// written into a temporary sibling folder, the old folder is removed, and the new one is
/// renamed into place.
pub fn replace_dir_atomic(dir: &Path, fill: impl FnOnce(&Path) -> Result<()>) -> Result<()> {
    let tmp = temp_sibling(dir);
    let _ = fs::remove_dir_all(&tmp);
    let result = (|| {
        fs::create_dir_all(&tmp)?;
        fill(&tmp)?;
        if dir.exists() {
            fs::remove_dir_all(dir)?;
        }
        fs::rename(&tmp, dir)?;
        Ok(())
    })();
    if result.is_err() {
        let _ = fs::remove_dir_all(&tmp);
    }
    result.map_err(|e: Error| e.in_field(&dir.display().to_string()))
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn escaping_table() {
        for (input, want) in [
            ("plain", "plain"),
            ("tab\there", "tab\\there"),
            ("two\nlines\r\n", "two\\nlines\\r\\n"),
            ("back\\slash", "back\\\\slash"),
            ("", ""),
        ] {
            assert_eq!(escape_text(input), want);
        }
    }

    #[test]
    fn empty_tables_still_have_a_header() {
        let mut out = Vec::new();
        write_tsv::<_, (u8, u8)>(&mut out, &["a", "b"], &[]).unwrap();
        assert_eq!(out, b"a\tb\n");
    }

    #[test]
    fn atomic_write_leaves_no_temporary_file_on_failure() {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join("x.tsv");
        let r = write_atomic(&path, |_| Err(Error::new(ErrorKind::Config("boom".into()))));
        assert!(r.is_err());
        assert_eq!(fs::read_dir(dir.path()).unwrap().count(), 0);
        write_atomic(&path, |w| Ok(w.write_all(b"ok")?)).unwrap();
        assert_eq!(fs::read(&path).unwrap(), b"ok");
    }
}
