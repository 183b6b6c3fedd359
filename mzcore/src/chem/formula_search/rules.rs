//! Heuristic filters for candidate formulas, after Kind and Fiehn, "Seven Golden Rules for
//! heuristic filtering of molecular formulas obtained by accurate mass spectrometry", BMC
//! Bioinformatics 8:105 (2007), and the whole-number RDBE of a neutral closed-shell molecule.
//!
//! The paper's text could not be consulted while this module was written: the rule
//! definitions and limits below are transcribed **from memory** of the paper (its Table 1,
//! the ratio ranges of rules 4 and 5 and the multi-element conditions of rule 6) and should be
//! verified against it. What could be checked against the paper's published abstract and its
//! authors' summary: the rule list, the H/C ranges 0.2-3.1 (common) and 0.1-6 (extended), and
//! the valences assumed (N 3, S 2/4/6, P 3/5).
//!
//! Two adaptations for halogenated compounds, because the Cl and Br counts are fixed by the
//! isotope signature before the search: the element limits (rule 1) and the element/C ratios
//! (rule 5) are applied to the elements searched, not to Cl and Br; and the H/C ratio (rule 4)
//! counts halogen atoms with hydrogen by default ([`RuleSet::halogens_as_hydrogen`]), since a
//! halogen replaces a hydrogen one for one (otherwise perchlorinated compounds such as
//! hexachlorobenzene, H/C = 0, would always fail). Rule 3 (isotope patterns) is the ranking of
//! the parent module; rule 7 (trimethylsilyl groups of derivatised GC samples) is not
//! implemented.

use std::fmt;

use crate::chem::Formula;

/// One filter; [`Rule::name`] is what the `rules_passed` column lists.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash, PartialOrd, Ord)]
pub enum Rule {
    /// Rule 1: at most so many atoms of each searched element for the mass range.
    ElementLimits,
    /// Rule 2, LEWIS: the valence electrons (group numbers: C 4, N 5, O 6, ...) pair up, an
    /// even total, as a neutral closed-shell (octet) molecule needs.
    Lewis,
    /// Rule 2, SENIOR: for some choice of valences (S 2/4/6, P 3/5, the others fixed) the sum
    /// of valences is even, at least twice the largest valence, and at least twice the number
    /// of atoms minus one (enough bonds to connect every atom).
    Senior,
    /// Rule 4: the H/C ratio (halogens counted with H by default) in range.
    HcRatio,
    /// Rule 5: N/C, O/C, P/C, S/C, F/C and Si/C in range.
    HeteroRatio,
    /// Rule 6: the multi-element limits on N, O, P and S found in known compounds.
    ElementProbability,
    /// Ring-plus-double-bond equivalents (lowest valences) a whole number, as a neutral
    /// closed-shell molecule has, and not negative (common practice: expanded S and P
    /// valences go to S=O and P=O bonds, which the lowest-valence count sees as missing H).
    Rdbe,
}

impl Rule {
    /// Every rule, in the order `rules_passed` lists them.
    pub const ALL: [Rule; 7] = [
        Rule::ElementLimits,
        Rule::Lewis,
        Rule::Senior,
        Rule::HcRatio,
        Rule::HeteroRatio,
        Rule::ElementProbability,
        Rule::Rdbe,
    ];

    /// The rule's name in `rules_passed` and on the command line.
    pub fn name(self) -> &'static str {
        match self {
            Rule::ElementLimits => "element_limits",
            Rule::Lewis => "lewis",
            Rule::Senior => "senior",
            Rule::HcRatio => "hc_ratio",
            Rule::HeteroRatio => "hetero_ratio",
            Rule::ElementProbability => "element_probability",
            Rule::Rdbe => "rdbe",
        }
    }

    /// The rule of that name.
    pub fn from_name(name: &str) -> Option<Rule> {
        Rule::ALL.into_iter().find(|r| r.name() == name)
    }

    fn index(self) -> usize {
        Rule::ALL.iter().position(|&r| r == self).unwrap_or(0)
    }
}

impl fmt::Display for Rule {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        f.write_str(self.name())
    }
}

