//! Isotope patterns: exact fine structure, aggregation to a resolving power, nominal shells.
//!
//! **Fine structure** follows the threshold variant of the IsoSpec algorithm (Łącki, Startek,
//! Valkenborg, Gambin, Anal. Chem. 89, 3272-3277, 2017): the isotopologues of one element form
//! a multinomial distribution; those of the molecule are products of one configuration per
//! element. Every configuration whose probability is at least `threshold` times that of the
//! most probable isotopologue is produced, and no other: per element, configurations are
//! explored outward from the mode over single-atom moves (the set above a probability cut is
//! connected for a multinomial); across elements, a depth-first product over configurations
//! sorted by probability stops as soon as even the best remaining completion falls below the
//! cut.
//!
//! **Nominal shells** (M, M+1, ...) are computed exactly, without enumerating isotopologues, by
//! polynomial convolution of the per-element isotope polynomials raised to the atom count
//! (Kubinyi, Anal. Chim. Acta 247, 107-119, 1991), carrying the probability-weighted mass so
//! each shell gets its abundance-weighted mean mass.
//!
//! **Aggregation to resolving power R** merges mass-sorted fine peaks into one peak while the
//! next fine peak lies closer than `m / R` to the running abundance-weighted centroid `m`.
//!
//! Shell numbers count neutrons relative to the monoisotopic isotopologue (each element at
//! its most abundant isotope), so they can be negative for elements such as boron.
//!
//! # Examples
//!
//! ```
//! use mzcore::chem::{Formula, isotopes};
//! let chloroform = Formula::parse("CHCl3")?;
//! let shells = isotopes::shells(&chloroform, 1e-6)?;
//! let m2 = shells.iter().find(|s| s.shell == 2).unwrap();
//! let m0 = shells.iter().find(|s| s.shell == 0).unwrap();
//! assert!((m2.abundance / m0.abundance - 0.96).abs() < 0.01); // Cl3: about 100:96
//! let fine = isotopes::fine_structure(&chloroform, 1e-6)?;
//! assert!(fine.peaks().len() > shells.len());
//! # Ok::<_, mzcore::Error>(())
//! ```

use std::collections::{HashMap, VecDeque};

use super::elements::{Element, Isotope};
use super::formula::Formula;
use super::ion::IonType;
use crate::{Error, ErrorKind, Result};

/// Most isotopes an element may have for fine-structure enumeration.
const MAX_ISOTOPES: usize = 10;
/// Most nominal shells computed by [`shells`].
pub const MAX_SHELLS: usize = 4096;
/// Most fine peaks [`fine_structure`] will produce before giving up.
pub const MAX_FINE_PEAKS: usize = 20_000_000;

/// One isotopic peak: a mass (or m/z) and its abundance as a fraction of all isotopologues.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Peak {
    /// Mass in u (neutral atoms) or m/z, depending on the producer.
    pub mass: f64,
    /// Probability of this peak among all isotopologues (0..=1).
    pub abundance: f64,
    /// Nominal shell: neutrons relative to the monoisotopic isotopologue.
    pub shell: i32,
}

/// ln(n!) for n up to `n`.
fn ln_factorials(n: usize) -> Vec<f64> {
    let mut t = Vec::with_capacity(n + 1);
    t.push(0.0);
    let mut acc = 0.0;
    for i in 1..=n {
        acc += (i as f64).ln();
        t.push(acc);
    }
    t
}

/// The configurations of one element (isotope counts) above a cut.
#[derive(Debug, Clone)]
struct Marginal {
    element: &'static Element,
    isotopes: &'static [Isotope],
    /// Sorted by probability, highest first.
    probs: Vec<f64>,
    masses: Vec<f64>,
    shells: Vec<i32>,
    counts: Vec<[u32; MAX_ISOTOPES]>,
}

