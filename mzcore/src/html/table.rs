//! A report table read by column name, so that the page tolerates columns added later and
//! says which one is missing.

use std::path::Path;

use crate::report::unescape_text;

/// A TSV report held as text cells, with its header.
#[derive(Debug, Clone, Default)]
pub struct Table {
    header: Vec<String>,
    rows: Vec<Vec<String>>,
}

impl Table {
    /// Reads a TSV file; the error is a sentence naming the file and the line.
    pub fn read(path: &Path) -> Result<Table, String> {
        let text = std::fs::read(path).map_err(|e| missing(path, &e))?;
        Table::parse(&text).map_err(|e| format!("{} could not be read: {e}.", file_name(path)))
    }

    /// Parses TSV text (header row, tab-separated, text cells escaped as the writers do).
    pub fn parse(text: &[u8]) -> Result<Table, String> {
        let mut r = csv::ReaderBuilder::new()
            .delimiter(b'\t')
            .has_headers(true)
            .flexible(true)
            .from_reader(text);
        let header: Vec<String> =
            r.headers().map_err(|e| e.to_string())?.iter().map(str::to_owned).collect();
        let mut rows = Vec::new();
        for (i, rec) in r.records().enumerate() {
            let rec = rec.map_err(|e| format!("line {}: {e}", i + 2))?;
            rows.push(rec.iter().map(unescape_text).collect());
        }
        Ok(Table { header, rows })
    }

    /// Column names, in order.
    pub fn header(&self) -> &[String] {
        &self.header
    }

    /// Number of data rows.
    pub fn len(&self) -> usize {
        self.rows.len()
    }

    /// True when the table has no data rows.
    pub fn is_empty(&self) -> bool {
        self.rows.is_empty()
    }

    /// Position of a column, if the table has it.
    pub fn column(&self, name: &str) -> Option<usize> {
        self.header.iter().position(|h| h == name)
    }

    /// The rows, each as cells addressed through [`Row`].
    pub fn rows(&self) -> impl Iterator<Item = Row<'_>> {
        self.rows.iter().map(move |cells| Row { table: self, cells })
    }
}

/// One data row of a [`Table`].
#[derive(Clone, Copy)]
pub struct Row<'a> {
    table: &'a Table,
    cells: &'a [String],
}

impl<'a> Row<'a> {
    /// The cell of column `name` (empty when the column or the cell is absent).
    pub fn text(&self, name: &str) -> &'a str {
        self.table.column(name).and_then(|i| self.cells.get(i)).map_or("", String::as_str)
    }

    /// The cell at a column position (empty when absent).
    pub fn at(&self, i: usize) -> &'a str {
        self.cells.get(i).map_or("", String::as_str)
    }

    /// The cell of column `name` as a finite number.
    pub fn num(&self, name: &str) -> Option<f64> {
        parse_num(self.text(name))
    }

    /// The cell of column `name` as `true` (anything else is false).
    pub fn flag(&self, name: &str) -> bool {
        self.text(name) == "true"
    }
}

/// A finite number, or none for an empty or unparsable cell.
pub fn parse_num(s: &str) -> Option<f64> {
    s.trim().parse::<f64>().ok().filter(|v| v.is_finite())
}

/// The file name of `path`, for sentences.
pub(super) fn file_name(path: &Path) -> String {
    path.file_name()
        .map_or_else(|| path.display().to_string(), |n| n.to_string_lossy().into_owned())
}

/// The sentence for a report file that cannot be opened: "x.tsv is not in folder." when it
/// does not exist.
pub(super) fn missing(path: &Path, e: &std::io::Error) -> String {
    if e.kind() == std::io::ErrorKind::NotFound {
        let parent = path
            .parent()
            .and_then(Path::file_name)
            .map(|p| p.to_string_lossy().into_owned())
            .unwrap_or_default();
        format!("{} is not in {parent}.", file_name(path))
    } else {
        format!("{} could not be read: {e}.", file_name(path))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn cells_by_name_with_escapes_and_missing_columns() {
        let t = Table::parse(b"a\tb\n1.5\tx\\ty\n\t\n").unwrap();
        let rows: Vec<_> = t.rows().collect();
        assert_eq!(rows[0].num("a"), Some(1.5));
        assert_eq!(rows[0].text("b"), "x\ty");
        assert_eq!(rows[0].text("c"), "");
        assert_eq!(rows[1].num("a"), None);
        assert_eq!(t.len(), 2);
    }
}
