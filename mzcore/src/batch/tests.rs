//! Tests of the batch view on constructed compounds.

use super::*;

fn compound(id: usize, mass: f64, rt: f64, area: f64, n_cl: u8) -> Compound {
    Compound {
        compound: id,
        rt_apex_min: rt,
        rt_start_min: rt - 0.08,
        rt_end_min: rt + 0.1,
        polarity: "+".into(),
        ionization: "electrospray".into(),
        resolution: "high".into(),
        neutral_mass: Some(mass),
        nominal_mass: Some(mass.round() as i64),
        odd_nominal: OddNominal::False,
        n_cl,
        n_br: 0,
        halogen: n_cl > 0,
        halogen_probability: if n_cl > 0 { 0.99 } else { 0.01 },
        molecular_ion_mz: mass + 1.007_276,
        ion_type: "[M+H]+".into(),
        charge: 1,
        apex_intensity: area * 8.0,
        area,
        members: String::new(),
        evidence: String::new(),
    }
}

/// The library of the constructed batch: (mass, retention time, n_cl).
const LIBRARY: [(f64, f64, u8); 8] = [
    (212.047_8, 4.00, 1), // A: in every sample
    (278.151_8, 3.00, 0), // B: background, as strong in the blanks as in the samples
    (326.004_0, 5.50, 2), // C: sample 3 only, below threshold in its second injection
    (212.048_2, 4.12, 1), // D: 1.9 ppm from A, 0.12 min later
    (212.047_3, 4.01, 0), // E: 2.4 ppm from A, same time
    (390.120_0, 6.20, 1), // F: concentrated in sample 2; carried over into the next blank
    (250.100_0, 2.20, 0), // G: internal standard, in every injection
    (420.200_0, 6.60, 0), // H: internal standard, in every injection
];

/// One injection: name, sample, kind, compounds present as (library index, area).
type Injection = (&'static str, &'static str, SampleKind, Vec<(usize, f64)>);

fn batch() -> Vec<Injection> {
    use SampleKind::*;
    let mut v = vec![
        ("b1", "blank-1", Blank, vec![(1, 900.0)]),
        ("s1a", "S1", Sample, vec![(0, 5000.0), (1, 1000.0), (3, 4000.0), (4, 3000.0)]),
        ("s1b", "S1", Sample, vec![(0, 5200.0), (1, 1100.0), (3, 4100.0), (4, 2900.0)]),
        ("s2a", "S2", Sample, vec![(0, 9000.0), (1, 950.0), (5, 1.0e6)]),
        ("b2", "blank-2", Blank, vec![(1, 1000.0), (5, 2.0e4)]),
        ("s2b", "S2", Sample, vec![(0, 9100.0), (1, 1050.0), (5, 0.9e6)]),
        ("s3a", "S3", Sample, vec![(0, 7000.0), (1, 980.0), (2, 3000.0)]),
        ("s3b", "S3", Sample, vec![(0, 7100.0), (1, 1020.0)]),
        (
            "qc",
            "qc-mix",
            Qc,
            vec![(0, 6000.0), (1, 990.0), (2, 5000.0), (3, 5000.0), (4, 5000.0), (5, 5000.0)],
        ),
    ];
    for (_, _, _, present) in v.iter_mut() {
        present.extend([(6, 2000.0), (7, 2500.0)]);
    }
    v
}

/// Drift of injection `k`: up to 0.2 min, not linear in time.
fn drift(k: usize, rt: f64) -> f64 {
    0.2 * k as f64 / 8.0 * (0.5 + 0.5 * (rt - 3.0) / 3.2).powi(2)
}

fn files() -> Vec<BatchFile> {
    batch()
        .into_iter()
        .enumerate()
        .map(|(k, (name, sample, kind, present))| {
            let compounds = present
                .iter()
                .map(|&(lib, area)| {
                    let (mass, rt, n_cl) = LIBRARY[lib];
                    // Mass error up to +-0.3 ppm, different in each file.
                    let err = mass * 0.3e-6 * (((k * 7 + lib * 3) % 5) as f64 - 2.0) / 2.0;
                    compound(lib + 1, mass + err, rt + drift(k, rt), area, n_cl)
                })
                .collect();
            BatchFile {
                name: name.into(),
                path: None,
                sample: sample.into(),
                kind,
                order: k,
                classes: vec![AcquisitionClass::new("+", "", "high")],
                compounds,
            }
        })
        .collect()
}