impl Marginal {
    fn new(
        element: &'static Element,
        isotopes: &'static [Isotope],
        n: u32,
        ln_threshold: f64,
        lnf: &[f64],
    ) -> Marginal {
        let k = isotopes.len();
        let lnp: Vec<f64> = isotopes.iter().map(|i| i.abundance.ln()).collect();
        let mono = element.most_abundant().mass_number as i32;
        let lp = |c: &[u32; MAX_ISOTOPES]| -> f64 {
            let mut s = lnf[n as usize];
            for i in 0..k {
                s += f64::from(c[i]) * lnp[i] - lnf[c[i] as usize];
            }
            s
        };
        // Mode: start from the expected counts, then climb over single-atom moves.
        let mut mode = [0u32; MAX_ISOTOPES];
        let mut assigned = 0;
        for i in 0..k {
            mode[i] = (f64::from(n) * isotopes[i].abundance).floor() as u32;
            assigned += mode[i];
        }
        let top = element.most_abundant_index().min(k - 1);
        mode[top] += n - assigned;
        let mut best = lp(&mode);
        loop {
            let mut improved = false;
            for i in 0..k {
                for j in 0..k {
                    if i == j || mode[i] == 0 {
                        continue;
                    }
                    let mut c = mode;
                    c[i] -= 1;
                    c[j] += 1;
                    let l = lp(&c);
                    if l > best + 1e-12 {
                        best = l;
                        mode = c;
                        improved = true;
                    }
                }
            }
            if !improved {
                break;
            }
        }
        let cut = best + ln_threshold;
        let mut seen: HashMap<[u32; MAX_ISOTOPES], ()> = HashMap::new();
        let mut queue = VecDeque::new();
        let mut found: Vec<(f64, [u32; MAX_ISOTOPES])> = Vec::new();
        seen.insert(mode, ());
        queue.push_back(mode);
        while let Some(c) = queue.pop_front() {
            let l = lp(&c);
            found.push((l, c));
            for i in 0..k {
                if c[i] == 0 {
                    continue;
                }
                for j in 0..k {
                    if i == j {
                        continue;
                    }
                    let mut d = c;
                    d[i] -= 1;
                    d[j] += 1;
                    if seen.contains_key(&d) {
                        continue;
                    }
                    seen.insert(d, ());
                    if lp(&d) >= cut {
                        queue.push_back(d);
                    }
                }
            }
        }
        found.sort_by(|a, b| b.0.total_cmp(&a.0));
        let mut m = Marginal {
            element,
            isotopes,
            probs: Vec::with_capacity(found.len()),
            masses: Vec::with_capacity(found.len()),
            shells: Vec::with_capacity(found.len()),
            counts: Vec::with_capacity(found.len()),
        };
        for (l, c) in found {
            m.probs.push(l.exp());
            m.masses.push((0..k).map(|i| f64::from(c[i]) * isotopes[i].mass).sum());
            m.shells.push(
                (0..k).map(|i| c[i] as i32 * (i32::from(isotopes[i].mass_number) - mono)).sum(),
            );
            m.counts.push(c);
        }
        m
    }
}

/// The fine structure of a formula: every isotopologue above a threshold.
#[derive(Debug, Clone)]
pub struct FineStructure {
    peaks: Vec<Peak>,
    marginals: Vec<Marginal>,
    /// Per peak (same order as `peaks`), the configuration index of each marginal.
    rows: Vec<u32>,
    configs: Vec<u16>,
}

impl FineStructure {
    /// The isotopologue peaks (neutral atom masses), sorted by mass.
    pub fn peaks(&self) -> &[Peak] {
        &self.peaks
    }

    /// Sum of the abundances produced (1 minus what the threshold left out).
    pub fn coverage(&self) -> f64 {
        self.peaks.iter().map(|p| p.abundance).sum()
    }

