//! The relations between ions of one compound: adducts and multimers of electrospray, and
//! neutral losses of in-source and electron-ionization fragments.
//!
//! Both tables are configurable (`[compound]` of the configuration); every mass comes from
//! the chemistry module ([`IonType`], [`Formula`]: AME2020 atomic masses, the electron mass
//! included), never a typed-in number. The defaults are the adducts and losses a screening
//! lab meets most (common practice):
//!
//! | table | default |
//! |---|---|
//! | positive adducts | `[M+H]+ [M+Na]+ [M+NH4]+ [M+K]+ [M+2H]2+ [2M+H]+ [M+H-H2O]+` |
//! | negative adducts | `[M-H]- [M+Cl]- [M+HCOO]- [M+CH3COO]- [M-H-H2O]- [2M-H]-` |
//! | neutral losses | `Cl HCl Br HBr CH3 H2O CO CO2 C2H4`, and any two of them in a row |
//!
//! The first adduct of each list is the one a lone ion is taken for.

use crate::chem::{Formula, IonType};
use crate::{Error, ErrorKind, Result};

/// One ion type of the adduct table, parsed.
#[derive(Debug, Clone, PartialEq)]
pub struct Adduct {
    /// The ion type.
    pub ion: IonType,
    /// Its label in bracket notation (`[M+Na]+`).
    pub label: String,
    /// Chlorine atoms the adduct itself brings (1 for `[M+Cl]-`).
    pub cl: i64,
    /// Bromine atoms the adduct itself brings.
    pub br: i64,
}

impl Adduct {
    /// Parses one ion type of the table.
    pub fn parse(text: &str) -> Result<Adduct> {
        let ion = IonType::parse(text)?;
        Ok(Adduct {
            label: ion.to_string(),
            cl: ion.element_change("Cl"),
            br: ion.element_change("Br"),
            ion,
        })
    }

    /// m/z of this ion of a neutral of monoisotopic mass `mass`.
    pub fn mz(&self, mass: f64) -> f64 {
        self.ion.mz_from_mass(mass)
    }

    /// Neutral mass of the molecule whose ion of this type has m/z `mz`.
    pub fn neutral(&self, mz: f64) -> f64 {
        self.ion.neutral_mass(mz)
    }

    /// Charge magnitude.
    pub fn z(&self) -> u8 {
        self.ion.charge().unsigned_abs().min(255) as u8
    }

    /// Halogen atoms of the neutral when the ion carries `ion_cl` Cl and `ion_br` Br, or
    /// `None` when the counts cannot belong to this adduct of one molecule (a chloride
    /// adduct without Cl, a dimer with an odd count).
    pub fn neutral_halogens(&self, ion_cl: u8, ion_br: u8) -> Option<(u8, u8)> {
        let n = i64::from(self.ion.molecules());
        let cl = i64::from(ion_cl) - self.cl;
        let br = i64::from(ion_br) - self.br;
        (cl >= 0 && br >= 0 && cl % n == 0 && br % n == 0).then(|| ((cl / n) as u8, (br / n) as u8))
    }
}

/// One neutral loss (one step or two in a row).
#[derive(Debug, Clone, PartialEq)]
pub struct Loss {
    /// Label as written in `members` (`-HCl`, `-Cl-CO`).
    pub label: String,
    /// Monoisotopic mass lost, u.
    pub mass: f64,
    /// Chlorine atoms lost.
    pub cl: u8,
    /// Bromine atoms lost.
    pub br: u8,
}

/// The relation tables in force (see the module docs).
#[derive(Debug, Clone, PartialEq)]
pub struct Relations {
    /// Adducts of positive ions; the first is the default.
    pub positive: Vec<Adduct>,
    /// Adducts of negative ions; the first is the default.
    pub negative: Vec<Adduct>,
    /// Losses, one and two steps, by increasing mass.
    pub losses: Vec<Loss>,
}

/// Default positive adducts (common practice in electrospray screening).
pub const POSITIVE_ADDUCTS: &[&str] =
    &["[M+H]+", "[M+Na]+", "[M+NH4]+", "[M+K]+", "[M+2H]2+", "[2M+H]+", "[M+H-H2O]+"];
