//! The element and isotope table.
//!
//! Sources:
//! - Isotope masses: the Atomic Mass Evaluation AME2020 (Wang, Huang, Kondev, Audi, Naimi,
//!   Chinese Physics C 45, 030003, 2021), in unified atomic mass units (u). Transcribed with all
//!   digits the table gives; cross-checked in tests against molmass (NIST table), which agrees
//!   to better than 1e-6 u for every isotope listed here.
//! - Isotope abundances: the representative isotopic compositions of the IUPAC/CIAAW,
//!   "Isotopic compositions of the elements 2013" (Meija et al., Pure Appl. Chem. 88, 293-306,
//!   2016), as amount fractions. Cross-checked against molmass in tests.
//! - Electron and proton mass: CODATA 2018 recommended values (Tiesinga et al., Rev. Mod. Phys.
//!   93, 025010, 2021).
//!
//! Only naturally occurring isotopes (non-zero representative abundance) are listed.

/// Electron mass in u (CODATA 2018: 5.48579909065(16) x 10^-4 u).
pub const ELECTRON_MASS: f64 = 0.000_548_579_909_065;

/// Proton mass in u (CODATA 2018: 1.007276466621(53) u).
pub const PROTON_MASS: f64 = 1.007_276_466_621;

/// One isotope of an element.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Isotope {
    /// Mass number A (protons + neutrons).
    pub mass_number: u16,
    /// Atomic mass in u (AME2020).
    pub mass: f64,
    /// Representative amount fraction in nature (IUPAC/CIAAW 2013), 0..=1.
    pub abundance: f64,
}

/// A chemical element with its naturally occurring isotopes, lightest first.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Element {
    /// Chemical symbol, e.g. `Cl`.
    pub symbol: &'static str,
    /// Atomic number Z.
    pub atomic_number: u8,
    /// Stable (or primordial) isotopes ordered by mass number.
    pub isotopes: &'static [Isotope],
}

impl Element {
    /// The most abundant isotope (the one used for monoisotopic and nominal masses).
    pub fn most_abundant(&self) -> &'static Isotope {
        let mut best = &self.isotopes[0];
        for iso in self.isotopes {
            if iso.abundance > best.abundance {
                best = iso;
            }
        }
        best
    }

    /// Index in [`Element::isotopes`] of the most abundant isotope.
    pub fn most_abundant_index(&self) -> usize {
        let m = self.most_abundant().mass_number;
        self.isotopes.iter().position(|i| i.mass_number == m).unwrap_or(0)
    }

    /// Average atomic mass from the isotope table: sum of abundance x mass.
    pub fn average_mass(&self) -> f64 {
        let total: f64 = self.isotopes.iter().map(|i| i.abundance).sum();
        self.isotopes.iter().map(|i| i.abundance * i.mass).sum::<f64>() / total
    }

    /// The isotope of mass number `a`, if the table lists it.
    pub fn isotope(&self, a: u16) -> Option<&'static Isotope> {
        self.isotopes.iter().find(|i| i.mass_number == a)
    }
}

const fn iso(mass_number: u16, mass: f64, abundance: f64) -> Isotope {
    Isotope { mass_number, mass, abundance }
}

macro_rules! elements {
    ($( $sym:literal $z:literal [ $( ($a:literal, $m:literal, $p:literal) ),+ ] )+) => {
        /// Every element the crate knows, ordered by atomic number.
        pub static ELEMENTS: &[Element] = &[
            $( Element { symbol: $sym, atomic_number: $z, isotopes: &[ $( iso($a, $m, $p) ),+ ] }, )+
        ];
    };
}

