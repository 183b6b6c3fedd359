//! Formula candidates: every elemental formula within a ppm window of a neutral monoisotopic
//! mass, with the Cl and Br counts fixed (by the isotope signature), filtered by heuristic
//! rules and ranked by mass error and isotope-pattern fit.
//!
//! - [`FormulaQuery`]: the mass, tolerance, Cl/Br counts, nitrogen parity, [`ElementSet`],
//!   [`RuleSet`] and [`ScoreSettings`].
//! - [`candidates`]: enumerates, filters and ranks; returns one [`FormulaCandidate`] per
//!   formula (the columns of `formulas.tsv`), best first. [`search`] also returns how many
//!   formulas each rule removed.
//! - [`summary`]: the `C6H3Cl3O:0.82;...;n=12` cell for a compound table.
//!
//! **Enumeration.** Loops over the counts of the heavier searched elements (I, S, P, Si, F, O,
//! N; N in steps of two when the parity is known), each bounded by the mass left and by the
//! element's bounds; then over C within the range the mass left allows (at least
//! `(rest - k m_H) / (12 + 2 m_H)`, where `2C + k` is the most H the heteroatoms allow: at
//! their lowest valences when the `rdbe` rule is required (RDBE >= 0), at their highest
//! otherwise); H is solved last as the one count that fits the mass left. No count
//! combination outside the mass window is visited beyond that last step.
//!
//! **Rules.** Each [`Rule`] is off, annotates (`rules_passed` lists the rules passed) or is
//! required (a failing formula is dropped); see [`rules`].
//!
//! **Score.** For candidate `i` with mass error `e_i` (ppm) and isotope `chi2_i`
//! (see [`fit`]; 0 without an observed cluster), the likelihood is
//! `L_i = exp(-e_i^2 / (2 s_m^2) - chi2_i / 2)` with `s_m` the mass error's standard
//! deviation ([`ScoreSettings::mass_sigma_ppm`], default half the tolerance), and the score is
//! `L_i / sum_j L_j` over the candidates kept: the share of the evidence each formula gets,
//! assuming the true formula is among them. Candidates are ranked by score, then by absolute
//! mass error.
//!
//! These are candidates for a database search, not identifications: the same formula fits
//! many structures, and a formula outside the element set or bounds is never proposed.
//!
//! # Examples
//!
//! ```
//! use mzcore::chem::Parity;
//! use mzcore::chem::formula_search::{self, FormulaQuery};
//! // 2,4,6-trichlorophenol C6H3Cl3O, neutral monoisotopic mass 195.92495 u, Cl3, even N.
//! let query = FormulaQuery {
//!     neutral_mass: 195.92495,
//!     ppm: 5.0,
//!     n_cl: 3,
//!     parity: Some(Parity::Even),
//!     ..FormulaQuery::default()
//! };
//! let found = formula_search::candidates(&query, None)?;
//! assert_eq!(found[0].formula, "C6H3Cl3O");
//! assert!(found[0].error_ppm.abs() < 0.1);
//! assert!(formula_search::summary(&found, 3).starts_with("C6H3Cl3O:"));
//! # Ok::<_, mzcore::Error>(())
//! ```

pub mod fit;
pub mod rules;

use serde::{Deserialize, Serialize};

pub use fit::{ObservedCluster, ObservedPeak, ScoreSettings, low_shells};
pub use rules::{Composition, RatioRange, Rule, RuleMode, RuleSet};

use super::Parity;
use super::elements::{Element, element};
use super::isotopes::Peak;
use crate::{Error, ErrorKind, Result};

/// Elements the search can use besides the fixed Cl and Br, in the order of their slots.
pub const SEARCH_ELEMENTS: [&str; 9] = ["C", "H", "N", "O", "S", "P", "F", "Si", "I"];

/// Largest neutral mass searched, u.
pub const MAX_MASS: f64 = 3000.0;

/// Largest tolerance accepted, ppm.
pub const MAX_PPM: f64 = 100.0;

