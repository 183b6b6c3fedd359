//! Ion types: which atoms a molecule gains or loses and which charge it carries.
//!
//! Two notations are accepted:
//!
//! - the trade's bracket notation: `[M+H]+`, `[M-H]-`, `[M+2H]2+`, `[2M+Na]+`, `[M+HCOO]-`,
//!   `[M]+.` (radical cation; `•` works too), `[M+CH3OH+H]+` (any formula as adduct);
//! - a shell-friendly notation without brackets or trailing charge: `M+H`, `M-H`, `M+2H`,
//!   `M+Na`, `M+NH4`, `M+Cl`, `M+HCOO`, `M-2H`, and `M+.` / `M-.` for the radical ions of
//!   electron ionization. The charge is then worked out from the adducts: H, Li, Na, K and NH4
//!   carry +1 when added (removing H gives -1); Cl, Br, HCOO and CH3COO carry -1 when added;
//!   any other formula counts as neutral (`M+H-H2O` is `[M+H-H2O]+`).
//!
//! The m/z of an ion is `(n M + added - removed - z m_e) / |z|`, with atomic masses for all
//! parts and `m_e` the electron mass (CODATA 2018), so a proton is `H - e`.
//!
//! # Examples
//!
//! ```
//! use mzcore::chem::{Formula, IonType};
//! let caffeine = Formula::parse("C8H10N4O2")?;
//! let ion = IonType::parse("M+H")?;
//! assert_eq!(ion.to_string(), "[M+H]+");
//! assert_eq!(ion.charge(), 1);
//! assert!((ion.mz(&caffeine)? - 195.087652).abs() < 1e-5);
//! assert_eq!(IonType::parse("[M-2H]2-")?.charge(), -2);
//! # Ok::<_, mzcore::Error>(())
//! ```

use std::fmt;
use std::str::FromStr;

use super::elements::ELECTRON_MASS;
use super::formula::{Formula, parse_error};
use crate::{Error, Result};

/// How a molecule M becomes an ion.
#[derive(Debug, Clone, PartialEq)]
pub struct IonType {
    molecules: u32,
    /// Terms as written: sign (+1 / -1), multiplier, group text and its formula.
    terms: Vec<Term>,
    charge: i32,
    radical: bool,
}

#[derive(Debug, Clone, PartialEq)]
struct Term {
    sign: i32,
    count: u32,
    group: String,
    formula: Formula,
}

/// Charge a group carries when added (common practice in electrospray).
fn group_charge(group: &str) -> i32 {
    match group {
        "H" | "Li" | "Na" | "K" | "NH4" => 1,
        "Cl" | "Br" | "HCOO" | "CH3COO" | "HCO2" | "CH3CO2" => -1,
        _ => 0,
    }
}

