//! Chemical formulas: parsing, masses, Hill notation and the nitrogen rule.
//!
//! # Notation
//!
//! - Element symbols with optional counts in any order: `C6H12O6`, `H12C6O6`, `ClCH3`.
//!   A symbol is one upper-case letter, optionally followed by one lower-case letter.
//! - Parentheses with multipliers, nested: `C6H4(NO2)2`, `(CH3)3C(CH2(CH3))2`.
//! - Explicit isotopes in square brackets, mass number before the symbol: `[13C]6H12O6`,
//!   `C6[2H]5Cl`. `D` is accepted for `[2H]`. An atom written this way counts as that one
//!   isotope only (abundance 1); plain symbols mean the natural isotopic composition.
//! - Counts are decimal integers from 1 to [`MAX_COUNT`]; after multiplying out parentheses,
//!   each element may hold at most [`MAX_ATOMS`] atoms.
//!
//! # Examples
//!
//! ```
//! use mzcore::chem::Formula;
//! let f: Formula = "C6H4(NO2)2".parse()?;
//! assert_eq!(f.count("N"), 2);
//! assert_eq!(f.to_string(), "C6H4N2O4");
//! assert_eq!(f.nominal_mass(), 168);
//! assert!((f.monoisotopic_mass() - 168.017107).abs() < 1e-5);
//! # Ok::<_, mzcore::Error>(())
//! ```

use std::collections::BTreeMap;
use std::fmt;
use std::str::FromStr;

use super::elements::{ELEMENTS, Element, Isotope};
use crate::{Error, ErrorKind, Result};

/// Largest count the parser accepts after one symbol or group: as many atoms as one element
/// may hold, so that every formula this module writes (Hill notation) reads back.
pub const MAX_COUNT: u32 = MAX_ATOMS;
/// Largest number of atoms of one element (or isotope) in a formula.
pub const MAX_ATOMS: u32 = 1_000_000;
/// Deepest nesting of parentheses the parser accepts.
const MAX_DEPTH: usize = 32;

/// What one formula entry stands for: an element at natural composition, or one isotope.
#[derive(Debug, Clone, Copy, PartialEq, Eq, PartialOrd, Ord, Hash)]
struct Species {
    /// Index into [`ELEMENTS`].
    element: u8,
    /// Mass number of an explicit isotope; `None` for the natural composition.
    mass_number: Option<u16>,
}

/// A chemical formula: atom counts per element (natural isotopic composition) or per explicit
/// isotope.
#[derive(Debug, Clone, Default, PartialEq, Eq, Hash)]
pub struct Formula {
    counts: BTreeMap<Species, u32>,
}

/// One entry of a formula, as [`Formula::entries`] yields it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Entry {
    /// The element.
    pub element: &'static Element,
    /// The explicit isotope, or `None` for the natural isotopic composition.
    pub isotope: Option<&'static Isotope>,
    /// Number of atoms.
    pub count: u32,
}

impl Entry {
    /// The isotopes this entry draws from: the element's natural isotopes, or the one
    /// explicit isotope (with the abundance it has in nature; callers treat it as 1).
    pub fn isotopes(&self) -> &'static [Isotope] {
        match self.isotope {
            Some(i) => std::slice::from_ref(i),
            None => self.element.isotopes,
        }
    }
}

/// Parity of a nominal mass.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Parity {
    /// Even nominal mass.
    Even,
    /// Odd nominal mass.
    Odd,
}

impl Parity {
    /// Parity of an integer.
    pub fn of(n: i64) -> Parity {
        if n.rem_euclid(2) == 0 { Parity::Even } else { Parity::Odd }
    }

    /// `"even"` or `"odd"`.
    pub fn as_str(self) -> &'static str {
        match self {
            Parity::Even => "even",
            Parity::Odd => "odd",
        }
    }
}

impl fmt::Display for Parity {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.as_str())
    }
}