/// Default negative adducts (common practice in electrospray screening).
pub const NEGATIVE_ADDUCTS: &[&str] =
    &["[M-H]-", "[M+Cl]-", "[M+HCOO]-", "[M+CH3COO]-", "[M-H-H2O]-", "[2M-H]-"];
/// Default neutral losses of fragments (common practice in EI and in-source fragmentation).
pub const LOSSES: &[&str] = &["Cl", "HCl", "Br", "HBr", "CH3", "H2O", "CO", "CO2", "C2H4"];

impl Relations {
    /// Parses the tables; `max_steps` (1 or 2) says how many losses may follow each other.
    pub fn new(
        positive: &[String],
        negative: &[String],
        losses: &[String],
        max_steps: usize,
    ) -> Result<Relations> {
        let adducts = |list: &[String], sign: i32, which: &str| -> Result<Vec<Adduct>> {
            let v = list
                .iter()
                .map(|t| {
                    let a = Adduct::parse(t).map_err(|e| config(format!("{which} '{t}': {e}")))?;
                    if a.ion.charge().signum() != sign || a.ion.is_radical() {
                        return Err(config(format!("{which} '{t}' has the wrong charge")));
                    }
                    Ok(a)
                })
                .collect::<Result<Vec<_>>>()?;
            if v.is_empty() {
                return Err(config(format!("{which} must list at least one ion type")));
            }
            Ok(v)
        };
        let positive = adducts(positive, 1, "compound adducts_positive")?;
        let negative = adducts(negative, -1, "compound adducts_negative")?;
        let mut one = Vec::new();
        for l in losses {
            let f = Formula::parse(l).map_err(|e| config(format!("compound losses '{l}': {e}")))?;
            if f.is_empty() {
                return Err(config(format!("compound losses '{l}' is empty")));
            }
            one.push(Loss {
                label: format!("-{}", l.trim()),
                mass: f.monoisotopic_mass(),
                cl: f.count("Cl").min(255) as u8,
                br: f.count("Br").min(255) as u8,
            });
        }
        if !(1..=2).contains(&max_steps) {
            return Err(config("compound max_loss_steps must be 1 or 2".into()));
        }
        let mut all = one.clone();
        if max_steps == 2 {
            for (i, a) in one.iter().enumerate() {
                for b in &one[i..] {
                    all.push(Loss {
                        label: format!("{}{}", a.label, b.label),
                        mass: a.mass + b.mass,
                        cl: a.cl + b.cl,
                        br: a.br + b.br,
                    });
                }
            }
        }
        all.sort_by(|a, b| a.mass.total_cmp(&b.mass).then(a.label.cmp(&b.label)));
        Ok(Relations { positive, negative, losses: all })
    }

    /// The default tables with two-step losses.
    pub fn defaults() -> Relations {
        let owned = |v: &[&str]| v.iter().map(|s| s.to_string()).collect::<Vec<_>>();
        Relations::new(&owned(POSITIVE_ADDUCTS), &owned(NEGATIVE_ADDUCTS), &owned(LOSSES), 2)
            .expect("the default relation tables parse")
    }

    /// The adducts for ions of charge sign `sign` (positive for `sign >= 0`).
    pub fn adducts(&self, sign: i32) -> &[Adduct] {
        if sign < 0 { &self.negative } else { &self.positive }
    }

    /// Every m/z at which an ion related to one at `mz` (charge `charge`, signed) may stand:
    /// its other adducts under each adduct hypothesis (not for EI), and its parents and
    /// fragments by each loss (singly charged ions only). Used to list the related ions of a
    /// flagged one while the spectrum is at hand.
    pub fn related_mz(&self, mz: f64, charge: i32, ei: bool, out: &mut Vec<f64>) {
        out.clear();
        if !ei {
            let list = self.adducts(charge);
            for a in list.iter().filter(|a| a.ion.charge() == charge) {
                let m = a.neutral(mz);
                if m <= 0.0 {
                    continue;
                }
                for b in list {
                    if b != a {
                        out.push(b.mz(m));
                    }
                }
            }
        }
        if charge.abs() == 1 {
            for l in &self.losses {
                out.push(mz + l.mass);
                if mz - l.mass > 0.0 {
                    out.push(mz - l.mass);
                }
            }
        }
        out.retain(|m| m.is_finite() && *m > 0.0);
    }
}

