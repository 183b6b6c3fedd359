//! The parallel streaming driver: read on one thread, decode and centroid on rayon workers,
//! hand results back in file order with a bounded number of spectra in flight.
//!
//! The calling thread tokenizes the XML ([`Reader`]) and collects results; each spectrum is
//! decoded and centroided on a worker of the given [`rayon::ThreadPool`]. At most
//! [`PipelineSettings::in_flight`] spectra are alive at once, so peak memory depends on that
//! setting and the largest spectrum, never on the file size. Results are delivered to the sink
//! in file order, so the output is the same for any number of threads.

use std::cell::RefCell;
use std::collections::BTreeMap;
use std::io::BufRead;
use std::sync::mpsc;

use serde::{Deserialize, Serialize};

use crate::centroid::{CentroidParams, Centroider, ResolutionClass, estimate_resolution};
use crate::error::Result;
use crate::mzml::Reader;
use crate::spectrum::{Peaks, Representation, Spectrum, SpectrumMeta};

/// How to decide between unit and high resolution for a spectrum.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ResolutionSetting {
    /// Estimate from each spectrum's own peaks (widths, or spacings for centroided data).
    #[default]
    Auto,
    /// Treat every spectrum as unit resolution.
    Unit,
    /// Treat every spectrum as high resolution.
    High,
}

/// Settings of the per-spectrum work.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct PipelineSettings {
    /// Spectra alive at once (read, being processed, or waiting to be delivered in order).
    pub in_flight: usize,
    /// Unit or high resolution, or estimated.
    pub resolution: ResolutionSetting,
    /// Peak picking.
    #[serde(skip)]
    pub centroid: CentroidParams,
}

impl Default for PipelineSettings {
    fn default() -> Self {
        PipelineSettings {
            in_flight: 64,
            resolution: ResolutionSetting::Auto,
            centroid: CentroidParams::default(),
        }
    }
}

/// Summary of a spectrum's decoded points (before peak picking).
#[derive(Debug, Clone, Copy, Default, PartialEq, Serialize)]
pub struct PointStats {
    /// Number of decoded points.
    pub points: usize,
    /// Sum of decoded intensities.
    pub intensity_sum: f64,
    /// Smallest m/z.
    pub mz_min: Option<f64>,
    /// Largest m/z.
    pub mz_max: Option<f64>,
    /// m/z of the most intense point.
    pub base_peak_mz: Option<f64>,
    /// Intensity of the most intense point.
    pub base_peak_intensity: Option<f64>,
}

impl PointStats {
    /// Computes the summary of `peaks`.
    pub fn of(peaks: &Peaks) -> Self {
        let mut s = PointStats { points: peaks.len(), ..Default::default() };
        let mut best: Option<(f64, f64)> = None;
        for (&m, &i) in peaks.mz.iter().zip(&peaks.intensity) {
            s.intensity_sum += i;
            s.mz_min = Some(s.mz_min.map_or(m, |v| v.min(m)));
            s.mz_max = Some(s.mz_max.map_or(m, |v| v.max(m)));
            if best.is_none_or(|(_, bi)| i > bi) {
                best = Some((m, i));
            }
        }
        s.base_peak_mz = best.map(|b| b.0);
        s.base_peak_intensity = best.map(|b| b.1);
        s
    }
}

/// One spectrum after decoding and peak picking.
#[derive(Debug, Clone, PartialEq)]
pub struct ProcessedSpectrum {
    /// Metadata as read.
    pub meta: SpectrumMeta,
    /// Summary of the decoded points.
    pub stats: PointStats,
    /// Peaks (centroids of profile data, or thresholded centroided data).
    pub centroids: Vec<crate::centroid::Centroid>,
    /// How the data was treated (profile or centroid), after looking at it when unstated.
    pub treated_as: Representation,
    /// Resolution class used for this spectrum.
    pub resolution: ResolutionClass,
}

thread_local! {
    static WORK: RefCell<(Centroider, Peaks)> = RefCell::new((Centroider::new(), Peaks::default()));
}