    /// A label for peak `i`: its shell and the heavy (or light) isotopes it carries, e.g.
    /// `M+2 37Cl` or `M+3 13C 37Cl`; `M` for the monoisotopic peak.
    pub fn label(&self, i: usize) -> String {
        let p = &self.peaks[i];
        let mut s = shell_label(p.shell);
        let row = self.rows[i] as usize;
        let nm = self.marginals.len();
        for (j, m) in self.marginals.iter().enumerate() {
            let c = &m.counts[usize::from(self.configs[row * nm + j])];
            let mono = m.element.most_abundant().mass_number;
            for (iso, &n) in m.isotopes.iter().zip(c.iter()) {
                if iso.mass_number != mono && n > 0 {
                    s.push(' ');
                    s.push_str(&format!("{}{}", iso.mass_number, m.element.symbol));
                    if n > 1 {
                        s.push_str(&n.to_string());
                    }
                }
            }
        }
        s
    }
}

/// `M`, `M+1`, `M-1`, ...
pub fn shell_label(shell: i32) -> String {
    match shell {
        0 => "M".to_string(),
        s if s > 0 => format!("M+{s}"),
        s => format!("M{s}"),
    }
}

fn check_threshold(threshold: f64) -> Result<()> {
    if !(threshold > 0.0 && threshold < 1.0) {
        return Err(Error::new(ErrorKind::InvalidValue {
            field: "threshold".into(),
            value: format!("{threshold} (must be between 0 and 1, exclusive)"),
        }));
    }
    Ok(())
}

/// Exact isotopic fine structure of `formula` (neutral atom masses): every isotopologue with
/// probability at least `threshold` (0 < threshold < 1) times that of the most probable one.
///
/// # Examples
///
/// ```
/// use mzcore::chem::{Formula, isotopes};
/// let f = Formula::parse("C2H6O")?;
/// let fine = isotopes::fine_structure(&f, 1e-9)?;
/// // All 13C/2H/17O/18O combinations above 1e-9 of the monoisotopic peak.
/// assert!((fine.coverage() - 1.0).abs() < 1e-8);
/// assert_eq!(fine.label(0), "M");
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn fine_structure(formula: &Formula, threshold: f64) -> Result<FineStructure> {
    check_threshold(threshold)?;
    let ln_thr = threshold.ln();
    let max_n = formula.entries().map(|e| e.count).max().unwrap_or(0) as usize;
    let lnf = ln_factorials(max_n);
    let mut fixed_mass = 0.0;
    let mut marginals = Vec::new();
    for e in formula.entries() {
        let isotopes = e.isotopes();
        if isotopes.len() == 1 {
            fixed_mass += f64::from(e.count) * isotopes[0].mass;
            continue;
        }
        if isotopes.len() > MAX_ISOTOPES {
            return Err(Error::new(ErrorKind::InvalidValue {
                field: "formula".into(),
                value: format!("{} has more than {MAX_ISOTOPES} isotopes", e.element.symbol),
            }));
        }
        marginals.push(Marginal::new(e.element, isotopes, e.count, ln_thr, &lnf));
    }
    // Explicit isotopes count at their own mass number: shell 0 is the monoisotopic mass.
    let fixed_shell = 0;
    // Put the elements with the most configurations first: the inner loops then break early.
    marginals.sort_by_key(|m| std::cmp::Reverse(m.probs.len()));
    let nm = marginals.len();
    // rest_max[i] = product of the modes of marginals i.. (upper bound of any completion).
    let mut rest_max = vec![1.0; nm + 1];
    for i in (0..nm).rev() {
        rest_max[i] = rest_max[i + 1] * marginals[i].probs[0];
    }
    let cut = rest_max[0] * threshold;
    let mut peaks = Vec::new();
    let mut configs: Vec<u16> = Vec::new();
    let mut stack_idx = vec![0u16; nm];
    if nm == 0 {
        peaks.push(Peak { mass: fixed_mass, abundance: 1.0, shell: fixed_shell });
    } else {
        let mut st = Dfs { marginals: &marginals, rest_max: &rest_max, cut, peaks: Vec::new() };
        st.go(0, 1.0, fixed_mass, fixed_shell, &mut stack_idx, &mut configs)?;
        peaks = st.peaks;
    }
    // Sort by mass, keeping the configuration rows attached.
    let mut order: Vec<u32> = (0..peaks.len() as u32).collect();
    order.sort_unstable_by(|&a, &b| peaks[a as usize].mass.total_cmp(&peaks[b as usize].mass));
    let sorted: Vec<Peak> = order.iter().map(|&i| peaks[i as usize]).collect();
    Ok(FineStructure { peaks: sorted, marginals, rows: order, configs })
}

