//! The batch view end to end on generated acquisitions (`tests/batch/drift-blanks.toml`):
//! two blanks (one right after a concentrated sample, carrying a few percent of it over),
//! three samples in duplicate, a QC standard mix, up to 0.2 min of drift, one compound below
//! the detection threshold in one injection only.
//!
//! Until the per-file compound stage is on this branch, each file's compounds here are its
//! halogen features taken one by one as [M+H]+ ions (a stand-in grouping in this test only);
//! alignment, drift correction, gap filling (from the mzML files themselves), blanks,
//! replicates and carry-over are the library's.

use std::collections::BTreeMap;
use std::path::Path;

use mzcore::batch::{self, AcquisitionClass, BatchFile, BatchSettings, BatchView};
use mzcore::compound::Compound;
use mzcore::screen::{self, ScreenConfig};
use mzcore::synth::{self, Acquisition, Scenario, SizeOptions};

/// Proton mass, u (CODATA 2018).
const PROTON: f64 = 1.007_276_466_62;

fn scenario() -> Scenario {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/batch/drift-blanks.toml");
    Scenario::from_toml(&std::fs::read_to_string(path).unwrap()).unwrap()
}

fn config() -> ScreenConfig {
    let mut c = ScreenConfig::from_toml("[flag]\nmin_snr = 40.0\n").unwrap();
    c.threads = 2;
    c
}

/// The stand-in grouping: one compound per halogen feature, as an [M+H]+ ion.
fn compounds_of(features: &[mzcore::feature::Feature]) -> Vec<Compound> {
    features
        .iter()
        .filter(|f| f.n_cl + f.n_br > 0 && f.charge == 1 && f.molecular_candidate)
        .enumerate()
        .map(|(i, f)| Compound {
            compound: i + 1,
            rt_apex_min: f.rt_apex_min,
            rt_start_min: f.rt_start_min,
            rt_end_min: f.rt_end_min,
            polarity: "+".into(),
            ionization: "electrospray".into(),
            resolution: "high".into(),
            neutral_mass: Some(f.mz - PROTON),
            nominal_mass: f.nominal_mass,
            odd_nominal: f.odd_nominal,
            n_cl: f.n_cl,
            n_br: f.n_br,
            halogen: true,
            halogen_probability: f.halogen_score,
            molecular_ion_mz: f.mz,
            ion_type: "[M+H]+".into(),
            charge: 1,
            apex_intensity: f.apex_intensity,
            area: f.area,
            members: format!("{}:[M+H]+", f.feature),
            evidence: String::new(),
        })
        .collect()
}

struct Batch {
    _dir: tempfile::TempDir,
    files: Vec<BatchFile>,
    acquisitions: Vec<Acquisition>,
}

fn screened() -> Batch {
    let scenario = scenario();
    let dir = tempfile::tempdir().unwrap();
    synth::generate(&scenario, dir.path(), SizeOptions::default(), &[]).unwrap();
    let config = config();
    let pool = mzcore::pipeline::thread_pool(2).unwrap();
    let sheet = batch::SampleSheet::read(
        &Path::new(env!("CARGO_MANIFEST_DIR")).join("../tests/batch/drift-blanks.samples.tsv"),
    )
    .unwrap();
    let mut files = Vec::new();
    let mut acquisitions = Vec::new();
    for (k, run) in scenario.runs.iter().enumerate() {
        let path = dir.path().join(format!("{}.mzML", run.file));
        let report = screen::screen_file(&path, &config, &pool).unwrap();
        let entry = sheet.entries.iter().find(|e| e.file == run.file).unwrap();
        files.push(BatchFile {
            name: run.file.clone(),
            path: Some(path),
            sample: entry.sample.clone(),
            kind: entry.kind,
            order: k,
            classes: vec![AcquisitionClass::new("+", "", "high")],
            compounds: compounds_of(&report.features),
        });
        acquisitions.push(Acquisition::new(&scenario, run, SizeOptions::default()).unwrap());
    }
    Batch { _dir: dir, files, acquisitions }
}

