//! The sample sheet: which file is which sample, of which kind, in which acquisition order.
//!
//! A sheet is a TSV with the columns `file sample kind` (any order, a header row first; blank
//! lines and lines starting with `#` are skipped). `kind` is `sample`, `blank`, `qc` or
//! `standard`; files with the same `sample` are replicate injections of one sample. The rows
//! are in acquisition order. Without a sheet, the kind comes from glob patterns on file names
//! ([`super::BatchSettings`]) and every file is its own sample.

use std::cmp::Ordering;
use std::path::Path;

use serde::{Deserialize, Serialize};

use super::BatchSettings;
use crate::error::{Error, ErrorKind, Result};

/// What an injection is.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum SampleKind {
    /// A sample to be screened.
    Sample,
    /// A procedural or solvent blank.
    Blank,
    /// A quality-control injection (e.g. a pooled or check sample).
    Qc,
    /// A standard (e.g. a standard mix).
    Standard,
}

impl SampleKind {
    /// The word used in sheets and reports.
    pub fn name(self) -> &'static str {
        match self {
            SampleKind::Sample => "sample",
            SampleKind::Blank => "blank",
            SampleKind::Qc => "qc",
            SampleKind::Standard => "standard",
        }
    }

    /// Parses the word of [`SampleKind::name`] (case-insensitive).
    pub fn parse(word: &str) -> Option<SampleKind> {
        [SampleKind::Sample, SampleKind::Blank, SampleKind::Qc, SampleKind::Standard]
            .into_iter()
            .find(|k| k.name().eq_ignore_ascii_case(word.trim()))
    }
}

/// One row of a sample sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SheetEntry {
    /// Line number in the sheet (1-based).
    pub line: usize,
    /// The file as written: a report folder name, an input path, or its file name with or
    /// without `.mzML` / `.mzML.gz`.
    pub file: String,
    /// Sample name (replicates share it).
    pub sample: String,
    /// Kind of injection.
    pub kind: SampleKind,
}

/// A parsed sample sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SampleSheet {
    /// Where it was read from, for messages.
    pub source: String,
    /// The rows, in acquisition order.
    pub entries: Vec<SheetEntry>,
}

fn sheet_error(source: &str, line: usize, msg: impl std::fmt::Display) -> Error {
    Error::new(ErrorKind::Config(format!("{source}: line {line}: {msg}")))
}

impl SampleSheet {
    /// Parses a sheet; `source` names it in errors, which also name the line.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::batch::{SampleKind, SampleSheet};
    /// let sheet = SampleSheet::parse("file\tsample\tkind\nb1\tblank-1\tblank\n", "sheet.tsv")?;
    /// assert_eq!(sheet.entries[0].kind, SampleKind::Blank);
    /// let e = SampleSheet::parse("file\tsample\tkind\nb1\tx\tspike\n", "sheet.tsv").unwrap_err();
    /// assert!(e.to_string().contains("sheet.tsv: line 2"));
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn parse(text: &str, source: &str) -> Result<SampleSheet> {
        let mut columns: Option<[usize; 3]> = None;
        let mut width = 0;
        let mut entries = Vec::new();
        for (i, raw) in text.lines().enumerate() {
            let line = i + 1;
            let raw = raw.strip_suffix('\r').unwrap_or(raw);
            if raw.trim().is_empty() || raw.starts_with('#') {
                continue;
            }
            let fields: Vec<&str> = raw.split('\t').map(str::trim).collect();
            let Some(cols) = columns else {
                let mut found = [usize::MAX; 3];
                for (c, name) in fields.iter().enumerate() {
                    let slot = match *name {
                        "file" => 0,
                        "sample" => 1,
                        "kind" => 2,
                        other => {
                            return Err(sheet_error(
                                source,
                                line,
                                format!(
                                    "unknown column '{other}' (the columns are file, sample, kind)"
                                ),
                            ));
                        }
                    };
                    if found[slot] != usize::MAX {
                        return Err(sheet_error(source, line, format!("column '{name}' twice")));
                    }
                    found[slot] = c;
                }
                for (slot, name) in ["file", "sample", "kind"].iter().enumerate() {
                    if found[slot] == usize::MAX {
                        return Err(sheet_error(source, line, format!("no column '{name}'")));
                    }
                }
                columns = Some(found);
                width = fields.len();
                continue;
            };
            if fields.len() != width {
                return Err(sheet_error(
                    source,
                    line,
                    format!("{} fields, the header has {width}", fields.len()),
                ));
            }
            let (file, sample, kind) = (fields[cols[0]], fields[cols[1]], fields[cols[2]]);
            if file.is_empty() || sample.is_empty() {
                return Err(sheet_error(source, line, "empty file or sample"));
            }
            let kind = SampleKind::parse(kind).ok_or_else(|| {
                sheet_error(
                    source,
                    line,
                    format!("unknown kind '{kind}' (use sample, blank, qc or standard)"),
                )
            })?;
            entries.push(SheetEntry { line, file: file.into(), sample: sample.into(), kind });
        }
        if columns.is_none() {
            return Err(sheet_error(source, 1, "no header row (file, sample, kind)"));
        }
        Ok(SampleSheet { source: source.into(), entries })
    }