fn config(msg: String) -> Error {
    Error::new(ErrorKind::Config(msg))
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::elements::isotope_mass;

    #[test]
    fn every_default_adduct_spacing_is_the_chemistry_modules() {
        // Spacings between adducts of one neutral: the mass of what differs, from AME2020
        // atomic masses (electrons cancel between ions of the same charge).
        let r = Relations::defaults();
        let h = isotope_mass("H", 1).unwrap();
        let na = isotope_mass("Na", 23).unwrap();
        let cl = isotope_mass("Cl", 35).unwrap();
        let m = 180.063_388; // glucose C6H12O6, monoisotopic
        let mh = r.positive[0].mz(m);
        let mna = r.positive[1].mz(m);
        assert!((mna - mh - (na - h)).abs() < 1e-9);
        let neg = &r.negative;
        assert!((neg[1].mz(m) - neg[0].mz(m) - (cl + h)).abs() < 1e-9);
        // [2M-H]- minus [M-H]- is one neutral.
        assert!((neg[5].mz(m) - neg[0].mz(m) - m).abs() < 1e-9);
        // [M+2H]2+ sits at (M + 2 H - 2 e) / 2.
        let e = crate::chem::ELECTRON_MASS;
        assert!((r.positive[4].mz(m) - (m + 2.0 * h - 2.0 * e) / 2.0).abs() < 1e-9);
        // Round trips.
        for a in r.positive.iter().chain(&r.negative) {
            assert!((a.neutral(a.mz(m)) - m).abs() < 1e-9, "{}", a.label);
        }
    }

    #[test]
    fn adduct_halogens_are_the_adducts_own() {
        let r = Relations::defaults();
        let chloride = &r.negative[1];
        assert_eq!(chloride.label, "[M+Cl]-");
        assert_eq!(chloride.neutral_halogens(1, 0), Some((0, 0)));
        assert_eq!(chloride.neutral_halogens(3, 1), Some((2, 1)));
        assert_eq!(chloride.neutral_halogens(0, 0), None);
        let dimer = &r.negative[5];
        assert_eq!(dimer.neutral_halogens(4, 0), Some((2, 0)));
        assert_eq!(dimer.neutral_halogens(3, 0), None);
        assert_eq!(r.positive[0].neutral_halogens(2, 0), Some((2, 0)));
    }

    #[test]
    fn losses_have_their_formula_masses_and_two_steps_combine() {
        let r = Relations::defaults();
        let hcl = r.losses.iter().find(|l| l.label == "-HCl").unwrap();
        let expect = isotope_mass("H", 1).unwrap() + isotope_mass("Cl", 35).unwrap();
        assert!((hcl.mass - expect).abs() < 1e-12);
        assert_eq!((hcl.cl, hcl.br), (1, 0));
        let two = r.losses.iter().find(|l| l.label == "-Cl-Cl").unwrap();
        assert_eq!(two.cl, 2);
        // 9 single losses and 45 unordered pairs.
        assert_eq!(r.losses.len(), 9 + 45);
        assert!(r.losses.windows(2).all(|w| w[0].mass <= w[1].mass));
    }

    #[test]
    fn bad_tables_are_config_errors_naming_the_entry() {
        let s = |v: &[&str]| v.iter().map(|x| x.to_string()).collect::<Vec<_>>();
        let e = Relations::new(&s(&["[M-H]-"]), &s(&["[M-H]-"]), &s(&["HCl"]), 2).unwrap_err();
        assert!(e.to_string().contains("adducts_positive '[M-H]-'"), "{e}");
        let e = Relations::new(&s(&["[M+H]+"]), &s(&["[M-H]-"]), &s(&["Xx"]), 2).unwrap_err();
        assert!(e.to_string().contains("losses 'Xx'"), "{e}");
        assert!(Relations::new(&s(&["[M+H]+"]), &s(&["[M-H]-"]), &s(&[]), 3).is_err());
    }
}
