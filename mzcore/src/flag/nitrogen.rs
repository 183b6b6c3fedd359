//! The nitrogen rule: ion type, molecular-ion candidate, neutral nominal mass and parity.
//!
//! # Ion type
//!
//! [`FlagSettings::ion_type`] wins when set. Otherwise (common practice): electron
//! ionization gives the radical cation M+. (M-. for a negative scan); electrospray, APCI,
//! APPI, chemical ionization and MALDI give [M+H]+ in positive and [M-H]- in negative scans.
//! Without a known polarity for those, or with an unknown ionization, the ion type is
//! unknown and parity is undecided. When the cluster's charge z differs from the ion type's,
//! protonation types become [M+zH]z+ / [M-zH]z-; other ion types leave parity undecided.
//!
//! # Molecular-ion candidate
//!
//! In EI spectra (MS1 only) the candidate is chosen by this rule (ours, after the trade's
//! habit of reading the high-mass end of the spectrum):
//!
//! 1. consider the clusters found in the spectrum (isotope peaks are part of a cluster, never
//!    clusters of their own);
//! 2. take the highest-m/z cluster whose most intense peak reaches
//!    [`FlagSettings::ei_min_relative`] of the base peak;
//! 3. if a higher cluster (below that threshold but with a monoisotopic S/N of at least
//!    [`FlagSettings::min_snr`]) lies a common neutral loss above it ([`COMMON_LOSSES`],
//!    nominal masses, within 0.5 u), the candidate is that loss's fragment and the higher
//!    cluster becomes the candidate; repeat until no such cluster is left.
//!
//! At high resolution only clusters with a plausible mass defect take part
//! ([`defect_plausible`]: a lone peak at m/z 142.56 is no molecular ion of an organic
//! compound).
//!
//! Other clusters of an EI spectrum are treated as fragments (parity undecided). For other
//! ionizations every flagged ion is taken as a (pseudo)molecular ion, and the spectrum's
//! candidate is its most intense cluster.
//!
//! # Nominal mass
//!
//! The neutral monoisotopic mass M follows from the ion's m/z and type. The Cl/Br part of
//! the assignment (n x 34.96885, m x 78.91834) is removed; the remaining C/H/N/O/... part
//! of mass R is given an estimated mass defect of `0.0005 R` (between aromatic, near 0, and
//! saturated CH2 chains, 0.0011 per u), and the nominal mass is
//! `35 n + 79 m + round(R - 0.0005 R)`. DESIGN.md's example C12Br10O (exact 949.18) comes
//! out as 790 + round(159.995 - 0.080) = 950. The call is `undecided` when the value being
//! rounded lies within `0.05 + 0.0004 R + u` of a half-integer, with `u` the m/z uncertainty
//! (the tolerance at high resolution, 0.15 u at unit resolution) times z.

use serde::{Deserialize, Serialize};

use crate::centroid::Centroid;
use crate::chem::IonType;
use crate::chem::elements::isotope_mass;
use crate::spectrum::{Ionization, Polarity, SpectrumMeta};

use super::FlagSettings;
use super::cluster::Cluster;

/// Common neutral losses in EI spectra, nominal u (common practice, from memory): H, CH3,
/// OH, H2O, CO / C2H4, CHO / C2H5, OCH3, Cl, HCl, C3H7 / CH3CO, CO2, Br, HBr.
pub const COMMON_LOSSES: [f64; 14] =
    [1.0, 15.0, 17.0, 18.0, 28.0, 29.0, 31.0, 35.0, 36.0, 43.0, 44.0, 79.0, 80.0, 81.0];

/// Estimated mass defect per u of the non-halogen part of a molecule.
pub const DEFECT_PER_U: f64 = 0.0005;
/// Half-range of that estimate per u.
pub const DEFECT_SPREAD_PER_U: f64 = 0.0004;

/// The nitrogen-rule call.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum OddNominal {
    /// Odd nominal mass: an odd number of nitrogen atoms.
    True,
    /// Even nominal mass: zero or an even number of nitrogen atoms.
    False,
    /// Could not be decided (see the reason).
    #[default]
    Undecided,
}

