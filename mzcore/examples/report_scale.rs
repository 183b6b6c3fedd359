//! Writes a synthetic run folder in the documented report formats (batch.tsv, run.json,
//! per file spectra/compounds/traces/cluster, batch_compounds.tsv, detections.tsv) and renders
//! its HTML page, printing the page size and the time to load and render it.
//!
//! usage: report_scale OUTDIR [FILES [COMPOUNDS [SCANS]]]   (defaults 100, 500, 3000)
//!
//! Every tenth file is a blank; 40 % of the compounds are halogenated; each file detects
//! about 70 % of the compounds. The values are invented for size, not for chemistry.

use std::fmt::Write as _;
use std::path::Path;
use std::time::Instant;

/// A small deterministic generator (64-bit LCG, Knuth's MMIX constants).
struct Lcg(u64);

impl Lcg {
    fn next(&mut self) -> f64 {
        self.0 = self.0.wrapping_mul(6364136223846793005).wrapping_add(1442695040888963407);
        (self.0 >> 11) as f64 / (1u64 << 53) as f64
    }
}

fn main() -> Result<(), Box<dyn std::error::Error>> {
    let args: Vec<String> = std::env::args().collect();
    let out =
        Path::new(args.get(1).ok_or("usage: report_scale OUTDIR [FILES [COMPOUNDS [SCANS]]]")?);
    let n_files: usize = args.get(2).map_or(Ok(100), |s| s.parse())?;
    let n_compounds: usize = args.get(3).map_or(Ok(500), |s| s.parse())?;
    let n_scans: usize = args.get(4).map_or(Ok(3000), |s| s.parse())?;
    std::fs::create_dir_all(out)?;
    let t0 = Instant::now();
    let mut rng = Lcg(20260417);
    let names: Vec<String> = (0..n_files)
        .map(|f| {
            if f % 10 == 9 { format!("night-{f:03}_blank") } else { format!("night-{f:03}_sample") }
        })
        .collect();
    // Batch compounds: mass, RT, halogens.
    struct Bc {
        mass: f64,
        rt: f64,
        n_cl: u8,
        n_br: u8,
    }
    let bcs: Vec<Bc> = (0..n_compounds)
        .map(|i| {
            let halogen = i % 5 < 2;
            Bc {
                mass: 150.0 + rng.next() * 600.0,
                rt: 1.5 + rng.next() * 13.0,
                n_cl: if halogen { 1 + (i % 4) as u8 } else { 0 },
                n_br: if halogen { (i % 3) as u8 } else { 0 },
            }
        })
        .collect();
    // detected[f][c]: area, when file f detects compound c.
    let detected: Vec<Vec<Option<f64>>> = (0..n_files)
        .map(|f| {
            (0..n_compounds)
                .map(|_| {
                    let p = if names[f].ends_with("blank") { 0.1 } else { 0.7 };
                    (rng.next() < p).then(|| 10f64.powf(3.0 + 4.0 * rng.next()))
                })
                .collect()
        })
        .collect();
    let mut batch = String::from(
        "file\tstatus\terror\tspectra\tms1\tms2\trt_start_min\trt_end_min\tflagged_spectra\thalogen_features\todd_nominal_features\tunreadable_spectra\tseconds\thalogen_compounds\todd_nominal_compounds\n",
    );
    let mut inputs = Vec::new();
    for (f, name) in names.iter().enumerate() {
        let dir = out.join(name);
        std::fs::create_dir_all(&dir)?;
        let ids: Vec<usize> = (0..n_compounds).filter(|&c| detected[f][c].is_some()).collect();
        // spectra.tsv: TIC and base peak from the detected compounds' Gaussian peaks.
        let mut s = String::from(
            "index\tid\tstatus\tms_level\tpolarity\trepresentation\trt_min\tpoints\tpeaks\tintensity_sum\tbase_peak_mz\tbase_peak_intensity\tresolution\tclusters\tflagged_ions\thas_halogen\tbest_mz\tbest_n_cl\tbest_n_br\tbest_score\todd_nominal\terror\n",
        );
        for i in 0..n_scans {
            let rt = 1.0 + 15.0 * i as f64 / n_scans as f64;
            let mut tic = 2e5 * (1.0 + 0.1 * rng.next());
            let mut bp: f64 = 1e4;
            for &c in &ids {
                let d = (rt - bcs[c].rt) / 0.05;
                if d.abs() < 5.0 {
                    let h = detected[f][c].unwrap_or(0.0) * 8.0 * (-d * d).exp();
                    tic += h;
                    bp = bp.max(h);
                }
            }
            writeln!(
                s,
                "{i}\tscan={}\tok\t1\t+\tprofile\t{rt:.4}\t20000\t900\t{tic:.1}\t300.1\t{bp:.1}\thigh\t3\t1\tfalse\t\t\t\t\t\t",
                i + 1
            )?;
        }
        std::fs::write(dir.join("spectra.tsv"), s)?;
        let mut comp = String::from(
            "compound\trt_apex_min\trt_start_min\trt_end_min\tpolarity\tionization\tresolution\tneutral_mass\tnominal_mass\todd_nominal\tn_cl\tn_br\thalogen\thalogen_probability\tmolecular_ion_mz\tion_type\tcharge\tapex_intensity\tarea\tmembers\tevidence\n",
        );
        let mut traces = String::from("compound\tshell\tmz\trt_min\tintensity\n");
        let mut cluster = String::from("compound\tshell\tobserved\texpected\n");
        for (k, &c) in ids.iter().enumerate() {
            let b = &bcs[c];
            let area = detected[f][c].unwrap_or(0.0);
            let hal = b.n_cl + b.n_br > 0;
            let mz = b.mass + 1.00728;
            writeln!(
                comp,
                "{}\t{:.3}\t{:.3}\t{:.3}\t+\telectrospray\thigh\t{:.4}\t{}\tfalse\t{}\t{}\t{hal}\t{}\t{mz:.4}\t[M+H]+\t1\t{:.1}\t{area:.1}\t{}:[M+H]+;{}:[M+Na]+\tsynthetic",
                k + 1,
                b.rt,
                b.rt - 0.1,
                b.rt + 0.1,
                b.mass,
                b.mass.round(),
                b.n_cl,
                b.n_br,
                if hal { 0.99 } else { 0.01 },
                area * 8.0,
                2 * k + 1,
                2 * k + 2
            )?;
            if hal {
                let expected = [
                    1.0,
                    0.32 * b.n_cl as f64 + 0.97 * b.n_br as f64,
                    0.1 * (b.n_cl + b.n_br) as f64,
                ];
                let top = expected.iter().copied().fold(0.0, f64::max);
                for (j, e) in expected.iter().enumerate() {
                    let obs = e / top * (0.95 + 0.1 * rng.next());
                    writeln!(cluster, "{}\t{}\t{obs:.4}\t{:.4}", k + 1, 2 * j, e / top)?;
                    for i in 0..40 {
                        let rt = b.rt - 0.2 + i as f64 * 0.01;
                        let d = (rt - b.rt) / 0.05;
                        writeln!(
                            traces,
                            "{}\t{}\t{:.4}\t{rt:.3}\t{:.1}",
                            k + 1,
                            if j == 0 { "M".to_owned() } else { format!("M+{}", 2 * j) },
                            mz + 1.997 * j as f64,
                            area * 8.0 * e / top * (-d * d).exp()
                        )?;
                    }
                }
            }
        }
        std::fs::write(dir.join("compounds.tsv"), comp)?;
        std::fs::write(dir.join("traces.tsv"), traces)?;
        std::fs::write(dir.join("cluster.tsv"), cluster)?;
        let hal = ids.iter().filter(|&&c| bcs[c].n_cl + bcs[c].n_br > 0).count();
        writeln!(
            batch,
            "in/{name}.mzML\tok\t\t{n_scans}\t{n_scans}\t0\t1\t16\t0\t{hal}\t0\t0\t1.0\t{hal}\t0"
        )?;
        inputs.push(serde_json::json!({"path": format!("in/{name}.mzML"), "report_folder": name}));
    }
    std::fs::write(out.join("batch.tsv"), batch)?;
    let run = serde_json::json!({"tool": "mzsift", "version": "synthetic", "started_utc": "", "finished_utc": "", "caution": mzcore::screen::CAUTION, "inputs": inputs});
    std::fs::write(out.join("run.json"), serde_json::to_string_pretty(&run)?)?;
    let mut wide = String::from(
        "batch_compound\tneutral_mass\trt_min\tpolarity\tn_cl\tn_br\thalogen\todd_nominal\tfiles_detected\tin_blank\tblank_max\tabove_blank",
    );
    for n in &names {
        write!(wide, "\t{n}")?;
    }
    wide.push('\n');
    let mut long = String::from(
        "batch_compound\tfile\tsample\tkind\tdetected\tfilled\tarea\tapex_intensity\trt_min\tmz_error_ppm\tcompound\n",
    );
    for (c, b) in bcs.iter().enumerate() {
        let blank_max = (0..n_files)
            .filter(|&f| names[f].ends_with("blank"))
            .filter_map(|f| detected[f][c])
            .fold(0.0, f64::max);
        let in_files = (0..n_files).filter(|&f| detected[f][c].is_some()).count();
        write!(
            wide,
            "{}\t{:.4}\t{:.3}\t+\t{}\t{}\t{}\tfalse\t{in_files}\t{}\t{}\t{}",
            c + 1,
            b.mass,
            b.rt,
            b.n_cl,
            b.n_br,
            b.n_cl + b.n_br > 0,
            blank_max > 0.0,
            if blank_max > 0.0 { format!("{blank_max:.1}") } else { String::new() },
            blank_max == 0.0
        )?;
        for per_file in &detected {
            match per_file[c] {
                Some(a) => write!(wide, "\t{a:.1}")?,
                None => wide.push('\t'),
            }
        }
        wide.push('\n');
        for (f, name) in names.iter().enumerate() {
            let kind = if name.ends_with("blank") { "blank" } else { "sample" };
            let k = (0..=c).filter(|&j| detected[f][j].is_some()).count();
            match detected[f][c] {
                Some(a) => writeln!(
                    long,
                    "{}\t{name}\t{name}\t{kind}\ttrue\tfalse\t{a:.1}\t{:.1}\t{:.3}\t0.5\t{k}",
                    c + 1,
                    a * 8.0,
                    b.rt
                )?,
                None => writeln!(long, "{}\t{name}\t{name}\t{kind}\tfalse\ttrue\t\t\t\t\t", c + 1)?,
            }
        }
    }
    std::fs::write(out.join("batch_compounds.tsv"), wide)?;
    std::fs::write(out.join("detections.tsv"), long)?;
    let written = t0.elapsed();
    let t1 = Instant::now();
    let stats = mzcore::html::write_report(out, &out.join("report.html"))?;
    println!(
        "{n_files} files x {n_compounds} compounds ({n_scans} scans each): reports written in {:.2} s; \
report.html {:.2} MB, {} compound sections, {} heat-map cells, read + rendered in {:.2} s",
        written.as_secs_f64(),
        stats.bytes as f64 / 1e6,
        stats.compound_sections,
        stats.heat_map_cells,
        t1.elapsed().as_secs_f64()
    );
    Ok(())
}