/// The nitrogen rule (common practice) evaluated for a formula.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct NitrogenRule {
    /// Nominal mass of the neutral molecule.
    pub nominal_mass: i64,
    /// Parity of the nominal mass.
    pub parity: Parity,
    /// Number of nitrogen atoms (all isotopes).
    pub nitrogen: u32,
    /// True when the formula holds only elements the rule covers (C, H, N, O, S, P, Si, F,
    /// Cl, Br, I) at natural composition, so that parity must follow the nitrogen count.
    pub applies: bool,
}

impl NitrogenRule {
    /// True when the rule applies and the nominal mass parity matches the nitrogen count.
    pub fn consistent(&self) -> bool {
        self.applies && self.parity == Parity::of(i64::from(self.nitrogen))
    }
}

/// Elements of the nitrogen rule (common practice): their most abundant isotope's mass number
/// has the same parity as their usual valence, except nitrogen (even mass, odd valence).
const NITROGEN_RULE_ELEMENTS: &[&str] = &["H", "C", "N", "O", "F", "Si", "P", "S", "Cl", "Br", "I"];

impl Formula {
    /// Parses a formula (see the module documentation for the notation).
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::chem::Formula;
    /// let glucose13 = mzcore::chem::Formula::parse("[13C]6H12O6")?;
    /// assert_eq!(glucose13.nominal_mass(), 186);
    /// assert!(Formula::parse("C6Xy2").is_err());
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn parse(text: &str) -> Result<Formula> {
        Parser { text, chars: text.char_indices().collect(), pos: 0 }.formula()
    }

    /// An empty formula (no atoms).
    pub fn new() -> Formula {
        Formula::default()
    }

    /// True when the formula has no atoms.
    pub fn is_empty(&self) -> bool {
        self.counts.is_empty()
    }

    /// Number of atoms of `symbol`, natural and explicit isotopes together.
    pub fn count(&self, symbol: &str) -> u32 {
        self.counts
            .iter()
            .filter(|(s, _)| ELEMENTS[usize::from(s.element)].symbol == symbol)
            .map(|(_, &c)| c)
            .sum()
    }

    /// Total number of atoms.
    pub fn atoms(&self) -> u64 {
        self.counts.values().map(|&c| u64::from(c)).sum()
    }

