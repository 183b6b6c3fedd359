//! Synthetic acquisitions: the files read back through our reader with a verified checksum,
//! the isotope clusters in the spectra match the isotope patterns they were made from (and,
//! at unit resolution, the IsoSpecPy reference table), elution apexes fall where the
//! scenario puts them, and generation is deterministic.

use std::collections::HashMap;

use mzcore::chem::isotopes::{self, Resolution};
use mzcore::mzml::{ChecksumStatus, Reader, ReaderOptions};
use mzcore::spectrum::{Peaks, SpectrumMeta};
use mzcore::synth::{
    Acquisition, Output, ResolvingPower, Scan, Scenario, SizeOptions, TRUTH_COLUMNS, write_truth,
};

/// Writes one run of `scenario` and reads every spectrum back, checking the SHA-1.
fn write_and_read(acq: &Acquisition) -> (Vec<u8>, Vec<(SpectrumMeta, Peaks)>) {
    let mut doc = Vec::new();
    let summary = acq.write(&mut doc).expect("write");
    let mut reader =
        Reader::with_options(&doc[..], ReaderOptions::default().verify_checksum(true)).unwrap();
    let mut spectra = Vec::new();
    for s in reader.by_ref() {
        let s = s.expect("readable spectrum");
        let p = s.decode().expect("decodable arrays");
        spectra.push((s.meta, p));
    }
    assert_eq!(reader.checksum_status(), &ChecksumStatus::Verified);
    assert_eq!(spectra.len(), summary.spectra);
    assert_eq!(spectra.iter().map(|s| s.1.len() as u64).sum::<u64>(), summary.points);
    assert!(reader.tic_chromatogram().is_some_and(|c| !c.time_min.is_empty()));
    (doc, spectra)
}

fn demo_runs() -> Vec<Acquisition> {
    let demo = Scenario::demo();
    demo.runs.iter().map(|r| Acquisition::new(&demo, r, SizeOptions::default()).unwrap()).collect()
}

/// IsoSpecPy nominal shells of neutral formulas (tests/reference/shells.tsv, made by
/// tests/reference/chem_reference.py), as shell -> abundance.
fn reference_shells() -> HashMap<String, Vec<(i32, f64)>> {
    let text = include_str!("../../tests/reference/shells.tsv");
    let mut out: HashMap<String, Vec<(i32, f64)>> = HashMap::new();
    for line in text.lines().skip(1) {
        let f: Vec<&str> = line.split('\t').collect();
        out.entry(f[0].to_string())
            .or_default()
            .push((f[1].parse().unwrap(), f[3].parse().unwrap()));
    }
    out
}

/// Observed shell sums of one species over the MS1 scans within one FWHM of its apex, with
/// a predicted standard deviation of each sum from the instrument's noise model.
fn observed_shells(
    acq: &Acquisition,
    spectra: &[(SpectrumMeta, Peaks)],
    species: usize,
    expected: &[(i32, f64, f64)], // shell, m/z, relative abundance
) -> Vec<(f64, f64)> {
    let inst = acq.instrument();
    let s = &acq.species()[species];
    let width = acq.run().compounds[species].width_min;
    let apex = s.elution.apex();
    let z = f64::from(s.ion.charge().abs());
    let half = match inst.resolving_power {
        ResolvingPower::Named(_) => 0.5 / z,
        ResolvingPower::Value(_) => 0.15 / z,
    };
    let baseline = if inst.output == Output::Profile { inst.noise.baseline } else { 0.0 };
    let (bsd, shot) = (inst.noise.baseline_sd, inst.noise.shot);
    let mut sums = vec![(0.0, 0.0); expected.len()];
    for (meta, peaks) in spectra {
        let rt = meta.rt_min.unwrap();
        if meta.ms_level != 1 || (rt - apex).abs() > 0.5 * width {
            continue;
        }
        for (k, &(_, mz, _)) in expected.iter().enumerate() {
            for (&m, &v) in peaks.mz.iter().zip(&peaks.intensity) {
                if (m - mz).abs() <= half && v > 0.0 {
                    let signal = (v - baseline).max(0.0);
                    sums[k].0 += v - baseline;
                    sums[k].1 += bsd * bsd + shot * shot * signal;
                }
            }
        }
    }
    sums.into_iter().map(|(sum, var)| (sum, var.sqrt())).collect()
}