/// What a rule does to a candidate that fails it.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RuleMode {
    /// Not evaluated (never in `rules_passed`).
    Off,
    /// Evaluated and listed in `rules_passed` when passed; a failing candidate is kept.
    Annotate,
    /// A failing candidate is dropped.
    Require,
}

/// Which ratio ranges rules 4 and 5 use.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum RatioRange {
    /// The ranges that covered about 99.7 % of the paper's formulas.
    Common,
    /// The ranges that covered about 99.99 % (the default).
    Extended,
}

/// The rules in force and their settings.
#[derive(Debug, Clone, PartialEq)]
pub struct RuleSet {
    modes: [RuleMode; 7],
    /// Ranges of rules 4 and 5.
    pub ratio_range: RatioRange,
    /// Count F, Cl, Br and I with H in the H/C ratio (our adaptation; default true).
    pub halogens_as_hydrogen: bool,
}

impl Default for RuleSet {
    /// Every rule required, extended ranges, halogens counted with hydrogen.
    fn default() -> RuleSet {
        RuleSet {
            modes: [RuleMode::Require; 7],
            ratio_range: RatioRange::Extended,
            halogens_as_hydrogen: true,
        }
    }
}

impl RuleSet {
    /// Every rule in `mode`.
    pub fn all(mode: RuleMode) -> RuleSet {
        RuleSet { modes: [mode; 7], ..RuleSet::default() }
    }

    /// The mode of `rule`.
    pub fn mode(&self, rule: Rule) -> RuleMode {
        self.modes[rule.index()]
    }

    /// Sets the mode of `rule`.
    pub fn set(&mut self, rule: Rule, mode: RuleMode) {
        self.modes[rule.index()] = mode;
    }
}

/// Atom counts of a candidate, the form the rules read.
#[derive(Debug, Clone, Copy, Default, PartialEq, Eq)]
pub struct Composition {
    /// Carbon.
    pub c: u32,
    /// Hydrogen.
    pub h: u32,
    /// Nitrogen.
    pub n: u32,
    /// Oxygen.
    pub o: u32,
    /// Sulfur.
    pub s: u32,
    /// Phosphorus.
    pub p: u32,
    /// Fluorine.
    pub f: u32,
    /// Silicon.
    pub si: u32,
    /// Iodine.
    pub i: u32,
    /// Chlorine (fixed by the isotope signature).
    pub cl: u32,
    /// Bromine (fixed by the isotope signature).
    pub br: u32,
}

impl Composition {
    /// The counts of a formula; `None` when it holds an element other than C H N O S P F Si
    /// I Cl Br or an explicit isotope.
    pub fn of(formula: &Formula) -> Option<Composition> {
        let mut c = Composition::default();
        for e in formula.entries() {
            if e.isotope.is_some() {
                return None;
            }
            let slot = match e.element.symbol {
                "C" => &mut c.c,
                "H" => &mut c.h,
                "N" => &mut c.n,
                "O" => &mut c.o,
                "S" => &mut c.s,
                "P" => &mut c.p,
                "F" => &mut c.f,
                "Si" => &mut c.si,
                "I" => &mut c.i,
                "Cl" => &mut c.cl,
                "Br" => &mut c.br,
                _ => return None,
            };
            *slot += e.count;
        }
        Some(c)
    }

    /// Halogen atoms (F, Cl, Br, I).
    pub fn halogens(&self) -> u32 {
        self.f + self.cl + self.br + self.i
    }

    /// Ring-plus-double-bond equivalents with the lowest valences (C, Si 4; N, P 3; O, S 2;
    /// H and halogens 1): `C + Si + 1 - (H + X)/2 + (N + P)/2` (common practice).
    pub fn rdbe(&self) -> f64 {
        let twice = 2 * i64::from(self.c + self.si) + 2 + i64::from(self.n + self.p)
            - i64::from(self.h + self.halogens());
        twice as f64 / 2.0
    }

    /// The atom counts as a [`Formula`].
    pub fn formula(&self) -> Formula {
        let mut f = Formula::new();
        for (sym, n) in [
            ("C", self.c),
            ("H", self.h),
            ("N", self.n),
            ("O", self.o),
            ("S", self.s),
            ("P", self.p),
            ("F", self.f),
            ("Si", self.si),
            ("I", self.i),
            ("Cl", self.cl),
            ("Br", self.br),
        ] {
            if n > 0 {
                f.add_element(sym, n).expect("known element, small count");
            }
        }
        f
    }
}