/// Count bounds of one element of the search.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct ElementBound {
    /// Element symbol, one of [`SEARCH_ELEMENTS`].
    pub symbol: &'static str,
    /// Least count.
    pub min: u32,
    /// Largest count; `None`: what the mass (and rule 1, when required) allows.
    pub max: Option<u32>,
}

/// The elements of a search with their bounds. C and H are always part of it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct ElementSet {
    bounds: Vec<ElementBound>,
}

impl Default for ElementSet {
    /// C H N O S P, C at least 1, no upper bounds.
    fn default() -> ElementSet {
        ElementSet::parse("CHNOSP").expect("built-in element set")
    }
}

impl ElementSet {
    /// Parses an element specification: element symbols of [`SEARCH_ELEMENTS`], each
    /// optionally followed by bounds `min-max` or an exact count, spaces or commas allowed;
    /// a leading `+` adds to the default set C H N O S P.
    ///
    /// `CHNOSPF`, `C2-30 H N0-4 O0-8 S0-2 P0`, `+F+Si+I`, `+I0-3`. Unbounded C has at least
    /// one atom; C and H are added when missing.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::chem::formula_search::ElementSet;
    /// let set = ElementSet::parse("+F0-6")?;
    /// assert_eq!(set.to_string(), "C1-H0-N0-O0-S0-P0-F0-6");
    /// assert!(ElementSet::parse("CHNOCl").is_err()); // Cl is fixed by --cl
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn parse(spec: &str) -> Result<ElementSet> {
        let bad = |at: usize, reason: String| {
            Error::new(ErrorKind::Parse {
                what: "element set".into(),
                text: spec.into(),
                at,
                reason,
            })
        };
        let mut set = ElementSet { bounds: Vec::new() };
        let mut rest = spec.trim();
        if let Some(r) = rest.strip_prefix('+') {
            set = ElementSet::default();
            rest = r;
        }
        let chars: Vec<(usize, char)> = rest.char_indices().collect();
        let offset = spec.len() - rest.len();
        let mut i = 0;
        while i < chars.len() {
            let (at, ch) = chars[i];
            if ch == ' ' || ch == ',' || ch == '+' {
                i += 1;
                continue;
            }
            if !ch.is_ascii_uppercase() {
                return Err(bad(offset + at, format!("expected an element symbol, found '{ch}'")));
            }
            let mut sym = ch.to_string();
            i += 1;
            if i < chars.len() && chars[i].1.is_ascii_lowercase() {
                sym.push(chars[i].1);
                i += 1;
            }
            let Some(&symbol) = SEARCH_ELEMENTS.iter().find(|&&s| s == sym) else {
                let reason = if sym == "Cl" || sym == "Br" {
                    format!("{sym} is not searched: its count is fixed (--cl, --br)")
                } else {
                    format!("'{sym}' is not an element of the search (C H N O S P F Si I)")
                };
                return Err(bad(offset + at, reason));
            };
            let number = |i: &mut usize| -> Option<u32> {
                let start = *i;
                while *i < chars.len() && chars[*i].1.is_ascii_digit() {
                    *i += 1;
                }
                let text: String = chars[start..*i].iter().map(|c| c.1).collect();
                text.parse().ok()
            };
            let num_at = chars.get(i).map_or(rest.len(), |c| c.0) + offset;
            let (min, max) = match number(&mut i) {
                None => (u32::from(symbol == "C"), None),
                Some(lo) => {
                    if i < chars.len() && chars[i].1 == '-' {
                        i += 1;
                        match number(&mut i) {
                            Some(hi) if hi >= lo => (lo, Some(hi)),
                            Some(hi) => {
                                return Err(bad(num_at, format!("bounds {lo}-{hi} are reversed")));
                            }
                            None => (lo, None),
                        }
                    } else {
                        (lo, Some(lo))
                    }
                }
            };
            if let Some(hi) = max.filter(|&hi| hi > 100_000) {
                return Err(bad(num_at, format!("count {hi} is too large")));
            }
            set.set(ElementBound { symbol, min, max });
        }
        for (sym, min) in [("C", 1), ("H", 0)] {
            if set.get(sym).is_none() {
                set.set(ElementBound { symbol: element_symbol(sym), min, max: None });
            }
        }
        Ok(set)
    }

