//! Gap filling: the intensity of an aligned compound in a file where it was not detected,
//! extracted from that file's MS1 spectra at the compound's ion m/z inside its
//! retention-time window.
//!
//! One streaming pass per file serves all of its targets: only spectra inside some target's
//! window are decoded and centroided (with the run's own peak-picking settings), so a filled
//! value is what the first pass would have seen below its detection thresholds.

use std::path::Path;

use crate::error::Result;
use crate::mzml::Reader;
use crate::pipeline::{PipelineSettings, process_spectrum};
use crate::screen::ScreenConfig;
use crate::spectrum::Polarity;

/// One compound to look for in one file.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct FillTarget {
    /// Ion m/z (monoisotopic peak of the molecular ion).
    pub mz: f64,
    /// Half-width of the m/z window, Th.
    pub tolerance: f64,
    /// Spectra of this polarity only ([`Polarity::Unknown`]: any; spectra that do not state
    /// their polarity are always taken).
    pub polarity: Polarity,
    /// Window start, in the file's own minutes.
    pub rt_from_min: f64,
    /// Window end, in the file's own minutes.
    pub rt_to_min: f64,
    /// Expected apex, in the file's own minutes.
    pub rt_apex_min: f64,
    /// How far from the expected apex the trace maximum may lie, minutes.
    pub apex_tolerance_min: f64,
    /// Least scans with signal for a peak to count as found.
    pub min_scans: usize,
    /// Scans without signal bridged inside a peak (a centroid list that lost the ion in a
    /// scan or two); the area is interpolated across them.
    pub max_gap: usize,
}

/// What was found for one target.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum FillResult {
    /// A peak: the run of consecutive scans with signal around the trace maximum.
    Found {
        /// Trapezoid area over the run, intensity x minutes.
        area: f64,
        /// Largest intensity.
        apex_intensity: f64,
        /// Retention time of the largest intensity, file minutes.
        rt_min: f64,
        /// m/z of the centroid at the apex.
        mz: f64,
        /// Scans in the run.
        scans: usize,
    },
    /// No peak in the window: nothing, or too few consecutive scans, or a maximum too far
    /// from the expected apex.
    Absent,
}

#[derive(Clone, Copy)]
struct Point {
    rt: f64,
    intensity: f64,
    mz: f64,
}

/// Reads the file at `path` once and returns one result per target, in order.
///
/// Spectra that cannot be read are skipped (their scans count as without signal); an input
/// that cannot be opened or is not mzML is an `Err`.
pub fn fill_from_file(
    path: &Path,
    targets: &[FillTarget],
    config: &ScreenConfig,
) -> Result<Vec<FillResult>> {
    if targets.is_empty() {
        return Ok(Vec::new());
    }
    let options = config.reader.options().verify_checksum(false);
    let reader = Reader::from_path_with(path, options)?;
    let settings = PipelineSettings { centroid: config.centroid, ..config.pipeline.clone() };
    // Targets by window start, with the longest window, to find the open ones quickly.
    let mut by_start: Vec<usize> = (0..targets.len()).collect();
    by_start.sort_by(|&a, &b| targets[a].rt_from_min.total_cmp(&targets[b].rt_from_min));
    let longest = targets.iter().map(|t| t.rt_to_min - t.rt_from_min).fold(0.0, f64::max);
    let mut traces: Vec<Vec<Point>> = vec![Vec::new(); targets.len()];
    for spectrum in reader {
        let Ok(spectrum) = spectrum else { continue };
        let meta = &spectrum.meta;
        let Some(rt) = meta.rt_min else { continue };
        if meta.ms_level > 1 {
            continue;
        }
        let lo = by_start.partition_point(|&t| targets[t].rt_from_min < rt - longest);
        let hi = by_start.partition_point(|&t| targets[t].rt_from_min <= rt);
        let open: Vec<usize> = by_start[lo..hi]
            .iter()
            .copied()
            .filter(|&t| {
                let tg = &targets[t];
                rt <= tg.rt_to_min
                    && (tg.polarity == Polarity::Unknown
                        || meta.polarity == Polarity::Unknown
                        || meta.polarity == tg.polarity)
            })
            .collect();
        if open.is_empty() {
            continue;
        }
        let Ok(done) = process_spectrum(&spectrum, &settings) else { continue };
        let c = &done.centroids;
        for t in open {
            let tg = &targets[t];
            let start = c.partition_point(|p| p.mz < tg.mz - tg.tolerance);
            let best = c[start..]
                .iter()
                .take_while(|p| p.mz <= tg.mz + tg.tolerance)
                .max_by(|a, b| a.intensity.total_cmp(&b.intensity));
            traces[t].push(match best {
                Some(p) => Point { rt, intensity: p.intensity, mz: p.mz },
                None => Point { rt, intensity: 0.0, mz: tg.mz },
            });
        }
    }
    Ok(targets.iter().zip(traces).map(|(t, mut trace)| peak_of(t, &mut trace)).collect())
}