/// Element limits of rule 1 for a neutral mass, in the order C H N O P S F Si; `None` above
/// 2000 u (no limit beyond what the mass allows).
///
/// From memory of Kind and Fiehn (2007), Table 1: per mass band, the larger of the counts
/// found in the Dictionary of Natural Products and in the Wiley mass spectral library. Si is
/// not among the elements we could recall for every band (values below from memory, less
/// certain); I has no limit.
pub fn element_limits(mass: f64) -> Option<[u32; 8]> {
    //                  C    H   N   O  P   S   F  Si
    if mass < 500.0 {
        Some([39, 72, 20, 20, 9, 10, 16, 8])
    } else if mass < 1000.0 {
        Some([78, 126, 25, 27, 9, 14, 34, 14])
    } else if mass < 2000.0 {
        Some([156, 236, 32, 63, 9, 14, 48, 18])
    } else {
        None
    }
}

/// True when `comp` passes `rule` (`mass` is the neutral mass, for rule 1).
pub fn passes(rule: Rule, comp: &Composition, mass: f64, set: &RuleSet) -> bool {
    match rule {
        Rule::ElementLimits => within_limits(comp, mass),
        Rule::Lewis => lewis(comp),
        Rule::Senior => senior(comp),
        Rule::HcRatio => hc_ratio(comp, set),
        Rule::HeteroRatio => hetero_ratio(comp, set.ratio_range),
        Rule::ElementProbability => element_probability(comp),
        Rule::Rdbe => {
            let r = comp.rdbe();
            r >= 0.0 && r.fract() == 0.0
        }
    }
}

fn within_limits(c: &Composition, mass: f64) -> bool {
    match element_limits(mass) {
        None => true,
        Some(l) => {
            let counts = [c.c, c.h, c.n, c.o, c.p, c.s, c.f, c.si];
            counts.iter().zip(l.iter()).all(|(n, max)| n <= max)
        }
    }
}

/// Valence electrons: group numbers C 4, Si 4, N 5, P 5, O 6, S 6, H 1, halogens 7.
fn lewis(c: &Composition) -> bool {
    let electrons = 4 * (c.c + c.si) + 5 * (c.n + c.p) + 6 * (c.o + c.s) + c.h + 7 * c.halogens();
    electrons % 2 == 0
}

fn senior(c: &Composition) -> bool {
    let atoms = u64::from(c.c + c.h + c.n + c.o + c.s + c.p + c.f + c.si + c.i + c.cl + c.br);
    if atoms == 0 {
        return false;
    }
    let fixed = 4 * u64::from(c.c + c.si)
        + 3 * u64::from(c.n)
        + 2 * u64::from(c.o)
        + u64::from(c.h + c.halogens());
    let fixed_max = if c.c + c.si > 0 {
        4
    } else if c.n > 0 {
        3
    } else if c.o > 0 {
        2
    } else if c.h + c.halogens() > 0 {
        1
    } else {
        0
    };
    let s_choices: &[u64] = if c.s > 0 { &[2, 4, 6] } else { &[0] };
    let p_choices: &[u64] = if c.p > 0 { &[3, 5] } else { &[0] };
    s_choices.iter().any(|&vs| {
        p_choices.iter().any(|&vp| {
            let sum = fixed + vs * u64::from(c.s) + vp * u64::from(c.p);
            let max_v = fixed_max.max(vs).max(vp);
            sum % 2 == 0 && sum >= 2 * max_v && sum + 2 >= 2 * atoms
        })
    })
}

fn ratio_ok(n: u32, c: u32, max: f64) -> bool {
    n == 0 || (c > 0 && f64::from(n) / f64::from(c) <= max)
}

fn hc_ratio(c: &Composition, set: &RuleSet) -> bool {
    if c.c == 0 {
        return false;
    }
    let h = c.h + if set.halogens_as_hydrogen { c.halogens() } else { 0 };
    let r = f64::from(h) / f64::from(c.c);
    let (lo, hi) = match set.ratio_range {
        RatioRange::Common => (0.2, 3.1),
        RatioRange::Extended => (0.1, 6.0),
    };
    (lo..=hi).contains(&r)
}