    /// The bounds, in the order given.
    pub fn bounds(&self) -> &[ElementBound] {
        &self.bounds
    }

    /// The bounds of `symbol`, if it is part of the set.
    pub fn get(&self, symbol: &str) -> Option<&ElementBound> {
        self.bounds.iter().find(|b| b.symbol == symbol)
    }

    /// Adds or replaces the bounds of one element.
    pub fn set(&mut self, bound: ElementBound) {
        match self.bounds.iter_mut().find(|b| b.symbol == bound.symbol) {
            Some(b) => *b = bound,
            None => self.bounds.push(bound),
        }
    }
}

impl std::fmt::Display for ElementSet {
    /// `C1-H0-N0-4...`: each element with `min-max` (`min-` when unbounded).
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        for b in &self.bounds {
            match b.max {
                Some(hi) => write!(f, "{}{}-{}", b.symbol, b.min, hi)?,
                None => write!(f, "{}{}-", b.symbol, b.min)?,
            }
        }
        Ok(())
    }
}

fn element_symbol(sym: &str) -> &'static str {
    SEARCH_ELEMENTS.iter().find(|&&s| s == sym).copied().unwrap_or("C")
}

/// What to search for.
#[derive(Debug, Clone, PartialEq)]
pub struct FormulaQuery {
    /// Neutral monoisotopic mass, u.
    pub neutral_mass: f64,
    /// Tolerance, ppm of the mass (a formula is kept when its exact mass is within it).
    pub ppm: f64,
    /// Chlorine atoms (fixed).
    pub n_cl: u32,
    /// Bromine atoms (fixed).
    pub n_br: u32,
    /// Parity of the nitrogen count when known; for these elements it is the parity of the
    /// neutral's nominal mass (nitrogen rule, common practice).
    pub parity: Option<Parity>,
    /// Elements searched and their bounds.
    pub elements: ElementSet,
    /// Filters in force.
    pub rules: RuleSet,
    /// Score weights.
    pub scoring: ScoreSettings,
    /// Most formulas kept after the rules; more is an error (narrow the search).
    pub max_candidates: usize,
}

impl Default for FormulaQuery {
    /// Mass 0 (to be set), 5 ppm, no Cl or Br, parity unknown, C H N O S P, every rule
    /// required, at most 100,000 candidates.
    fn default() -> FormulaQuery {
        FormulaQuery {
            neutral_mass: 0.0,
            ppm: 5.0,
            n_cl: 0,
            n_br: 0,
            parity: None,
            elements: ElementSet::default(),
            rules: RuleSet::default(),
            scoring: ScoreSettings::default(),
            max_candidates: 100_000,
        }
    }
}

/// One candidate formula: a row of `formulas.tsv`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct FormulaCandidate {
    /// Compound number in the file (filled by the caller; empty for a single mass).
    pub compound: Option<usize>,
    /// Rank, 1 = best.
    pub rank: usize,
    /// The formula in Hill notation.
    pub formula: String,
    /// Its exact neutral monoisotopic mass, u (6 decimals).
    pub neutral_mass: f64,
    /// (query mass - exact mass) / exact mass, ppm (3 decimals).
    pub error_ppm: f64,
    /// Ring-plus-double-bond equivalents (lowest valences).
    pub rdbe: f64,
    /// Isotope pattern fit, 0-1 (1 perfect; 4 decimals); empty without an observed cluster.
    pub isotope_fit: Option<f64>,
    /// Share of the evidence, 0-1, summing to 1 over the candidates (4 decimals).
    pub score: f64,
    /// The rules evaluated and passed, comma-separated ([`Rule::name`]).
    pub rules_passed: String,
}

/// The result of a [`search`].
#[derive(Debug, Clone, PartialEq)]
pub struct SearchResult {
    /// The candidates, best first.
    pub candidates: Vec<FormulaCandidate>,
    /// Formulas within the mass window before the rules.
    pub within_tolerance: usize,
    /// Formulas each required rule removed (the first failing required rule counts).
    pub removed: Vec<(Rule, usize)>,
    /// False when an observed cluster was given but had no usable M peak.
    pub isotope_fit_used: bool,
}