impl IonType {
    /// Parses an ion type in bracket or shell-friendly notation (see the module docs).
    pub fn parse(text: &str) -> Result<IonType> {
        let t = text.trim();
        let err = |at: usize, reason: &str| parse_error("ion type", text, at, reason.into());
        if t.is_empty() {
            return Err(err(0, "empty ion type"));
        }
        let (body, tail, bracketed) = if let Some(rest) = t.strip_prefix('[') {
            let close = rest.find(']').ok_or_else(|| err(0, "'[' without matching ']'"))?;
            (&rest[..close], &rest[close + 1..], true)
        } else {
            (t, "", false)
        };
        let off = usize::from(bracketed);
        // n M
        let digits = body.chars().take_while(char::is_ascii_digit).count();
        let molecules: u32 = if digits == 0 {
            1
        } else {
            body[..digits].parse().map_err(|_| err(off, "bad molecule count"))?
        };
        if molecules == 0 || molecules > 100 {
            return Err(err(off, "molecule count must be 1 to 100"));
        }
        if !body[digits..].starts_with('M') {
            return Err(err(off + digits, "expected 'M' for the molecule"));
        }
        let mut rest = &body[digits + 1..];
        let mut at = off + digits + 1;
        let mut terms = Vec::new();
        let mut radical = false;
        let mut radical_sign = 0;
        while !rest.is_empty() {
            let sign = match rest.as_bytes()[0] {
                b'+' => 1,
                b'-' => -1,
                _ => return Err(err(at, "expected '+' or '-'")),
            };
            let after = &rest[1..];
            if !bracketed && (after == "." || after == "•" || after.is_empty()) {
                if !terms.is_empty() {
                    return Err(err(at, "a radical ion cannot have adducts in this notation"));
                }
                radical = true;
                radical_sign = sign;
                break;
            }
            let end = after.find(['+', '-']).unwrap_or(after.len());
            let term = &after[..end];
            let n = term.chars().take_while(char::is_ascii_digit).count();
            let count: u32 =
                if n == 0 { 1 } else { term[..n].parse().map_err(|_| err(at + 1, "bad count"))? };
            if count == 0 || count > 100 {
                return Err(err(at + 1, "adduct count must be 1 to 100"));
            }
            let group = &term[n..];
            if group.is_empty() {
                return Err(err(at + 1 + n, "expected an adduct formula"));
            }
            let formula = Formula::parse(group)
                .map_err(|_| err(at + 1 + n, &format!("'{group}' is not a formula")))?;
            terms.push(Term { sign, count, group: group.to_string(), formula });
            rest = &after[end..];
            at += 1 + end;
        }
        let charge = if bracketed {
            let tail_at = off + body.len() + 1;
            let (mag_txt, rest) =
                tail.split_at(tail.chars().take_while(char::is_ascii_digit).count());
            let magnitude: i32 = if mag_txt.is_empty() {
                1
            } else {
                mag_txt.parse().map_err(|_| err(tail_at, "bad charge"))?
            };
            let mut chars = rest.chars();
            let sign = match chars.next() {
                Some('+') => 1,
                Some('-') => -1,
                _ => return Err(err(tail_at, "expected the charge after ']', as in [M+H]+")),
            };
            match chars.as_str() {
                "" => {}
                "." | "•" => radical = true,
                _ => return Err(err(tail_at, "unexpected text after the charge")),
            }
            if magnitude == 0 || magnitude > 100 {
                return Err(err(tail_at, "charge must be 1 to 100"));
            }
            sign * magnitude
        } else if radical {
            radical_sign
        } else {
            let z: i32 =
                terms.iter().map(|t| t.sign * t.count as i32 * group_charge(&t.group)).sum();
            if z == 0 {
                return Err(err(
                    0,
                    "cannot tell the charge; use the bracket notation, e.g. [M+X]+",
                ));
            }
            z
        };
        Ok(IonType { molecules, terms, charge, radical })
    }

    /// The radical cation M+. of electron ionization.
    pub fn radical_cation() -> IonType {
        IonType { molecules: 1, terms: Vec::new(), charge: 1, radical: true }
    }

    /// The ion types a lab meets most: M+., M-., [M+H]+, [M-H]-, [M+Na]+, [M+K]+, [M+NH4]+,
    /// [M+Cl]-, [M+HCOO]-, [M+2H]2+, [M-2H]2-.
    pub fn common() -> Vec<IonType> {
        ["M+.", "M-.", "M+H", "M-H", "M+Na", "M+K", "M+NH4", "M+Cl", "M+HCOO", "M+2H", "M-2H"]
            .iter()
            .map(|s| IonType::parse(s).expect("built-in ion types parse"))
            .collect()
    }

    /// Number of molecules M in the ion (2 for `[2M+H]+`).
    pub fn molecules(&self) -> u32 {
        self.molecules
    }

    /// Atoms of element `symbol` that the ion type adds (negative: removes), e.g. +1 Cl for
    /// `[M+Cl]-`, -1 H for `[M-H]-`.
    pub fn element_change(&self, symbol: &str) -> i64 {
        self.terms
            .iter()
            .map(|t| i64::from(t.sign) * i64::from(t.count) * i64::from(t.formula.count(symbol)))
            .sum()
    }

    /// Neutral monoisotopic mass of the molecule M whose ion of this type has m/z `mz`
    /// (the inverse of [`IonType::mz_from_mass`]).
    ///
    /// ```
    /// use mzcore::chem::{Formula, IonType};
    /// let glucose = Formula::parse("C6H12O6")?;
    /// let ion = IonType::parse("[M+Cl]-")?;
    /// let m = ion.neutral_mass(ion.mz(&glucose)?);
    /// assert!((m - glucose.monoisotopic_mass()).abs() < 1e-9);
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn neutral_mass(&self, mz: f64) -> f64 {
        let atoms = mz * f64::from(self.charge.abs()) + f64::from(self.charge) * ELECTRON_MASS;
        (atoms - self.adduct_mass()) / f64::from(self.molecules)
    }