/// Gap-filling results as a file search would give them: C in s3b at 12 % of s3a.
fn fills(a: &Alignment) -> Vec<Option<Vec<FillResult>>> {
    (0..a.files().len())
        .map(|f| {
            let name = a.files()[f].name.clone();
            let targets = a.fill_targets(f);
            Some(
                targets
                    .iter()
                    .map(|(r, t)| {
                        let lib = a.rows[*r].best;
                        let lib = a.files[lib.0].compounds[lib.1].compound - 1;
                        if name == "s3b" && lib == 2 {
                            FillResult::Found {
                                area: 360.0,
                                apex_intensity: 2900.0,
                                rt_min: t.rt_apex_min,
                                mz: t.mz,
                                scans: 7,
                            }
                        } else {
                            FillResult::Absent
                        }
                    })
                    .collect(),
            )
        })
        .collect()
}

fn view_of(files: Vec<BatchFile>) -> BatchView {
    let a = align(files, &BatchSettings::default());
    let f = fills(&a);
    a.finish(f)
}

fn tables(v: &BatchView) -> (String, String, String) {
    let (mut a, mut b, mut c) = (Vec::new(), Vec::new(), Vec::new());
    v.write_compounds(&mut a).unwrap();
    v.write_detections(&mut b).unwrap();
    v.write_drift(&mut c).unwrap();
    (String::from_utf8(a).unwrap(), String::from_utf8(b).unwrap(), String::from_utf8(c).unwrap())
}

/// Library index of each row's members (all must agree).
fn row_compound(v: &BatchView, r: usize) -> usize {
    let ids: Vec<usize> = v
        .detections()
        .iter()
        .filter(|d| d.batch_compound == r + 1)
        .filter_map(|d| d.compound)
        .collect();
    assert!(!ids.is_empty() && ids.iter().all(|&i| i == ids[0]), "row {r} mixes {ids:?}");
    ids[0] - 1
}

#[test]
fn every_compound_is_one_row_with_blanks_replicates_and_carry_over() {
    let v = view_of(files());
    assert_eq!(v.compounds().len(), LIBRARY.len());
    let by_lib: HashMap<usize, &AlignedCompound> =
        (0..v.compounds().len()).map(|r| (row_compound(&v, r), &v.compounds()[r])).collect();
    assert_eq!(by_lib.len(), LIBRARY.len(), "a compound split into two rows");
    // Detected counts: A 7 files, B 9, C 2, D 3, E 3, F 4, the standards 9.
    let counts: Vec<usize> = (0..8).map(|l| by_lib[&l].files_detected).collect();
    assert_eq!(counts, [7, 9, 2, 3, 3, 4, 9, 9]);
    let above: Vec<bool> = (0..8).map(|l| by_lib[&l].above_blank).collect();
    assert_eq!(above, [true, false, true, true, true, true, false, false]);
    let in_blank: Vec<bool> = (0..8).map(|l| by_lib[&l].in_blank).collect();
    assert_eq!(in_blank, [false, true, false, false, false, true, true, true]);
    assert_eq!(by_lib[&1].blank_max, Some(1000.0));
    let carry: Vec<bool> = (0..8).map(|l| by_lib[&l].carry_over).collect();
    assert_eq!(carry, [false, false, false, false, false, true, false, false]);
    // C: detected in s3a, filled in s3b.
    let c = by_lib[&2].batch_compound;
    let s3b = v.detections().iter().find(|d| d.batch_compound == c && &*d.file == "s3b").unwrap();
    assert_eq!((s3b.detected, s3b.filled, s3b.area), (false, Some(true), Some(360.0)));
    assert_eq!((s3b.replicates_detected, s3b.replicate_injections), (1, 2));
    let rsd = s3b.replicate_rsd_percent.unwrap();
    // Areas 3000 and 360: mean 1680, sample sd 1866.8 -> 111.1 %.
    assert!((rsd - 111.12).abs() < 0.05, "{rsd}");
    let s1a = v.detections().iter().find(|d| d.batch_compound == c && &*d.file == "s1a").unwrap();
    assert_eq!((s1a.detected, s1a.filled, s1a.area), (false, Some(false), None));
    // The matrix: files x compounds, NaN where absent.
    let f_s3b = v.files().iter().position(|f| f.name == "s3b").unwrap();
    assert_eq!(v.matrix().dim(), (9, 8));
    assert_eq!(v.matrix()[[f_s3b, c - 1]], 360.0);
    let counts = v.counts();
    assert_eq!((counts.compounds, counts.above_blank, counts.halogenated_above_blank), (8, 5, 4));
    assert_eq!((counts.carry_over_suspects, counts.filled), (1, 1));
}