/// The ion type for a spectrum (see the module docs); `None` when unknown.
pub fn ion_type_for(meta: &SpectrumMeta, settings: &FlagSettings) -> Option<IonType> {
    if let Some(t) = &settings.ion_type {
        return IonType::parse(t).ok();
    }
    let text = match (meta.ionization, meta.polarity) {
        (Ionization::Electron, Polarity::Negative) => "M-.",
        (Ionization::Electron, _) => "M+.",
        (Ionization::Unknown | Ionization::Other, _) => return None,
        (_, Polarity::Positive) => "[M+H]+",
        (_, Polarity::Negative) => "[M-H]-",
        (_, Polarity::Unknown) => return None,
    };
    Some(IonType::parse(text).expect("built-in ion types parse"))
}

/// True for radical ions without adducts (EI).
pub fn is_ei(ion: &Option<IonType>) -> bool {
    ion.as_ref().is_some_and(|t| t.is_radical() && t.adduct_mass() == 0.0)
}

/// Neutral monoisotopic mass from an ion's m/z and charge magnitude, or a reason.
fn neutral_mass(mz: f64, z: u8, ion: &IonType) -> Result<f64, &'static str> {
    let zi = i32::from(z);
    let owned;
    let t = if ion.charge().abs() == zi {
        ion
    } else {
        let sign = ion.charge().signum();
        let plain = IonType::parse(if sign > 0 { "[M+H]+" } else { "[M-H]-" }).expect("parses");
        if *ion != plain {
            return Err("cluster charge differs from the ion type's");
        }
        let text = if sign > 0 { format!("[M+{z}H]{z}+") } else { format!("[M-{z}H]{z}-") };
        owned = IonType::parse(&text).expect("protonation types parse");
        &owned
    };
    // m/z is linear in the neutral mass: mz = a M + b.
    let b = t.mz_from_mass(0.0);
    let a = t.mz_from_mass(1.0) - b;
    Ok((mz - b) / a)
}

/// Neutral nominal mass, the parity call and a reason (see the module docs).
pub fn nominal(
    mz: f64,
    z: u8,
    ion: &Option<IonType>,
    n_cl: u8,
    n_br: u8,
    mz_uncertainty: f64,
) -> (Option<i64>, OddNominal, String) {
    let Some(ion) = ion else {
        return (None, OddNominal::Undecided, "ion type unknown (set ion_type)".into());
    };
    let m = match neutral_mass(mz, z, ion) {
        Ok(m) => m,
        Err(why) => return (None, OddNominal::Undecided, why.into()),
    };
    let cl = isotope_mass("Cl", 35).expect("35Cl");
    let br = isotope_mass("Br", 79).expect("79Br");
    let r = m - f64::from(n_cl) * cl - f64::from(n_br) * br;
    if r < 0.0 {
        return (None, OddNominal::Undecided, "halogen count heavier than the ion".into());
    }
    let (x, margin) = corrected(r, z, mz_uncertainty);
    let rounded = x.round();
    let frac = (x - rounded).abs();
    let nominal = 35 * i64::from(n_cl) + 79 * i64::from(n_br) + rounded as i64;
    if frac > 0.5 - margin {
        return (
            Some(nominal),
            OddNominal::Undecided,
            format!("mass defect too uncertain to round (M {m:.4}, {ion})"),
        );
    }
    let call = if nominal.rem_euclid(2) == 1 { OddNominal::True } else { OddNominal::False };
    let reason = format!(
        "neutral M {m:.4} as {ion}, nominal {nominal} after Cl{n_cl}Br{n_br} defect correction"
    );
    (Some(nominal), call, reason)
}

/// The non-halogen mass with its estimated defect removed, and the rounding margin.
fn corrected(r: f64, z: u8, mz_uncertainty: f64) -> (f64, f64) {
    (r - DEFECT_PER_U * r, 0.05 + DEFECT_SPREAD_PER_U * r + mz_uncertainty * f64::from(z))
}

