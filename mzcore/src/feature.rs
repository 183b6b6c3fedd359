//! Features: flagged ions of consecutive MS1 scans grouped into chromatographic features.
//!
//! [`FeatureBuilder::push`] is called with each spectrum's [`SpectrumFlags`] in file order
//! (MSn spectra are skipped; they do not break a feature). An ion joins the open track with
//! the same charge whose intensity-weighted m/z is within the ion's tolerance
//! ([`FlaggedIon::tolerance_da`]) and whose last ion is at most
//! [`FlagSettings::feature_max_gap`] MS1 scans back; each track takes at most one ion per
//! scan (the closest in m/z, then the most intense). Assignments may differ between scans at
//! low S/N, so tracks are matched on m/z and charge and the feature reports the
//! **consensus** assignment (most scans, ties to the larger summed intensity) with its
//! **support** (fraction of the feature's scans that agree). A track not extended for more
//! than `feature_max_gap` scans is closed; tracks with at least
//! [`FlagSettings::feature_min_scans`] scans become [`Feature`]s.
//!
//! Per feature: m/z weighted by intensity, apex RT and intensity, start and end RT, scan
//! count, area (trapezoids of intensity over RT in minutes, 0 for a single scan or missing
//! RTs), halogen score (mean halogen probability of the agreeing scans), nominal mass and
//! parity (majority of the agreeing scans that decided, ties undecided).
//!
//! Everything depends only on the order of `push` calls, never on threads.
//!
//! # Examples
//!
//! ```
//! use mzcore::feature::FeatureBuilder;
//! use mzcore::flag::{FlagSettings, FlaggedIon, SpectrumFlags, SpacingVerdict, OddNominal};
//! use mzcore::spectrum::SpectrumMeta;
//!
//! let settings = FlagSettings::default();
//! let mut fb = FeatureBuilder::new(&settings);
//! for scan in 0..5 {
//!     let meta = SpectrumMeta { index: scan, ms_level: 1, rt_min: Some(scan as f64 * 0.1), ..Default::default() };
//!     let ion = FlaggedIon {
//!         scan, spectrum_id: String::new(), rt_min: meta.rt_min, mz: 288.9439, charge: -1,
//!         intensity: [1.0, 3.0, 5.0, 3.0, 1.0][scan], snr: 50.0, halogen: true,
//!         molecular_candidate: true, assignment: "Cl3Br0".into(), n_cl: 3, n_br: 0, score: 0.99,
//!         halogen_probability: 1.0, second: "Cl2Br1".into(), second_score: 0.01, misfit: 1.0,
//!         m2_ratio: 0.97, m2_expected: 0.98, m4_ratio: 0.31, m4_expected: 0.32,
//!         spacing: SpacingVerdict::Consistent, m2_delta: Some(1.99705), nominal_mass: Some(288),
//!         odd_nominal: OddNominal::False, ion_type: "[M-H]-".into(), tolerance_da: 0.003,
//!         reason: String::new(), cluster: Default::default(),
//!     };
//!     fb.push(&meta, &SpectrumFlags { has_halogen: true, ions: vec![ion], ..Default::default() });
//! }
//! let features = fb.finish();
//! assert_eq!(features.len(), 1);
//! assert_eq!(features[0].scans, 5);
//! assert!((features[0].rt_apex_min - 0.2).abs() < 1e-12);
//! assert!((features[0].area - 1.2).abs() < 1e-9); // trapezoids: 0.1 x (2 + 4 + 4 + 2) / 2
//! ```

use serde::Serialize;

use crate::centroid::ResolutionClass;
use crate::flag::{FlagSettings, FlaggedIon, IonCluster, OddNominal, SpectrumFlags};
use crate::spectrum::SpectrumMeta;

/// One chromatographic feature.
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct Feature {
    /// Feature number in the file (1-based, in order of the first scan, then m/z).
    pub feature: usize,
    /// Intensity-weighted m/z of the monoisotopic peak.
    pub mz: f64,
    /// Charge number.
    pub charge: i32,
    /// Retention time of the most intense scan, minutes.
    pub rt_apex_min: f64,
    /// First retention time, minutes.
    pub rt_start_min: f64,
    /// Last retention time, minutes.
    pub rt_end_min: f64,
    /// Number of scans with an ion.
    pub scans: usize,
    /// Spectrum index of the apex scan.
    pub apex_scan: usize,
    /// Highest monoisotopic intensity.
    pub apex_intensity: f64,
    /// Trapezoid area of monoisotopic intensity over RT (intensity x minutes).
    pub area: f64,
    /// True when the consensus assignment carries Cl or Br and its scans were flagged.
    pub halogen: bool,
    /// Consensus chlorine count.
    pub n_cl: u8,
    /// Consensus bromine count.
    pub n_br: u8,
    /// Consensus assignment label.
    pub assignment: String,
    /// Fraction of the feature's scans that agree with the consensus.
    pub support: f64,
    /// Mean halogen probability of the agreeing scans.
    pub halogen_score: f64,
    /// Consensus neutral nominal mass.
    pub nominal_mass: Option<i64>,
    /// Consensus parity call.
    pub odd_nominal: OddNominal,
    /// True when any scan's ion was the molecular-ion candidate.
    pub molecular_candidate: bool,
    /// The compound the feature belongs to (`compounds.tsv`), 0 before grouping.
    pub compound: usize,
    /// Resolution class of the scans (not a column).
    #[serde(skip)]
    pub resolution: Option<ResolutionClass>,
    /// Ion type used for the nitrogen rule (not a column).
    #[serde(skip)]
    pub ion_type: String,
    /// One point per scan of the feature (not a column).
    #[serde(skip)]
    pub trace: Vec<FeaturePoint>,
    /// The cluster at the most intense agreeing scan (not a column).
    #[serde(skip)]
    pub apex_cluster: IonCluster,
}

