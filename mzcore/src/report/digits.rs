//! How many digits each kind of number gets in the reports: one place for every TSV writer.
//!
//! | kind | function | digits |
//! |---|---|---|
//! | m/z, masses, m/z widths and differences (Th, u) | [`mz`] | 5 decimals |
//! | theoretical m/z, masses and abundances (`mzsift mass`, `mzsift pattern`) | [`theoretical`] | 6 decimals |
//! | retention times (minutes) | [`minutes`] | 4 decimals |
//! | intensities, areas, intensity sums | [`intensity`] | 6 significant digits |
//! | probabilities, scores, ratios, fractions, S/N | [`probability`], [`ratio`] | 4 decimals |
//! | mass errors in ppm | [`ppm`] | 2 decimals |
//! | wall times (seconds) | [`seconds`] | 3 decimals |
//!
//! Never exponent notation; `-0` is written `0`; non-finite values as `NaN`, `inf`, `-inf`.
//! [`Precision::Full`] (`[report] precision = "full"`) writes every number with the shortest
//! digits that read back to the same `f64` instead (still without exponent).
//!
//! Row structs opt in per field with serde's `serialize_with`; the helpers take `f64`, `f32`
//! and their `Option`s (`None` is an empty cell):
//!
//! ```
//! use mzcore::report::digits::{self, Precision};
//!
//! #[derive(serde::Serialize)]
//! struct Row {
//!     #[serde(serialize_with = "digits::mz")]
//!     mz: f64,
//!     #[serde(serialize_with = "digits::minutes")]
//!     rt_min: Option<f64>,
//!     #[serde(serialize_with = "digits::intensity")]
//!     intensity: f64,
//! }
//! let row = Row { mz: 82.948466662768, rt_min: Some(6.291666666666666), intensity: 27630.451171875 };
//! let mut out = Vec::new();
//! mzcore::report::write_tsv(&mut out, &[], &[&row])?;
//! assert_eq!(String::from_utf8(out).unwrap(), "mz\trt_min\tintensity\n82.94847\t6.2917\t27630.5\n");
//!
//! let full = digits::with_precision(Precision::Full, || digits::text(digits::Kind::Minutes, 6.291666666666666));
//! assert_eq!(full, "6.291666666666666");
//! # Ok::<_, mzcore::Error>(())
//! ```
//!
//! The helpers write a text cell (exact digits in TSV). Inside [`as_numbers`] (which
//! [`super::write_json_atomic`] uses) they write JSON numbers instead, rounded the same way.

use std::cell::{Cell, RefCell};
use std::fmt::Write as _;

use serde::{Deserialize, Serialize, Serializer};

/// How many digits the reports carry.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "snake_case")]
pub enum Precision {
    /// The digits the measurement supports, per kind (the table of this module).
    #[default]
    Measured,
    /// Every digit needed to read the same `f64` back (shortest round-trip form).
    Full,
}

/// The kinds of numbers in the reports (see the module's table).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Kind {
    /// m/z and masses, 5 decimals.
    Mz,
    /// Theoretical values of `mass` and `pattern`, 6 decimals.
    Theoretical,
    /// Minutes, 4 decimals.
    Minutes,
    /// Intensities and areas, 6 significant digits.
    Intensity,
    /// Probabilities and ratios, 4 decimals.
    Probability,
    /// ppm, 2 decimals.
    Ppm,
    /// Seconds of wall time, 3 decimals.
    Seconds,
}

enum Rule {
    Decimals(usize),
    Significant(usize),
}

impl Kind {
    fn rule(self) -> Rule {
        match self {
            Kind::Mz => Rule::Decimals(5),
            Kind::Theoretical => Rule::Decimals(6),
            Kind::Minutes => Rule::Decimals(4),
            Kind::Intensity => Rule::Significant(6),
            Kind::Probability => Rule::Decimals(4),
            Kind::Ppm => Rule::Decimals(2),
            Kind::Seconds => Rule::Decimals(3),
        }
    }
}

