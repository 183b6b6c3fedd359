//! The page itself: a `maud` template over the [`RunFolder`] model, with the plots inlined.

use std::collections::{BTreeSet, HashMap};

use maud::{DOCTYPE, Markup, PreEscaped, html};

use super::model::{
    BatchMatrix, CheckRow, FileEntry, FileEvidence, HalogenEvidence, Loaded, RunFolder,
};
use super::plot::{self, Bar, Line, Mark};

/// Paul Tol's sequential colour scheme "YlOrBr" (Tol, "Colour Schemes", SRON technical note,
/// 2021), light to dark: the heat map's nine intensity classes.
pub const TOL_YLORBR: [&str; 9] = [
    "#FFFFE5", "#FFF7BC", "#FEE391", "#FEC44F", "#FB9A29", "#EC7014", "#CC4C02", "#993404",
    "#662506",
];

const STYLE: &str = include_str!("page.css");

/// A number for people: three significant digits, scientific notation when large or small.
pub fn number(v: f64) -> String {
    if !v.is_finite() {
        return String::new();
    }
    let a = v.abs();
    if a == 0.0 {
        "0".into()
    } else if !(0.01..100_000.0).contains(&a) {
        format!("{v:.2e}")
    } else {
        let decimals = (2 - a.log10().floor() as i32).max(0) as usize;
        format!("{v:.decimals$}")
    }
}

fn opt(v: Option<f64>) -> String {
    v.map(number).unwrap_or_default()
}

fn mass(v: Option<f64>) -> String {
    v.map(|m| format!("{m:.4} u")).unwrap_or_else(|| "unknown".into())
}

fn status_mark(status: &str) -> &'static str {
    match status {
        "ok" => "✓",
        "partial" => "◐",
        "failed" => "✗",
        _ => "–",
    }
}

fn missing(sentence: &str) -> Markup {
    html! { p.missing { (sentence) } }
}

fn halogens(n_cl: &str, n_br: &str) -> String {
    let part = |el: &str, n: &str| match n {
        "" | "0" => String::new(),
        "1" => el.to_owned(),
        n => format!("{el}{n}"),
    };
    let s = format!("{}{}", part("Cl", n_cl), part("Br", n_br));
    if s.is_empty() { "no Cl/Br".into() } else { s }
}

fn parity(odd: &str) -> &'static str {
    match odd {
        "true" => "odd nominal mass (odd number of N by the nitrogen rule)",
        "false" => "even nominal mass (even number of N by the nitrogen rule)",
        _ => "parity undecided",
    }
}

/// Renders the whole page.
pub fn render(folder: &RunFolder) -> String {
    let title =
        folder.dir.file_name().map(|n| n.to_string_lossy().into_owned()).unwrap_or_default();
    let caution = folder
        .run
        .as_ref()
        .ok()
        .map(|r| r.caution.clone())
        .filter(|c| !c.is_empty())
        .unwrap_or_else(|| crate::screen::CAUTION.to_owned());
    let page = html! {
        (DOCTYPE)
        html lang="en" {
            head {
                meta charset="utf-8";
                meta name="viewport" content="width=device-width, initial-scale=1";
                title { "Screening report: " (title) }
                style { (PreEscaped(STYLE)) }
            }
            body {
                header {
                    h1 { "Screening report: " (title) }
                    (run_line(folder))
                }
                aside.caution role="note" {
                    strong { "Screening hints, not identifications. " }
                    (caution)
                }
                nav {
                    a href="#batch" { "The batch" } " · "
                    a href="#matrix" { "Compounds across files" } " · "
                    a href="#halogenated" { "Halogenated compounds" } " · "
                    a href="#files" { "Files" }
                }
                (batch_section(folder))
                (matrix_section(folder))
                (halogen_sections(folder))
                (file_sections(folder))
                footer {
                    "Written by mzsift from the reports in " code { (folder.dir.display()) }
                    ". Colours: Okabe–Ito for lines and bars, Paul Tol's YlOrBr for the heat map; shapes and labels tell the same."
                }
            }
        }
    };
    page.into_string()
}

fn run_line(folder: &RunFolder) -> Markup {
    match &folder.run {
        Ok(r) => html! {
            p.run { (r.tool) " " (r.version) ", run " (r.started_utc) " to " (r.finished_utc) " (UTC)." }
        },
        Err(e) => missing(&format!("{e} Tool and run times are unknown.")),
    }
}