/// Expected shells of a species' ion from the chemistry core: (shell, m/z, relative).
fn expected_shells(acq: &Acquisition, species: usize) -> Vec<(i32, f64, f64)> {
    let s = &acq.species()[species];
    let p = isotopes::pattern(&s.formula, Some(&s.ion), Resolution::Shells, 1e-6).unwrap();
    let max = p.iter().map(|r| r.abundance).fold(0.0, f64::max);
    p.iter().map(|r| (r.shell, r.mz, r.abundance / max)).collect()
}

/// Compares observed and expected shell ratios; returns the number of shells compared.
fn compare(
    name: &str,
    expected: &[(i32, f64, f64)],
    observed: &[(f64, f64)],
    min_rel: f64,
) -> usize {
    let top = expected.iter().enumerate().max_by(|a, b| a.1.2.total_cmp(&b.1.2)).unwrap().0;
    let (s_top, sd_top) = observed[top];
    assert!(s_top > 0.0, "{name}: tallest shell not found");
    let mut n = 0;
    for (k, &(shell, _, rel)) in expected.iter().enumerate() {
        if rel < min_rel {
            continue;
        }
        let (s, sd) = observed[k];
        let ratio = s / s_top;
        // Four standard deviations of the ratio from the noise model, plus 1 % for what the
        // model leaves out (dropped tails, noise peaks, numpress rounding).
        let tol =
            4.0 * ratio * ((sd / s.max(1.0)).powi(2) + (sd_top / s_top).powi(2)).sqrt() + 0.01;
        assert!(
            (ratio - rel).abs() <= tol,
            "{name} shell M+{shell}: observed {ratio:.4}, expected {rel:.4} (tolerance {tol:.4})"
        );
        n += 1;
    }
    n
}

#[test]
fn demo_files_read_back_with_verified_checksums_and_match_their_plan() {
    for acq in demo_runs() {
        let (_, spectra) = write_and_read(&acq);
        assert_eq!(spectra.len(), acq.scans().len());
        for ((meta, peaks), scan) in spectra.iter().zip(acq.scans()) {
            assert!(peaks.mz.windows(2).all(|w| w[0] <= w[1]), "{}: m/z not sorted", meta.id);
            match *scan {
                Scan::Ms1 { rt } => {
                    assert_eq!(meta.ms_level, 1);
                    assert!((meta.rt_min.unwrap() - rt).abs() < 1e-9);
                }
                Scan::Ms2 { precursor_mz, .. } => {
                    assert_eq!(meta.ms_level, 2);
                    assert_eq!(meta.precursors[0].selected_mz, Some(precursor_mz));
                }
            }
        }
    }
}

#[test]
fn isotope_clusters_in_the_spectra_match_the_patterns() {
    let reference = reference_shells();
    let mut compared = 0;
    let mut against_reference = 0;
    for acq in demo_runs() {
        let (_, spectra) = write_and_read(&acq);
        let unit = matches!(acq.instrument().resolving_power, ResolvingPower::Named(_));
        for j in 0..acq.species().len() {
            let s = &acq.species()[j];
            let name = format!("{} in {}", s.name, acq.run().file);
            let expected = expected_shells(&acq, j);
            let observed = observed_shells(&acq, &spectra, j, &expected);
            // Only shells well above the threshold even half a width from the apex (where
            // the elution profile is at 0.5).
            let floor = 6.0 * acq.instrument().drop_below / s.abundance;
            let min_rel = floor.max(if unit { 0.1 } else { 0.05 });
            compared += compare(&name, &expected, &observed, min_rel);
            // Under EI the ion M+. has the neutral's atoms: check against IsoSpecPy too.
            if let (true, Some(r)) = (s.ion.is_radical(), reference.get(&s.formula.hill())) {
                let max = r.iter().map(|x| x.1).fold(0.0, f64::max);
                let from_reference: Vec<(i32, f64, f64)> = expected
                    .iter()
                    .map(|&(shell, mz, _)| {
                        let a = r.iter().find(|x| x.0 == shell).map_or(0.0, |x| x.1);
                        (shell, mz, a / max)
                    })
                    .collect();
                against_reference += compare(&name, &from_reference, &observed, min_rel);
            }
        }
    }
    // 36 compounds, most with two or more shells above the cut.
    assert!(compared >= 70, "only {compared} shells compared");
    assert!(against_reference >= 30, "only {against_reference} shells against IsoSpecPy");
}