struct Dfs<'a> {
    marginals: &'a [Marginal],
    rest_max: &'a [f64],
    cut: f64,
    peaks: Vec<Peak>,
}

impl Dfs<'_> {
    fn go(
        &mut self,
        depth: usize,
        prob: f64,
        mass: f64,
        shell: i32,
        idx: &mut [u16],
        configs: &mut Vec<u16>,
    ) -> Result<()> {
        let m = &self.marginals[depth];
        let bound = self.rest_max[depth + 1];
        let last = depth + 1 == self.marginals.len();
        for j in 0..m.probs.len() {
            let p = prob * m.probs[j];
            if p * bound < self.cut {
                break;
            }
            idx[depth] = j as u16;
            if last {
                if self.peaks.len() >= MAX_FINE_PEAKS {
                    return Err(Error::new(ErrorKind::LimitExceeded {
                        what: "fine-structure peaks".into(),
                        found: self.peaks.len() as u64,
                        limit: MAX_FINE_PEAKS as u64,
                    }));
                }
                self.peaks.push(Peak {
                    mass: mass + m.masses[j],
                    abundance: p,
                    shell: shell + m.shells[j],
                });
                configs.extend_from_slice(idx);
            } else {
                self.go(depth + 1, p, mass + m.masses[j], shell + m.shells[j], idx, configs)?;
            }
        }
        Ok(())
    }
}

/// Merges mass-sorted peaks closer than `m / resolving_power` into abundance-weighted
/// centroids; a merged peak keeps the shell of its most abundant member.
///
/// # Examples
///
/// ```
/// use mzcore::chem::{Formula, isotopes};
/// let f = Formula::parse("C12H8S")?; // dibenzothiophene
/// let fine = isotopes::fine_structure(&f, 1e-8)?;
/// let low = isotopes::aggregate(fine.peaks(), 1_000.0);
/// let high = isotopes::aggregate(fine.peaks(), 1_000_000.0);
/// assert!(low.len() < high.len());
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn aggregate(peaks: &[Peak], resolving_power: f64) -> Vec<Peak> {
    aggregate_with_members(peaks, resolving_power).into_iter().map(|(p, _)| p).collect()
}

/// As [`aggregate`], also giving the index (into `peaks`) of each merged peak's most abundant
/// member.
pub fn aggregate_with_members(peaks: &[Peak], resolving_power: f64) -> Vec<(Peak, usize)> {
    let mut out: Vec<(Peak, usize)> = Vec::new();
    let mut best = 0.0;
    let mut weighted = 0.0;
    for (i, p) in peaks.iter().enumerate() {
        if let Some((cur, top)) = out.last_mut() {
            if p.mass - cur.mass < cur.mass / resolving_power {
                weighted += p.mass * p.abundance;
                cur.abundance += p.abundance;
                cur.mass = weighted / cur.abundance;
                if p.abundance > best {
                    best = p.abundance;
                    *top = i;
                    cur.shell = p.shell;
                }
                continue;
            }
        }
        out.push((*p, i));
        best = p.abundance;
        weighted = p.mass * p.abundance;
    }
    out
}

/// Probability polynomial with mass moments, indexed by neutrons above a base.
#[derive(Debug, Clone)]
struct Poly {
    p: Vec<f64>,
    mp: Vec<f64>,
}

impl Poly {
    fn one() -> Poly {
        Poly { p: vec![1.0], mp: vec![0.0] }
    }

