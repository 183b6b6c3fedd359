//! The centroided copy of an acquisition (`mzml::CentroidedWriter` fed by
//! `screen::screen_file_centroided`), checked against the input it came from: every spectrum
//! read back equals the peaks the pipeline picks from the input (what `mzsift peaks` prints),
//! already centroided spectra are bit-identical, metadata is kept, the SHA-1 checksum and index
//! verify with our reader, and screening the copy again finds the same halogen features.
//! (XSD validity of these files is checked by `.ci/run` with xmllint.)

use std::path::{Path, PathBuf};

use mzcore::mzml::{
    CentroidedEncoding, CentroidedWriter, ChecksumStatus, IndexedReader, Reader, ReaderOptions,
    SourceFile,
};
use mzcore::pipeline::{PipelineSettings, process_spectrum, thread_pool};
use mzcore::screen::{FileReport, ScreenConfig, screen_file, screen_file_centroided};
use mzcore::spectrum::{Representation, Spectrum};

fn demo_files() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("../fixtures/demo");
    let mut v: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|e| e == "mzML"))
        .collect();
    v.sort();
    assert_eq!(v.len(), 6, "the demo batch has six acquisitions");
    v
}

fn write_copy(input: &Path, out: &Path, encoding: CentroidedEncoding) -> FileReport {
    let config = ScreenConfig::default();
    let pool = thread_pool(2).unwrap();
    let mut w = CentroidedWriter::create(out, encoding, config.centroid).unwrap();
    let report = screen_file_centroided(input, &config, &pool, &[], &mut w).unwrap();
    let source = SourceFile {
        name: input.file_name().unwrap().to_string_lossy().into_owned(),
        location: "file:///demo/".into(),
        sha256: Some(report.summary.sha256.clone()),
    };
    let summary = w.finish(&source).unwrap();
    assert_eq!(summary.spectra, report.summary.spectra);
    assert_eq!(summary.bytes, std::fs::metadata(out).unwrap().len());
    report
}

fn read_all(path: &Path) -> (Vec<Spectrum>, ChecksumStatus) {
    let mut r = Reader::with_options(
        std::io::BufReader::new(std::fs::File::open(path).unwrap()),
        ReaderOptions::default().verify_checksum(true),
    )
    .unwrap();
    let spectra: Vec<Spectrum> = (&mut r).map(|s| s.unwrap()).collect();
    (spectra, r.checksum_status().clone())
}

#[test]
fn centroided_copy_holds_the_picked_peaks_and_the_metadata_of_every_spectrum() {
    let dir = tempfile::tempdir().unwrap();
    let settings = PipelineSettings::default();
    let (mut picked_total, mut passed_total) = (0, 0);
    for input in demo_files() {
        let out = dir.path().join("copy.mzML");
        write_copy(&input, &out, CentroidedEncoding::Zlib);
        let (orig, _) = read_all(&input);
        let (copy, checksum) = read_all(&out);
        assert_eq!(checksum, ChecksumStatus::Verified, "{}", input.display());
        assert_eq!(orig.len(), copy.len());
        for (a, b) in orig.iter().zip(&copy) {
            let ctx = format!("{} {}", input.display(), a.meta.id);
            assert_eq!(a.meta.id, b.meta.id, "{ctx}");
            assert_eq!(a.meta.ms_level, b.meta.ms_level, "{ctx}");
            assert_eq!(a.meta.polarity, b.meta.polarity, "{ctx}");
            assert_eq!(a.meta.rt_min, b.meta.rt_min, "{ctx}");
            assert_eq!(a.meta.precursors, b.meta.precursors, "{ctx}");
            assert_eq!(a.meta.ionization, b.meta.ionization, "{ctx}");
            let done = process_spectrum(a, &settings).unwrap();
            let got = b.decode().unwrap();
            if done.treated_as == Representation::Profile {
                picked_total += 1;
                assert_eq!(b.meta.representation, Representation::Centroid, "{ctx}");
                let mz: Vec<f64> = done.centroids.iter().map(|c| c.mz).collect();
                // Intensities are stored as 32-bit floats.
                let it: Vec<f64> =
                    done.centroids.iter().map(|c| c.intensity as f32 as f64).collect();
                assert_eq!(got.mz, mz, "{ctx}");
                assert_eq!(got.intensity, it, "{ctx}");
            } else {
                passed_total += 1;
                assert_eq!(b.meta.representation, a.meta.representation, "{ctx}");
                let want = a.decode().unwrap();
                let bits = |v: &[f64]| v.iter().map(|x| x.to_bits()).collect::<Vec<_>>();
                assert_eq!(bits(&got.mz), bits(&want.mz), "{ctx}");
                assert_eq!(bits(&got.intensity), bits(&want.intensity), "{ctx}");
            }
            // Screening the copy's spectrum keeps the picked peaks with their S/N.
            let again = process_spectrum(b, &settings).unwrap();
            assert_eq!(again.centroids.len(), done.centroids.len(), "{ctx}");
            for (x, y) in again.centroids.iter().zip(&done.centroids) {
                assert_eq!(x.mz, y.mz, "{ctx}");
                assert!((x.snr - y.snr).abs() <= 1e-6 * y.snr.abs(), "{ctx}");
            }
        }
        let mut indexed = IndexedReader::from_path(&out).unwrap();
        let last = copy.last().unwrap();
        assert_eq!(indexed.by_id(&last.meta.id).unwrap().meta.id, last.meta.id);
    }
    assert!(
        picked_total > 100 && passed_total > 100,
        "{picked_total} picked, {passed_total} passed"
    );
}