/// One scan of a feature: the monoisotopic height and the M+2 and M+4 shell heights.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FeaturePoint {
    /// Position among the file's MS1 scans (0-based).
    pub ms1: usize,
    /// Spectrum index.
    pub scan: usize,
    /// Retention time, minutes.
    pub rt_min: Option<f64>,
    /// Monoisotopic height.
    pub intensity: f64,
    /// M+2 shell height (0 when absent).
    pub m2: f64,
    /// M+4 shell height (0 when absent).
    pub m4: f64,
    /// The scan's posterior probability of Cl/Br.
    pub halogen_probability: f64,
    /// True when the scan's assignment is the feature's consensus.
    pub agrees: bool,
}

#[derive(Debug, Clone)]
struct Track {
    ions: Vec<FlaggedIon>,
    /// MS1 ordinal of each ion.
    ordinals: Vec<usize>,
    resolution: Option<ResolutionClass>,
    /// MS1 ordinal of the last ion.
    last: usize,
    /// Running sums for the weighted m/z.
    wsum: f64,
    wmz: f64,
    tolerance: f64,
    charge: i32,
}

impl Track {
    fn mz(&self) -> f64 {
        if self.wsum > 0.0 { self.wmz / self.wsum } else { self.ions[0].mz }
    }
}

/// Groups flagged ions across scans (see the module docs).
#[derive(Debug, Clone)]
pub struct FeatureBuilder {
    min_scans: usize,
    max_gap: usize,
    ms1: usize,
    open: Vec<Track>,
    done: Vec<Track>,
}

impl FeatureBuilder {
    /// A builder with the feature settings of `settings`.
    pub fn new(settings: &FlagSettings) -> Self {
        FeatureBuilder {
            min_scans: settings.feature_min_scans.max(1),
            max_gap: settings.feature_max_gap,
            ms1: 0,
            open: Vec::new(),
            done: Vec::new(),
        }
    }

    /// Adds one spectrum's flags; call in file order.
    pub fn push(&mut self, meta: &SpectrumMeta, flags: &SpectrumFlags) {
        if meta.ms_level > 1 {
            return;
        }
        let now = self.ms1;
        self.ms1 += 1;
        // Close stale tracks (keep order: they were opened in order).
        let max_gap = self.max_gap;
        let (stale, open): (Vec<Track>, Vec<Track>) =
            std::mem::take(&mut self.open).into_iter().partition(|t| now - t.last > max_gap + 1);
        self.open = open;
        self.done.extend(stale);
        // Match ions to tracks: candidate pairs by m/z distance, greedy, deterministic.
        let mut pairs: Vec<(f64, usize, usize)> = Vec::new();
        for (i, ion) in flags.ions.iter().enumerate() {
            for (t, track) in self.open.iter().enumerate() {
                if track.charge != ion.charge || track.last == now {
                    continue;
                }
                let d = (track.mz() - ion.mz).abs();
                if d <= ion.tolerance_da.max(track.tolerance) {
                    pairs.push((d, i, t));
                }
            }
        }
        pairs.sort_by(|a, b| {
            a.0.total_cmp(&b.0)
                .then(flags.ions[b.1].intensity.total_cmp(&flags.ions[a.1].intensity))
                .then(a.1.cmp(&b.1))
                .then(a.2.cmp(&b.2))
        });
        let mut ion_used = vec![false; flags.ions.len()];
        let mut track_used = vec![false; self.open.len()];
        for (_, i, t) in pairs {
            if ion_used[i] || track_used[t] {
                continue;
            }
            ion_used[i] = true;
            track_used[t] = true;
            let ion = &flags.ions[i];
            let tr = &mut self.open[t];
            tr.wsum += ion.intensity;
            tr.wmz += ion.intensity * ion.mz;
            tr.last = now;
            tr.ions.push(ion.clone());
            tr.ordinals.push(now);
        }
        for (i, ion) in flags.ions.iter().enumerate() {
            if !ion_used[i] {
                self.open.push(Track {
                    ions: vec![ion.clone()],
                    ordinals: vec![now],
                    resolution: flags.resolution,
                    last: now,
                    wsum: ion.intensity,
                    wmz: ion.intensity * ion.mz,
                    tolerance: ion.tolerance_da,
                    charge: ion.charge,
                });
            }
        }
    }