thread_local! {
    static PRECISION: Cell<Precision> = const { Cell::new(Precision::Measured) };
    static NUMBERS: Cell<bool> = const { Cell::new(false) };
    static SCRATCH: RefCell<String> = const { RefCell::new(String::new()) };
}

/// Runs `f` with `precision` in force for the helpers on this thread (restored afterwards).
pub fn with_precision<T>(precision: Precision, f: impl FnOnce() -> T) -> T {
    let before = PRECISION.with(|p| p.replace(precision));
    let out = f();
    PRECISION.with(|p| p.set(before));
    out
}

/// Runs `f` with the helpers writing numbers (for JSON) instead of text cells.
pub fn as_numbers<T>(f: impl FnOnce() -> T) -> T {
    let before = NUMBERS.with(|n| n.replace(true));
    let out = f();
    NUMBERS.with(|n| n.set(before));
    out
}

/// The precision in force on this thread.
pub fn precision() -> Precision {
    PRECISION.with(Cell::get)
}

/// Appends `x` formatted as `kind` to `out` (the precision in force decides the digits).
pub fn write(kind: Kind, x: f64, out: &mut String) {
    if !x.is_finite() {
        let _ = write!(out, "{x}");
        return;
    }
    let start = out.len();
    if precision() == Precision::Full {
        let _ = write!(out, "{x}");
    } else {
        match kind.rule() {
            Rule::Decimals(d) => {
                let _ = write!(out, "{x:.d$}");
            }
            Rule::Significant(n) => significant(x, n, out),
        }
    }
    // "-0.00" (a tiny negative value rounded away) is written as zero.
    if out[start..].starts_with('-') && out[start + 1..].bytes().all(|b| b == b'0' || b == b'.') {
        out.remove(start);
    }
}

/// `x` formatted as `kind`, as a new string.
pub fn text(kind: Kind, x: f64) -> String {
    let mut s = String::new();
    write(kind, x, &mut s);
    s
}

/// `n` significant digits without exponent: the decimal exponent is taken after rounding
/// (so 9.999996 becomes `10.0000`, not `10.00000`).
fn significant(x: f64, n: usize, out: &mut String) {
    if x == 0.0 {
        out.push('0');
        return;
    }
    let sci = format!("{:.*e}", n - 1, x);
    let exp: i32 = sci.rsplit('e').next().and_then(|e| e.parse().ok()).unwrap_or(0);
    let decimals = (n as i32 - 1 - exp).max(0) as usize;
    if decimals > 0 {
        let _ = write!(out, "{x:.decimals$}");
    } else {
        let rounded: f64 = sci.parse().unwrap_or(x);
        let _ = write!(out, "{rounded:.0}");
    }
}

/// A number the helpers accept: `f64`, `f32`, and their `Option`s.
pub trait ReportNumber {
    /// The value, `None` for an empty cell.
    fn value(&self) -> Option<f64>;
}

impl ReportNumber for f64 {
    fn value(&self) -> Option<f64> {
        Some(*self)
    }
}

impl ReportNumber for f32 {
    fn value(&self) -> Option<f64> {
        Some(f64::from(*self))
    }
}

impl<T: ReportNumber> ReportNumber for Option<T> {
    fn value(&self) -> Option<f64> {
        self.as_ref().and_then(ReportNumber::value)
    }
}

impl<T: ReportNumber + ?Sized> ReportNumber for &T {
    fn value(&self) -> Option<f64> {
        (**self).value()
    }
}

/// Serializes `v` as `kind`: a text cell (or, inside [`as_numbers`], a rounded number).
pub fn serialize<T: ReportNumber + ?Sized, S: Serializer>(
    kind: Kind,
    v: &T,
    s: S,
) -> Result<S::Ok, S::Error> {
    let Some(x) = v.value() else { return s.serialize_none() };
    SCRATCH.with(|buf| {
        let mut buf = buf.borrow_mut();
        buf.clear();
        write(kind, x, &mut buf);
        if NUMBERS.with(Cell::get) {
            s.serialize_f64(buf.parse().unwrap_or(x))
        } else {
            s.serialize_str(&buf)
        }
    })
}

