//! Every column of every report of the demo batch has the digits the README's "Numbers" table
//! documents for its kind; `[report] precision = "full"` gives round-trip digits instead.

use std::path::{Path, PathBuf};

use crate::util::{fixture, mzsift, stderr, stdout, tsv};

#[derive(Debug, Clone, Copy, PartialEq)]
enum Kind {
    Integer,
    Decimals(usize),
    Significant(usize),
    Text,
}

/// The documented kind of a column, by its name (README, "Numbers").
fn kind(column: &str) -> Kind {
    const INTEGER: &[&str] = &[
        "index",
        "ms_level",
        "points",
        "peaks",
        "clusters",
        "flagged_ions",
        "best_n_cl",
        "best_n_br",
        "scan",
        "charge",
        "n_cl",
        "n_br",
        "nominal_mass",
        "feature",
        "scans",
        "apex_scan",
        "spectra",
        "ms1",
        "ms2",
        "flagged_spectra",
        "halogen_features",
        "odd_nominal_features",
        "unreadable_spectra",
        "compound",
        "precursor_charge",
        "halogen_compounds",
        "odd_nominal_compounds",
    ];
    const MZ: &[&str] =
        &["mz", "m2_delta", "tolerance_da", "neutral_mass", "fwhm", "mz_min", "mz_max"];
    const RATIO: &[&str] = &[
        "score",
        "halogen_probability",
        "support",
        "misfit",
        "m2_ratio",
        "m2_expected",
        "m4_ratio",
        "m4_expected",
        "snr",
        "observed",
        "expected",
    ];
    if INTEGER.contains(&column) {
        Kind::Integer
    } else if MZ.contains(&column) || column.ends_with("_mz") {
        Kind::Decimals(5)
    } else if column.ends_with("_min") {
        Kind::Decimals(4)
    } else if column.contains("intensity") || column == "area" {
        Kind::Significant(6)
    } else if RATIO.contains(&column) || column.ends_with("_score") {
        Kind::Decimals(4)
    } else if column.ends_with("_ppm") {
        Kind::Decimals(2)
    } else if column == "seconds" {
        Kind::Decimals(3)
    } else {
        Kind::Text
    }
}

fn significant_digits(cell: &str) -> usize {
    let digits: String = cell.chars().filter(char::is_ascii_digit).collect();
    let trimmed = digits.trim_start_matches('0');
    // Trailing zeros of an integer part are place holders, not measured digits.
    let trimmed = if cell.contains('.') { trimmed } else { trimmed.trim_end_matches('0') };
    trimmed.len()
}

/// Why `cell` breaks the rule of `kind`, if it does.
fn breaks(kind: Kind, cell: &str) -> Option<String> {
    if cell.is_empty() {
        return None;
    }
    let unsigned = cell.strip_prefix('-').unwrap_or(cell);
    let numeric = !unsigned.is_empty() && unsigned.chars().all(|c| c.is_ascii_digit() || c == '.');
    match kind {
        Kind::Integer => {
            (!unsigned.chars().all(|c| c.is_ascii_digit())).then(|| "not an integer".into())
        }
        Kind::Decimals(d) => {
            let ok = numeric && unsigned.split_once('.').is_some_and(|(_, f)| f.len() == d);
            (!ok).then(|| format!("not {d} decimals"))
        }
        Kind::Significant(n) => {
            let ok = numeric && (cell == "0" || significant_digits(cell) <= n);
            (!ok).then(|| format!("more than {n} significant digits or not a plain number"))
        }
        // A text column holding numbers with decimals is a number column nobody documented.
        Kind::Text => (numeric && unsigned.contains('.')).then(|| "undocumented number".into()),
    }
}

fn tables(dir: &Path) -> Vec<PathBuf> {
    let mut out = Vec::new();
    for e in std::fs::read_dir(dir).unwrap() {
        let p = e.unwrap().path();
        if p.is_dir() {
            out.extend(tables(&p));
        } else if p.extension().is_some_and(|x| x == "tsv") {
            out.push(p);
        }
    }
    out
}