/// For each true compound: the rows its detections fall in (by ion m/z within 5 ppm and apex
/// within 0.05 min of the truth in each file).
fn rows_of_truth(b: &Batch, v: &BatchView) -> BTreeMap<String, Vec<usize>> {
    let mut out: BTreeMap<String, Vec<usize>> = BTreeMap::new();
    for acq in &b.acquisitions {
        let file = &acq.run().file;
        for t in acq.truth() {
            let hits: Vec<usize> = v
                .detections()
                .iter()
                .filter(|d| *d.file == **file && d.detected)
                .filter(|d| {
                    let row = &v.compounds()[d.batch_compound - 1];
                    (row.ion_mz - t.mz).abs() / t.mz < 5e-6
                        && (d.rt_min.unwrap() - t.rt_apex_min).abs() < 0.05
                })
                .map(|d| d.batch_compound)
                .collect();
            let rows = out.entry(t.compound.clone()).or_default();
            rows.extend(hits);
            rows.sort_unstable();
            rows.dedup();
        }
    }
    out
}

#[test]
fn the_scenario_batch_aligns_fills_and_compares_with_blanks() {
    let b = screened();
    let v = batch::build(b.files.clone(), &BatchSettings::default(), &config());
    assert!(v.fill_errors.is_empty(), "{:?}", v.fill_errors);
    let truth = rows_of_truth(&b, &v);
    // Every true compound is one row (no splits) ...
    for (name, rows) in &truth {
        assert_eq!(rows.len(), 1, "{name}: rows {rows:?}");
    }
    // ... and no row holds two of them (no merges), the isomers 0.15 min apart included.
    let mut owner: BTreeMap<usize, &str> = BTreeMap::new();
    for (name, rows) in &truth {
        assert!(owner.insert(rows[0], name).is_none(), "row {} merges {name}", rows[0]);
    }
    let row = |name: &str| &v.compounds()[truth[name][0] - 1];
    // Above the blanks: everything in a sample; not the internal standard (as strong in the
    // blanks), not the compound found in the QC mix only (a standard, not a sample).
    for (name, want) in [
        ("trichlorobiphenyl", false),
        ("tribromophenol", false),
        ("atrazine", true),
        ("diclofenac", true),
        ("diclofenac isomer", true),
        ("triclosan", true),
        ("bromacil", true),
        ("chlorpyrifos", true),
        ("tetrachlorophenol", false),
    ] {
        assert_eq!(row(name).above_blank, want, "{name}: {:?}", row(name));
    }
    // Carry-over: the blank after the concentrated sample holds 3 % of triclosan and bromacil.
    let suspects: Vec<&str> =
        truth.keys().map(String::as_str).filter(|n| row(n).carry_over).collect();
    assert_eq!(suspects, ["bromacil", "triclosan"]);
    assert!(row("trichlorobiphenyl").in_blank && !row("atrazine").in_blank);
    // Gap filling recovers chlorpyrifos in the weak injection within 20 % of its true area.
    let weak = v
        .detections()
        .iter()
        .find(|d| d.batch_compound == truth["chlorpyrifos"][0] && &*d.file == "TB12-08_s3-b")
        .unwrap();
    assert!(!weak.detected, "test setup: the weak injection was detected");
    assert_eq!(weak.filled, Some(true));
    let acq = &b.acquisitions[7];
    let s = acq.species().iter().find(|s| s.name == "chlorpyrifos").unwrap();
    let sigma = 0.1 / synth::shape::FWHM_PER_SIGMA;
    let true_area = s.abundance * s.mono_relative() * sigma * (2.0 * std::f64::consts::PI).sqrt();
    let got = weak.area.unwrap();
    eprintln!("gap-filled chlorpyrifos: area {got:.1}, true {true_area:.1}");
    assert!((got / true_area - 1.0).abs() < 0.2, "filled area {got}, true {true_area}");
    assert_eq!((weak.replicates_detected, weak.replicate_injections), (1, 2));
    // Absent is told apart from below threshold: the blank's chlorpyrifos was looked for.
    let blank = v
        .detections()
        .iter()
        .find(|d| d.batch_compound == truth["chlorpyrifos"][0] && &*d.file == "TB12-01_blank-a")
        .unwrap();
    assert_eq!((blank.detected, blank.filled, blank.area), (false, Some(false), None));
    // Drift of up to 0.2 min is fitted from the compounds found in most files.
    let last = v.drift().iter().find(|d| d.file == "TB12-09_qc-mix").unwrap();
    assert!(last.fit.anchors >= 2 && last.fit.median_shift_min < -0.05, "{:?}", last.fit);
    let c = v.counts();
    eprintln!("counts {c:?}; rows {}; truth rows {}", v.compounds().len(), truth.len());
    assert_eq!(c.carry_over_suspects, 2);
}