/// Every formula within tolerance of the query, filtered and ranked, best first.
///
/// An error when the query is unusable (mass not in 1-3000 u, tolerance not in 0-100 ppm,
/// more than [`FormulaQuery::max_candidates`] formulas).
pub fn candidates(
    query: &FormulaQuery,
    observed: Option<&ObservedCluster>,
) -> Result<Vec<FormulaCandidate>> {
    Ok(search(query, observed)?.candidates)
}

/// The `formula:score` list of the best `top` candidates and the count of all, e.g.
/// `C6H3Cl3O:0.82;C3H4Cl3N2O:0.11;C5HCl3N2:0.04;n=12` (`n=0` when there is none).
pub fn summary(candidates: &[FormulaCandidate], top: usize) -> String {
    let mut s = String::new();
    for c in candidates.iter().take(top) {
        s.push_str(&c.formula);
        s.push(':');
        s.push_str(&format!("{:.2}", c.score));
        s.push(';');
    }
    s.push_str(&format!("n={}", candidates.len()));
    s
}

/// Slots of the composition array, in [`SEARCH_ELEMENTS`] order, then Cl and Br.
const C: usize = 0;
const H: usize = 1;
const N: usize = 2;
const O: usize = 3;
const S: usize = 4;
const P: usize = 5;
const F: usize = 6;
const SI: usize = 7;
const I: usize = 8;
const CL: usize = 9;
const BR: usize = 10;

fn composition(counts: &[u32; 11]) -> Composition {
    Composition {
        c: counts[C],
        h: counts[H],
        n: counts[N],
        o: counts[O],
        s: counts[S],
        p: counts[P],
        f: counts[F],
        si: counts[SI],
        i: counts[I],
        cl: counts[CL],
        br: counts[BR],
    }
}

struct Slot {
    index: usize,
    mass: f64,
    min: u32,
    max: u32,
    /// Extra H a saturated molecule may carry per atom at the element's highest valence
    /// (valence - 2), negative for halogens.
    h_gain: i64,
}

struct Walk<'a> {
    slots: &'a [Slot],
    tol: f64,
    c: (u32, u32),
    h: (u32, u32),
    m_c: f64,
    m_h: f64,
    nitrogen_step: Option<Parity>,
    counts: [u32; 11],
    found: Vec<[u32; 11]>,
    limit: usize,
}

impl Walk<'_> {
    fn go(&mut self, level: usize, rest: f64, h_room: i64) -> Result<()> {
        if level == self.slots.len() {
            return self.solve_carbon(rest, h_room);
        }
        let slot = &self.slots[level];
        let by_mass = ((rest + self.tol) / slot.mass).floor();
        if by_mass < f64::from(slot.min) {
            return Ok(());
        }
        let hi = slot.max.min(by_mass as u32);
        let mut n = slot.min;
        let step = if slot.index == N && self.nitrogen_step.is_some() {
            let want = self.nitrogen_step == Some(Parity::Odd);
            if (n % 2 == 1) != want {
                n += 1;
            }
            2
        } else {
            1
        };
        while n <= hi {
            self.counts[slot.index] = n;
            self.go(
                level + 1,
                rest - f64::from(n) * slot.mass,
                h_room + slot.h_gain * i64::from(n),
            )?;
            n += step;
        }
        self.counts[slot.index] = 0;
        Ok(())
    }

    /// C over the range the mass allows; H solved from what is left.
    fn solve_carbon(&mut self, rest: f64, h_room: i64) -> Result<()> {
        // H <= 2C + h_room (saturation), so 12 C + m_H (2C + h_room) >= rest - tol.
        let lo =
            ((rest - self.tol - self.m_h * h_room as f64) / (self.m_c + 2.0 * self.m_h)).ceil();
        let hi = ((rest + self.tol) / self.m_c).floor();
        if hi < 0.0 {
            return Ok(());
        }
        let c_lo = (lo.max(0.0) as u32).max(self.c.0);
        let c_hi = (hi as u32).min(self.c.1);
        let inv_h = 1.0 / self.m_h;
        for c in c_lo..=c_hi {
            let left = rest - f64::from(c) * self.m_c;
            if left < -self.tol {
                break;
            }
            // Nearest whole H (left >= -tol > -m_H / 2, so the truncation rounds).
            let h = ((left * inv_h).max(0.0) + 0.5) as u32;
            if (left - f64::from(h) * self.m_h).abs() > self.tol {
                continue;
            }
            if h < self.h.0 || h > self.h.1 || i64::from(h) > 2 * i64::from(c) + h_room {
                continue;
            }
            self.counts[C] = c;
            self.counts[H] = h;
            if self.found.len() >= self.limit {
                return Err(Error::new(ErrorKind::LimitExceeded {
                    what: "formulas within the tolerance".into(),
                    found: self.found.len() as u64 + 1,
                    limit: self.limit as u64,
                }));
            }
            self.found.push(self.counts);
        }
        self.counts[C] = 0;
        self.counts[H] = 0;
        Ok(())
    }
}