macro_rules! helper {
    ($(#[$doc:meta])* $name:ident, $kind:expr) => {
        $(#[$doc])*
        pub fn $name<T: ReportNumber + ?Sized, S: Serializer>(
            v: &T,
            s: S,
        ) -> Result<S::Ok, S::Error> {
            serialize($kind, v, s)
        }
    };
}

helper!(
    /// m/z, masses, m/z widths and differences: 5 decimals.
    mz,
    Kind::Mz
);
helper!(
    /// Theoretical m/z, masses and abundances of `mass` and `pattern`: 6 decimals.
    theoretical,
    Kind::Theoretical
);
helper!(
    /// Retention times in minutes: 4 decimals.
    minutes,
    Kind::Minutes
);
helper!(
    /// Intensities, areas and intensity sums: 6 significant digits.
    intensity,
    Kind::Intensity
);
helper!(
    /// Probabilities and scores: 4 decimals.
    probability,
    Kind::Probability
);
helper!(
    /// Ratios, fractions and S/N: 4 decimals.
    ratio,
    Kind::Probability
);
helper!(
    /// Mass errors in ppm: 2 decimals.
    ppm,
    Kind::Ppm
);
helper!(
    /// Wall times in seconds: 3 decimals.
    seconds,
    Kind::Seconds
);

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn each_kind_table() {
        for (kind, x, want) in [
            (Kind::Mz, 82.948466662768, "82.94847"),
            (Kind::Mz, 100.0, "100.00000"),
            (Kind::Mz, -0.000001, "0.00000"),
            (Kind::Theoretical, 215.0937732, "215.093773"),
            (Kind::Theoretical, 0.0000012, "0.000001"),
            (Kind::Minutes, 6.291666666666666, "6.2917"),
            (Kind::Intensity, 27630.451171875, "27630.5"),
            (Kind::Intensity, 123456789.0, "123457000"),
            (Kind::Intensity, 9.999996, "10.0000"),
            (Kind::Intensity, 0.000123456789, "0.000123457"),
            (Kind::Intensity, 1e20, "100000000000000000000"),
            (Kind::Intensity, 0.0, "0"),
            (Kind::Intensity, -12.3456789, "-12.3457"),
            (Kind::Probability, 0.95, "0.9500"),
            (Kind::Ppm, -1.23456, "-1.23"),
            (Kind::Seconds, 0.0004, "0.000"),
            (Kind::Mz, f64::NAN, "NaN"),
        ] {
            assert_eq!(text(kind, x), want, "{kind:?} {x}");
        }
    }

    #[test]
    fn full_precision_round_trips_without_exponent() {
        for x in [6.291666666666666, 1e-7, 1e21, 27630.451171875, 0.1 + 0.2] {
            let t = with_precision(Precision::Full, || text(Kind::Mz, x));
            assert!(!t.contains('e'), "{t}");
            assert_eq!(t.parse::<f64>().unwrap(), x);
        }
        assert_eq!(precision(), Precision::Measured, "restored after the scope");
    }

    #[test]
    fn json_gets_rounded_numbers() {
        #[derive(Serialize)]
        struct R {
            #[serde(serialize_with = "minutes")]
            t: Option<f64>,
            #[serde(serialize_with = "intensity")]
            i: f32,
        }
        let r = R { t: Some(6.291666666666666), i: 27630.451 };
        let json = as_numbers(|| serde_json::to_string(&r).unwrap());
        assert_eq!(json, r#"{"t":6.2917,"i":27630.5}"#);
        assert_eq!(serde_json::to_string(&r).unwrap(), r#"{"t":"6.2917","i":"27630.5"}"#);
        let none = R { t: None, i: 0.0 };
        assert_eq!(as_numbers(|| serde_json::to_string(&none).unwrap()), r#"{"t":null,"i":0.0}"#);
    }
}
