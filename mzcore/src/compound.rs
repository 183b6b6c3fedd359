//! Compounds: the features of one file that belong to one molecule, grouped by co-elution,
//! with the molecular ion chosen and the neutral's chemistry worked out.
//!
//! One [`Compound`] is one row of `compounds.tsv`. The grouping stage that fills these rows is
//! being built (see the issue on compounds); this module fixes the row so that the batch view
//! and the report can be written against it.

use serde::{Deserialize, Serialize};

use crate::flag::OddNominal;

/// One compound of a file: a group of co-eluting features (adducts, isotopologue-bearing
/// ions, in-source or EI fragments) explained by one neutral molecule.
///
/// Columns of `compounds.tsv`, in this order. Masses in u, m/z in Th, times in minutes,
/// intensities in the file's own units.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct Compound {
    /// Compound number in the file (1-based, by apex retention time, then mass).
    pub compound: usize,
    /// Retention time of the molecular ion's apex scan, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_apex_min: f64,
    /// First retention time of any member, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_start_min: f64,
    /// Last retention time of any member, minutes.
    #[serde(serialize_with = "crate::report::digits::minutes")]
    pub rt_end_min: f64,
    /// Scan polarity of the members: `+`, `-`, or empty when the file does not say.
    pub polarity: String,
    /// Ionization of the acquisition (`electron`, `electrospray`, ... as in the spectra).
    pub ionization: String,
    /// Resolution class of the molecular ion's scans: `unit`, `high` or `unknown`.
    pub resolution: String,
    /// Neutral monoisotopic mass of the molecule, u; empty when the ion type is unknown.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub neutral_mass: Option<f64>,
    /// Neutral nominal mass (mass defect of the assigned Cl/Br corrected before rounding).
    pub nominal_mass: Option<i64>,
    /// Nitrogen rule on the neutral: `true` odd, `false` even, `undecided`.
    pub odd_nominal: OddNominal,
    /// Chlorine atoms of the neutral (an adduct's own Cl not counted).
    pub n_cl: u8,
    /// Bromine atoms of the neutral.
    pub n_br: u8,
    /// True when the neutral carries Cl or Br with enough evidence.
    pub halogen: bool,
    /// Calibrated probability that the neutral carries at least one Cl or Br.
    #[serde(serialize_with = "crate::report::digits::probability")]
    pub halogen_probability: f64,
    /// m/z of the molecular ion's monoisotopic peak.
    #[serde(serialize_with = "crate::report::digits::mz")]
    pub molecular_ion_mz: f64,
    /// Ion type of the molecular ion (`M+.`, `[M+H]+`, `[M-H]-`, ...).
    pub ion_type: String,
    /// Charge number of the molecular ion (signed).
    pub charge: i32,
    /// Apex intensity of the molecular ion's monoisotopic peak.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub apex_intensity: f64,
    /// Trapezoid area of the molecular ion's monoisotopic trace, intensity x minutes.
    #[serde(serialize_with = "crate::report::digits::intensity")]
    pub area: f64,
    /// The members: feature ids with their role, e.g. `4:[M+H]+;9:[M+Na]+;11:-HCl`.
    pub members: String,
    /// Short words behind the calls, `;`-separated.
    pub evidence: String,
}