    fn mul(&self, o: &Poly, max_len: usize) -> Poly {
        let len = (self.p.len() + o.p.len() - 1).min(max_len);
        let mut p = vec![0.0; len];
        let mut mp = vec![0.0; len];
        for i in 0..self.p.len().min(len) {
            let (a, am) = (self.p[i], self.mp[i]);
            if a == 0.0 && am == 0.0 {
                continue;
            }
            for j in 0..o.p.len().min(len - i) {
                p[i + j] += a * o.p[j];
                mp[i + j] += am * o.p[j] + a * o.mp[j];
            }
        }
        Poly { p, mp }
    }

    fn pow(&self, mut n: u32, max_len: usize) -> Poly {
        let mut result = Poly::one();
        let mut base = self.clone();
        while n > 0 {
            if n & 1 == 1 {
                result = result.mul(&base, max_len);
            }
            n >>= 1;
            if n > 0 {
                base = base.mul(&base, max_len);
            }
        }
        result
    }
}

/// Exact nominal shells of `formula` (neutral atom masses): abundance and abundance-weighted
/// mean mass per shell, keeping shells of at least `threshold` times the largest shell.
pub fn shells(formula: &Formula, threshold: f64) -> Result<Vec<Peak>> {
    check_threshold(threshold)?;
    let mut total = Poly::one();
    let mut base_shift: i64 = 0; // shell index of the monoisotopic peak in `total`
    let span: u64 = formula
        .entries()
        .map(|e| {
            let iso = e.isotopes();
            u64::from(e.count) * u64::from(iso[iso.len() - 1].mass_number - iso[0].mass_number)
        })
        .sum();
    let max_len = (span as usize + 1).min(MAX_SHELLS);
    for e in formula.entries() {
        let iso = e.isotopes();
        let lightest = iso[0].mass_number;
        let reference = e.isotope.unwrap_or_else(|| e.element.most_abundant()).mass_number;
        base_shift += i64::from(e.count) * i64::from(reference - lightest);
        let width = usize::from(iso[iso.len() - 1].mass_number - lightest) + 1;
        let mut poly = Poly { p: vec![0.0; width], mp: vec![0.0; width] };
        for i in iso {
            let a = if e.isotope.is_some() { 1.0 } else { i.abundance };
            let k = usize::from(i.mass_number - lightest);
            poly.p[k] = a;
            poly.mp[k] = a * i.mass;
        }
        total = total.mul(&poly.pow(e.count, max_len), max_len);
    }
    let max = total.p.iter().copied().fold(0.0, f64::max);
    Ok(total
        .p
        .iter()
        .zip(&total.mp)
        .enumerate()
        .filter(|&(_, (&p, _))| p > 0.0 && p >= threshold * max)
        .map(|(k, (&p, &mp))| Peak {
            mass: mp / p,
            abundance: p,
            shell: k as i32 - base_shift as i32,
        })
        .collect())
}

/// How to present an isotope pattern.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Resolution {
    /// Every isotopologue.
    Fine,
    /// Fine peaks merged at resolving power R = m / delta m.
    ResolvingPower(f64),
    /// Nominal shells M, M+1, ...
    Shells,
}

/// One row of an ion's isotope pattern.
#[derive(Debug, Clone, PartialEq)]
pub struct PatternPeak {
    /// `M`, `M+1`, ... for shells; for fine or merged peaks the shell and the heavy isotopes
    /// of the (most abundant) isotopologue, e.g. `M+2 37Cl`.
    pub label: String,
    /// m/z (or neutral mass when no ion type is given).
    pub mz: f64,
    /// Abundance as a fraction of all isotopologues.
    pub abundance: f64,
    /// Abundance relative to the most abundant peak listed, which is 100.
    pub relative: f64,
    /// Nominal shell.
    pub shell: i32,
}