    /// The entries, ordered by atomic number, natural composition before explicit isotopes.
    pub fn entries(&self) -> impl Iterator<Item = Entry> + '_ {
        self.counts.iter().map(|(s, &count)| {
            let element = &ELEMENTS[usize::from(s.element)];
            let isotope = s.mass_number.and_then(|a| element.isotope(a));
            Entry { element, isotope, count }
        })
    }

    /// Adds `count` atoms of an element at natural composition.
    pub fn add_element(&mut self, symbol: &str, count: u32) -> Result<()> {
        let idx = ELEMENTS.iter().position(|e| e.symbol == symbol).ok_or_else(|| {
            parse_error("formula", symbol, 0, format!("unknown element '{symbol}'"))
        })?;
        self.add_species(Species { element: idx as u8, mass_number: None }, count)
            .map_err(|reason| parse_error("formula", symbol, 0, reason))
    }

    fn add_species(&mut self, s: Species, count: u32) -> std::result::Result<(), String> {
        let slot = self.counts.entry(s).or_insert(0);
        let total = u64::from(*slot) + u64::from(count);
        if total > u64::from(MAX_ATOMS) {
            return Err(format!("more than {MAX_ATOMS} atoms of one element"));
        }
        *slot = total as u32;
        Ok(())
    }

    /// The sum of two formulas.
    pub fn plus(&self, other: &Formula) -> Result<Formula> {
        let mut out = self.clone();
        for (&s, &c) in &other.counts {
            out.add_species(s, c).map_err(|r| parse_error("formula", &other.to_string(), 0, r))?;
        }
        Ok(out)
    }

    /// This formula less `other`; an error when `other` holds atoms this one lacks.
    pub fn minus(&self, other: &Formula) -> Result<Formula> {
        let mut out = self.clone();
        for (&s, &c) in &other.counts {
            let have = out.counts.get(&s).copied().unwrap_or(0);
            if have < c {
                return Err(Error::new(ErrorKind::InvalidValue {
                    field: "formula".into(),
                    value: format!("cannot remove {other} from {self}"),
                }));
            }
            if have == c {
                out.counts.remove(&s);
            } else {
                out.counts.insert(s, have - c);
            }
        }
        Ok(out)
    }

    /// This formula `n` times (n M, as in a dimer `[2M+H]+`).
    pub fn times(&self, n: u32) -> Result<Formula> {
        let mut out = Formula::new();
        for (&s, &c) in &self.counts {
            let total = u64::from(c) * u64::from(n);
            if total > u64::from(MAX_ATOMS) {
                return Err(parse_error("formula", &self.to_string(), 0, "too many atoms".into()));
            }
            if total > 0 {
                out.counts.insert(s, total as u32);
            }
        }
        Ok(out)
    }

    /// Monoisotopic mass in u: each natural element at its most abundant isotope, explicit
    /// isotopes at their own mass.
    pub fn monoisotopic_mass(&self) -> f64 {
        self.entries()
            .map(|e| {
                let m = e.isotope.unwrap_or_else(|| e.element.most_abundant()).mass;
                m * f64::from(e.count)
            })
            .sum()
    }

    /// Average (molar) mass in u from the isotope table.
    pub fn average_mass(&self) -> f64 {
        self.entries()
            .map(|e| {
                let m = e.isotope.map_or_else(|| e.element.average_mass(), |i| i.mass);
                m * f64::from(e.count)
            })
            .sum()
    }

    /// Nominal mass: sum of the mass numbers of the isotopes used for the monoisotopic mass.
    pub fn nominal_mass(&self) -> i64 {
        self.entries()
            .map(|e| {
                let a = e.isotope.unwrap_or_else(|| e.element.most_abundant()).mass_number;
                i64::from(a) * i64::from(e.count)
            })
            .sum()
    }

    /// The nitrogen rule for the neutral molecule.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::chem::{Formula, Parity};
    /// let atrazine = Formula::parse("C8H14ClN5")?;
    /// let rule = atrazine.nitrogen_rule();
    /// assert_eq!(rule.parity, Parity::Odd);
    /// assert!(rule.consistent());
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn nitrogen_rule(&self) -> NitrogenRule {
        let nominal_mass = self.nominal_mass();
        let applies = self
            .entries()
            .all(|e| e.isotope.is_none() && NITROGEN_RULE_ELEMENTS.contains(&e.element.symbol));
        NitrogenRule {
            nominal_mass,
            parity: Parity::of(nominal_mass),
            nitrogen: self.count("N"),
            applies,
        }
    }

    /// The formula in Hill order: C, then H, then the rest alphabetically (all alphabetical
    /// when there is no carbon). Explicit isotopes follow their element as `[13C]2`.
    pub fn hill(&self) -> String {
        let mut entries: Vec<Entry> = self.entries().collect();
        let has_carbon = entries.iter().any(|e| e.element.symbol == "C");
        let rank = |e: &Entry| -> (u8, &'static str, u16) {
            let r = match (has_carbon, e.element.symbol) {
                (true, "C") => 0,
                (true, "H") => 1,
                _ => 2,
            };
            (r, e.element.symbol, e.isotope.map_or(0, |i| i.mass_number))
        };
        entries.sort_by(|a, b| rank(a).cmp(&rank(b)));
        let mut s = String::new();
        for e in entries {
            match e.isotope {
                Some(i) => s.push_str(&format!("[{}{}]", i.mass_number, e.element.symbol)),
                None => s.push_str(e.element.symbol),
            }
            if e.count != 1 {
                s.push_str(&e.count.to_string());
            }
        }
        s
    }
}

impl fmt::Display for Formula {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(&self.hill())
    }
}

impl FromStr for Formula {
    type Err = Error;
    fn from_str(s: &str) -> Result<Formula> {
        Formula::parse(s)
    }
}