/// The peak of a trace: the scans with signal around the largest intensity near the expected
/// apex, bridging gaps of at most `max_gap` scans without signal.
fn peak_of(t: &FillTarget, trace: &mut [Point]) -> FillResult {
    trace.sort_by(|a, b| a.rt.total_cmp(&b.rt));
    let apex = trace
        .iter()
        .enumerate()
        .filter(|(_, p)| p.intensity > 0.0 && (p.rt - t.rt_apex_min).abs() <= t.apex_tolerance_min)
        .max_by(|a, b| a.1.intensity.total_cmp(&b.1.intensity).then(b.0.cmp(&a.0)));
    let Some((k, top)) = apex else { return FillResult::Absent };
    let extend = |mut at: usize, step: isize| {
        let mut gap = 0;
        let mut i = at as isize + step;
        while i >= 0 && (i as usize) < trace.len() {
            if trace[i as usize].intensity > 0.0 {
                at = i as usize;
                gap = 0;
            } else {
                gap += 1;
                if gap > t.max_gap {
                    break;
                }
            }
            i += step;
        }
        at
    };
    let (first, last) = (extend(k, -1), extend(k, 1));
    let run: Vec<&Point> = trace[first..=last].iter().filter(|p| p.intensity > 0.0).collect();
    let scans = run.len();
    if scans < t.min_scans.max(1) {
        return FillResult::Absent;
    }
    let area: f64 =
        run.windows(2).map(|w| 0.5 * (w[0].intensity + w[1].intensity) * (w[1].rt - w[0].rt)).sum();
    FillResult::Found { area, apex_intensity: top.intensity, rt_min: top.rt, mz: top.mz, scans }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn target() -> FillTarget {
        FillTarget {
            mz: 200.0,
            tolerance: 0.001,
            polarity: Polarity::Unknown,
            rt_from_min: 0.0,
            rt_to_min: 10.0,
            rt_apex_min: 5.0,
            apex_tolerance_min: 0.1,
            min_scans: 3,
            max_gap: 1,
        }
    }

    fn trace(values: &[f64]) -> Vec<Point> {
        values
            .iter()
            .enumerate()
            .map(|(i, &v)| Point { rt: 4.8 + i as f64 * 0.05, intensity: v, mz: 200.0 })
            .collect()
    }

    #[test]
    fn a_run_of_signal_near_the_apex_is_found_and_integrated() {
        // Scans at 4.80 .. 5.20; the peak's run is 4.90 .. 5.10.
        let mut t = trace(&[0.0, 0.0, 10.0, 30.0, 50.0, 30.0, 10.0, 0.0, 0.0]);
        match peak_of(&target(), &mut t) {
            FillResult::Found { area, apex_intensity, rt_min, scans, .. } => {
                // Trapezoids of 0.05 min: (10+30)/2 + (30+50)/2 + (50+30)/2 + (30+10)/2 = 120.
                assert!((area - 120.0 * 0.05).abs() < 1e-9, "{area}");
                assert_eq!((apex_intensity, scans), (50.0, 5));
                assert!((rt_min - 5.0).abs() < 1e-9);
            }
            FillResult::Absent => panic!("not found"),
        }
    }

    #[test]
    fn short_gaps_are_bridged() {
        // One scan lost at 5.00: bridged, and the area interpolated across it.
        let mut t = trace(&[0.0, 0.0, 10.0, 30.0, 0.0, 30.0, 10.0, 0.0, 0.0]);
        let FillResult::Found { area, scans, .. } = peak_of(&target(), &mut t) else {
            panic!("not found")
        };
        // (10+30)/2 * 0.05 + (30+30)/2 * 0.10 + (30+10)/2 * 0.05 = 1 + 3 + 1.
        assert!((area - 5.0).abs() < 1e-9 && scans == 4, "{area} {scans}");
        // Two lost scans are not bridged with max_gap 1: the runs either side are too short.
        let mut t = trace(&[0.0, 10.0, 30.0, 0.0, 0.0, 30.0, 10.0, 0.0]);
        assert_eq!(peak_of(&target(), &mut t), FillResult::Absent);
    }

    #[test]
    fn nothing_too_short_or_too_far_is_absent() {
        assert_eq!(peak_of(&target(), &mut trace(&[0.0; 9])), FillResult::Absent);
        assert_eq!(
            peak_of(&target(), &mut trace(&[0.0, 0.0, 0.0, 5.0, 9.0, 0.0])),
            FillResult::Absent
        );
        // A peak at 4.80-4.85: more than 0.1 min before the expected apex.
        assert_eq!(
            peak_of(&target(), &mut trace(&[40.0, 40.0, 0.0, 0.0, 0.0, 0.0, 0.0])),
            FillResult::Absent
        );
    }
}