fn invalid(field: &str, value: String) -> Error {
    Error::new(ErrorKind::InvalidValue { field: field.into(), value })
}

fn check_query(q: &FormulaQuery) -> Result<()> {
    if !(q.neutral_mass >= 1.0 && q.neutral_mass <= MAX_MASS) {
        return Err(invalid(
            "neutral mass",
            format!("{} (must be 1 to {MAX_MASS} u)", q.neutral_mass),
        ));
    }
    if !(q.ppm > 0.0 && q.ppm <= MAX_PPM) {
        return Err(invalid(
            "tolerance",
            format!("{} ppm (must be above 0, at most {MAX_PPM})", q.ppm),
        ));
    }
    if q.n_cl > 100 || q.n_br > 100 {
        return Err(invalid(
            "halogen count",
            format!("Cl {} Br {} (at most 100 each)", q.n_cl, q.n_br),
        ));
    }
    Ok(())
}

/// Enumerates, filters and ranks (see the module documentation); [`candidates`] keeps only
/// the list.
pub fn search(query: &FormulaQuery, observed: Option<&ObservedCluster>) -> Result<SearchResult> {
    check_query(query)?;
    let mass = query.neutral_mass;
    let tol = mass * query.ppm * 1e-6;
    let el =
        |sym: &str| -> &'static Element { element(sym).expect("search elements are in the table") };
    let mono = |sym: &str| el(sym).most_abundant().mass;
    let limits_required = query.rules.mode(Rule::ElementLimits) == RuleMode::Require;
    let rule1 = rules::element_limits(mass).filter(|_| limits_required);
    // Rule 1 limit of a slot (order C H N O P S F Si of `rules::element_limits`).
    let rule1_of = |index: usize| -> u32 {
        let pos = match index {
            C => Some(0),
            H => Some(1),
            N => Some(2),
            O => Some(3),
            P => Some(4),
            S => Some(5),
            F => Some(6),
            SI => Some(7),
            _ => None,
        };
        match (rule1, pos) {
            (Some(l), Some(p)) => l[p],
            _ => u32::MAX,
        }
    };
    let fixed_mass = f64::from(query.n_cl) * mono("Cl") + f64::from(query.n_br) * mono("Br");
    let bound_of = |sym: &str| query.elements.get(sym).copied();
    let range = |sym: &str, index: usize| -> (u32, u32) {
        match bound_of(sym) {
            Some(b) => (b.min, b.max.unwrap_or(u32::MAX).min(rule1_of(index))),
            None => (0, 0),
        }
    };
    // Extra H per atom on a saturated molecule (valence - 2): lowest valences when RDBE >= 0
    // is required (a formula above that bound fails the rule anyway), else the highest.
    let lowest = query.rules.mode(Rule::Rdbe) == RuleMode::Require;
    let h_gain = |index: usize| -> i64 {
        match index {
            N => 1,
            S if lowest => 0,
            S => 4,
            P if lowest => 1,
            P => 3,
            SI => 2,
            F | I => -1,
            _ => 0,
        }
    };
    // Heavier elements first: fewer counts fit, and the loops below them are shorter.
    let mut slots: Vec<Slot> = [I, S, P, SI, F, O, N]
        .into_iter()
        .filter_map(|index| {
            let sym = SEARCH_ELEMENTS[index];
            bound_of(sym)?;
            let (min, max) = range(sym, index);
            Some(Slot { index, mass: mono(sym), min, max, h_gain: h_gain(index) })
        })
        .collect();
    slots.sort_by(|a, b| b.mass.total_cmp(&a.mass));
    let (c_min, c_max) = range("C", C);
    let (h_min, h_max) = range("H", H);
    let mut walk = Walk {
        slots: &slots,
        tol,
        c: (c_min, c_max),
        h: (h_min, h_max),
        m_c: mono("C"),
        m_h: mono("H"),
        nitrogen_step: query.parity,
        counts: [0; 11],
        found: Vec::new(),
        limit: query.max_candidates.saturating_mul(20).max(1000),
    };
    walk.counts[CL] = query.n_cl;
    walk.counts[BR] = query.n_br;
    if query.parity == Some(Parity::Odd) && bound_of("N").is_none() {
        walk.found.clear();
    } else {
        let h_room = 2 - i64::from(query.n_cl + query.n_br);
        walk.go(0, mass - fixed_mass, h_room)?;
    }
    let found = std::mem::take(&mut walk.found);
    rank(query, observed, found)
}

