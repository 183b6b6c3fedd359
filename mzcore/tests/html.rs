//! The HTML page from hand-made report folders in the documented formats (README, the
//! compound and batch-view file formats): a failed file, an empty file, a file without any
//! halogenated compound and a blank are each named on the page, and missing tables are said.

use std::path::Path;

use mzcore::html::{RunFolder, render, write_report};

const COMPOUND_HEADER: &str = "compound\trt_apex_min\trt_start_min\trt_end_min\tpolarity\tionization\tresolution\tneutral_mass\tnominal_mass\todd_nominal\tn_cl\tn_br\thalogen\thalogen_probability\tmolecular_ion_mz\tion_type\tcharge\tapex_intensity\tarea\tmembers\tevidence\n";
const SPECTRA_HEADER: &str = "index\tid\tstatus\tms_level\tpolarity\trepresentation\trt_min\tpoints\tpeaks\tintensity_sum\tbase_peak_mz\tbase_peak_intensity\tresolution\tclusters\tflagged_ions\thas_halogen\tbest_mz\tbest_n_cl\tbest_n_br\tbest_score\todd_nominal\terror\n";

fn put(dir: &Path, name: &str, text: &str) {
    let p = dir.join(name);
    std::fs::create_dir_all(p.parent().unwrap()).unwrap();
    std::fs::write(p, text).unwrap();
}

fn spectra(n: usize) -> String {
    let mut s = SPECTRA_HEADER.to_owned();
    for i in 0..n {
        let rt = 2.0 + i as f64 * 0.05;
        let tic = 1000.0 + 50_000.0 * (-((rt - 3.0) / 0.1f64).powi(2)).exp();
        s += &format!(
            "{i}\tscan={}\tok\t1\t+\tprofile\t{rt}\t100\t10\t{tic}\t300.1\t{}\thigh\t0\t0\tfalse\t\t\t\t\t\t\n",
            i + 1,
            tic / 4.0
        );
    }
    s
}

/// A batch of five: a river sample with a Cl2 compound, its blank, a failed file, an empty
/// file (no spectra) and a sample whose compounds carry no halogen.
fn hand_made(dir: &Path) {
    put(
        dir,
        "batch.tsv",
        "file\tstatus\terror\tspectra\tms1\tms2\trt_start_min\trt_end_min\tflagged_spectra\thalogen_features\todd_nominal_features\tunreadable_spectra\tseconds\thalogen_compounds\todd_nominal_compounds\n\
in/river.mzML\tok\t\t40\t40\t0\t2\t3.95\t5\t1\t0\t0\t0.1\t1\t0\n\
in/blank.mzML\tok\t\t40\t40\t0\t2\t3.95\t0\t0\t0\t0\t0.1\t0\t0\n\
in/broken.mzML\tfailed\tbyte 12: not an mzML document\t0\t0\t0\t\t\t0\t0\t0\t0\t0.0\t\t\n\
in/empty.mzML\tok\t\t0\t0\t0\t\t\t0\t0\t0\t0\t0.0\t0\t0\n\
in/tap.mzML\tok\t\t40\t40\t0\t2\t3.95\t0\t0\t0\t0\t0.1\t0\t0\n",
    );
    put(dir, "river/spectra.tsv", &spectra(40));
    put(dir, "blank/spectra.tsv", &spectra(40));
    put(dir, "tap/spectra.tsv", &spectra(40));
    put(dir, "empty/spectra.tsv", SPECTRA_HEADER);
    put(dir, "empty/compounds.tsv", COMPOUND_HEADER);
    put(
        dir,
        "river/compounds.tsv",
        &format!(
            "{COMPOUND_HEADER}1\t3.0\t2.8\t3.2\t+\telectrospray\thigh\t161.9748\t162\tfalse\t2\t0\ttrue\t0.99\t162.9821\t[M+H]+\t1\t12500\t2100\t4:[M+H]+;9:[M+Na]+\tCl2 cluster;co-eluting adduct\n"
        ),
    );
    put(dir, "blank/compounds.tsv", COMPOUND_HEADER);
    put(
        dir,
        "tap/compounds.tsv",
        &format!(
            "{COMPOUND_HEADER}1\t3.0\t2.8\t3.2\t+\telectrospray\thigh\t180.0634\t180\tfalse\t0\t0\tfalse\t0.01\t181.0707\t[M+H]+\t1\t9000\t1500\t2:[M+H]+\t\n2\t3.5\t3.4\t3.6\t+\telectrospray\thigh\t151.0633\t151\ttrue\t0\t0\tfalse\t0.02\t152.0706\t[M+H]+\t1\t4000\t700\t3:[M+H]+\t\n"
        ),
    );
    let mut traces = "compound\tshell\tmz\trt_min\tintensity\n".to_owned();
    for (shell, mz, h) in
        [("M", 162.9821, 12500.0), ("M+2", 164.9791, 8000.0), ("M+4", 166.9762, 1300.0)]
    {
        for i in 0..9 {
            let rt = 2.8 + i as f64 * 0.05;
            traces += &format!(
                "1\t{shell}\t{mz}\t{rt}\t{}\n",
                h * (-((rt - 3.0) / 0.08f64).powi(2)).exp()
            );
        }
    }
    put(dir, "river/traces.tsv", &traces);
    put(
        dir,
        "river/cluster.tsv",
        "compound\tshell\tobserved\texpected\n1\t0\t1\t1\n1\t2\t0.64\t0.65\n1\t4\t0.1\t0.11\n",
    );
    put(
        dir,
        "batch_compounds.tsv",
        "batch_compound\tneutral_mass\trt_min\tpolarity\tn_cl\tn_br\thalogen\todd_nominal\tfiles_detected\tin_blank\tblank_max\tabove_blank\triver\tblank\tbroken\tempty\ttap\n\
1\t180.0634\t3.0\t+\t0\t0\tfalse\tfalse\t1\tfalse\t\tfalse\t\t\t\t\t1500\n\
2\t161.9748\t3.0\t+\t2\t0\ttrue\tfalse\t1\tfalse\t40\ttrue\t2100\t40\t\t\t\n\
3\t151.0633\t3.5\t+\t0\t0\tfalse\ttrue\t1\tfalse\t\tfalse\t\t\t\t\t700\n",
    );
    put(
        dir,
        "detections.tsv",
        "batch_compound\tfile\tsample\tkind\tdetected\tfilled\tarea\tapex_intensity\trt_min\tmz_error_ppm\tcompound\n\
2\triver\triver\tsample\ttrue\tfalse\t2100\t12500\t3.0\t0.4\t1\n\
2\tblank\tblank\tblank\tfalse\ttrue\t40\t200\t3.0\t\t\n\
2\ttap\ttap\tsample\tfalse\ttrue\t\t\t\t\t\n\
1\ttap\ttap\tsample\ttrue\tfalse\t1500\t9000\t3.0\t0.2\t1\n\
1\tblank\tblank\tblank\tfalse\tfalse\t\t\t\t\t\n\
3\ttap\ttap\tsample\ttrue\tfalse\t700\t4000\t3.5\t0.1\t2\n",
    );
}

