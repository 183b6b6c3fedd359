//! Chemistry: elements and isotopes, formulas, ion types, isotope patterns and the halogen
//! cluster model that the flagging stage scores against.
//!
//! - [`elements`]: the isotope table (AME2020 masses, IUPAC/CIAAW 2013 abundances) and the
//!   electron and proton masses (CODATA 2018).
//! - [`formula`]: [`Formula`] parsing (any order, Hill, parentheses, `[13C]` isotopes),
//!   monoisotopic / average / nominal mass and the nitrogen rule.
//! - [`ion`]: [`IonType`] (`[M+H]+` or `M+H`, ...) and ion m/z with electron masses.
//! - [`isotopes`]: exact fine structure, aggregation to a resolving power, nominal shells.
//! - [`formula_search`]: formula candidates for a neutral mass with fixed Cl/Br counts,
//!   filtered by heuristic rules and ranked by mass error and isotope-pattern fit.
//! - [`halogen`]: the precomputed Cl_n Br_m cluster model with its background spread, and the
//!   M+2 spacings that tell halogens from S, Si, O and 13C2.
//!
//! # Examples
//!
//! ```
//! use mzcore::chem::{Formula, IonType, halogen, isotopes::{self, Resolution}};
//! let diclofenac = Formula::parse("C14H11Cl2NO2")?;
//! let ion = IonType::parse("[M+H]+")?;
//! let mz = ion.mz(&diclofenac)?;
//! assert!((mz - 296.02396).abs() < 1e-4);
//! // Odd nitrogen count: odd nominal mass, even nominal m/z for the protonated ion.
//! assert!(diclofenac.nitrogen_rule().consistent());
//! assert_eq!(ion.nominal_mass(&diclofenac)? % 2, 0);
//! // Shells of the ion, and what the cluster model expects for two chlorines there.
//! let shells = isotopes::pattern(&diclofenac, Some(&ion), Resolution::Shells, 1e-4)?;
//! let model = halogen::expected(mz, 1, 2, 0).unwrap();
//! let observed_m2 = shells[2].abundance as f32;
//! assert!((observed_m2 - model.shells[2]).abs() <= model.spread[2] + 0.005);
//! # Ok::<_, mzcore::Error>(())
//! ```

pub mod elements;
pub mod formula;
pub mod formula_search;
pub mod halogen;
pub mod ion;
pub mod isotopes;

pub use elements::{ELECTRON_MASS, PROTON_MASS};
pub use formula::{Formula, NitrogenRule, Parity};
pub use ion::IonType;