/// Decodes and centroids one spectrum (what a worker does). Pure: the result depends only on
/// the spectrum and the settings.
///
/// # Examples
///
/// ```
/// use mzcore::mzml::{Reader, Writer, WriterOptions};
/// use mzcore::pipeline::{process_spectrum, PipelineSettings};
/// use mzcore::spectrum::{Peaks, Representation, SpectrumMeta};
///
/// let mut w = Writer::new(Vec::new(), WriterOptions::default())?;
/// let meta = SpectrumMeta {
///     id: "scan=1".into(), ms_level: 1, representation: Representation::Centroid,
///     ..Default::default()
/// };
/// let mz: Vec<f64> = (0..50).map(|i| 100.0 + i as f64).collect();
/// let mut intensity: Vec<f64> = (0..50).map(|i| 10.0 + (i % 5) as f64).collect();
/// intensity[20] = 5000.0;
/// w.write_spectrum(&meta, &Peaks { mz, intensity })?;
/// let doc = w.finish()?;
///
/// let spectrum = Reader::new(&doc[..])?.next().unwrap()?;
/// let done = process_spectrum(&spectrum, &PipelineSettings::default())?;
/// assert_eq!(done.stats.points, 50);
/// assert!(done.centroids.iter().any(|c| c.mz == 120.0));
/// # Ok::<_, mzcore::Error>(())
/// ```
pub fn process_spectrum(
    spectrum: &Spectrum,
    settings: &PipelineSettings,
) -> Result<ProcessedSpectrum> {
    WORK.with(|cell| {
        let mut work = cell.borrow_mut();
        let (centroider, peaks) = &mut *work;
        spectrum.decode_into(peaks)?;
        let mut out = ProcessedSpectrum {
            meta: spectrum.meta.clone(),
            stats: PointStats::of(peaks),
            centroids: Vec::new(),
            treated_as: Representation::Unknown,
            resolution: ResolutionClass::Unknown,
        };
        out.treated_as = centroider.pick(
            peaks,
            spectrum.meta.representation,
            &settings.centroid,
            &mut out.centroids,
        );
        if out.treated_as == Representation::Centroid {
            stored_snr_peaks(spectrum, peaks, &settings.centroid, &mut out.centroids)?;
        }
        out.resolution = match settings.resolution {
            ResolutionSetting::Unit => ResolutionClass::Unit,
            ResolutionSetting::High => ResolutionClass::High,
            ResolutionSetting::Auto => estimate_resolution(&out.centroids).class,
        };
        Ok(out)
    })
}

/// A centroid list that carries its peaks' S/N (MS:1000517 signal to noise array, as the
/// centroided files of [`crate::mzml::CentroidedWriter`] do) keeps the peaks whose stored S/N
/// reaches `centroided_min_snr` (default 1: every picked peak, since an interpolated apex may
/// sit a little below the `min_snr` its highest point passed), with that S/N, instead of re-estimating the noise from the list (which,
/// for a list of picked peaks only, measures S/N against the weakest peaks). Without the
/// array, or with one of another length, `centroids` stays as thresholded.
fn stored_snr_peaks(
    spectrum: &Spectrum,
    peaks: &Peaks,
    params: &CentroidParams,
    centroids: &mut Vec<crate::centroid::Centroid>,
) -> Result<()> {
    let Some(array) = spectrum.array(crate::spectrum::ArrayKind::SignalToNoise) else {
        return Ok(());
    };
    let mut snr = Vec::new();
    array.decode_into(&mut snr).map_err(|e| {
        e.in_field("signal to noise array").in_spectrum(spectrum.meta.index, &spectrum.meta.id)
    })?;
    if snr.len() != peaks.len() {
        return Ok(());
    }
    // MS:1002529 resolution array: m/z over FWHM, giving the peaks their widths back.
    let mut resolution = Vec::new();
    if let Some(r) = spectrum.array(crate::spectrum::ArrayKind::Resolution) {
        r.decode_into(&mut resolution).map_err(|e| {
            e.in_field("resolution array").in_spectrum(spectrum.meta.index, &spectrum.meta.id)
        })?;
    }
    if resolution.len() != peaks.len() {
        resolution.clear();
    }
    centroids.clear();
    for (i, ((&mz, &y), &s)) in peaks.mz.iter().zip(&peaks.intensity).zip(&snr).enumerate() {
        if s >= params.centroided_min_snr && y > 0.0 && y.is_finite() && mz.is_finite() {
            let r = resolution.get(i).copied().unwrap_or(0.0);
            let fwhm = if r > 0.0 && r.is_finite() { mz / r } else { 0.0 };
            centroids.push(crate::centroid::Centroid { mz, intensity: y, area: y, snr: s, fwhm });
        }
    }
    Ok(())
}