#[test]
fn elution_apexes_match_the_scenario() {
    for acq in demo_runs() {
        let (_, spectra) = write_and_read(&acq);
        let ms1: Vec<&(SpectrumMeta, Peaks)> =
            spectra.iter().filter(|s| s.0.ms_level == 1).collect();
        let cycle = ms1[1].0.rt_min.unwrap() - ms1[0].0.rt_min.unwrap();
        for (j, s) in acq.species().iter().enumerate() {
            let width = acq.run().compounds[j].width_min;
            let tol = acq.fwhm(s.precursor_mz) * 2.0;
            // Extracted ion chromatogram over the species' main peaks (molecular cluster and,
            // under EI, fragments of at least 20 % of the molecular ion's tallest peak).
            let targets: Vec<f64> = s
                .cluster
                .iter()
                .chain(&s.ms1_fragments)
                .filter(|p| p.1 >= 0.2)
                .map(|p| p.0)
                .collect();
            let xic: Vec<f64> = ms1
                .iter()
                .map(|(_, p)| {
                    p.mz.iter()
                        .zip(&p.intensity)
                        .filter(|(m, _)| targets.iter().any(|t| (**m - t).abs() <= tol))
                        .map(|(_, v)| *v)
                        .sum()
                })
                .collect();
            // Other compounds' fragments can share the ion's m/z at other times: look within
            // three widths of the stated apex, and require the maximum inside, not at the rim.
            let wanted = acq.run().compounds[j].rt_apex_min;
            let near: Vec<usize> = (0..xic.len())
                .filter(|&i| (ms1[i].0.rt_min.unwrap() - wanted).abs() <= 3.0 * width)
                .collect();
            let best = *near.iter().max_by(|&&a, &&b| xic[a].total_cmp(&xic[b])).unwrap();
            assert!(
                best > near[0] && best < near[near.len() - 1],
                "{} in {}: the largest signal is at the rim of the search window",
                s.name,
                acq.run().file
            );
            // Apex by a parabola through the logarithms of the top three points (a Gaussian
            // top), common practice for peak apex interpolation.
            let (a, b, c) = (xic[best - 1].ln(), xic[best].ln(), xic[best + 1].ln());
            let shift = 0.5 * (a - c) / (a - 2.0 * b + c);
            let apex = ms1[best].0.rt_min.unwrap() + shift * cycle;
            assert!(
                (apex - wanted).abs() <= (0.2 * width).max(cycle),
                "{} in {}: apex {apex:.4} min, scenario {wanted} min",
                s.name,
                acq.run().file
            );
        }
    }
}

#[test]
fn profile_spectra_keep_one_zero_either_side_of_each_run_of_points() {
    let demo = Scenario::demo();
    let run = demo.runs.iter().find(|r| r.file.contains("lc-neg")).unwrap();
    let acq = Acquisition::new(&demo, run, SizeOptions::default()).unwrap();
    let threshold = acq.instrument().drop_below;
    let (_, spectra) = write_and_read(&acq);
    let mut runs = 0;
    for (meta, p) in &spectra {
        let v = &p.intensity;
        assert!(v.is_empty() || (v[0] == 0.0 && v[v.len() - 1] == 0.0), "{}", meta.id);
        for i in 0..v.len() {
            if v[i] == 0.0 {
                // A zero sits next to a kept point, never between two zeros.
                let next_kept = i + 1 < v.len() && v[i + 1] > threshold;
                let prev_kept = i > 0 && v[i - 1] > threshold;
                assert!(next_kept || prev_kept, "{}: stray zero at {i}", meta.id);
                if next_kept {
                    runs += 1;
                }
            } else {
                assert!(v[i] > threshold, "{}: point below the threshold kept", meta.id);
            }
        }
    }
    assert!(runs > 1000, "only {runs} runs of points");
}