/// Upper limits of N/C, O/C, P/C, S/C, F/C, Si/C (from memory of the paper's rule 5).
fn hetero_ratio(c: &Composition, range: RatioRange) -> bool {
    let max = match range {
        RatioRange::Common => [1.3, 1.2, 0.3, 0.8, 1.5, 0.5],
        RatioRange::Extended => [4.0, 3.0, 2.0, 3.0, 6.0, 1.0],
    };
    [c.n, c.o, c.p, c.s, c.f, c.si].iter().zip(max).all(|(&n, m)| ratio_ok(n, c.c, m))
}

/// Rule 6 (from memory of the paper): when each of a group of elements occurs more than
/// once, their counts stay below limits seen in known compounds.
fn element_probability(c: &Composition) -> bool {
    let (n, o, p, s) = (c.n, c.o, c.p, c.s);
    let all_above_one = |xs: &[u32]| xs.iter().all(|&x| x > 1);
    if all_above_one(&[n, o, p, s]) && !(n < 10 && o < 20 && p < 4 && s < 3) {
        return false;
    }
    if all_above_one(&[n, o, p]) && !(n < 11 && o < 22 && p < 6) {
        return false;
    }
    if all_above_one(&[o, p, s]) && !(o < 14 && p < 3 && s < 3) {
        return false;
    }
    if all_above_one(&[p, s, n]) && !(p < 3 && s < 3 && n < 4) {
        return false;
    }
    if all_above_one(&[n, o, s]) && !(n < 19 && o < 14 && s < 8) {
        return false;
    }
    true
}

#[cfg(test)]
mod tests {
    use super::*;

    fn comp(f: &str) -> Composition {
        Composition::of(&Formula::parse(f).unwrap()).unwrap()
    }

    fn pass(rule: Rule, f: &str) -> bool {
        let c = comp(f);
        let mass = Formula::parse(f).unwrap().monoisotopic_mass();
        passes(rule, &c, mass, &RuleSet::default())
    }

    #[test]
    fn rdbe_worked_examples() {
        // Benzene C6H6: 4 (3 double bonds + 1 ring); chloroform 0; atrazine C8H14ClN5: 4
        // (ring + 3 C=N); pyridine C5H5N: 4 (common practice, textbook examples).
        assert_eq!(comp("C6H6").rdbe(), 4.0);
        assert_eq!(comp("CHCl3").rdbe(), 0.0);
        assert_eq!(comp("C8H14ClN5").rdbe(), 4.0);
        assert_eq!(comp("C5H5N").rdbe(), 4.0);
        // A radical gives a half-integer: CH3 0.5; aniline C6H7N 4, C6H6N 4.5.
        assert_eq!(comp("CH3").rdbe(), 0.5);
        assert!(pass(Rule::Rdbe, "C6H7N"));
        assert!(!pass(Rule::Rdbe, "C6H6N"));
        // Negative: CH6 (-1) fails; sulfates and phosphates stay at 0 or above: TCEP
        // C6H12Cl3O4P 0, methanesulfonic acid CH4O3S 0.
        assert!(!pass(Rule::Rdbe, "CH6"));
        assert!(pass(Rule::Rdbe, "C6H12Cl3O4P"));
        assert!(pass(Rule::Rdbe, "CH4O3S"));
    }

    #[test]
    fn lewis_even_electrons() {
        // Methane 8 valence electrons; CH3 radical 7; NO2 (17) fails, HNO2 (18) passes.
        assert!(pass(Rule::Lewis, "CH4"));
        assert!(!pass(Rule::Lewis, "CH3"));
        assert!(!pass(Rule::Lewis, "NO2"));
        assert!(pass(Rule::Lewis, "HNO2"));
        assert!(pass(Rule::Lewis, "C14H9Cl5"));
    }