elements! {
    "H" 1 [(1, 1.007_825_032_23, 0.999_885), (2, 2.014_101_778_12, 0.000_115)]
    "Li" 3 [(6, 6.015_122_887_4, 0.0759), (7, 7.016_003_436_6, 0.9241)]
    "B" 5 [(10, 10.012_936_95, 0.199), (11, 11.009_305_36, 0.801)]
    "C" 6 [(12, 12.0, 0.9893), (13, 13.003_354_835_07, 0.0107)]
    "N" 7 [(14, 14.003_074_004_43, 0.996_36), (15, 15.000_108_898_88, 0.003_64)]
    "O" 8 [
        (16, 15.994_914_619_57, 0.997_57),
        (17, 16.999_131_756_5, 0.000_38),
        (18, 17.999_159_612_86, 0.002_05)
    ]
    "F" 9 [(19, 18.998_403_162_73, 1.0)]
    "Na" 11 [(23, 22.989_769_282, 1.0)]
    "Mg" 12 [(24, 23.985_041_697, 0.7899), (25, 24.985_836_976, 0.1), (26, 25.982_592_968, 0.1101)]
    "Al" 13 [(27, 26.981_538_53, 1.0)]
    "Si" 14 [
        (28, 27.976_926_534_65, 0.922_23),
        (29, 28.976_494_664_9, 0.046_85),
        (30, 29.973_770_136, 0.030_92)
    ]
    "P" 15 [(31, 30.973_761_998_42, 1.0)]
    "S" 16 [
        (32, 31.972_071_174_4, 0.9499),
        (33, 32.971_458_909_8, 0.0075),
        (34, 33.967_867_004, 0.0425),
        (36, 35.967_080_71, 0.0001)
    ]
    "Cl" 17 [(35, 34.968_852_682, 0.7576), (37, 36.965_902_602, 0.2424)]
    "K" 19 [
        (39, 38.963_706_486_4, 0.932_581),
        (40, 39.963_998_166, 0.000_117),
        (41, 40.961_825_257_9, 0.067_302)
    ]
    "Ca" 20 [
        (40, 39.962_590_863, 0.969_41),
        (42, 41.958_617_83, 0.006_47),
        (43, 42.958_766_44, 0.001_35),
        (44, 43.955_481_56, 0.020_86),
        (46, 45.953_689, 0.000_04),
        (48, 47.952_522_76, 0.001_87)
    ]
    "Fe" 26 [
        (54, 53.939_608_99, 0.058_45),
        (56, 55.934_936_33, 0.917_54),
        (57, 56.935_392_84, 0.021_19),
        (58, 57.933_274_43, 0.002_82)
    ]
    "Cu" 29 [(63, 62.929_597_72, 0.6915), (65, 64.927_789_7, 0.3085)]
    "Zn" 30 [
        (64, 63.929_142_01, 0.4917),
        (66, 65.926_033_81, 0.2773),
        (67, 66.927_127_75, 0.0404),
        (68, 67.924_844_55, 0.1845),
        (70, 69.925_319_2, 0.0061)
    ]
    "As" 33 [(75, 74.921_594_57, 1.0)]
    "Se" 34 [
        (74, 73.922_475_934, 0.0089),
        (76, 75.919_213_704, 0.0937),
        (77, 76.919_914_154, 0.0763),
        (78, 77.917_309_28, 0.2377),
        (80, 79.916_521_8, 0.4961),
        (82, 81.916_699_5, 0.0873)
    ]
    "Br" 35 [(79, 78.918_337_6, 0.5069), (81, 80.916_289_7, 0.4931)]
    "Sn" 50 [
        (112, 111.904_823_87, 0.0097),
        (114, 113.902_782_7, 0.0066),
        (115, 114.903_344_699, 0.0034),
        (116, 115.901_742_8, 0.1454),
        (117, 116.902_953_98, 0.0768),
        (118, 117.901_606_57, 0.2422),
        (119, 118.903_311_17, 0.0859),
        (120, 119.902_201_63, 0.3258),
        (122, 121.903_443_8, 0.0463),
        (124, 123.905_276_6, 0.0579)
    ]
    "I" 53 [(127, 126.904_471_9, 1.0)]
    "Hg" 80 [
        (196, 195.965_832_6, 0.0015),
        (198, 197.966_768_6, 0.0997),
        (199, 198.968_280_64, 0.1687),
        (200, 199.968_326_59, 0.231),
        (201, 200.970_302_84, 0.1318),
        (202, 201.970_643_4, 0.2986),
        (204, 203.973_493_98, 0.0687)
    ]
}

/// Looks up an element by its symbol (case-sensitive, as chemists write it).
///
/// # Examples
///
/// ```
/// use mzcore::chem::elements::element;
/// let cl = element("Cl").unwrap();
/// assert_eq!(cl.isotopes.len(), 2);
/// assert!(element("Xx").is_none());
/// ```
pub fn element(symbol: &str) -> Option<&'static Element> {
    ELEMENTS.iter().find(|e| e.symbol == symbol)
}

/// Mass of isotope `a` of element `symbol` in u; `None` if the table does not list it.
pub fn isotope_mass(symbol: &str, a: u16) -> Option<f64> {
    element(symbol)?.isotope(a).map(|i| i.mass)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn abundances_sum_to_one() {
        // IUPAC representative compositions sum to 1 within rounding of the last digit.
        for e in ELEMENTS {
            let s: f64 = e.isotopes.iter().map(|i| i.abundance).sum();
            assert!((s - 1.0).abs() < 2e-4, "{} sums to {s}", e.symbol);
        }
    }

    #[test]
    fn isotopes_are_ordered_and_near_their_mass_number() {
        for e in ELEMENTS {
            for w in e.isotopes.windows(2) {
                assert!(w[0].mass_number < w[1].mass_number, "{}", e.symbol);
            }
            for i in e.isotopes {
                assert!(
                    (i.mass - f64::from(i.mass_number)).abs() < 0.2,
                    "{}{}",
                    i.mass_number,
                    e.symbol
                );
            }
        }
    }

    #[test]
    fn design_note_values_from_memory_hold() {
        // Values quoted in DESIGN.md ("from memory"): 35Cl 34.968853 (75.76 %), 81Br 80.916290.
        let cl = element("Cl").unwrap();
        assert!((cl.isotopes[0].mass - 34.968853).abs() < 1e-6);
        assert_eq!(cl.isotopes[0].abundance, 0.7576);
        assert!((element("Br").unwrap().isotopes[1].mass - 80.916290).abs() < 1e-6);
    }
}