    /// Reads and parses the sheet at `path`.
    pub fn read(path: &Path) -> Result<SampleSheet> {
        let text = std::fs::read_to_string(path)
            .map_err(|e| Error::new(ErrorKind::Io(e)).in_field(&path.display().to_string()))?;
        SampleSheet::parse(&text, &path.display().to_string())
    }
}

/// Who a batch file is, for matching it to the sheet.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct FileIdentity {
    /// Its report folder name (unique in the batch).
    pub name: String,
    /// Its input path as given or found.
    pub path: String,
}

/// The sample, kind and acquisition position of one file.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct SampleAssignment {
    /// Sample name.
    pub sample: String,
    /// Kind of injection.
    pub kind: SampleKind,
    /// Position in acquisition order (0-based, unique).
    pub order: usize,
}

fn strip_mzml(name: &str) -> &str {
    let lower = name.to_ascii_lowercase();
    for ext in [".mzml.gz", ".mzml"] {
        if lower.ends_with(ext) {
            return &name[..name.len() - ext.len()];
        }
    }
    name
}

fn file_name(path: &str) -> &str {
    path.rsplit(['/', '\\']).next().unwrap_or(path)
}

fn names_file(written: &str, f: &FileIdentity) -> bool {
    let base = file_name(&f.path);
    written == f.name || written == f.path || written == base || written == strip_mzml(base)
}

/// Compares names with digit runs taken as numbers (`run-2` before `run-10`), then bytewise.
pub fn natural_cmp(a: &str, b: &str) -> Ordering {
    let (mut x, mut y) = (a.as_bytes(), b.as_bytes());
    while !x.is_empty() && !y.is_empty() {
        if x[0].is_ascii_digit() && y[0].is_ascii_digit() {
            let dx = x.iter().take_while(|c| c.is_ascii_digit()).count();
            let dy = y.iter().take_while(|c| c.is_ascii_digit()).count();
            let (nx, ny) = (&x[..dx], &y[..dy]);
            let tx = nx.iter().skip_while(|&&c| c == b'0').count();
            let ty = ny.iter().skip_while(|&&c| c == b'0').count();
            let o = tx.cmp(&ty).then_with(|| nx[dx - tx..].cmp(&ny[dy - ty..]));
            if o != Ordering::Equal {
                return o;
            }
            (x, y) = (&x[dx..], &y[dy..]);
        } else {
            if x[0] != y[0] {
                return x[0].cmp(&y[0]);
            }
            (x, y) = (&x[1..], &y[1..]);
        }
    }
    x.len().cmp(&y.len()).then_with(|| a.cmp(b))
}