/// Checks every cell of a TSV text; returns the number of numeric cells checked.
fn check_table(name: &str, text: &str) -> usize {
    let (header, rows) = tsv(text);
    let mut checked = 0;
    for row in &rows {
        for (column, cell) in header.iter().zip(row) {
            let k = kind(column);
            if let Some(why) = breaks(k, cell) {
                panic!("{name}: column {column} ({k:?}): '{cell}' {why}");
            }
            checked += usize::from(k != Kind::Text && !cell.is_empty());
        }
    }
    checked
}

#[test]
fn every_report_column_has_its_documented_digits() {
    let dir = tempfile::tempdir().unwrap();
    let demo = fixture("demo");
    let o = mzsift(dir.path()).args(["run"]).arg(&demo).args(["-o", "out", "-q"]).output().unwrap();
    assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
    let mut checked = 0;
    let found = tables(&dir.path().join("out"));
    assert!(found.len() > 3 * 6, "{found:?}");
    for t in &found {
        checked += check_table(&t.display().to_string(), &std::fs::read_to_string(t).unwrap());
    }
    // The commands that print tables.
    let first = std::fs::read_dir(&demo)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "mzML"))
        .min()
        .unwrap();
    for args in [
        vec!["list".to_owned(), first.display().to_string()],
        vec!["peaks".to_owned(), first.display().to_string(), "--index".into(), "3".into()],
    ] {
        let o = mzsift(dir.path()).args(&args).output().unwrap();
        assert_eq!(o.status.code(), Some(0), "{args:?}: {}", stderr(&o));
        checked += check_table(&args[0], &stdout(&o));
    }
    assert!(checked > 10_000, "only {checked} numeric cells checked");
}

#[test]
fn theoretical_values_have_six_decimals_and_no_exponent() {
    let dir = tempfile::tempdir().unwrap();
    let o =
        mzsift(dir.path()).args(["pattern", "C12Br10O", "--threshold", "1e-6"]).output().unwrap();
    let (header, rows) = tsv(&stdout(&o));
    assert_eq!(header, ["label", "mz", "relative_abundance", "abundance"]);
    for r in &rows {
        assert_eq!(breaks(Kind::Decimals(6), &r[1]), None, "{r:?}");
        assert_eq!(breaks(Kind::Decimals(6), &r[2]), None, "{r:?}");
        assert_eq!(breaks(Kind::Significant(6), &r[3]), None, "{r:?}");
    }
    let o = mzsift(dir.path()).args(["mass", "C8H14ClN5", "--ion", "M+H"]).output().unwrap();
    let text = stdout(&o);
    let value =
        |k: &str| text.lines().find_map(|l| l.strip_prefix(&format!("{k}\t"))).unwrap().to_owned();
    assert_eq!(breaks(Kind::Decimals(6), &value("monoisotopic_mass")), None);
    assert_eq!(breaks(Kind::Decimals(6), &value("ion_mz")), None);
}

#[test]
fn full_precision_gives_round_trip_digits() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join("full.toml"), "[report]\nprecision = \"full\"\n").unwrap();
    let input = fixture("variant-indexed-zlib.mzML");
    let run = |out: &str, extra: &[&str]| {
        let o = mzsift(dir.path())
            .arg("run")
            .arg(&input)
            .args(["-o", out, "-q"])
            .args(extra)
            .output()
            .unwrap();
        assert_eq!(o.status.code(), Some(0), "{}", stderr(&o));
        std::fs::read_to_string(dir.path().join(out).join("variant-indexed-zlib/spectra.tsv"))
            .unwrap()
    };
    let measured = run("m", &[]);
    let full = run("f", &["--config", "full.toml"]);
    let (h, m_rows) = tsv(&measured);
    let (_, f_rows) = tsv(&full);
    let rt = h.iter().position(|c| c == "rt_min").unwrap();
    for (m, f) in m_rows.iter().zip(&f_rows) {
        let (a, b): (f64, f64) = (m[rt].parse().unwrap(), f[rt].parse().unwrap());
        assert!((a - b).abs() <= 0.5e-4, "{a} {b}");
        assert!(!f[rt].contains('e'), "{}", f[rt]);
        assert_eq!(breaks(Kind::Decimals(4), &m[rt]), None);
    }
    assert_ne!(measured, full, "full precision changes the digits");
}