#[test]
fn screening_the_centroided_copy_finds_the_same_halogen_features() {
    let dir = tempfile::tempdir().unwrap();
    let pool = thread_pool(2).unwrap();
    let mut halogen = 0;
    for input in demo_files() {
        let out = dir.path().join("copy.mzML");
        let first = write_copy(&input, &out, CentroidedEncoding::Zlib);
        let again = screen_file(&out, &ScreenConfig::default(), &pool).unwrap();
        assert_eq!(first.features.len(), again.features.len(), "{}", input.display());
        for (a, b) in first.features.iter().zip(&again.features) {
            let ppm = (a.mz - b.mz).abs() / a.mz * 1e6;
            assert!(ppm <= 0.1, "{}: m/z {} vs {} ({ppm} ppm)", input.display(), a.mz, b.mz);
            assert_eq!((a.n_cl, a.n_br), (b.n_cl, b.n_br), "{} m/z {}", input.display(), a.mz);
            halogen += usize::from(a.n_cl + a.n_br > 0);
        }
    }
    assert!(halogen >= 50, "only {halogen} halogen features compared");
}

#[test]
fn numpress_copy_reads_back_within_the_codec_error() {
    let dir = tempfile::tempdir().unwrap();
    let input = demo_files().into_iter().find(|p| p.to_string_lossy().contains("lc-pos")).unwrap();
    let zlib = dir.path().join("zlib.mzML");
    let numpress = dir.path().join("numpress.mzML");
    write_copy(&input, &zlib, CentroidedEncoding::Zlib);
    write_copy(&input, &numpress, CentroidedEncoding::Numpress);
    let (a, _) = read_all(&zlib);
    let (b, status) = read_all(&numpress);
    assert_eq!(status, ChecksumStatus::Verified);
    let mut compared = 0;
    for (x, y) in a.iter().zip(&b) {
        let (p, q) = (x.decode().unwrap(), y.decode().unwrap());
        assert_eq!(p.len(), q.len());
        if x.meta.representation != Representation::Centroid || p.is_empty() {
            continue;
        }
        for i in 0..p.len() {
            // Numpress linear keeps m/z to about 1e-9 relative at these scales; short logged
            // float keeps intensities to about 2e-4 relative (Teleman et al. 2014).
            assert!((p.mz[i] - q.mz[i]).abs() <= 1e-6, "m/z {} vs {}", p.mz[i], q.mz[i]);
            let rel = (p.intensity[i] - q.intensity[i]).abs() / p.intensity[i].abs().max(1e-30);
            assert!(rel <= 5e-4, "intensity {} vs {}", p.intensity[i], q.intensity[i]);
            compared += 1;
        }
    }
    assert!(compared > 500, "{compared} peaks compared");
}

#[test]
fn an_unfinished_copy_leaves_no_file() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("copy.mzML");
    {
        let input = &demo_files()[0];
        let config = ScreenConfig::default();
        let pool = thread_pool(1).unwrap();
        let mut w =
            CentroidedWriter::create(&out, CentroidedEncoding::Zlib, config.centroid).unwrap();
        screen_file_centroided(input, &config, &pool, &[], &mut w).unwrap();
        // Dropped without finish (e.g. the run was stopped).
    }
    assert_eq!(std::fs::read_dir(dir.path()).unwrap().count(), 0);
}