/// Gives every file its sample, kind and acquisition position: from the sheet when one is
/// given (rows in acquisition order), else from the glob patterns of `settings` on the file
/// name and report folder name, one sample per file. Files the sheet does not list get the
/// glob rules and come after the listed ones. Without a sheet, acquisition order is the
/// natural order of report folder names, so the result never depends on the input order.
///
/// A sheet row naming no file of the batch, or more than one, or a file named twice, is an
/// error naming its line.
///
/// # Examples
///
/// ```
/// use mzcore::batch::{assign_samples, BatchSettings, FileIdentity, SampleKind};
/// let files = ["night-10", "night-2_blank"]
///     .map(|n| FileIdentity { name: n.into(), path: format!("in/{n}.mzML") });
/// let a = assign_samples(&files, None, &BatchSettings::default())?;
/// assert_eq!((a[0].kind, a[0].order), (SampleKind::Sample, 1));
/// assert_eq!((a[1].kind, a[1].order), (SampleKind::Blank, 0));
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn assign_samples(
    files: &[FileIdentity],
    sheet: Option<&SampleSheet>,
    settings: &BatchSettings,
) -> Result<Vec<SampleAssignment>> {
    let mut listed: Vec<Option<(usize, &SheetEntry)>> = vec![None; files.len()];
    if let Some(sheet) = sheet {
        for (row, e) in sheet.entries.iter().enumerate() {
            let hits: Vec<usize> =
                (0..files.len()).filter(|&i| names_file(&e.file, &files[i])).collect();
            match hits.as_slice() {
                [] => {
                    return Err(sheet_error(
                        &sheet.source,
                        e.line,
                        format!("file '{}' is not in the batch", e.file),
                    ));
                }
                [i] => {
                    if let Some((_, first)) = listed[*i] {
                        return Err(sheet_error(
                            &sheet.source,
                            e.line,
                            format!("file '{}' is already listed on line {}", e.file, first.line),
                        ));
                    }
                    listed[*i] = Some((row, e));
                }
                _ => {
                    return Err(sheet_error(
                        &sheet.source,
                        e.line,
                        format!("file '{}' names {} files of the batch", e.file, hits.len()),
                    ));
                }
            }
        }
    }
    let glob_kind = |f: &FileIdentity| {
        let base = file_name(&f.path);
        let hit = |pats: &[String]| {
            pats.iter().any(|p| crate::qc::glob_match(p, base) || crate::qc::glob_match(p, &f.name))
        };
        if hit(&settings.blanks) {
            SampleKind::Blank
        } else if hit(&settings.qc) {
            SampleKind::Qc
        } else if hit(&settings.standards) {
            SampleKind::Standard
        } else {
            SampleKind::Sample
        }
    };
    let mut by_order: Vec<usize> = (0..files.len()).collect();
    by_order.sort_by(|&a, &b| match (listed[a], listed[b]) {
        (Some((ra, _)), Some((rb, _))) => ra.cmp(&rb),
        (Some(_), None) => Ordering::Less,
        (None, Some(_)) => Ordering::Greater,
        (None, None) => natural_cmp(&files[a].name, &files[b].name),
    });
    let mut out: Vec<SampleAssignment> = files
        .iter()
        .zip(&listed)
        .map(|(f, l)| match l {
            Some((_, e)) => SampleAssignment { sample: e.sample.clone(), kind: e.kind, order: 0 },
            None => SampleAssignment { sample: f.name.clone(), kind: glob_kind(f), order: 0 },
        })
        .collect();
    for (pos, &i) in by_order.iter().enumerate() {
        out[i].order = pos;
    }
    Ok(out)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn ids(names: &[&str]) -> Vec<FileIdentity> {
        names
            .iter()
            .map(|n| FileIdentity { name: (*n).into(), path: format!("data/{n}.mzML") })
            .collect()
    }

    #[test]
    fn sheet_errors_name_the_line() {
        for (text, want) in [
            ("file\tsample\tkind\tnote\n", "line 1: unknown column 'note'"),
            ("file\tsample\n", "line 1: no column 'kind'"),
            ("file\tsample\tkind\nx\ty\n", "line 2: 2 fields"),
            ("# c\nfile\tsample\tkind\n\nx\ty\tspiked\n", "line 4: unknown kind 'spiked'"),
            ("", "line 1: no header row"),
            ("kind\tfile\tkind\n", "line 1: column 'kind' twice"),
        ] {
            let e = SampleSheet::parse(text, "s.tsv").unwrap_err().to_string();
            assert!(e.contains(&format!("s.tsv: {want}")), "{text:?}: {e}");
        }
    }

    #[test]
    fn sheet_rows_match_files_and_set_order() {
        let sheet = SampleSheet::parse(
            "kind\tfile\tsample\r\nblank\tb.mzML\tB\nsample\tdata/a.mzML\tS\nsample\tc\tS\n",
            "s.tsv",
        )
        .unwrap();
        let a = assign_samples(
            &ids(&["a", "b", "c", "d-blank"]),
            Some(&sheet),
            &BatchSettings::default(),
        )
        .unwrap();
        assert_eq!(
            a[1],
            SampleAssignment { sample: "B".into(), kind: SampleKind::Blank, order: 0 }
        );
        assert_eq!(
            a[0],
            SampleAssignment { sample: "S".into(), kind: SampleKind::Sample, order: 1 }
        );
        assert_eq!(a[2].order, 2);
        // Not on the sheet: the glob rules, after the listed files.
        assert_eq!(
            a[3],
            SampleAssignment { sample: "d-blank".into(), kind: SampleKind::Blank, order: 3 }
        );
    }

    #[test]
    fn unknown_and_repeated_files_are_errors() {
        let files = ids(&["a", "b"]);
        let s = SampleSheet::parse("file\tsample\tkind\nzz\tS\tsample\n", "s.tsv").unwrap();
        let e = assign_samples(&files, Some(&s), &BatchSettings::default()).unwrap_err();
        assert!(e.to_string().contains("s.tsv: line 2: file 'zz' is not in the batch"), "{e}");
        let s = SampleSheet::parse("file\tsample\tkind\na\tS\tsample\na.mzML\tS\tqc\n", "s.tsv")
            .unwrap();
        let e = assign_samples(&files, Some(&s), &BatchSettings::default()).unwrap_err();
        assert!(e.to_string().contains("line 3: file 'a.mzML' is already listed on line 2"), "{e}");
    }

    #[test]
    fn natural_order_compares_numbers() {
        let mut v = vec!["run-10", "run-2", "run-02b", "Run-1", "run-1"];
        v.sort_by(|a, b| natural_cmp(a, b));
        assert_eq!(v, ["Run-1", "run-1", "run-2", "run-02b", "run-10"]);
    }
}