fn atom_list(counts: &[u32; 11]) -> Vec<(&'static Element, u32)> {
    let syms = ["C", "H", "N", "O", "S", "P", "F", "Si", "I", "Cl", "Br"];
    syms.iter()
        .zip(counts.iter())
        .filter(|(_, n)| **n > 0)
        .map(|(s, &n)| (element(s).expect("search elements are in the table"), n))
        .collect()
}

fn round_to(x: f64, decimals: i32) -> f64 {
    let k = 10f64.powi(decimals);
    (x * k).round() / k
}

fn rank(
    query: &FormulaQuery,
    observed: Option<&ObservedCluster>,
    found: Vec<[u32; 11]>,
) -> Result<SearchResult> {
    let within_tolerance = found.len();
    let mut removed: Vec<(Rule, usize)> = Vec::new();
    let prepared = observed.and_then(|o| fit::PreparedCluster::new(o, &query.scoring));
    let sigma = query.scoring.mass_sigma_ppm.unwrap_or(query.ppm / 2.0).max(1e-9);
    let mut fine: Vec<Peak> = Vec::new();
    let mut scratch: Vec<Peak> = Vec::new();
    struct Kept {
        counts: [u32; 11],
        exact: f64,
        error_ppm: f64,
        fit: Option<(f64, usize)>,
        log_l: f64,
        passed: String,
    }
    let mut kept: Vec<Kept> = Vec::new();
    'each: for counts in found {
        let comp = composition(&counts);
        let mut passed = String::new();
        for rule in Rule::ALL {
            let mode = query.rules.mode(rule);
            if mode == RuleMode::Off {
                continue;
            }
            if rules::passes(rule, &comp, query.neutral_mass, &query.rules) {
                if !passed.is_empty() {
                    passed.push(',');
                }
                passed.push_str(rule.name());
            } else if mode == RuleMode::Require {
                match removed.iter_mut().find(|(r, _)| *r == rule) {
                    Some((_, n)) => *n += 1,
                    None => removed.push((rule, 1)),
                }
                continue 'each;
            }
        }
        if kept.len() >= query.max_candidates {
            return Err(Error::new(ErrorKind::LimitExceeded {
                what: "formula candidates".into(),
                found: kept.len() as u64 + 1,
                limit: query.max_candidates as u64,
            }));
        }
        let atoms = atom_list(&counts);
        let exact: f64 = atoms.iter().map(|(e, n)| f64::from(*n) * e.most_abundant().mass).sum();
        let error_ppm = (query.neutral_mass - exact) / exact * 1e6;
        let fit = prepared.as_ref().map(|p| {
            fit::low_shell_peaks(&atoms, &mut fine);
            let expected = p.expected(&fine, &mut scratch);
            p.chi2(&expected, &query.scoring)
        });
        let log_l = -0.5 * (error_ppm / sigma).powi(2) - 0.5 * fit.map_or(0.0, |f| f.0);
        kept.push(Kept { counts, exact, error_ppm, fit, log_l, passed });
    }
    let best = kept.iter().map(|k| k.log_l).fold(f64::NEG_INFINITY, f64::max);
    let total: f64 = kept.iter().map(|k| (k.log_l - best).exp()).sum();
    kept.sort_by(|a, b| {
        b.log_l.total_cmp(&a.log_l).then(a.error_ppm.abs().total_cmp(&b.error_ppm.abs()))
    });
    removed.sort();
    let candidates = kept
        .into_iter()
        .enumerate()
        .map(|(i, k)| {
            let comp = composition(&k.counts);
            FormulaCandidate {
                compound: None,
                rank: i + 1,
                formula: comp.formula().hill(),
                neutral_mass: round_to(k.exact, 6),
                error_ppm: round_to(k.error_ppm, 3),
                rdbe: comp.rdbe(),
                isotope_fit: k.fit.map(|(chi2, n)| round_to((-chi2 / (2.0 * n as f64)).exp(), 4)),
                score: round_to((k.log_l - best).exp() / total, 4),
                rules_passed: k.passed,
            }
        })
        .collect();
    Ok(SearchResult { candidates, within_tolerance, removed, isotope_fit_used: prepared.is_some() })
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Formula;

    fn query(mass: f64, n_cl: u32, n_br: u32) -> FormulaQuery {
        FormulaQuery { neutral_mass: mass, ppm: 5.0, n_cl, n_br, ..FormulaQuery::default() }
    }

    /// Every formula of the element set within tolerance, by brute force over all counts.
    fn brute_force(q: &FormulaQuery) -> Vec<String> {
        let tol = q.neutral_mass * q.ppm * 1e-6;
        let mut out = Vec::new();
        let m = |s: &str| element(s).unwrap().most_abundant().mass;
        let fixed = f64::from(q.n_cl) * m("Cl") + f64::from(q.n_br) * m("Br");
        for c in 1..=40u32 {
            for n in 0..=6u32 {
                for o in 0..=8u32 {
                    for s in 0..=2u32 {
                        for p in 0..=1u32 {
                            for h in 0..=90u32 {
                                let mass = fixed
                                    + f64::from(c) * m("C")
                                    + f64::from(h) * m("H")
                                    + f64::from(n) * m("N")
                                    + f64::from(o) * m("O")
                                    + f64::from(s) * m("S")
                                    + f64::from(p) * m("P");
                                if (mass - q.neutral_mass).abs() > tol {
                                    continue;
                                }
                                let comp = Composition {
                                    c,
                                    h,
                                    n,
                                    o,
                                    s,
                                    p,
                                    cl: q.n_cl,
                                    br: q.n_br,
                                    ..Composition::default()
                                };
                                // The same chemical bound as the enumerator (saturation at
                                // the highest valences), and the required rules.
                                let room = 2 * i64::from(c)
                                    + 2
                                    + i64::from(n)
                                    + 4 * i64::from(s)
                                    + 3 * i64::from(p)
                                    - i64::from(q.n_cl + q.n_br);
                                if i64::from(h) > room {
                                    continue;
                                }
                                if Rule::ALL
                                    .iter()
                                    .all(|&r| rules::passes(r, &comp, q.neutral_mass, &q.rules))
                                {
                                    out.push(comp.formula().hill());
                                }
                            }
                        }
                    }
                }
            }
        }
        out.sort();
        out
    }

    #[test]
    fn enumeration_equals_brute_force() {
        // Within the brute force's bounds (C 1-40, N 0-6, O 0-8, S 0-2, P 0-1), every formula
        // within 5 ppm, for a few masses and halogen counts.
        for (mass, cl, br) in [(195.92495, 3, 0), (349.9320, 2, 1), (288.0903, 1, 0), (485.7, 0, 4)]
        {
            let mut q = query(mass, cl, br);
            q.elements = ElementSet::parse("C1-40 H0-90 N0-6 O0-8 S0-2 P0-1").unwrap();
            let mut ours: Vec<String> =
                candidates(&q, None).unwrap().into_iter().map(|c| c.formula).collect();
            ours.sort();
            assert_eq!(ours, brute_force(&q), "mass {mass}");
        }
    }

    #[test]
    fn parity_halves_the_list() {
        // With the RDBE rule required, every formula of one nominal mass has the same N
        // parity already (nitrogen rule); without rules the parity halves the list.
        let q = FormulaQuery { rules: RuleSet::all(RuleMode::Annotate), ..query(288.0903, 1, 0) };
        let all = candidates(&q, None).unwrap();
        for parity in [Parity::Even, Parity::Odd] {
            let part =
                candidates(&FormulaQuery { parity: Some(parity), ..q.clone() }, None).unwrap();
            assert!(!part.is_empty());
            assert!(part.len() < all.len());
            for c in &part {
                let n = Formula::parse(&c.formula).unwrap().count("N");
                assert_eq!(Parity::of(i64::from(n)), parity, "{}", c.formula);
            }
        }
    }

    #[test]
    fn rules_annotate_or_remove() {
        let mut q = query(195.92495, 3, 0);
        let required = search(&q, None).unwrap();
        q.rules = RuleSet::all(RuleMode::Annotate);
        let annotated = search(&q, None).unwrap();
        assert_eq!(annotated.candidates.len(), annotated.within_tolerance);
        // Required RDBE >= 0 tightens the enumeration's H bound: fewer formulas visited.
        assert!(required.within_tolerance <= annotated.within_tolerance);
        let removed: usize = required.removed.iter().map(|r| r.1).sum();
        assert_eq!(required.candidates.len() + removed, required.within_tolerance);
        let all_names = Rule::ALL.map(Rule::name).join(",");
        let full = annotated.candidates.iter().filter(|c| c.rules_passed == all_names).count();
        assert_eq!(full, required.candidates.len());
        q.rules = RuleSet::all(RuleMode::Off);
        let off = search(&q, None).unwrap();
        assert!(off.candidates.iter().all(|c| c.rules_passed.is_empty()));
    }

    #[test]
    fn scores_sum_to_one_and_summary() {
        let found = candidates(&query(349.9320, 2, 1), None).unwrap();
        let sum: f64 = found.iter().map(|c| c.score).sum();
        assert!((sum - 1.0).abs() < 1e-3, "{sum}");
        assert!(found.windows(2).all(|w| w[0].score >= w[1].score));
        let s = summary(&found, 3);
        assert_eq!(s.split(';').count(), found.len().min(3) + 1);
        assert!(s.ends_with(&format!("n={}", found.len())));
        assert_eq!(summary(&[], 3), "n=0");
    }

    #[test]
    fn bad_queries_are_errors() {
        assert!(candidates(&query(0.0, 0, 0), None).is_err());
        assert!(candidates(&FormulaQuery { ppm: -1.0, ..query(300.0, 0, 0) }, None).is_err());
        assert!(candidates(&query(f64::NAN, 0, 0), None).is_err());
        let tight = FormulaQuery { max_candidates: 2, ppm: 50.0, ..query(800.0, 0, 0) };
        assert!(candidates(&tight, None).is_err());
    }

    #[test]
    fn element_set_spec() {
        let s = ElementSet::parse("C2-30 H N0-4,O S2 P0").unwrap();
        assert_eq!(s.to_string(), "C2-30H0-N0-4O0-S2-2P0-0");
        assert_eq!(ElementSet::parse("NO").unwrap().to_string(), "N0-O0-C1-H0-");
        for bad in ["CHNOX", "CHN4-2", "CHBr", "chno", "C1-9999999"] {
            assert!(ElementSet::parse(bad).is_err(), "{bad}");
        }
    }
}