#[test]
fn drift_is_corrected_and_reported() {
    let v = view_of(files());
    let last = v.drift().iter().find(|d| d.file == "qc").unwrap();
    // The last injection runs 0.05 to 0.2 min late; the anchors (A, B and the standards,
    // in most files) say so.
    assert!(last.fit.anchors >= 4);
    // The reference is the median injection (the fifth, k = 4): the last one's time of the
    // late standard H maps onto it.
    let (h_file, h_reference) = (6.6 + drift(8, 6.6), 6.6 + drift(4, 6.6));
    assert!((last.fit.apply(h_file) - h_reference).abs() < 0.005, "{:?}", last.fit);
    assert!(h_file - h_reference > 0.09, "test setup: drift too small");
    for d in v.drift() {
        assert!(d.fit.max_abs_residual_min < 0.005, "{}: {:?}", d.file, d.fit);
    }
}

#[test]
fn any_file_order_gives_the_same_tables() {
    let reference = tables(&view_of(files()));
    for seed in 1..6u64 {
        let mut fs = files();
        // A deterministic shuffle.
        let mut x = seed;
        for i in (1..fs.len()).rev() {
            x = x.wrapping_mul(6_364_136_223_846_793_005).wrapping_add(1_442_695_040_888_963_407);
            fs.swap(i, (x >> 33) as usize % (i + 1));
        }
        for f in fs.iter_mut() {
            f.compounds.reverse();
        }
        assert_eq!(tables(&view_of(fs)), reference, "shuffle {seed}");
    }
}

#[test]
fn wide_table_has_the_fixed_columns_then_one_per_file() {
    let (wide, long, drift) = tables(&view_of(files()));
    let header: Vec<&str> = wide.lines().next().unwrap().split('\t').collect();
    assert_eq!(&header[..COMPOUND_FIXED_COLUMNS.len()], COMPOUND_FIXED_COLUMNS);
    assert_eq!(
        &header[COMPOUND_FIXED_COLUMNS.len()..],
        ["b1", "s1a", "s1b", "s2a", "b2", "s2b", "s3a", "s3b", "qc"]
    );
    assert_eq!(wide.lines().count(), 1 + LIBRARY.len());
    assert_eq!(long.lines().next().unwrap().split('\t').collect::<Vec<_>>(), DETECTION_COLUMNS);
    // Every compound x every file of its class.
    assert_eq!(long.lines().count(), 1 + LIBRARY.len() * 9);
    assert_eq!(drift.lines().count(), 1 + 9);
}

#[test]
fn unit_resolution_and_other_classes_stay_apart() {
    let mut fs = files();
    // The same masses in a negative-mode file never join the positive rows.
    let mut neg = fs[1].clone();
    neg.name = "s1a-neg".into();
    neg.order = 20;
    neg.classes = vec![AcquisitionClass::new("-", "", "high")];
    for c in neg.compounds.iter_mut() {
        c.polarity = "-".into();
    }
    fs.push(neg);
    let v = view_of(fs);
    assert_eq!(v.compounds().len(), LIBRARY.len() + 6);
    let neg_rows = v.compounds().iter().filter(|c| c.class.polarity == "-").count();
    assert_eq!(neg_rows, 6);
    // The negative file is not in the positive rows' detections.
    assert!(v.detections().iter().all(
        |d| &*d.file != "s1a-neg" || v.compounds()[d.batch_compound - 1].class.polarity == "-"
    ));
}

#[test]
fn settings_are_validated() {
    let bad = BatchSettings { blank_factor: 0.0, ..BatchSettings::default() };
    assert!(bad.validate().unwrap_err().to_string().contains("batch.blank_factor"));
    let bad = BatchSettings { rt_drift_max_min: 0.01, ..BatchSettings::default() };
    assert!(bad.validate().is_err());
    assert!(BatchSettings::default().validate().is_ok());
}