    /// Signed charge number z.
    pub fn charge(&self) -> i32 {
        self.charge
    }

    /// True for odd-electron ions written with `.` (`M+.`, `[M]-.`).
    pub fn is_radical(&self) -> bool {
        self.radical
    }

    /// The elemental composition of the ion for molecule `m` (electrons aside).
    pub fn ion_formula(&self, m: &Formula) -> Result<Formula> {
        let mut f = m.times(self.molecules)?;
        for t in self.terms.iter().filter(|t| t.sign > 0) {
            f = f.plus(&t.formula.times(t.count)?)?;
        }
        for t in self.terms.iter().filter(|t| t.sign < 0) {
            f = f.minus(&t.formula.times(t.count)?).map_err(|_| {
                Error::new(crate::ErrorKind::InvalidValue {
                    field: "ion type".into(),
                    value: format!("{self} needs atoms that {m} lacks"),
                })
            })?;
        }
        Ok(f)
    }

    /// Mass change from n M to the ion's atoms (added minus removed), in u, electrons aside.
    pub fn adduct_mass(&self) -> f64 {
        self.terms
            .iter()
            .map(|t| f64::from(t.sign) * f64::from(t.count) * t.formula.monoisotopic_mass())
            .sum()
    }

    /// m/z of the monoisotopic ion of a molecule with monoisotopic mass `mass`.
    pub fn mz_from_mass(&self, mass: f64) -> f64 {
        self.mass_to_mz(f64::from(self.molecules) * mass + self.adduct_mass())
    }

    /// m/z of an ion whose atoms (electrons aside) weigh `ion_atoms_mass`.
    pub fn mass_to_mz(&self, ion_atoms_mass: f64) -> f64 {
        (ion_atoms_mass - f64::from(self.charge) * ELECTRON_MASS) / f64::from(self.charge.abs())
    }

    /// m/z of the monoisotopic ion of molecule `m`; an error when the ion removes atoms that
    /// `m` lacks.
    pub fn mz(&self, m: &Formula) -> Result<f64> {
        Ok(self.mass_to_mz(self.ion_formula(m)?.monoisotopic_mass()))
    }

    /// Nominal mass of the ion (sum of mass numbers, charge aside).
    pub fn nominal_mass(&self, m: &Formula) -> Result<i64> {
        Ok(self.ion_formula(m)?.nominal_mass())
    }

    /// The shell-friendly spelling (`M+H`, `M+2H`, `M+.`), or the bracket notation where the
    /// charge cannot be inferred from the adducts.
    pub fn shell_name(&self) -> String {
        if self.radical && self.terms.is_empty() && self.molecules == 1 && self.charge.abs() == 1 {
            return if self.charge > 0 { "M+.".into() } else { "M-.".into() };
        }
        let inferred: i32 =
            self.terms.iter().map(|t| t.sign * t.count as i32 * group_charge(&t.group)).sum();
        if self.radical || inferred != self.charge {
            return self.to_string();
        }
        self.body()
    }

    fn body(&self) -> String {
        let mut s = String::new();
        if self.molecules > 1 {
            s.push_str(&self.molecules.to_string());
        }
        s.push('M');
        for t in &self.terms {
            s.push(if t.sign > 0 { '+' } else { '-' });
            if t.count > 1 {
                s.push_str(&t.count.to_string());
            }
            s.push_str(&t.group);
        }
        s
    }
}

impl fmt::Display for IonType {
    fn fmt(&self, f: &mut fmt::Formatter<'_>) -> fmt::Result {
        if self.radical && self.terms.is_empty() && self.molecules == 1 && self.charge.abs() == 1 {
            return f.write_str(if self.charge > 0 { "M+." } else { "M-." });
        }
        let z = self.charge.abs();
        write!(f, "[{}]", self.body())?;
        if z > 1 {
            write!(f, "{z}")?;
        }
        f.write_str(if self.charge > 0 { "+" } else { "-" })?;
        if self.radical {
            f.write_str(".")?;
        }
        Ok(())
    }
}