    /// Closes all tracks and returns the features, by first scan then m/z.
    pub fn finish(mut self) -> Vec<Feature> {
        self.done.append(&mut self.open);
        let mut tracks: Vec<Track> =
            self.done.into_iter().filter(|t| t.ions.len() >= self.min_scans).collect();
        tracks.sort_by(|a, b| {
            a.ions[0].scan.cmp(&b.ions[0].scan).then(a.ions[0].mz.total_cmp(&b.ions[0].mz))
        });
        tracks.iter().enumerate().map(|(i, t)| summarize(i + 1, t)).collect()
    }
}

fn summarize(number: usize, t: &Track) -> Feature {
    let ions = &t.ions;
    // Consensus assignment: most scans, then larger summed intensity, then label order.
    let mut votes: Vec<(&str, usize, f64)> = Vec::new();
    for ion in ions {
        match votes.iter_mut().find(|v| v.0 == ion.assignment) {
            Some(v) => {
                v.1 += 1;
                v.2 += ion.intensity;
            }
            None => votes.push((&ion.assignment, 1, ion.intensity)),
        }
    }
    votes.sort_by(|a, b| b.1.cmp(&a.1).then(b.2.total_cmp(&a.2)).then(a.0.cmp(b.0)));
    let label = votes[0].0;
    let agree: Vec<&FlaggedIon> = ions.iter().filter(|i| i.assignment == label).collect();
    let first = agree[0];
    let apex = ions
        .iter()
        .enumerate()
        .max_by(|a, b| a.1.intensity.total_cmp(&b.1.intensity).then(b.0.cmp(&a.0)))
        .map(|(_, i)| i)
        .expect("non-empty");
    let rts: Vec<f64> = ions.iter().filter_map(|i| i.rt_min).collect();
    let area = if rts.len() == ions.len() {
        ions.windows(2)
            .map(|w| {
                let (a, b) = (&w[0], &w[1]);
                (b.rt_min.unwrap() - a.rt_min.unwrap()) * (a.intensity + b.intensity) / 2.0
            })
            .sum()
    } else {
        0.0
    };
    // Nominal mass and parity: majority among agreeing, decided scans.
    let mut nominal_votes: Vec<(i64, OddNominal, usize)> = Vec::new();
    for ion in &agree {
        if let (Some(n), OddNominal::True | OddNominal::False) = (ion.nominal_mass, ion.odd_nominal)
        {
            match nominal_votes.iter_mut().find(|v| v.0 == n) {
                Some(v) => v.2 += 1,
                None => nominal_votes.push((n, ion.odd_nominal, 1)),
            }
        }
    }
    nominal_votes.sort_by(|a, b| b.2.cmp(&a.2).then(a.0.cmp(&b.0)));
    let (nominal_mass, odd_nominal) = match nominal_votes.as_slice() {
        [] => (agree.iter().find_map(|i| i.nominal_mass), OddNominal::Undecided),
        [one] => (Some(one.0), one.1),
        [a, b, ..] if a.2 > b.2 => (Some(a.0), a.1),
        [a, ..] => (Some(a.0), OddNominal::Undecided),
    };
    let halogen_score =
        agree.iter().map(|i| i.halogen_probability).sum::<f64>() / agree.len() as f64;
    let shell = |ion: &FlaggedIon, k: usize| ion.cluster.observed.get(k).copied().unwrap_or(0.0);
    let trace = ions
        .iter()
        .zip(&t.ordinals)
        .map(|(ion, &ms1)| FeaturePoint {
            ms1,
            scan: ion.scan,
            rt_min: ion.rt_min,
            intensity: ion.intensity,
            m2: shell(ion, 2),
            m4: shell(ion, 4),
            halogen_probability: ion.halogen_probability,
            agrees: ion.assignment == label,
        })
        .collect();
    let apex_agree =
        agree.iter().max_by(|a, b| a.intensity.total_cmp(&b.intensity)).expect("non-empty");
    Feature {
        feature: number,
        mz: t.mz(),
        charge: t.charge,
        rt_apex_min: apex.rt_min.unwrap_or(f64::NAN),
        rt_start_min: ions[0].rt_min.unwrap_or(f64::NAN),
        rt_end_min: ions[ions.len() - 1].rt_min.unwrap_or(f64::NAN),
        scans: ions.len(),
        apex_scan: apex.scan,
        apex_intensity: apex.intensity,
        area,
        halogen: (first.n_cl + first.n_br > 0) && agree.iter().any(|i| i.halogen),
        n_cl: first.n_cl,
        n_br: first.n_br,
        assignment: label.to_string(),
        support: agree.len() as f64 / ions.len() as f64,
        halogen_score,
        nominal_mass,
        odd_nominal,
        molecular_candidate: ions.iter().any(|i| i.molecular_candidate),
        compound: 0,
        resolution: t.resolution,
        ion_type: first.ion_type.clone(),
        trace,
        apex_cluster: apex_agree.cluster.clone(),
    }
}