#[test]
fn data_dependent_ms2_follows_top_n_and_dynamic_exclusion() {
    let demo = Scenario::demo();
    let run = demo.runs.iter().find(|r| r.file.contains("lc-pos_fennick")).unwrap();
    let acq = Acquisition::new(&demo, run, SizeOptions::default()).unwrap();
    let inst = acq.instrument();
    let mut last: HashMap<usize, f64> = HashMap::new();
    let mut in_cycle = 0;
    let mut ms2 = 0;
    for scan in acq.scans() {
        match *scan {
            Scan::Ms1 { .. } => in_cycle = 0,
            Scan::Ms2 { rt, species, precursor_mz } => {
                in_cycle += 1;
                ms2 += 1;
                assert!(in_cycle <= inst.ms2_top_n);
                let s = &acq.species()[species];
                assert_eq!(precursor_mz, s.precursor_mz);
                assert!(s.abundance * s.elution.at(rt) > 0.5 * inst.ms2_min_intensity);
                if let Some(prev) = last.insert(species, rt) {
                    assert!(rt - prev >= inst.ms2_exclusion_min - 1e-9, "{} re-selected", s.name);
                }
            }
        }
    }
    assert!(ms2 >= acq.species().len(), "only {ms2} MS2 scans");
}

#[test]
fn size_knobs_set_the_scan_and_point_counts() {
    let demo = Scenario::demo();
    let lc = demo.runs.iter().find(|r| r.file.contains("lc-neg")).unwrap();
    let size = SizeOptions { ms1_scans: Some(7), points: Some(1234), ..Default::default() };
    let acq = Acquisition::new(&demo, lc, size).unwrap();
    let (_, spectra) = write_and_read(&acq);
    assert_eq!(spectra.len(), 7);
    assert!(spectra.iter().all(|s| s.1.len() == 1234));
    let p = &spectra[3].1;
    let inst = acq.instrument();
    assert!((p.mz[0] - inst.mz_min).abs() < 1e-9 && (p.mz[1233] - inst.mz_max).abs() < 1e-6);
    let gc = demo.runs.iter().find(|r| r.file.contains("_gc_")).unwrap();
    let acq = Acquisition::new(
        &demo,
        gc,
        SizeOptions { ms1_scans: Some(5), points: Some(300), ..Default::default() },
    )
    .unwrap();
    let (_, spectra) = write_and_read(&acq);
    assert_eq!(spectra.len(), 5);
    assert!(spectra.iter().all(|s| s.1.len() >= 300));
}

#[test]
fn generation_is_deterministic_and_depends_on_the_seed() {
    let demo = Scenario::demo();
    let run = &demo.runs[2];
    let a = Acquisition::new(&demo, run, SizeOptions::default()).unwrap();
    let b = Acquisition::new(&demo, run, SizeOptions::default()).unwrap();
    let (doc_a, _) = write_and_read(&a);
    let (doc_b, _) = write_and_read(&b);
    assert!(doc_a == doc_b, "two writes differ");
    // Spectra come from per-scan streams: one spectrum alone equals its place in the run.
    assert_eq!(a.spectrum(40), b.spectrum(40));
    let mut other = demo.clone();
    other.seed += 1;
    let c = Acquisition::new(&other, &other.runs[2], SizeOptions::default()).unwrap();
    assert_ne!(a.spectrum(40).1, c.spectrum(40).1);
}