impl FromStr for IonType {
    type Err = Error;
    fn from_str(s: &str) -> Result<IonType> {
        IonType::parse(s)
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::elements::{PROTON_MASS, isotope_mass};

    #[test]
    fn both_notations_agree() {
        for (shell, bracket, z) in [
            ("M+H", "[M+H]+", 1),
            ("M-H", "[M-H]-", -1),
            ("M+Na", "[M+Na]+", 1),
            ("M+K", "[M+K]+", 1),
            ("M+NH4", "[M+NH4]+", 1),
            ("M+Cl", "[M+Cl]-", -1),
            ("M+HCOO", "[M+HCOO]-", -1),
            ("M+2H", "[M+2H]2+", 2),
            ("M-2H", "[M-2H]2-", -2),
            ("M+.", "[M]+.", 1),
            ("M-.", "[M]-.", -1),
        ] {
            let a = IonType::parse(shell).unwrap();
            let b = IonType::parse(bracket).unwrap();
            assert_eq!(a, b, "{shell} vs {bracket}");
            assert_eq!(a.charge(), z);
            assert_eq!(a.shell_name(), shell);
            assert_eq!(IonType::parse(&a.to_string()).unwrap(), a);
        }
        assert_eq!(IonType::common().len(), 11);
    }

    #[test]
    fn mz_accounts_for_electrons() {
        let m = Formula::parse("C6H12O6").unwrap();
        let mono = m.monoisotopic_mass();
        let e = ELECTRON_MASS;
        let h = isotope_mass("H", 1).unwrap();
        let na = isotope_mass("Na", 23).unwrap();
        let cl = isotope_mass("Cl", 35).unwrap();
        let cases = [
            ("M+.", mono - e),
            ("M-.", mono + e),
            ("M+H", mono + h - e),
            ("M-H", mono - h + e),
            ("M+Na", mono + na - e),
            ("M+Cl", mono + cl + e),
            ("M+2H", (mono + 2.0 * h - 2.0 * e) / 2.0),
            ("M-2H", (mono - 2.0 * h + 2.0 * e) / 2.0),
        ];
        for (ion, want) in cases {
            let got = IonType::parse(ion).unwrap().mz(&m).unwrap();
            assert!((got - want).abs() < 1e-9, "{ion}: {got} vs {want}");
        }
        // H atom minus electron is the proton up to the 13.6 eV binding energy (1.5e-8 u).
        assert!((h - e - PROTON_MASS).abs() < 2e-8);
        let p = IonType::parse("M+H").unwrap();
        assert!((p.mz_from_mass(mono) - p.mz(&m).unwrap()).abs() < 1e-9);
    }

    #[test]
    fn nitrogen_rule_flips_for_even_electron_ions() {
        // Common practice: [M+H]+ of an odd-N molecule has an even nominal m/z.
        let atrazine = Formula::parse("C8H14ClN5").unwrap();
        assert_eq!(atrazine.nominal_mass(), 215);
        assert_eq!(IonType::parse("M+H").unwrap().nominal_mass(&atrazine).unwrap(), 216);
        assert_eq!(IonType::parse("M+.").unwrap().nominal_mass(&atrazine).unwrap(), 215);
    }

    #[test]
    fn bad_ion_types_are_parse_errors() {
        for bad in ["", "[M+H", "[M+H]", "X+H", "M+Xy", "M*H", "M+CH3OH", "[M+H]+x", "M+0H"] {
            let e = IonType::parse(bad).unwrap_err();
            assert!(matches!(e.kind(), crate::ErrorKind::Parse { .. }), "{bad}: {e}");
        }
        assert!(IonType::parse("M-H").unwrap().mz(&Formula::parse("CCl4").unwrap()).is_err());
        let dimer = IonType::parse("[2M+Na]+").unwrap();
        assert_eq!(dimer.ion_formula(&Formula::parse("CH4").unwrap()).unwrap().hill(), "C2H8Na");
        assert_eq!(IonType::parse("M+H-H2O").unwrap().charge(), 1);
    }
}