    #[test]
    fn senior_three_conditions() {
        // Sum of valences even: CH3 (7) fails.
        assert!(!pass(Rule::Senior, "CH3"));
        // Twice the number of atoms minus one: C2H8 (sum 16, 10 atoms -> needs 18) fails,
        // C2H6 (14, 8 atoms -> 14) passes: ethane is saturated.
        assert!(!pass(Rule::Senior, "C2H8"));
        assert!(pass(Rule::Senior, "C2H6"));
        // Twice the largest valence: H2 passes (2 >= 2); a lone C fails (4 < 8).
        assert!(pass(Rule::Senior, "H2"));
        assert!(!pass(Rule::Senior, "C"));
        // Expanded valences: H2SO4 passes already with S 2 (sum 12, 7 atoms); SF6 needs
        // S 6 (with S 2 the sum is 8, below 2 x (7 - 1)).
        assert!(pass(Rule::Senior, "H2O4S"));
        assert!(pass(Rule::Senior, "F6S"));
        // PCl5 needs P(V).
        assert!(pass(Rule::Senior, "PCl5"));
        assert!(!pass(Rule::Senior, "PH5N"));
    }

    #[test]
    fn hc_ratio_ranges() {
        // Extended 0.1..6: methane 4 passes; C10H0 fails; C20H1 (0.05) fails.
        assert!(pass(Rule::HcRatio, "CH4"));
        assert!(!pass(Rule::HcRatio, "C20H"));
        // Halogens with hydrogen: hexachlorobenzene (0 H, 6 Cl over 6 C) passes by default
        // and fails the paper's plain H/C.
        assert!(pass(Rule::HcRatio, "C6Cl6"));
        let strict = RuleSet { halogens_as_hydrogen: false, ..RuleSet::default() };
        assert!(!passes(Rule::HcRatio, &comp("C6Cl6"), 282.0, &strict));
        // Common range 0.2..3.1: methane (4) fails it.
        let common = RuleSet { ratio_range: RatioRange::Common, ..RuleSet::default() };
        assert!(!passes(Rule::HcRatio, &comp("CH4"), 16.0, &common));
        assert!(passes(Rule::HcRatio, &comp("C6H6"), 78.0, &common));
    }

    #[test]
    fn hetero_ratio_ranges() {
        // Chloropicrin CCl3NO2: O/C 2 passes the extended range (3), fails the common (1.2).
        assert!(pass(Rule::HeteroRatio, "CCl3NO2"));
        let common = RuleSet { ratio_range: RatioRange::Common, ..RuleSet::default() };
        assert!(!passes(Rule::HeteroRatio, &comp("CCl3NO2"), 165.0, &common));
        // N/C above 4 fails: CN5H3.
        assert!(!pass(Rule::HeteroRatio, "CH3N5"));
        // Cl/C is not checked (Cl fixed by the signature): CHCl3 passes.
        assert!(pass(Rule::HeteroRatio, "CHCl3"));
    }

    #[test]
    fn element_probability_groups() {
        // N, O, P, S all above one: O 20 breaks O < 20.
        assert!(!pass(Rule::ElementProbability, "C40H60N3O20P2S2"));
        assert!(pass(Rule::ElementProbability, "C40H60N3O8P2S2"));
        // A group with a member at one atom does not apply: chlorpyrifos (N 1, P 1, S 1).
        assert!(pass(Rule::ElementProbability, "C9H11Cl3NO3PS"));
        // P, S, N above one: N 4 breaks N < 4.
        assert!(!pass(Rule::ElementProbability, "C20H30N4O1P2S2"));
    }

    #[test]
    fn element_limits_by_mass_band() {
        // Below 500 u at most 20 N: C10H10N21 would fail, C10H10N20 passes.
        let c = comp("C10H10N21");
        assert!(!passes(Rule::ElementLimits, &c, 450.0, &RuleSet::default()));
        assert!(passes(Rule::ElementLimits, &comp("C10H10N20"), 450.0, &RuleSet::default()));
        // Cl and Br are fixed by the signature and not limited: C12Br10O.
        assert!(pass(Rule::ElementLimits, "C12Br10O"));
        assert_eq!(element_limits(2500.0), None);
    }

    #[test]
    fn names_round_trip() {
        for r in Rule::ALL {
            assert_eq!(Rule::from_name(r.name()), Some(r));
        }
        let mut set = RuleSet::default();
        set.set(Rule::Lewis, RuleMode::Off);
        assert_eq!(set.mode(Rule::Lewis), RuleMode::Off);
        assert_eq!(set.mode(Rule::Senior), RuleMode::Require);
    }
}