/// Streams every spectrum of `reader` through [`process_spectrum`] on `pool` and calls `sink`
/// with each result in file order (a read or decode error is an `Err` for that spectrum; the
/// rest go on). Returns the first error of `sink` itself, which stops the run.
///
/// `extra` runs on the worker after peak picking (e.g. flagging) and may add to the result.
pub fn run<R, X, T, F>(
    reader: &mut Reader<R>,
    pool: &rayon::ThreadPool,
    settings: &PipelineSettings,
    extra: X,
    sink: F,
) -> Result<()>
where
    R: BufRead,
    X: Fn(&ProcessedSpectrum) -> T + Send + Sync + Clone + 'static,
    T: Send + 'static,
    F: FnMut(Result<(ProcessedSpectrum, T)>) -> Result<()>,
{
    run_with_source(reader, pool, settings, move |_, p| extra(p), sink)
}

/// [`run`] whose `extra` also sees the spectrum as read (its still-encoded arrays), e.g. to
/// pass stored arrays through into a derived file.
pub fn run_with_source<R, X, T, F>(
    reader: &mut Reader<R>,
    pool: &rayon::ThreadPool,
    settings: &PipelineSettings,
    extra: X,
    mut sink: F,
) -> Result<()>
where
    R: BufRead,
    X: Fn(&Spectrum, &ProcessedSpectrum) -> T + Send + Sync + Clone + 'static,
    T: Send + 'static,
    F: FnMut(Result<(ProcessedSpectrum, T)>) -> Result<()>,
{
    type Done<T> = (u64, Result<(ProcessedSpectrum, T)>, Spectrum);
    let (tx, rx) = mpsc::channel::<Done<T>>();
    let limit = settings.in_flight.max(1);
    let shared = std::sync::Arc::new(settings.clone());
    let mut waiting: BTreeMap<u64, Result<(ProcessedSpectrum, T)>> = BTreeMap::new();
    let mut spare: Vec<Spectrum> = Vec::new();
    let (mut next_seq, mut next_out, mut alive) = (0u64, 0u64, 0usize);
    let mut reading = true;
    loop {
        // Deliver everything that is ready, in order.
        while let Some(item) = waiting.remove(&next_out) {
            next_out += 1;
            alive -= 1;
            sink(item)?;
        }
        if !reading && alive == 0 {
            return Ok(());
        }
        if reading && alive < limit {
            let mut s = spare.pop().unwrap_or_default();
            match reader.read_spectrum(&mut s) {
                Ok(true) => {
                    let (tx, settings, extra, seq) =
                        (tx.clone(), shared.clone(), extra.clone(), next_seq);
                    pool.spawn(move || {
                        let r = process_spectrum(&s, &settings).map(|p| {
                            let t = extra(&s, &p);
                            (p, t)
                        });
                        // The receiver outlives every worker unless the run was abandoned.
                        let _ = tx.send((seq, r, s));
                    });
                }
                Ok(false) => {
                    reading = false;
                    continue;
                }
                Err(e) => {
                    waiting.insert(next_seq, Err(e));
                    spare.push(s);
                }
            }
            next_seq += 1;
            alive += 1;
            // Collect whatever finished meanwhile without blocking.
            while let Ok((seq, r, s)) = rx.try_recv() {
                waiting.insert(seq, r);
                spare.push(s);
            }
            continue;
        }
        // Either the window is full or reading is over: wait for a worker.
        let (seq, r, s) = rx.recv().expect("a worker holds a sender while spectra are in flight");
        waiting.insert(seq, r);
        spare.push(s);
    }
}

/// The worker pool type ([`rayon::ThreadPool`]), for callers that do not depend on rayon.
pub use rayon::ThreadPool;

/// A rayon pool with `threads` workers (0: one per available core).
pub fn thread_pool(threads: usize) -> Result<rayon::ThreadPool> {
    rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .thread_name(|i| format!("mzsift-worker-{i}"))
        .build()
        .map_err(|e| crate::Error::new(crate::ErrorKind::Config(format!("thread pool: {e}"))))
}