/// Per file: `(pass, warn, fail)` counts and the failed or warning rules.
fn qc_by_file(rows: &[CheckRow]) -> HashMap<String, (usize, Vec<String>, Vec<String>)> {
    let mut m: HashMap<String, (usize, Vec<String>, Vec<String>)> = HashMap::new();
    for r in rows {
        let e = m.entry(r.file.clone()).or_default();
        match r.status.as_str() {
            "pass" => e.0 += 1,
            "warn" => e.1.push(r.rule.clone()),
            _ => e.2.push(r.rule.clone()),
        }
    }
    m
}

fn halogen_count(f: &FileEntry) -> Option<u64> {
    f.row.halogen_compounds.or_else(|| {
        f.compounds.as_ref().ok().map(|c| c.iter().filter(|c| c.halogen).count() as u64)
    })
}

fn batch_section(folder: &RunFolder) -> Markup {
    let files = match &folder.files {
        Ok(f) => f,
        Err(e) => {
            return html! { section #batch { h2 { "The batch" } (missing(&format!("{e} No file can be listed."))) (qc_line(folder)) } };
        }
    };
    let count = |s: &str| files.iter().filter(|f| f.row.status == s).count();
    let qc = folder.check.as_ref().ok().map(|rows| qc_by_file(rows));
    let halogenated: u64 = files.iter().filter_map(halogen_count).sum();
    html! {
        section #batch {
            h2 { "The batch" }
            p {
                (files.len()) " files: " (count("ok")) " ok, " (count("partial")) " partial, "
                (count("failed")) " failed, " (count("skipped")) " skipped; "
                (halogenated) " halogenated compounds in all."
            }
            (qc_line(folder))
            table.files {
                thead { tr {
                    th { "file" } th { "status" } th.n { "spectra" } th { "RT range (min)" }
                    th.n { "halogenated compounds" }
                    @if qc.is_some() { th { "QC" } }
                } }
                tbody {
                    @for f in files {
                        tr class=(format!("st-{}", f.row.status)) {
                            td { a href=(format!("#file-{}", anchor(&f.folder))) { (f.folder) } }
                            td { (status_mark(&f.row.status)) " " (f.row.status)
                                @if !f.row.error.is_empty() { div.error { (f.row.error) } } }
                            td.n { (f.row.spectra.map(|n| n.to_string()).unwrap_or_default()) }
                            td { @if let (Some(a), Some(b)) = (f.row.rt_start_min, f.row.rt_end_min) { (format!("{a:.2} – {b:.2}")) } }
                            td.n { (halogen_count(f).map(|n| n.to_string()).unwrap_or_else(|| "unknown".into())) }
                            @if let Some(qc) = &qc {
                                td { (qc_cell(qc, f)) }
                            }
                        }
                    }
                }
            }
        }
    }
}

fn qc_line(folder: &RunFolder) -> Markup {
    html! {
            @match &folder.check {
                Ok(rows) => p { "QC gate (check.tsv): " (rows.iter().filter(|r| r.status == "fail").count()) " failed and "
                    (rows.iter().filter(|r| r.status == "warn").count()) " warning rule results of " (rows.len()) "." },
                Err(e) => (missing(&format!("{e} No QC result: run mzsift check with -o into this folder to add it."))),
            }
    }
}

fn qc_cell(qc: &HashMap<String, (usize, Vec<String>, Vec<String>)>, f: &FileEntry) -> Markup {
    let base = |s: &str| s.rsplit(['/', '\\']).next().unwrap_or(s).to_owned();
    let found = qc
        .get(&f.row.file)
        .or_else(|| qc.iter().find(|(k, _)| base(k) == base(&f.row.file)).map(|(_, v)| v));
    match found {
        None => html! { "not checked" },
        Some((pass, warn, fail)) if warn.is_empty() && fail.is_empty() => {
            html! { "✓ pass (" (pass) " rules)" }
        }
        Some((_, warn, fail)) => html! {
            @if !fail.is_empty() { "✗ fail: " (fail.join(", ")) }
            @if !fail.is_empty() && !warn.is_empty() { "; " }
            @if !warn.is_empty() { "! warn: " (warn.join(", ")) }
        },
    }
}

fn anchor(s: &str) -> String {
    s.chars()
        .map(|c| if c.is_ascii_alphanumeric() || c == '-' || c == '_' { c } else { '_' })
        .collect()
}