/// True when the ion's mass defect is plausible for a molecule of C, H, N, O with the
/// assigned Cl/Br and a few S, P or F atoms: after the correction, within the rounding
/// margin plus 0.1 u of an integer (see the module docs).
pub fn defect_plausible(
    mz: f64,
    z: u8,
    ion: &Option<IonType>,
    n_cl: u8,
    n_br: u8,
    mz_uncertainty: f64,
) -> bool {
    let Some(ion) = ion else { return true };
    let Ok(m) = neutral_mass(mz, z, ion) else { return true };
    let cl = isotope_mass("Cl", 35).expect("35Cl");
    let br = isotope_mass("Br", 79).expect("79Br");
    let r = m - f64::from(n_cl) * cl - f64::from(n_br) * br;
    let (x, margin) = corrected(r.max(0.0), z, mz_uncertainty);
    (x - x.round()).abs() <= margin + 0.1
}

/// Index of the spectrum's molecular-ion candidate among `clusters` (see the module docs).
pub fn molecular_candidate(
    centroids: &[Centroid],
    clusters: &[Cluster],
    plausible: &[bool],
    ion: &Option<IonType>,
    settings: &FlagSettings,
) -> Option<usize> {
    if clusters.is_empty() {
        return None;
    }
    if !is_ei(ion) {
        // Most intense cluster; ties to the lower m/z (clusters are in ascending m/z).
        return clusters
            .iter()
            .enumerate()
            .max_by(|a, b| a.1.apex.total_cmp(&b.1.apex).then(b.0.cmp(&a.0)))
            .map(|(i, _)| i);
    }
    let base = centroids.iter().map(|c| c.intensity).fold(0.0, f64::max);
    let threshold = settings.ei_min_relative * base;
    let mass = |c: &Cluster| centroids[c.mono].mz * f64::from(c.charge);
    let mut cand =
        (0..clusters.len()).rev().find(|&i| clusters[i].apex >= threshold && plausible[i])?;
    loop {
        let m = mass(&clusters[cand]);
        let higher = clusters
            .iter()
            .enumerate()
            .skip(cand + 1)
            .filter(|(i, h)| {
                let d = mass(h) - m;
                plausible[*i]
                    && centroids[h.mono].snr >= settings.min_snr
                    && COMMON_LOSSES.iter().any(|&l| (d - l).abs() <= 0.5)
            })
            .map(|(i, _)| i)
            .next_back();
        match higher {
            Some(h) => cand = h,
            None => return Some(cand),
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::chem::Formula;

    #[test]
    fn decabromodiphenyl_ether_defect_is_corrected() {
        // DESIGN.md: C12Br10O exact 949.18, nominal 950 (plain rounding would give 949).
        let f = Formula::parse("C12Br10O").unwrap();
        let ion = IonType::parse("M+.").unwrap();
        let mz = ion.mz(&f).unwrap();
        assert_eq!(mz.round(), 949.0);
        for unc in [0.003, 0.15] {
            let (n, call, why) = nominal(mz, 1, &Some(ion.clone()), 0, 10, unc);
            assert_eq!(n, Some(950), "{why}");
            assert_eq!(call, OddNominal::False);
        }
        // Without the bromine count the rounding is wrong or undecided, never "950".
        let (n, call, _) = nominal(mz, 1, &Some(ion.clone()), 0, 0, 0.003);
        assert!(n != Some(950) || call == OddNominal::Undecided);
    }

    #[test]
    fn protonated_and_doubly_charged_ions() {
        // Atrazine C8H14ClN5, nominal 215 (odd: five N; common practice).
        let f = Formula::parse("C8H14ClN5").unwrap();
        let p = IonType::parse("[M+H]+").unwrap();
        let mz = p.mz(&f).unwrap();
        let (n, call, _) = nominal(mz, 1, &Some(p.clone()), 1, 0, 0.003);
        assert_eq!((n, call), (Some(215), OddNominal::True));
        let p2 = IonType::parse("[M+2H]2+").unwrap();
        let (n, call, _) = nominal(p2.mz(&f).unwrap(), 2, &Some(p.clone()), 1, 0, 0.003);
        assert_eq!((n, call), (Some(215), OddNominal::True));
        let na = IonType::parse("[M+Na]+").unwrap();
        assert_eq!(nominal(300.0, 2, &Some(na), 0, 0, 0.003).1, OddNominal::Undecided);
        assert_eq!(nominal(300.0, 1, &None, 0, 0, 0.003).1, OddNominal::Undecided);
    }
}