#[test]
fn truth_tables_have_the_agreed_columns_and_values() {
    assert_eq!(
        TRUTH_COLUMNS.join("\t"),
        "compound\tformula\tion_type\tcharge\tmz\trt_apex_min\tn_cl\tn_br\tn_n\tnominal_mass\todd_nominal\tmono_snr\trole\tion_formula"
    );
    let demo = Scenario::demo();
    let mut rows = Vec::new();
    for run in &demo.runs {
        rows.extend(Acquisition::new(&demo, run, SizeOptions::default()).unwrap().truth());
    }
    // mono_snr by hand: chloroform's M+. is the tallest shell of its Cl3 cluster (35Cl^3
    // 0.4348 against 3 x 35Cl^2 x 37Cl 0.4174, abundances of the chemistry core), so its
    // height is the scenario's abundance 3000; the GC instrument writes centroids, whose
    // noise level is the larger of baseline_sd 30 and the noise peaks' mean height 140.
    let chloroform = rows.iter().find(|r| r.compound == "chloroform").unwrap();
    assert!((chloroform.mono_snr - 3000.0 / 140.0).abs() < 1e-9, "{chloroform:?}");
    let distinct: std::collections::BTreeSet<&str> =
        rows.iter().map(|r| r.compound.as_str()).collect();
    assert!(distinct.len() >= 30, "{} compounds", distinct.len());
    // Coverage the demo promises: 1 to 6 Cl, 1 to 4 Br, mixed Cl/Br, odd and even N.
    for n in 1..=6 {
        assert!(rows.iter().any(|r| r.n_cl == n && r.n_br == 0), "no compound with {n} Cl");
    }
    for n in 1..=4 {
        assert!(rows.iter().any(|r| r.n_br == n), "no compound with {n} Br");
    }
    assert!(rows.iter().any(|r| r.n_br > 0 && r.n_cl > 0));
    assert!(
        rows.iter().any(|r| r.n_n % 2 == 1) && rows.iter().any(|r| r.n_n > 0 && r.n_n % 2 == 0)
    );
    // Values checked by hand from the formulas (common practice: nominal mass is the sum of
    // the mass numbers of the most abundant isotopes; triclosan C12H7Cl3O2 = 144+7+105+32;
    // the [M-H]- m/z 286.9439 is the value in the chem module's worked example).
    let t = rows.iter().find(|r| r.compound == "triclosan").unwrap();
    assert_eq!((t.nominal_mass, t.odd_nominal, t.n_cl, t.charge), (288, false, 3, -1));
    assert!((t.mz - 286.9439).abs() < 1e-3);
    let atrazine = rows.iter().find(|r| r.compound == "atrazine").unwrap();
    assert_eq!(
        (atrazine.nominal_mass, atrazine.odd_nominal, atrazine.ion_type.as_str()),
        (215, true, "M+.")
    );
    let mut text = Vec::new();
    write_truth(&rows[..1], &mut text).unwrap();
    let text = String::from_utf8(text).unwrap();
    assert_eq!(text.lines().count(), 2);
    assert_eq!(text.lines().nth(1).unwrap().split('\t').count(), TRUTH_COLUMNS.len());
}

#[test]
fn scenario_errors_name_the_problem() {
    let base = mzcore::synth::DEMO_SCENARIO;
    let cases = [
        (base.replace("name = \"lindane\"\nformula", "name = \"lindane-x\"\nformula"), "lindane"),
        (base.replace("\"f64-zlib\"", "\"f80\""), "f80"),
        (base.replace("instrument = \"gc_ei_quad\"\n", "instrument = \"nope\"\n"), "nope"),
        (base.replace("scan_rate_hz = 2.0", "scan_rate_hz = -1.0"), "scan_rate_hz"),
        (
            base.replace("{ mz = 58.07, relative", "{ mz = 58.07, formula = \"CH3\", relative"),
            "fragment",
        ),
        (base.replace("seed = 417", "seed = 417\ncolour = 3"), "colour"),
    ];
    for (text, needle) in cases {
        let err = Scenario::from_toml(&text).and_then(|s| {
            s.runs
                .iter()
                .try_for_each(|r| Acquisition::new(&s, r, SizeOptions::default()).map(|_| ()))
        });
        let msg = err.expect_err(needle).to_string();
        assert!(msg.contains(needle), "'{msg}' does not mention {needle}");
    }
}
