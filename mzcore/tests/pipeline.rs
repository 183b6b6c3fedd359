//! The parallel pipeline gives the same results, in file order, for every thread count and
//! window size, and the same as processing each spectrum alone.

use mzcore::centroid::{CentroidParams, Centroider};
use mzcore::mzml::{Reader, Writer, WriterOptions};
use mzcore::pipeline::{self, PipelineSettings, ProcessedSpectrum, process_spectrum};
use mzcore::spectrum::{Peaks, Representation, SpectrumMeta};

/// A document of `n` profile spectra with Gaussian peaks on a noisy baseline; spectrum
/// `bad` (if any) gets a corrupt base64 array.
fn document(n: usize, bad: Option<usize>) -> Vec<u8> {
    let mut w =
        Writer::new(Vec::new(), WriterOptions { spectrum_count: n, ..Default::default() }).unwrap();
    let mut state = 12345u64;
    let mut noise = move || {
        state = state.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (state >> 11) as f64 / (1u64 << 53) as f64
    };
    for i in 0..n {
        let mz: Vec<f64> = (0..2000).map(|k| 200.0 + k as f64 * 0.002).collect();
        let centre = 201.0 + (i % 7) as f64 * 0.3;
        let intensity = mz
            .iter()
            .map(|m| {
                100.0 + 20.0 * noise() + 5e4 * (-((m - centre) / 0.003f64).powi(2) / 2.0).exp()
            })
            .collect();
        let meta = SpectrumMeta {
            id: format!("scan={}", i + 1),
            ms_level: 1,
            representation: Representation::Profile,
            rt_min: Some(i as f64 * 0.1),
            ..Default::default()
        };
        w.write_spectrum(&meta, &Peaks { mz, intensity }).unwrap();
    }
    let mut doc = String::from_utf8(w.finish().unwrap()).unwrap();
    if let Some(b) = bad {
        let start = doc.match_indices("<spectrum ").nth(b).unwrap().0;
        let at = start + doc[start..].find("<binary>").unwrap() + 8;
        doc.replace_range(at..at + 1, "*");
    }
    doc.into_bytes()
}

/// Runs the pipeline and returns, per spectrum, the result or the error text.
fn run(doc: &[u8], threads: usize, in_flight: usize) -> Vec<Result<ProcessedSpectrum, String>> {
    let pool = pipeline::thread_pool(threads).unwrap();
    let settings = PipelineSettings { in_flight, ..Default::default() };
    let mut reader = Reader::new(doc).unwrap();
    let mut out = Vec::new();
    pipeline::run(
        &mut reader,
        &pool,
        &settings,
        |_| (),
        |r| {
            out.push(r.map(|(p, ())| p).map_err(|e| e.to_string()));
            Ok(())
        },
    )
    .unwrap();
    out
}

#[test]
fn same_results_for_any_thread_count_and_window() {
    let doc = document(40, Some(17));
    let reference = run(&doc, 1, 1);
    assert_eq!(reference.len(), 40);
    for (threads, in_flight) in [(1, 64), (2, 1), (2, 3), (2, 64), (4, 7)] {
        assert_eq!(
            run(&doc, threads, in_flight),
            reference,
            "{threads} threads, {in_flight} in flight"
        );
    }
}

#[test]
fn results_come_in_file_order_and_a_bad_spectrum_stays_in_its_place() {
    let doc = document(25, Some(9));
    let results = run(&doc, 2, 4);
    for (i, r) in results.iter().enumerate() {
        match r {
            Ok(p) => assert_eq!(p.meta.index, i),
            Err(e) => {
                assert_eq!(i, 9);
                assert!(e.contains("spectrum 9 (id 'scan=10')"), "{e}");
            }
        }
    }
    assert_eq!(results.iter().filter(|r| r.is_err()).count(), 1);
}

#[test]
fn pipeline_equals_processing_each_spectrum_alone() {
    let doc = document(12, None);
    let alone: Vec<ProcessedSpectrum> = Reader::new(&doc[..])
        .unwrap()
        .map(|s| process_spectrum(&s.unwrap(), &PipelineSettings::default()).unwrap())
        .collect();
    let piped: Vec<ProcessedSpectrum> = run(&doc, 2, 5).into_iter().map(Result::unwrap).collect();
    assert_eq!(piped, alone);
    // Each spectrum has its one Gaussian peak, found within 0.1 ppm of its true centre.
    for (i, p) in piped.iter().enumerate() {
        let centre = 201.0 + (i % 7) as f64 * 0.3;
        let best = p.centroids.iter().max_by(|a, b| a.intensity.total_cmp(&b.intensity)).unwrap();
        assert!(
            ((best.mz - centre) / centre).abs() < 1e-7,
            "{}: {} vs {centre}",
            p.meta.id,
            best.mz
        );
        assert_eq!(p.stats.points, 2000);
    }
}

#[test]
fn a_clean_centroid_list_keeps_its_small_peaks() {
    // An instrument-made centroid list (no noise entries): every peak is real, so the median is
    // no noise estimate; S/N is measured against the list's floor instead.
    let mz = [63.0, 91.0, 116.96, 151.99, 153.99];
    let y = [120.0, 850.0, 40.0, 310.0, 200.0];
    let (mut picker, mut out) = (Centroider::new(), Vec::new());
    picker.threshold_centroided(&mz, &y, &CentroidParams::default(), &mut out);
    assert_eq!(out.len(), 5);
    assert!(out.iter().all(|c| c.snr >= 1.0));
    // A noise-dominated list is thresholded as before: one real peak among noise.
    let mz: Vec<f64> = (0..100).map(|i| 50.0 + i as f64).collect();
    let mut y: Vec<f64> = (0..100).map(|i| 10.0 + (i % 5) as f64).collect();
    y[40] = 500.0;
    picker.threshold_centroided(&mz, &y, &CentroidParams::default(), &mut out);
    assert_eq!(out.len(), 1);
}