/// A `Parse` error.
pub(crate) fn parse_error(what: &str, text: &str, at: usize, reason: String) -> Error {
    Error::new(ErrorKind::Parse { what: what.into(), text: text.into(), at, reason })
}

struct Parser<'a> {
    text: &'a str,
    chars: Vec<(usize, char)>,
    pos: usize,
}

impl Parser<'_> {
    fn peek(&self) -> Option<char> {
        self.chars.get(self.pos).map(|&(_, c)| c)
    }

    fn err(&self, at: usize, reason: impl Into<String>) -> Error {
        parse_error("formula", self.text, at, reason.into())
    }

    fn formula(mut self) -> Result<Formula> {
        if self.chars.is_empty() {
            return Err(self.err(0, "empty formula"));
        }
        let f = self.sequence(0)?;
        if let Some(c) = self.peek() {
            let reason = if c == ')' {
                "')' without matching '('".to_string()
            } else {
                format!("unexpected character '{c}'")
            };
            return Err(self.err(self.pos, reason));
        }
        if f.is_empty() {
            return Err(self.err(0, "formula has no atoms"));
        }
        Ok(f)
    }

    /// A sequence of terms up to `)` or the end.
    fn sequence(&mut self, depth: usize) -> Result<Formula> {
        let mut out = Formula::new();
        loop {
            let start = self.pos;
            let Some(c) = self.peek() else { break };
            let group = match c {
                ')' => break,
                '(' => {
                    if depth >= MAX_DEPTH {
                        return Err(self.err(start, "parentheses nested too deeply"));
                    }
                    self.pos += 1;
                    let inner = self.sequence(depth + 1)?;
                    if self.peek() != Some(')') {
                        return Err(self.err(start, "'(' without matching ')'"));
                    }
                    if inner.is_empty() {
                        return Err(self.err(start, "empty parentheses"));
                    }
                    self.pos += 1;
                    inner
                }
                '[' => self.isotope()?,
                'A'..='Z' => self.element()?,
                _ => return Err(self.err(start, format!("unexpected character '{c}'"))),
            };
            let n = self.count()?.unwrap_or(1);
            let g = group.times(n).map_err(|_| self.err(start, "too many atoms"))?;
            for (&s, &c) in &g.counts {
                out.add_species(s, c).map_err(|r| self.err(start, r))?;
            }
        }
        Ok(out)
    }

    fn symbol(&mut self) -> Result<(usize, String)> {
        let start = self.pos;
        let mut sym = String::new();
        match self.peek() {
            Some(c @ 'A'..='Z') => sym.push(c),
            Some(c) => {
                return Err(self.err(start, format!("expected an element symbol, found '{c}'")));
            }
            None => return Err(self.err(start, "expected an element symbol, found the end")),
        }
        self.pos += 1;
        if let Some(c @ 'a'..='z') = self.peek() {
            sym.push(c);
            self.pos += 1;
        }
        Ok((start, sym))
    }

    fn lookup(&self, at: usize, sym: &str) -> Result<u8> {
        ELEMENTS
            .iter()
            .position(|e| e.symbol == sym)
            .map(|i| i as u8)
            .ok_or_else(|| self.err(at, format!("unknown element '{sym}'")))
    }

    fn element(&mut self) -> Result<Formula> {
        let (at, sym) = self.symbol()?;
        let mut f = Formula::new();
        if sym == "D" {
            let h = self.lookup(at, "H")?;
            f.counts.insert(Species { element: h, mass_number: Some(2) }, 1);
        } else {
            let e = self.lookup(at, &sym)?;
            f.counts.insert(Species { element: e, mass_number: None }, 1);
        }
        Ok(f)
    }

    /// `[13C]`: mass number, then symbol, in square brackets.
    fn isotope(&mut self) -> Result<Formula> {
        let start = self.pos;
        self.pos += 1; // '['
        let num_at = self.pos;
        let mut a: u32 = 0;
        while let Some(d) = self.peek().and_then(|c| c.to_digit(10)) {
            a = a * 10 + d;
            if a > 999 {
                return Err(self.err(num_at, "mass number too large"));
            }
            self.pos += 1;
        }
        if self.pos == num_at {
            return Err(self.err(num_at, "expected a mass number after '[' (as in [13C])"));
        }
        let (sym_at, sym) = self.symbol()?;
        let e = self.lookup(sym_at, &sym)?;
        if self.peek() != Some(']') {
            return Err(self.err(start, "'[' without matching ']'"));
        }
        self.pos += 1;
        let a = a as u16;
        if ELEMENTS[usize::from(e)].isotope(a).is_none() {
            return Err(
                self.err(num_at, format!("no naturally occurring isotope {a}{sym} in the table"))
            );
        }
        let mut f = Formula::new();
        f.counts.insert(Species { element: e, mass_number: Some(a) }, 1);
        Ok(f)
    }

    fn count(&mut self) -> Result<Option<u32>> {
        let start = self.pos;
        let mut n: u64 = 0;
        while let Some(d) = self.peek().and_then(|c| c.to_digit(10)) {
            n = n * 10 + u64::from(d);
            if n > u64::from(MAX_COUNT) {
                return Err(self.err(start, format!("count larger than {MAX_COUNT}")));
            }
            self.pos += 1;
        }
        if self.pos == start {
            return Ok(None);
        }
        if n == 0 {
            return Err(self.err(start, "count of zero"));
        }
        Ok(Some(n as u32))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn parse_err(text: &str) -> (usize, String) {
        match Formula::parse(text).unwrap_err().kind() {
            ErrorKind::Parse { at, reason, .. } => (*at, reason.clone()),
            k => panic!("not a parse error: {k}"),
        }
    }

    #[test]
    fn any_order_and_hill_agree() {
        let a = Formula::parse("C2H6O").unwrap();
        let b = Formula::parse("HOC2H5").unwrap();
        assert_eq!(a, b);
        assert_eq!(b.hill(), "C2H6O");
        assert_eq!(Formula::parse("ClH").unwrap().hill(), "ClH");
        assert_eq!(Formula::parse("CHCl3").unwrap().hill(), "CHCl3");
        assert_eq!(Formula::parse("BrCCl3").unwrap().hill(), "CBrCl3");
    }

    #[test]
    fn parentheses_and_isotopes() {
        let f = Formula::parse("C6H4(NO2)2").unwrap();
        assert_eq!((f.count("C"), f.count("H"), f.count("N"), f.count("O")), (6, 4, 2, 4));
        let g = Formula::parse("((CH2)2O)3").unwrap();
        assert_eq!(g.hill(), "C6H12O3");
        let l = Formula::parse("[13C]6H12O6").unwrap();
        assert_eq!(l.count("C"), 6);
        assert_eq!(l.hill(), "[13C]6H12O6");
        let d = Formula::parse("C6D5Cl").unwrap();
        assert_eq!(d.hill(), "C6[2H]5Cl");
        assert_eq!(d.nominal_mass(), 72 + 10 + 35);
        assert!(!d.nitrogen_rule().applies);
    }

    #[test]
    fn errors_name_the_place() {
        assert_eq!(parse_err("C6Xy2"), (2, "unknown element 'Xy'".into()));
        assert_eq!(parse_err("C0H4"), (1, "count of zero".into()));
        assert_eq!(parse_err("C1000001"), (1, format!("count larger than {MAX_COUNT}")));
        assert_eq!(parse_err("C6(H2"), (2, "'(' without matching ')'".into()));
        assert_eq!(parse_err("C6H2)"), (4, "')' without matching '('".into()));
        assert_eq!(parse_err(""), (0, "empty formula".into()));
        assert_eq!(parse_err("c6"), (0, "unexpected character 'c'".into()));
        assert_eq!(parse_err("C 6"), (1, "unexpected character ' '".into()));
        assert_eq!(parse_err("[C]"), (1, "expected a mass number after '[' (as in [13C])".into()));
        assert_eq!(
            parse_err("[14C]"),
            (1, "no naturally occurring isotope 14C in the table".into())
        );
        assert_eq!(parse_err("()"), (0, "empty parentheses".into()));
        assert!(parse_err("(((C100000)100000)100000)").1.contains("atoms"));
    }

    #[test]
    fn masses_of_water() {
        // Common practice: H2O monoisotopic 18.010565 u, nominal 18, average 18.015.
        let w = Formula::parse("H2O").unwrap();
        assert!((w.monoisotopic_mass() - 18.010_565).abs() < 1e-6);
        assert_eq!(w.nominal_mass(), 18);
        assert!((w.average_mass() - 18.015).abs() < 1e-3);
    }

    #[test]
    fn large_mass_defect_nominal_mass() {
        // DESIGN.md: C12Br10O exact 949.18, nominal 950.
        let f = Formula::parse("C12Br10O").unwrap();
        assert_eq!(f.nominal_mass(), 950);
        assert!((f.monoisotopic_mass() - 949.18).abs() < 0.01);
    }

    #[test]
    fn minus_and_plus() {
        let m = Formula::parse("C2H6O").unwrap();
        let h = Formula::parse("H").unwrap();
        assert_eq!(m.minus(&h).unwrap().hill(), "C2H5O");
        assert_eq!(m.plus(&h).unwrap().hill(), "C2H7O");
        assert!(Formula::parse("C2").unwrap().minus(&h).is_err());
    }

    mod props {
        use super::super::*;
        use proptest::prelude::*;

        const SYMBOLS: &[&str] = &["C", "H", "N", "O", "S", "Cl", "Br", "Si", "P", "F", "I", "Na"];

        fn formula_text() -> impl Strategy<Value = Vec<(usize, u32)>> {
            proptest::collection::vec((0..SYMBOLS.len(), 1u32..200), 1..8)
        }

        proptest! {
            #[test]
            fn hill_round_trips(terms in formula_text()) {
                let text: String = terms.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                let f = Formula::parse(&text).unwrap();
                let g = Formula::parse(&f.hill()).unwrap();
                prop_assert_eq!(&f, &g);
                for (i, sym) in SYMBOLS.iter().enumerate() {
                    let want: u32 = terms.iter().filter(|t| t.0 == i).map(|t| t.1).sum();
                    prop_assert_eq!(f.count(sym), want);
                }
            }

            #[test]
            fn order_does_not_matter(terms in formula_text(), seed in any::<u64>()) {
                let text: String = terms.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                let mut shuffled = terms.clone();
                let len = shuffled.len();
                shuffled.rotate_left((seed as usize) % len);
                shuffled.reverse();
                let text2: String = shuffled.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                prop_assert_eq!(Formula::parse(&text).unwrap(), Formula::parse(&text2).unwrap());
            }

            #[test]
            fn group_multiplier_is_repetition(terms in formula_text(), k in 1u32..6) {
                let inner: String = terms.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                let grouped = Formula::parse(&format!("({inner}){k}")).unwrap();
                let repeated = Formula::parse(&inner.repeat(k as usize)).unwrap();
                prop_assert_eq!(grouped, repeated);
            }

            #[test]
            fn arbitrary_text_never_panics(s in "\\PC{0,24}") {
                let _ = Formula::parse(&s);
            }

            #[test]
            fn mass_is_additive(a in formula_text(), b in formula_text()) {
                let ta: String = a.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                let tb: String = b.iter().map(|&(i, n)| format!("{}{n}", SYMBOLS[i])).collect();
                let fa = Formula::parse(&ta).unwrap();
                let fb = Formula::parse(&tb).unwrap();
                let fab = Formula::parse(&format!("{ta}{tb}")).unwrap();
                prop_assert!((fa.monoisotopic_mass() + fb.monoisotopic_mass() - fab.monoisotopic_mass()).abs() < 1e-8);
                prop_assert_eq!(fa.nominal_mass() + fb.nominal_mass(), fab.nominal_mass());
            }
        }
    }
}