/// The text of the page's section with id `id` (up to the next section of the same kind).
fn section<'a>(page: &'a str, id: &str) -> &'a str {
    let start = page.find(&format!("id=\"{id}\"")).unwrap_or_else(|| panic!("no section {id}"));
    let rest = &page[start..];
    let end = rest[1..].find("<section").map_or(rest.len(), |e| e + 1);
    &rest[..end]
}

#[test]
fn failed_empty_and_halogen_free_files_are_each_named() {
    let dir = tempfile::tempdir().unwrap();
    hand_made(dir.path());
    let page = render(&RunFolder::load(dir.path()));
    assert!(
        section(&page, "file-broken").contains("This file failed: byte 12: not an mzML document.")
    );
    assert!(
        section(&page, "file-empty")
            .contains("The file holds no readable MS1 spectrum (0 spectra listed)")
    );
    assert!(
        section(&page, "file-empty")
            .contains("No halogenated compound in this file (0 compounds in all).")
    );
    assert!(
        section(&page, "file-tap")
            .contains("No halogenated compound in this file (2 compounds in all).")
    );
    // The river sample: a chromatogram and its one halogenated compound.
    let river = section(&page, "file-river");
    assert!(river.contains("<svg") && river.contains("1 halogenated"));
    // One section for the one halogenated batch compound, with its traces and cluster.
    assert_eq!(page.matches("<section class=\"compound\"").count(), 1);
    let c = section(&page, "bc-2");
    for text in [
        "Cl2",
        "161.9748 u",
        "even nominal mass",
        "M+2 (m/z 164.9791)",
        "observed (filled)",
        "feature 4 [M+H]+",
        "0.640",
    ] {
        assert!(c.contains(text), "compound section lacks {text:?}");
    }
    assert!(c.contains("Not detected in any blank; gap filling in blank found area 40."));
    assert!(c.contains("The reports give no misfit"), "no ions.tsv, so no misfit");
    // The heat map: one cell per file and compound, the blank marked.
    assert_eq!(page.matches("class=\"cell").count(), 5 * 3);
    assert!(section(&page, "matrix").contains("blank (blank)"));
    assert!(page.contains("check.tsv is not in"));
    assert!(page.contains("Screening hints, not identifications."));
    // Nothing is loaded from elsewhere: no script, no source attribute, no outside link or
    // style reference (the SVG namespace URI is a name, not a request).
    for outside in ["<script", "src=", "href=\"http", "url(http", "@import", "<link"] {
        assert!(!page.contains(outside), "{outside}");
    }
}

#[test]
fn halogenated_rows_come_first_in_the_heat_map() {
    let dir = tempfile::tempdir().unwrap();
    hand_made(dir.path());
    let page = render(&RunFolder::load(dir.path()));
    let m = section(&page, "matrix");
    let first_cell = m.find("<title>").unwrap();
    assert!(
        m[first_cell..].starts_with("<title>2 in river: 2100</title>"),
        "{}",
        &m[first_cell..first_cell + 40]
    );
    assert!(m.contains("<title>2 in broken: not found</title>"));
}

#[test]
fn a_folder_with_nothing_says_so_for_every_section() {
    let dir = tempfile::tempdir().unwrap();
    let out = dir.path().join("page.html");
    let stats = write_report(dir.path(), &out).unwrap();
    let page = std::fs::read_to_string(&out).unwrap();
    assert_eq!(stats.bytes, page.len());
    for sentence in [
        "run.json is not in",
        "batch.tsv is not in",
        "batch_compounds.tsv is not in",
        "check.tsv is not in",
    ] {
        assert!(page.contains(sentence), "{sentence}");
    }
}

#[test]
fn a_damaged_table_is_named_with_its_line() {
    let dir = tempfile::tempdir().unwrap();
    hand_made(dir.path());
    put(dir.path(), "river/cluster.tsv", "compound\tshell\tobserved\texpected\n1\tzero\t1\t1\n");
    let page = render(&RunFolder::load(dir.path()));
    assert!(section(&page, "bc-2").contains("cluster.tsv could not be read at line 2"));
    // The rest of the compound's evidence is still there.
    assert!(section(&page, "bc-2").contains("M+2 (m/z 164.9791)"));
}