/// The heat-map class (0..=8) of a value on the log scale between `lo` and `hi`.
fn class_of(v: f64, lo: f64, hi: f64) -> usize {
    if hi <= lo {
        return 8;
    }
    let t = (v.max(lo).log10() - lo.log10()) / (hi.log10() - lo.log10());
    ((t * 9.0) as usize).min(8)
}

fn matrix_section(folder: &RunFolder) -> Markup {
    let m = match &folder.batch {
        Ok(m) => m,
        Err(e) => {
            return html! { section #matrix { h2 { "Compounds across files" }
            (missing(&format!("{e} Compounds are not lined up across files, so there is no heat map."))) } };
        }
    };
    let blanks = folder.blanks();
    html! {
        section #matrix {
            h2 { "Compounds across files" }
            p { (m.compounds.len()) " compounds in " (m.files.len()) " files, halogenated rows first; "
                "colour is the log of the area, a hatched cell means not found; blanks are marked "
                "“blank” and outlined with dashes. Hover a cell for its value." }
            @if folder.detections.is_err() { (missing("detections.tsv is missing, so blanks are not marked.")) }
            (heat_map(m, &blanks))
        }
    }
}

fn heat_map(m: &BatchMatrix, blanks: &BTreeSet<String>) -> Markup {
    let order = m.display_order();
    let positive = m.values.iter().flatten().copied().filter(|v| *v > 0.0);
    let (lo, hi) = positive.fold((f64::INFINITY, 0.0f64), |(a, b), v| (a.min(v), b.max(v)));
    let nf = m.files.len().max(1);
    let cw = (720 / nf).clamp(6, 24) as i64;
    let ch = 12i64;
    let left = 190i64;
    let top = 170i64;
    let halogenated = order.iter().filter(|&&c| m.compounds[c].halogen).count() as i64;
    let gap = if halogenated > 0 && (halogenated as usize) < order.len() { 8 } else { 0 };
    let width = (left + cw * nf as i64 + 130).max(left + 64 * 10 + 30);
    let height = top + ch * order.len() as i64 + gap + 70;
    let row_y = |i: usize| top + ch * i as i64 + if (i as i64) >= halogenated { gap } else { 0 };
    let cell_css = format!(".heatmap rect.cell{{width:{}px;height:{}px}}", cw - 1, ch - 1);
    html! {
        div.scroll {
            svg.heatmap xmlns="http://www.w3.org/2000/svg" width=(width) height=(height) viewBox=(format!("0 0 {width} {height}")) role="img" aria-label="heat map of compounds by file" {
                style { (cell_css) @for (i, c) in TOL_YLORBR.iter().enumerate() { (format!(".q{i}{{fill:{c}}}")) } }
                defs { pattern #hatch width="4" height="4" patternUnits="userSpaceOnUse" { rect width="4" height="4" fill="#ffffff" {} path d="M0,4 L4,0" stroke="#bbbbbb" stroke-width="1" {} } }
                @for (f, name) in m.files.iter().enumerate() {
                    @let x = left + cw * f as i64 + cw / 2;
                    @let blank = blanks.contains(name);
                    text.col x=(x) y=(top - 6) transform=(format!("rotate(-60 {x} {})", top - 6)) { (name) @if blank { " (blank)" } }
                    @if blank {
                        rect.blankcol x=(left + cw * f as i64) y=(top - 2) width=(cw - 1) height=(height - top - 66) {}
                    }
                }
                @if halogenated > 0 { text.group x="4" y=(top - 4) { "halogenated ▼" } }
                @for (i, &c) in order.iter().enumerate() {
                    @let bc = &m.compounds[c];
                    @let y = row_y(i);
                    text.row x=(left - 4) y=(y + ch - 3) {
                        (bc.id) " · " (bc.neutral_mass.map(|v| format!("{v:.3}")).unwrap_or_default())
                        @if bc.halogen { " · " (halogens(&bc.n_cl, &bc.n_br)) }
                    }
                    @for f in 0..m.files.len() {
                        @let v = m.value(c, f);
                        @let x = left + cw * f as i64;
                        @match v {
                            Some(v) if v > 0.0 => rect class=(format!("cell q{}", class_of(v, lo, hi))) x=(x) y=(y) {
                                title { (bc.id) " in " (m.files[f]) ": " (number(v)) }
                            },
                            Some(v) => rect.cell fill="#ffffff" x=(x) y=(y) { title { (bc.id) " in " (m.files[f]) ": " (number(v)) } },
                            None => rect.cell fill="url(#hatch)" x=(x) y=(y) { title { (bc.id) " in " (m.files[f]) ": not found" } },
                        }
                    }
                }
                @let ly = height - 40;
                text.legend x=(left) y=(ly - 6) { "area, log scale:" }
                @for (i, c) in TOL_YLORBR.iter().enumerate() {
                    @let from = if hi > lo { lo * (hi / lo).powf(i as f64 / 9.0) } else { hi };
                    rect x=(left + 64 * i as i64) y=(ly) width="62" height="12" fill=(c) stroke="#000" stroke-width="0.5" { title { "from " (number(from)) } }
                    text.legend x=(left + 64 * i as i64) y=(ly + 26) { "≥ " (number(from)) }
                }
                rect x=(left + 64 * 9 + 10) y=(ly) width="62" height="12" fill="url(#hatch)" stroke="#000" stroke-width="0.5" {}
                text.legend x=(left + 64 * 9 + 10) y=(ly + 26) { "not found" }
            }
        }
    }
}

fn halogen_sections(folder: &RunFolder) -> Markup {
    let body = match &folder.batch {
        Err(e) => missing(&format!("{e} Halogenated compounds are shown per file below.")),
        Ok(m) if folder.halogenated.is_empty() => {
            html! { p.none { "No halogenated compound in the batch (" (m.compounds.len()) " compounds in all)." } }
        }
        Ok(m) => html! { @for e in &folder.halogenated { (compound_section(folder, m, e)) } },
    };
    html! { section #halogenated { h2 { "Halogenated compounds" } (body) } }
}

fn compound_section(folder: &RunFolder, m: &BatchMatrix, e: &HalogenEvidence) -> Markup {
    let bc = &m.compounds[e.compound];
    let files = folder.files.as_ref().map(Vec::as_slice).unwrap_or(&[]);
    html! {
        section.compound id=(format!("bc-{}", anchor(&bc.id))) {
            h3 { "Compound " (bc.id) ": " (halogens(&bc.n_cl, &bc.n_br)) ", " (mass(bc.neutral_mass)) }
            dl {
                dt { "neutral mass" } dd { (mass(bc.neutral_mass)) }
                dt { "n_cl / n_br" } dd { (bc.n_cl) " / " (bc.n_br) }
                dt { "parity" } dd { (parity(&bc.odd_nominal)) }
                dt { "retention time" } dd { (opt(bc.rt_min)) " min" }
                @if !bc.polarity.is_empty() { dt { "polarity" } dd { (bc.polarity) } }
                dt { "files" } dd { "detected in " (bc.files_detected) }
                dt { "blank" } dd {
                    @if bc.in_blank { "in a blank (largest blank value " (opt(bc.blank_max)) ")" } @else { "not in a blank" }
                    @if bc.above_blank { "; above the blank" } @else { "; not above the blank" }
                }
                @if !bc.formula_candidates.is_empty() { dt { "formula candidates" } dd { (bc.formula_candidates.replace(';', ", ")) } }
            }
            div.evidence {
                (evidence(files, &e.strongest, "strongest in"))
                (evidence(files, &e.blank, "blank"))
            }
        }
    }
}

fn evidence(files: &[FileEntry], ev: &Loaded<FileEvidence>, role: &str) -> Markup {
    let ev = match ev {
        Ok(ev) => ev,
        Err(e) => return html! { div.panel { h4 { (role) } (missing(e)) } },
    };
    let file = &files[ev.file];
    let Some(c) = &ev.compound else {
        return html! { div.panel { h4 { (role) " " (file.folder) }
        (missing("Only a gap-filled value: this file has no compound row to show traces for.")) } };
    };
    let traces = ev.traces.as_ref().map_err(Clone::clone).and_then(|t| {
        let mut shells: Vec<String> =
            t.iter().map(|p| p.shell.clone()).collect::<BTreeSet<_>>().into_iter().collect();
        shells.sort_by_key(|s| {
            s.trim_start_matches("M+").trim_start_matches('M').parse::<u32>().unwrap_or(0)
        });
        let lines: Vec<Line> = shells
            .iter()
            .map(|s| {
                let mut pts: Vec<(f64, f64)> =
                    t.iter().filter(|p| &p.shell == s).map(|p| (p.rt_min, p.intensity)).collect();
                pts.sort_by(|a, b| a.0.total_cmp(&b.0));
                let mz = t.iter().find(|p| &p.shell == s).map(|p| p.mz).unwrap_or(0.0);
                Line { label: format!("{s} (m/z {mz:.4})"), points: pts }
            })
            .collect();
        if lines.is_empty() {
            return Err("traces.tsv has no trace for this compound.".into());
        }
        let marks = [Mark { rt: c.rt_apex_min, label: "apex".into(), strong: true }];
        plot::lines_plot("extracted-ion traces", "intensity", &lines, &marks, (460, 240))
    });
    let cluster = ev.cluster.as_ref().map_err(Clone::clone).and_then(|shells| {
        let mut s = shells.clone();
        s.sort_by_key(|x| x.shell);
        let bars: Vec<Bar> = s
            .iter()
            .map(|x| Bar {
                label: if x.shell == 0 { "M".into() } else { format!("M+{}", x.shell) },
                observed: x.observed,
                expected: x.expected,
            })
            .collect();
        if bars.is_empty() {
            return Err("cluster.tsv has no cluster for this compound.".into());
        }
        plot::cluster_plot("isotope cluster at the apex", &bars, (300, 240)).map(|svg| (svg, s))
    });
    html! {
        div.panel {
            h4 { (role) " " a href=(format!("#file-{}", anchor(&file.folder))) { (file.folder) } ", compound " (c.compound) }
            p.small { (c.ion_type) " at m/z " (format!("{:.4}", c.molecular_ion_mz)) ", apex " (format!("{:.2}", c.rt_apex_min)) " min, apex intensity " (opt(c.apex_intensity)) ", area " (opt(c.area)) }
            div.plots {
                @match &traces { Ok(svg) => div.plot { (PreEscaped(svg)) }, Err(e) => (missing(e)) }
                @match &cluster {
                    Ok((svg, shells)) => div.plot {
                        (PreEscaped(svg))
                        table.cluster { tr { th { "shell" } th.n { "observed" } th.n { "expected" } }
                            @for s in shells { tr { td { @if s.shell == 0 { "M" } @else { "M+" (s.shell) } } td.n { (format!("{:.3}", s.observed)) } td.n { (format!("{:.3}", s.expected)) } } } }
                    },
                    Err(e) => (missing(e)),
                }
            }
            p.small { @match ev.misfit {
                Some((m, from)) => { "misfit (chi-square per degree of freedom, from " (from) "): " (format!("{m:.2}")) },
                None => { "The reports give no misfit for this compound." },
            } }
            @if !c.members.is_empty() {
                p.small { "members: " (members(&c.members)) }
            }
            @if !c.formula_candidates.is_empty() { p.small { "formula candidates: " (c.formula_candidates.replace(';', ", ")) } }
            @if !c.evidence.is_empty() { p.small { "evidence: " (c.evidence.replace(';', ", ")) } }
        }
    }
}

/// `4:[M+H]+;9:-HCl` as `feature 4 [M+H]+, feature 9 -HCl`.
fn members(text: &str) -> String {
    text.split(';')
        .filter(|m| !m.is_empty())
        .map(|m| match m.split_once(':') {
            Some((id, role)) => format!("feature {id} {role}"),
            None => m.to_owned(),
        })
        .collect::<Vec<_>>()
        .join(", ")
}

fn file_sections(folder: &RunFolder) -> Markup {
    let files = match &folder.files {
        Ok(f) => f,
        Err(e) => return html! { section #files { h2 { "Files" } (missing(e)) } },
    };
    html! { section #files { h2 { "Files" } @for f in files { (file_section(f)) } } }
}

fn file_section(f: &FileEntry) -> Markup {
    let failed = f.row.status == "failed" || f.row.status == "skipped";
    html! {
        section.file id=(format!("file-{}", anchor(&f.folder))) {
            h3 { (f.folder) " " span.status { (status_mark(&f.row.status)) " " (f.row.status) } }
            p.small { (f.row.file) }
            @if failed {
                p.problem { "This file " (if f.row.status == "failed" { "failed" } else { "was skipped" }) ": "
                    (if f.row.error.is_empty() { "no reason recorded" } else { &f.row.error }) ". It has no spectra to plot." }
            } @else {
                @if !f.row.error.is_empty() { p.problem { "Problems: " (f.row.error) } }
                (chromatograms(f))
                (file_compounds(f))
            }
        }
    }
}

fn chromatograms(f: &FileEntry) -> Markup {
    let spectra = match &f.spectra {
        Ok(s) => s,
        Err(e) => return missing(&format!("{e} No chromatogram.")),
    };
    let ms1: Vec<_> = spectra
        .iter()
        .filter(|s| s.status == "ok" && s.ms_level == Some(1) && s.rt_min.is_some())
        .collect();
    if ms1.is_empty() {
        return html! { p.none { "The file holds no readable MS1 spectrum (" (spectra.len()) " spectra listed), so there is no chromatogram." } };
    }
    let polarities: BTreeSet<&str> = ms1.iter().map(|s| s.polarity.as_str()).collect();
    let line =
        |pol: &str, value: &dyn Fn(&super::model::SpectrumPoint) -> Option<f64>, what: &str| {
            let mut pts: Vec<(f64, f64)> = ms1
                .iter()
                .filter(|s| s.polarity == pol)
                .filter_map(|s| Some((s.rt_min?, value(s).unwrap_or(0.0))))
                .collect();
            pts.sort_by(|a, b| a.0.total_cmp(&b.0));
            let label = match pol {
                "+" => format!("{what} positive"),
                "-" => format!("{what} negative"),
                _ => what.to_owned(),
            };
            Line { label, points: plot::thin(&pts, 500) }
        };
    let tic: Vec<Line> = polarities.iter().map(|p| line(p, &|s| s.intensity_sum, "TIC")).collect();
    let bpc: Vec<Line> =
        polarities.iter().map(|p| line(p, &|s| s.base_peak_intensity, "base peak")).collect();
    let marks: Vec<Mark> = f
        .compounds
        .as_ref()
        .map(|cs| {
            cs.iter()
                .map(|c| Mark {
                    rt: c.rt_apex_min,
                    label: c.compound.to_string(),
                    strong: c.halogen,
                })
                .collect()
        })
        .unwrap_or_default();
    let tic = plot::lines_plot("TIC (MS1)", "intensity sum", &tic, &marks, (900, 220));
    // Compounds are marked on the TIC only: the base-peak panel below shares its time axis.
    let bpc = plot::lines_plot("base-peak chromatogram (MS1)", "base peak", &bpc, &[], (900, 220));
    html! {
        div.chrom {
            @for p in [tic, bpc] { @match p { Ok(svg) => div.plot { (PreEscaped(svg)) }, Err(e) => (missing(&e)) } }
            @if f.compounds.is_ok() { p.small { "On the TIC, ▲ with a number: a halogenated compound's apex (numbers left out where they would overlap); a tick: another compound." } }
        }
    }
}

fn file_compounds(f: &FileEntry) -> Markup {
    let cs = match &f.compounds {
        Ok(c) => c,
        Err(e) => return missing(&format!("{e} Compounds of this file are not known.")),
    };
    let hal: Vec<_> = cs.iter().filter(|c| c.halogen).collect();
    html! {
        @if hal.is_empty() {
            p.none { "No halogenated compound in this file (" (cs.len()) " compounds in all)." }
        } @else {
            p { (cs.len()) " compounds, " (hal.len()) " halogenated:" }
            ul.compact { @for c in hal {
                li { (c.compound) ": " (halogens(&c.n_cl.to_string(), &c.n_br.to_string())) ", " (mass(c.neutral_mass)) ", "
                    (format!("{:.2}", c.rt_apex_min)) " min, " (c.ion_type) " m/z " (format!("{:.4}", c.molecular_ion_mz)) }
            } }
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn numbers_for_people() {
        assert_eq!(number(0.0), "0");
        assert_eq!(number(1234.6), "1235");
        assert_eq!(number(12.345), "12.3");
        assert_eq!(number(0.5), "0.500");
        assert_eq!(number(1.5e7), "1.50e7");
    }

    #[test]
    fn heat_map_classes_span_the_log_range() {
        assert_eq!(class_of(10.0, 10.0, 1e6), 0);
        assert_eq!(class_of(1e6, 10.0, 1e6), 8);
        assert_eq!(class_of(1e4, 10.0, 1e6), 5);
    }
}