/// The isotope pattern of `formula` as ion `ion` (or as the neutral molecule when `None`),
/// keeping peaks of at least `threshold` times the most abundant one.
///
/// For [`Resolution::ResolvingPower`] the fine structure is computed 100 times deeper than
/// `threshold` before merging, so merged abundances include the small peaks they absorb.
///
/// # Examples
///
/// ```
/// use mzcore::chem::{Formula, IonType, isotopes::{self, Resolution}};
/// let f = Formula::parse("C12H7Cl3O2")?; // triclosan
/// let ion = IonType::parse("M-H")?;
/// let p = isotopes::pattern(&f, Some(&ion), Resolution::Shells, 1e-3)?;
/// assert_eq!(p[0].label, "M");
/// assert!((p[0].mz - 286.9439).abs() < 1e-3);
/// assert_eq!(p[0].relative, 100.0);
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn pattern(
    formula: &Formula,
    ion: Option<&IonType>,
    resolution: Resolution,
    threshold: f64,
) -> Result<Vec<PatternPeak>> {
    check_threshold(threshold)?;
    let atoms = match ion {
        Some(i) => i.ion_formula(formula)?,
        None => formula.clone(),
    };
    let to_mz = |m: f64| ion.map_or(m, |i| i.mass_to_mz(m));
    let mut rows: Vec<PatternPeak> = match resolution {
        Resolution::Shells => shells(&atoms, threshold)?
            .into_iter()
            .map(|p| PatternPeak {
                label: shell_label(p.shell),
                mz: to_mz(p.mass),
                abundance: p.abundance,
                relative: 0.0,
                shell: p.shell,
            })
            .collect(),
        Resolution::Fine => {
            let fine = fine_structure(&atoms, threshold)?;
            (0..fine.peaks().len())
                .map(|i| {
                    let p = fine.peaks()[i];
                    PatternPeak {
                        label: fine.label(i),
                        mz: to_mz(p.mass),
                        abundance: p.abundance,
                        relative: 0.0,
                        shell: p.shell,
                    }
                })
                .collect()
        }
        Resolution::ResolvingPower(r) => {
            if !(r > 0.0 && r.is_finite()) {
                return Err(Error::new(ErrorKind::InvalidValue {
                    field: "resolving power".into(),
                    value: r.to_string(),
                }));
            }
            let fine = fine_structure(&atoms, (threshold * 1e-2).max(1e-300))?;
            // Merge on the m/z axis: R refers to m/z.
            let on_mz: Vec<Peak> =
                fine.peaks().iter().map(|p| Peak { mass: to_mz(p.mass), ..*p }).collect();
            aggregate_with_members(&on_mz, r)
                .into_iter()
                .map(|(p, top)| PatternPeak {
                    label: fine.label(top),
                    mz: p.mass,
                    abundance: p.abundance,
                    relative: 0.0,
                    shell: p.shell,
                })
                .collect()
        }
    };
    let max = rows.iter().map(|r| r.abundance).fold(0.0, f64::max);
    rows.retain(|r| r.abundance >= threshold * max);
    for r in &mut rows {
        r.relative = 100.0 * (r.abundance / max);
    }
    Ok(rows)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rel_shells(formula: &str) -> Vec<(i32, f64)> {
        let s = shells(&Formula::parse(formula).unwrap(), 1e-9).unwrap();
        let max = s.iter().map(|p| p.abundance).fold(0.0, f64::max);
        s.iter().map(|p| (p.shell, 100.0 * p.abundance / max)).collect()
    }

    fn even_shells_rounded(formula: &str) -> Vec<i64> {
        rel_shells(formula)
            .iter()
            .filter(|(s, _)| s % 2 == 0)
            .map(|(_, r)| r.round() as i64)
            .collect()
    }

    #[test]
    fn handbook_halogen_clusters() {
        // Rule-of-thumb clusters for pure halogen clusters (common practice, textbook tables).
        assert_eq!(even_shells_rounded("Cl"), vec![100, 32]);
        assert_eq!(even_shells_rounded("Cl2"), vec![100, 64, 10]);
        assert_eq!(even_shells_rounded("Cl3"), vec![100, 96, 31, 3]);
        assert_eq!(even_shells_rounded("Br"), vec![100, 97]);
        assert_eq!(even_shells_rounded("Br2"), vec![51, 100, 49]);
        assert_eq!(even_shells_rounded("ClBr"), vec![77, 100, 24]);
        // And M:M+2 about 3:1 for one Cl, 1:1 for one Br (DESIGN.md, common practice).
        let cl = rel_shells("Cl");
        assert!((cl[0].1 / cl[1].1 - 3.0).abs() < 0.2);
    }

    #[test]
    fn fine_structure_sums_to_shells() {
        for f in ["C14H9Cl5", "C12H6Br4O", "C9H11Cl3NO3PS", "C8H24O4Si4", "B2H6", "C6[2H]5Cl"] {
            let formula = Formula::parse(f).unwrap();
            let fine = fine_structure(&formula, 1e-12).unwrap();
            let sh = shells(&formula, 1e-12).unwrap();
            for s in &sh {
                let (p, mp) = fine
                    .peaks()
                    .iter()
                    .filter(|p| p.shell == s.shell)
                    .fold((0.0, 0.0), |(a, b), p| (a + p.abundance, b + p.abundance * p.mass));
                assert!(
                    (p - s.abundance).abs() < 1e-9,
                    "{f} shell {}: {p} vs {}",
                    s.shell,
                    s.abundance
                );
                if p > 1e-6 {
                    assert!((mp / p - s.mass).abs() < 1e-7, "{f} shell {}", s.shell);
                }
            }
            assert!((fine.coverage() - 1.0).abs() < 1e-9, "{f}");
        }
    }

    #[test]
    fn threshold_is_exact() {
        // Compare against brute-force enumeration for a small molecule.
        let f = Formula::parse("C3H3Cl2O2S").unwrap();
        let all = fine_structure(&f, 1e-300).unwrap();
        let max = all.peaks().iter().map(|p| p.abundance).fold(0.0, f64::max);
        for thr in [1e-2, 1e-4, 1e-6] {
            let want = all.peaks().iter().filter(|p| p.abundance >= thr * max).count();
            let got = fine_structure(&f, thr).unwrap();
            assert_eq!(got.peaks().len(), want, "threshold {thr}");
            assert!(got.peaks().iter().all(|p| p.abundance >= thr * max * (1.0 - 1e-12)));
        }
    }

    #[test]
    fn labels_name_heavy_isotopes() {
        let f = Formula::parse("CHCl3").unwrap();
        let fine = fine_structure(&f, 1e-6).unwrap();
        let labels: Vec<String> = (0..fine.peaks().len()).map(|i| fine.label(i)).collect();
        assert!(labels.contains(&"M".to_string()));
        assert!(labels.contains(&"M+2 37Cl".to_string()));
        assert!(labels.contains(&"M+1 13C".to_string()));
        assert!(labels.contains(&"M+4 37Cl2".to_string()));
    }

    #[test]
    fn boron_has_a_lighter_shell() {
        let s = shells(&Formula::parse("B").unwrap(), 1e-6).unwrap();
        assert_eq!(s.iter().map(|p| p.shell).collect::<Vec<_>>(), vec![-1, 0]);
        assert_eq!(shell_label(-1), "M-1");
    }

    #[test]
    fn aggregation_at_low_resolution_gives_shells() {
        let f = Formula::parse("C14H9Cl5").unwrap();
        let fine = fine_structure(&f, 1e-12).unwrap();
        let merged = aggregate(fine.peaks(), 1000.0);
        let sh = shells(&f, 1e-12).unwrap();
        let big: Vec<&Peak> = merged.iter().filter(|p| p.abundance > 1e-6).collect();
        for p in big {
            let s = sh.iter().find(|s| s.shell == p.shell).unwrap();
            assert!((p.abundance - s.abundance).abs() < 1e-9);
        }
    }

    #[test]
    fn pattern_rejects_bad_parameters() {
        let f = Formula::parse("CH4").unwrap();
        assert!(pattern(&f, None, Resolution::Shells, 0.0).is_err());
        assert!(pattern(&f, None, Resolution::Shells, 1.5).is_err());
        assert!(pattern(&f, None, Resolution::ResolvingPower(-5.0), 1e-3).is_err());
    }
}
