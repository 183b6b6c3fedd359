//! Quality rules for new acquisitions: a gate that says pass, warn or fail per file and rule.
//!
//! [`QcRules`] is read from TOML ([`QcRules::from_toml`]; an unknown key or a wrong type is an
//! error naming the key). Every rule is optional; each may be limited to some files (`files`,
//! glob patterns on the file name) and may be set to warn instead of fail (`on_breach`).
//! [`QcRules::trace_targets`] lists the extracted-ion traces the required compounds need, so
//! the file is read once ([`crate::screen::screen_file_traced`]); [`QcRules::evaluate`] turns
//! the screened file into one [`QcRow`] per applicable rule, with the observed value and the
//! limit. [`write_junit`] writes rows as JUnit-style XML for CI systems.
//!
//! # Examples
//!
//! ```
//! use mzcore::mzml::{Writer, WriterOptions};
//! use mzcore::qc::{QcRules, QcStatus};
//! use mzcore::screen::{screen_reader_traced, ScreenConfig, Sha256Reader};
//! use mzcore::spectrum::{Peaks, SpectrumMeta};
//!
//! let rules = QcRules::from_toml("[min_spectra]\nlimit = 3\n[max_scan_gap]\nseconds = 5.0\n")?;
//! let mut w = Writer::new(Vec::new(), WriterOptions { spectrum_count: 3, ..Default::default() })?;
//! for (i, rt) in [1.0, 1.05, 1.5].into_iter().enumerate() {
//!     let meta = SpectrumMeta { id: format!("scan={i}"), index: i, ms_level: 1, rt_min: Some(rt), ..Default::default() };
//!     w.write_spectrum(&meta, &Peaks { mz: vec![100.0], intensity: vec![10.0] })?;
//! }
//! let doc = w.finish()?;
//! let pool = mzcore::pipeline::thread_pool(1)?;
//! let targets = rules.trace_targets("night.mzML");
//! let report = screen_reader_traced(Sha256Reader::new(&doc[..]), &ScreenConfig::default(), &pool, &targets)?;
//! let rows = rules.evaluate("night.mzML", &report);
//! assert_eq!(rows[0].status, QcStatus::Pass); // 3 spectra
//! assert_eq!((rows[1].status, rows[1].observed.as_str()), (QcStatus::Fail, "27")); // 0.45 min gap
//! # Ok::<_, mzcore::Error>(())
//! ```

use std::io::Write;

use serde::{Deserialize, Serialize};

use crate::chem::{Formula, IonType};
use crate::error::{Error, ErrorKind, Result};
use crate::mzml::ChecksumStatus;
use crate::screen::{FileReport, TracePoint, TraceTarget};
use crate::spectrum::Polarity;

/// What a breached rule reports.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Breach {
    /// The rule fails (the gate fails).
    #[default]
    Fail,
    /// The rule warns (the gate still passes).
    Warn,
}

/// Outcome of one rule for one file.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum QcStatus {
    /// Within the limit.
    Pass,
    /// Outside the limit, on a rule set to warn.
    Warn,
    /// Outside the limit (or the file could not be evaluated).
    Fail,
}

impl QcStatus {
    /// The lower-case name used in reports.
    pub fn name(self) -> &'static str {
        match self {
            QcStatus::Pass => "pass",
            QcStatus::Warn => "warn",
            QcStatus::Fail => "fail",
        }
    }
}

/// A lower limit on a count (`limit`: the least allowed).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MinCount {
    /// The least allowed value.
    pub limit: u64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// An upper limit on a count (`limit`: the most allowed).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaxCount {
    /// The most allowed value.
    pub limit: u64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// A lower limit on a value.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MinValue {
    /// The least allowed value.
    pub limit: f64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// An upper limit on a fraction (0 to 1).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct MaxFraction {
    /// The largest allowed fraction.
    pub limit: f64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// A retention-time range the scans must cover.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RtCoverage {
    /// The first scan must be at or before this time (minutes).
    pub from_min: f64,
    /// The last scan must be at or after this time (minutes).
    pub to_min: f64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// The largest allowed gap between consecutive scan times.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ScanGap {
    /// Largest allowed gap, seconds.
    pub seconds: f64,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// The SHA-1 `fileChecksum` must verify.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ChecksumRule {
    /// Pass files that carry no checksum (plain mzML) instead of failing them.
    #[serde(default)]
    pub allow_absent: bool,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// A compound that must be found: an internal standard or a spiked check compound.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RequiredCompound {
    /// Name used in the rule name (`compound:<name>`).
    pub name: String,
    /// Molecular formula of the neutral molecule.
    pub formula: String,
    /// Ion type (e.g. `M+H`, `[M-H]-`, `M+.`).
    pub ion: String,
    /// Start of the retention-time window, minutes.
    pub rt_from_min: f64,
    /// End of the retention-time window, minutes.
    pub rt_to_min: f64,
    /// Least apex intensity of the ion's trace inside the window.
    pub min_intensity: f64,
    /// m/z tolerance in Th (give this or `tolerance_ppm`).
    #[serde(default)]
    pub tolerance_mz: Option<f64>,
    /// m/z tolerance in parts per million of the ion m/z (give this or `tolerance_mz`).
    #[serde(default)]
    pub tolerance_ppm: Option<f64>,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
    /// Glob patterns on the file name; empty: every file.
    #[serde(default)]
    pub files: Vec<String>,
}

/// Carry-over: at most `limit` halogenated features in files whose name matches `files`.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct CarryOver {
    /// Most halogenated features allowed in a blank.
    pub limit: u64,
    /// Glob patterns naming the blanks (required).
    pub files: Vec<String>,
    /// Fail or warn when breached.
    #[serde(default)]
    pub on_breach: Breach,
}

/// Every rule of a QC gate; each is optional.
#[derive(Debug, Clone, PartialEq, Default, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct QcRules {
    /// Least number of readable spectra.
    pub min_spectra: Option<MinCount>,
    /// Least number of readable MS1 spectra.
    pub min_ms1: Option<MinCount>,
    /// Retention-time range the scans must cover.
    pub rt_coverage: Option<RtCoverage>,
    /// Largest gap between consecutive scan times.
    pub max_scan_gap: Option<ScanGap>,
    /// Least median TIC (sum of decoded intensities) of the MS1 spectra.
    pub min_median_tic: Option<MinValue>,
    /// Largest fraction of readable spectra without any point.
    pub max_empty_fraction: Option<MaxFraction>,
    /// Most unreadable spectra (including index entries never read).
    pub max_unreadable: Option<MaxCount>,
    /// The SHA-1 `fileChecksum` must verify.
    pub checksum: Option<ChecksumRule>,
    /// Compounds that must be found.
    pub compound: Vec<RequiredCompound>,
    /// Halogenated features allowed in blanks.
    pub carry_over: Option<CarryOver>,
}

/// One row of `check.tsv`: a rule's outcome for a file.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
pub struct QcRow {
    /// The file, as given (escaped text).
    pub file: String,
    /// Rule name (`min_spectra`, ..., `compound:<name>`, `carry_over`).
    pub rule: String,
    /// Pass, warn or fail.
    pub status: QcStatus,
    /// Observed value: a number, or a short text when there is none.
    pub observed: String,
    /// The limit: a number, or a short text for ranges and states.
    pub limit: String,
    /// What was compared, in words (escaped text).
    pub message: String,
}

/// Column names of `check.tsv`.
pub const QC_COLUMNS: &[&str] = &["file", "rule", "status", "observed", "limit", "message"];

fn config_error(what: String) -> Error {
    Error::new(ErrorKind::Config(what))
}

/// Matches `name` against a glob `pattern` (`*` any run of characters, `?` one character),
/// ignoring ASCII case.
///
/// # Examples
///
/// ```
/// use mzcore::qc::glob_match;
/// assert!(glob_match("*blank*", "DRWL0417-06_lc-pos_Procedural-BLANK.mzML"));
/// assert!(glob_match("night-??.mzML", "night-04.mzML"));
/// assert!(!glob_match("*_gc_*", "night_lc_1.mzML"));
/// ```
pub fn glob_match(pattern: &str, name: &str) -> bool {
    let p: Vec<char> = pattern.chars().map(|c| c.to_ascii_lowercase()).collect();
    let n: Vec<char> = name.chars().map(|c| c.to_ascii_lowercase()).collect();
    let (mut pi, mut ni) = (0, 0);
    let mut star: Option<(usize, usize)> = None;
    while ni < n.len() {
        if pi < p.len() && (p[pi] == '?' || (p[pi] != '*' && p[pi] == n[ni])) {
            pi += 1;
            ni += 1;
        } else if pi < p.len() && p[pi] == '*' {
            star = Some((pi, ni));
            pi += 1;
        } else if let Some((sp, sn)) = star {
            pi = sp + 1;
            ni = sn + 1;
            star = Some((sp, sn + 1));
        } else {
            return false;
        }
    }
    p[pi..].iter().all(|&c| c == '*')
}

fn applies(files: &[String], name: &str) -> bool {
    files.is_empty() || files.iter().any(|p| glob_match(p, name))
}

/// The last component of a path as given (either separator).
fn file_name(file: &str) -> &str {
    file.rsplit(['/', '\\']).next().unwrap_or(file)
}

/// A number as written in reports: the shortest text that reads back to the same value.
fn num(v: f64) -> String {
    format!("{v}")
}

impl RequiredCompound {
    /// Ion m/z, tolerance (Th) and the polarity of spectra to trace.
    fn target(&self) -> Result<TraceTarget> {
        let formula = Formula::parse(&self.formula)?;
        let ion = IonType::parse(&self.ion)?;
        let mz = ion.mz(&formula)?;
        let tolerance = match (self.tolerance_mz, self.tolerance_ppm) {
            (Some(t), None) => t,
            (None, Some(ppm)) => mz * ppm * 1e-6,
            _ => {
                return Err(config_error("give exactly one of tolerance_mz, tolerance_ppm".into()));
            }
        };
        let polarity = if ion.charge() < 0 { Polarity::Negative } else { Polarity::Positive };
        Ok(TraceTarget { mz, tolerance, polarity })
    }
}

fn check_files(key: &str, files: &[String]) -> Result<()> {
    if files.iter().any(|p| p.is_empty()) {
        return Err(config_error(format!("{key}.files: empty pattern")));
    }
    Ok(())
}

fn check_finite(key: &str, v: f64, min: f64, max: f64) -> Result<()> {
    if !(v.is_finite() && v >= min && v <= max) {
        return Err(config_error(format!("{key}: {v} is outside {min} to {max}")));
    }
    Ok(())
}

impl QcRules {
    /// Parses rules from TOML; an unknown key, a wrong type or an impossible value is an error
    /// naming the key.
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::qc::QcRules;
    /// let r = QcRules::from_toml("[min_ms1]\nlimit = 50\non_breach = \"warn\"\n")?;
    /// assert_eq!(r.min_ms1.unwrap().limit, 50);
    /// let e = QcRules::from_toml("[min_ms1]\nlimt = 50\n").unwrap_err();
    /// assert!(e.to_string().contains("limt"));
    /// # Ok::<_, mzcore::Error>(())
    /// ```
    pub fn from_toml(text: &str) -> Result<Self> {
        let rules: QcRules = toml::from_str(text).map_err(|e| config_error(e.to_string()))?;
        rules.validate()?;
        Ok(rules)
    }

    /// Checks every value's range, and that every compound's formula, ion and tolerance make
    /// sense.
    pub fn validate(&self) -> Result<()> {
        let big = f64::MAX;
        for (key, files) in [
            ("min_spectra", self.min_spectra.as_ref().map(|r| &r.files)),
            ("min_ms1", self.min_ms1.as_ref().map(|r| &r.files)),
            ("rt_coverage", self.rt_coverage.as_ref().map(|r| &r.files)),
            ("max_scan_gap", self.max_scan_gap.as_ref().map(|r| &r.files)),
            ("min_median_tic", self.min_median_tic.as_ref().map(|r| &r.files)),
            ("max_empty_fraction", self.max_empty_fraction.as_ref().map(|r| &r.files)),
            ("max_unreadable", self.max_unreadable.as_ref().map(|r| &r.files)),
            ("checksum", self.checksum.as_ref().map(|r| &r.files)),
            ("carry_over", self.carry_over.as_ref().map(|r| &r.files)),
        ] {
            if let Some(files) = files {
                check_files(key, files)?;
            }
        }
        if let Some(r) = &self.rt_coverage {
            check_finite("rt_coverage.from_min", r.from_min, 0.0, big)?;
            check_finite("rt_coverage.to_min", r.to_min, r.from_min, big)?;
        }
        if let Some(r) = &self.max_scan_gap {
            check_finite("max_scan_gap.seconds", r.seconds, 0.0, big)?;
        }
        if let Some(r) = &self.min_median_tic {
            check_finite("min_median_tic.limit", r.limit, 0.0, big)?;
        }
        if let Some(r) = &self.max_empty_fraction {
            check_finite("max_empty_fraction.limit", r.limit, 0.0, 1.0)?;
        }
        if let Some(r) = &self.carry_over {
            if r.files.is_empty() {
                return Err(config_error(
                    "carry_over.files: name the blanks (e.g. [\"*blank*\"])".into(),
                ));
            }
        }
        let mut names = std::collections::HashSet::new();
        for (i, c) in self.compound.iter().enumerate() {
            let key = format!("compound[{i}]");
            if c.name.trim().is_empty() {
                return Err(config_error(format!("{key}.name: empty")));
            }
            if !names.insert(c.name.as_str()) {
                return Err(config_error(format!("{key}.name: '{}' given twice", c.name)));
            }
            let key = format!("compound[{i}] ('{}')", c.name);
            Formula::parse(&c.formula).map_err(|e| config_error(format!("{key}.formula: {e}")))?;
            IonType::parse(&c.ion).map_err(|e| config_error(format!("{key}.ion: {e}")))?;
            check_finite(&format!("{key}.rt_from_min"), c.rt_from_min, 0.0, big)?;
            check_finite(&format!("{key}.rt_to_min"), c.rt_to_min, c.rt_from_min, big)?;
            check_finite(&format!("{key}.min_intensity"), c.min_intensity, 0.0, big)?;
            if let Some(t) = c.tolerance_mz {
                check_finite(&format!("{key}.tolerance_mz"), t, 1e-9, 10.0)?;
            }
            if let Some(t) = c.tolerance_ppm {
                check_finite(&format!("{key}.tolerance_ppm"), t, 1e-3, 1e5)?;
            }
            c.target().map_err(|e| config_error(format!("{key}: {e}")))?;
            check_files(&key, &c.files)?;
        }
        Ok(())
    }

    fn compounds_for<'a>(&'a self, name: &'a str) -> impl Iterator<Item = &'a RequiredCompound> {
        self.compound.iter().filter(move |c| applies(&c.files, name))
    }

    /// The extracted-ion traces the required compounds that apply to `file` need, in the
    /// order [`QcRules::evaluate`] expects them in [`FileReport::traces`].
    pub fn trace_targets(&self, file: &str) -> Vec<TraceTarget> {
        let name = file_name(file);
        self.compounds_for(name)
            .map(|c| c.target().expect("validated when the rules were read"))
            .collect()
    }

    /// The names of the rules that apply to `file`, in report order.
    pub fn rule_names(&self, file: &str) -> Vec<String> {
        let name = file_name(file);
        let mut out: Vec<String> = Vec::new();
        let mut put = |key: &str, files: Option<&Vec<String>>| {
            if files.is_some_and(|f| applies(f, name)) {
                out.push(key.to_owned());
            }
        };
        put("min_spectra", self.min_spectra.as_ref().map(|r| &r.files));
        put("min_ms1", self.min_ms1.as_ref().map(|r| &r.files));
        put("rt_coverage", self.rt_coverage.as_ref().map(|r| &r.files));
        put("max_scan_gap", self.max_scan_gap.as_ref().map(|r| &r.files));
        put("min_median_tic", self.min_median_tic.as_ref().map(|r| &r.files));
        put("max_empty_fraction", self.max_empty_fraction.as_ref().map(|r| &r.files));
        put("max_unreadable", self.max_unreadable.as_ref().map(|r| &r.files));
        put("checksum", self.checksum.as_ref().map(|r| &r.files));
        for c in self.compounds_for(name) {
            out.push(format!("compound:{}", c.name));
        }
        if let Some(r) = &self.carry_over {
            if r.files.iter().any(|p| glob_match(p, name)) {
                out.push("carry_over".into());
            }
        }
        out
    }

    /// One failing row per applicable rule, for a file that could not be screened at all.
    pub fn unreadable_file(&self, file: &str, error: &str) -> Vec<QcRow> {
        self.rule_names(file)
            .into_iter()
            .map(|rule| QcRow {
                file: crate::report::escape_text(file),
                rule,
                status: QcStatus::Fail,
                observed: "unreadable".into(),
                limit: String::new(),
                message: crate::report::escape_text(&format!("file could not be read: {error}")),
            })
            .collect()
    }

    /// Evaluates every rule that applies to `file` on its screening `report` (screened with
    /// the targets of [`QcRules::trace_targets`] for the same `file`).
    pub fn evaluate(&self, file: &str, report: &FileReport) -> Vec<QcRow> {
        let name = file_name(file);
        let mut rows = Vec::new();
        let mut push =
            |rule: String, pass: bool, breach: Breach, observed, limit, message: String| {
                let status = match (pass, breach) {
                    (true, _) => QcStatus::Pass,
                    (false, Breach::Warn) => QcStatus::Warn,
                    (false, Breach::Fail) => QcStatus::Fail,
                };
                rows.push(QcRow {
                    file: crate::report::escape_text(file),
                    rule,
                    status,
                    observed,
                    limit,
                    message: crate::report::escape_text(&message),
                });
            };
        let s = &report.summary;
        let readable: Vec<_> = report.spectra.iter().filter(|r| r.status == "ok").collect();

        // Count rules: the file's count against the least number required.
        let counts = [
            ("min_spectra", &self.min_spectra, s.spectra, "readable spectra"),
            ("min_ms1", &self.min_ms1, s.ms1, "readable MS1 spectra"),
        ];
        for (rule, r, n, what) in counts {
            let Some(r) = r.as_ref().filter(|r| applies(&r.files, name)) else { continue };
            let n = n as u64;
            let msg = format!("{n} {what}; at least {} required", r.limit);
            push(rule.into(), n >= r.limit, r.on_breach, n.to_string(), r.limit.to_string(), msg);
        }
        if let Some(r) = self.rt_coverage.as_ref().filter(|r| applies(&r.files, name)) {
            let limit = format!("{} to {}", num(r.from_min), num(r.to_min));
            match (s.rt_start_min, s.rt_end_min) {
                (Some(a), Some(b)) => {
                    let pass = a <= r.from_min && b >= r.to_min;
                    let msg = format!(
                        "scans cover {} to {} min; {} to {} min must be covered",
                        num(a),
                        num(b),
                        num(r.from_min),
                        num(r.to_min)
                    );
                    push(
                        "rt_coverage".into(),
                        pass,
                        r.on_breach,
                        format!("{} to {}", num(a), num(b)),
                        limit,
                        msg,
                    );
                }
                _ => push(
                    "rt_coverage".into(),
                    false,
                    r.on_breach,
                    "no scan times".into(),
                    limit,
                    "no readable spectrum states a scan start time".into(),
                ),
            }
        }
        if let Some(r) = self.max_scan_gap.as_ref().filter(|r| applies(&r.files, name)) {
            let mut times: Vec<f64> = readable.iter().filter_map(|x| x.rt_min).collect();
            times.sort_by(f64::total_cmp);
            let gap = times
                .windows(2)
                .map(|w| ((w[1] - w[0]) * 60.0, w[0]))
                .max_by(|a, b| a.0.total_cmp(&b.0));
            match gap {
                Some((g, at)) => {
                    // Minutes to seconds can leave a last-digit error; compare at 1e-9 s.
                    let g = (g * 1e9).round() / 1e9;
                    let msg = format!(
                        "largest gap between consecutive scans {} s, after {} min; at most {} s allowed",
                        num(g),
                        num(at),
                        num(r.seconds)
                    );
                    push(
                        "max_scan_gap".into(),
                        g <= r.seconds,
                        r.on_breach,
                        num(g),
                        num(r.seconds),
                        msg,
                    );
                }
                None => push(
                    "max_scan_gap".into(),
                    false,
                    r.on_breach,
                    "fewer than 2 scan times".into(),
                    num(r.seconds),
                    "a gap needs at least two readable spectra with scan start times".into(),
                ),
            }
        }
        if let Some(r) = self.min_median_tic.as_ref().filter(|r| applies(&r.files, name)) {
            let mut tic: Vec<f64> = readable
                .iter()
                .filter(|x| x.ms_level.is_some_and(|l| l <= 1))
                .filter_map(|x| x.intensity_sum)
                .collect();
            tic.sort_by(f64::total_cmp);
            match median(&tic) {
                Some(m) => {
                    let msg = format!(
                        "median TIC (sum of decoded intensities) of {} MS1 spectra {}; at least {} required",
                        tic.len(),
                        num(m),
                        num(r.limit)
                    );
                    push(
                        "min_median_tic".into(),
                        m >= r.limit,
                        r.on_breach,
                        num(m),
                        num(r.limit),
                        msg,
                    );
                }
                None => push(
                    "min_median_tic".into(),
                    false,
                    r.on_breach,
                    "no MS1 spectra".into(),
                    num(r.limit),
                    "no readable MS1 spectrum".into(),
                ),
            }
        }
        if let Some(r) = self.max_empty_fraction.as_ref().filter(|r| applies(&r.files, name)) {
            if readable.is_empty() {
                push(
                    "max_empty_fraction".into(),
                    false,
                    r.on_breach,
                    "no readable spectra".into(),
                    num(r.limit),
                    "no readable spectrum".into(),
                );
            } else {
                let empty = readable.iter().filter(|x| x.points == Some(0)).count();
                let f = empty as f64 / readable.len() as f64;
                let msg = format!(
                    "{empty} of {} readable spectra have no points; at most a fraction {} allowed",
                    readable.len(),
                    num(r.limit)
                );
                push(
                    "max_empty_fraction".into(),
                    f <= r.limit,
                    r.on_breach,
                    num(f),
                    num(r.limit),
                    msg,
                );
            }
        }
        if let Some(r) = self.max_unreadable.as_ref().filter(|r| applies(&r.files, name)) {
            // `unreadable` already lists the spectra the index names but the document lacks
            // (and, for a file cut off, the positions never read): count each once.
            let n = s.unreadable.len() as u64;
            let mut msg = format!(
                "{n} spectra unreadable or never read ({} of them listed in the index but not \
                 found); at most {} allowed",
                s.missing_from_index.len(),
                r.limit
            );
            if !s.error.is_empty() {
                msg.push_str(&format!("; first error: {}", s.error));
            }
            push(
                "max_unreadable".into(),
                n <= r.limit,
                r.on_breach,
                n.to_string(),
                r.limit.to_string(),
                msg,
            );
        }
        if let Some(r) = self.checksum.as_ref().filter(|r| applies(&r.files, name)) {
            let (observed, pass, why) = match s.checksum {
                ChecksumStatus::Verified => {
                    ("verified", true, "the SHA-1 fileChecksum matches the file")
                }
                ChecksumStatus::Absent => (
                    "absent",
                    r.allow_absent,
                    "the file carries no fileChecksum (not an indexed mzML file)",
                ),
                ChecksumStatus::Mismatch => (
                    "mismatch",
                    false,
                    "the SHA-1 fileChecksum does not match the file: it was changed or damaged",
                ),
                ChecksumStatus::NotChecked => (
                    "not_checked",
                    false,
                    "not verified: verification is off ([reader] verify_checksum) or the file ends early",
                ),
            };
            let limit = if r.allow_absent { "verified or absent" } else { "verified" };
            push("checksum".into(), pass, r.on_breach, observed.into(), limit.into(), why.into());
        }
        for (k, c) in self.compounds_for(name).enumerate() {
            let rule = format!("compound:{}", c.name);
            let target = c.target().expect("validated when the rules were read");
            let Some(trace) = report.traces.get(k) else {
                push(
                    rule,
                    false,
                    Breach::Fail,
                    "not traced".into(),
                    num(c.min_intensity),
                    "the file was screened without this compound's trace".into(),
                );
                continue;
            };
            let inside: Vec<&TracePoint> = trace
                .iter()
                .filter(|p| p.rt_min.is_some_and(|t| t >= c.rt_from_min && t <= c.rt_to_min))
                .collect();
            let best = inside.iter().max_by(|a, b| a.intensity.total_cmp(&b.intensity));
            let window = format!(
                "{} {} m/z {:.4} ± {:.4} in {} to {} min",
                c.formula,
                c.ion,
                target.mz,
                target.tolerance,
                num(c.rt_from_min),
                num(c.rt_to_min)
            );
            match best {
                Some(b) if b.intensity > 0.0 => {
                    let msg = format!(
                        "{window}: largest {} at {} min over {} MS1 scans; at least {} required",
                        num(b.intensity),
                        num(b.rt_min.unwrap_or(f64::NAN)),
                        inside.len(),
                        num(c.min_intensity)
                    );
                    push(
                        rule,
                        b.intensity >= c.min_intensity,
                        c.on_breach,
                        num(b.intensity),
                        num(c.min_intensity),
                        msg,
                    );
                }
                _ => {
                    let msg = if inside.is_empty() {
                        format!("{window}: no MS1 scan of matching polarity in the window")
                    } else {
                        format!(
                            "{window}: no centroid within tolerance in {} MS1 scans",
                            inside.len()
                        )
                    };
                    push(
                        rule,
                        c.min_intensity <= 0.0 && !inside.is_empty(),
                        c.on_breach,
                        "0".into(),
                        num(c.min_intensity),
                        msg,
                    );
                }
            }
        }
        if let Some(r) = &self.carry_over {
            if r.files.iter().any(|p| glob_match(p, name)) {
                let n = s.halogen_features as u64;
                let msg = format!(
                    "{n} features with a Cl/Br assignment in a blank; at most {} allowed",
                    r.limit
                );
                push(
                    "carry_over".into(),
                    n <= r.limit,
                    r.on_breach,
                    n.to_string(),
                    r.limit.to_string(),
                    msg,
                );
            }
        }
        rows
    }
}

fn median(sorted: &[f64]) -> Option<f64> {
    let n = sorted.len();
    match n {
        0 => None,
        _ if n % 2 == 1 => Some(sorted[n / 2]),
        _ => Some((sorted[n / 2 - 1] + sorted[n / 2]) / 2.0),
    }
}

/// Counts of rows per status: (pass, warn, fail).
pub fn tally(rows: &[QcRow]) -> (usize, usize, usize) {
    rows.iter().fold((0, 0, 0), |(p, w, f), r| match r.status {
        QcStatus::Pass => (p + 1, w, f),
        QcStatus::Warn => (p, w + 1, f),
        QcStatus::Fail => (p, w, f + 1),
    })
}

/// Escapes text for XML 1.0 content and attribute values; characters XML 1.0 does not allow
/// (most C0 controls) become `?`.
pub fn xml_escape(s: &str) -> String {
    let mut out = String::with_capacity(s.len());
    for c in s.chars() {
        match c {
            '&' => out.push_str("&amp;"),
            '<' => out.push_str("&lt;"),
            '>' => out.push_str("&gt;"),
            '"' => out.push_str("&quot;"),
            '\'' => out.push_str("&apos;"),
            '\t' => out.push_str("&#9;"),
            '\n' => out.push_str("&#10;"),
            '\r' => out.push_str("&#13;"),
            // XML 1.0 section 2.2 (Char): no other C0 controls, no U+FFFE/U+FFFF.
            c if (c as u32) < 0x20 || c == '\u{FFFE}' || c == '\u{FFFF}' => out.push('?'),
            c => out.push(c),
        }
    }
    out
}

/// Writes `rows` as JUnit-style XML: one `<testsuite>` per file (in the order files first
/// appear), one `<testcase>` per file and rule (`classname` the file, `name` the rule). A
/// failed rule holds a `<failure>`; a warning is a passing test case whose `<system-out>`
/// starts with `warn:`; every test case's `<system-out>` holds the observed value, the limit
/// and the message.
pub fn write_junit<W: Write>(mut w: W, rows: &[QcRow]) -> Result<()> {
    let mut files: Vec<&str> = Vec::new();
    for r in rows {
        if !files.contains(&r.file.as_str()) {
            files.push(&r.file);
        }
    }
    let (_, _, fail) = tally(rows);
    writeln!(w, r#"<?xml version="1.0" encoding="UTF-8"?>"#)?;
    writeln!(
        w,
        r#"<testsuites name="mzsift check" tests="{}" failures="{fail}" errors="0" skipped="0">"#,
        rows.len()
    )?;
    for file in files {
        let mine: Vec<&QcRow> = rows.iter().filter(|r| r.file == file).collect();
        let failures = mine.iter().filter(|r| r.status == QcStatus::Fail).count();
        let shown = xml_escape(&crate::report::unescape_text(file));
        writeln!(
            w,
            r#"  <testsuite name="{shown}" tests="{}" failures="{failures}" errors="0" skipped="0">"#,
            mine.len()
        )?;
        for r in mine {
            let message = crate::report::unescape_text(&r.message);
            let detail = xml_escape(&format!(
                "{}: observed {}, limit {}: {message}",
                r.status.name(),
                r.observed,
                r.limit
            ));
            writeln!(
                w,
                r#"    <testcase classname="{shown}" name="{}" time="0">"#,
                xml_escape(&r.rule)
            )?;
            if r.status == QcStatus::Fail {
                writeln!(
                    w,
                    r#"      <failure type="qc" message="{}">{detail}</failure>"#,
                    xml_escape(&format!("observed {}, limit {}", r.observed, r.limit))
                )?;
            }
            writeln!(w, "      <system-out>{detail}</system-out>")?;
            writeln!(w, "    </testcase>")?;
        }
        writeln!(w, "  </testsuite>")?;
    }
    writeln!(w, "</testsuites>")?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::mzml::{Writer, WriterOptions};
    use crate::screen::{ScreenConfig, Sha256Reader, screen_reader_traced};
    use crate::spectrum::{Peaks, Representation, SpectrumMeta};

    /// One crafted spectrum: MS level, scan time (min), polarity, and centroids.
    struct Scan {
        level: u8,
        rt: f64,
        polarity: Polarity,
        peaks: Vec<(f64, f64)>,
    }

    /// A centroided MS1 scan: 40 background centroids of intensity 80 to 120 (m/z 101..140,
    /// sum 4000) plus `extra`.
    fn ms1(rt: f64, extra: &[(f64, f64)]) -> Scan {
        let mut peaks: Vec<(f64, f64)> =
            (1..=40).map(|i| (100.0 + i as f64, 80.0 + f64::from(i % 5) * 10.0)).collect();
        peaks.extend_from_slice(extra);
        peaks.sort_by(|a, b| a.0.total_cmp(&b.0));
        Scan { level: 1, rt, polarity: Polarity::Positive, peaks }
    }

    fn write_doc(scans: &[Scan], indexed: bool) -> Vec<u8> {
        let options = WriterOptions { spectrum_count: scans.len(), indexed, ..Default::default() };
        let mut w = Writer::new(Vec::new(), options).unwrap();
        for (i, s) in scans.iter().enumerate() {
            let meta = SpectrumMeta {
                index: i,
                id: format!("scan={}", i + 1),
                ms_level: s.level,
                polarity: s.polarity,
                representation: Representation::Centroid,
                rt_min: Some(s.rt),
                ..Default::default()
            };
            let peaks = Peaks {
                mz: s.peaks.iter().map(|p| p.0).collect(),
                intensity: s.peaks.iter().map(|p| p.1).collect(),
            };
            w.write_spectrum(&meta, &peaks).unwrap();
        }
        w.finish().unwrap()
    }

    fn screen(rules: &QcRules, file: &str, doc: &[u8]) -> Vec<QcRow> {
        let pool = crate::pipeline::thread_pool(1).unwrap();
        let targets = rules.trace_targets(file);
        let report =
            screen_reader_traced(Sha256Reader::new(doc), &ScreenConfig::default(), &pool, &targets)
                .unwrap();
        rules.evaluate(file, &report)
    }

    fn row<'a>(rows: &'a [QcRow], rule: &str) -> &'a QcRow {
        rows.iter().find(|r| r.rule == rule).unwrap_or_else(|| panic!("no row {rule}: {rows:?}"))
    }

    fn status(rows: &[QcRow], rule: &str) -> QcStatus {
        row(rows, rule).status
    }

    /// 20 MS1 scans every 0.05 min (3 s) from 1.0 min, two MS2 scans (1.01 and 1.26 min), and a 30 s hole after
    /// the tenth MS1 scan when `gap` is set.
    fn run_scans(gap: bool) -> Vec<Scan> {
        let mut scans = Vec::new();
        for i in 0..20 {
            let rt = 1.0 + 0.05 * i as f64 + if gap && i >= 10 { 0.45 } else { 0.0 };
            scans.push(ms1(rt, &[]));
        }
        for rt in [1.01, 1.26] {
            let mut s = ms1(rt, &[]);
            s.level = 2;
            scans.push(s);
        }
        scans.sort_by(|a, b| a.rt.total_cmp(&b.rt));
        scans
    }

    #[test]
    fn counts_pass_at_the_limit_and_fail_above_it() {
        let doc = write_doc(&run_scans(false), true);
        let pass =
            QcRules::from_toml("[min_spectra]\nlimit = 22\n[min_ms1]\nlimit = 20\n").unwrap();
        let rows = screen(&pass, "a.mzML", &doc);
        assert_eq!(
            (status(&rows, "min_spectra"), status(&rows, "min_ms1")),
            (QcStatus::Pass, QcStatus::Pass)
        );
        assert_eq!(row(&rows, "min_spectra").observed, "22");
        let fail = QcRules::from_toml(
            "[min_spectra]\nlimit = 23\n[min_ms1]\nlimit = 21\non_breach = \"warn\"\n",
        )
        .unwrap();
        let rows = screen(&fail, "a.mzML", &doc);
        assert_eq!(
            (status(&rows, "min_spectra"), status(&rows, "min_ms1")),
            (QcStatus::Fail, QcStatus::Warn)
        );
        assert_eq!(
            (row(&rows, "min_ms1").observed.as_str(), row(&rows, "min_ms1").limit.as_str()),
            ("20", "21")
        );
    }

    #[test]
    fn scan_gap_is_found_in_seconds() {
        let rules = QcRules::from_toml("[max_scan_gap]\nseconds = 10.0\n").unwrap();
        let rows = screen(&rules, "a.mzML", &write_doc(&run_scans(false), true));
        // Scans every 3 s; the MS2 scans at 1.01 and 1.51 min split two of those intervals.
        assert_eq!(status(&rows, "max_scan_gap"), QcStatus::Pass);
        assert_eq!(row(&rows, "max_scan_gap").observed, "3");
        let rows = screen(&rules, "a.mzML", &write_doc(&run_scans(true), true));
        // The hole: 0.45 min added to the usual 0.05 min = 0.5 min = 30 s.
        assert_eq!(status(&rows, "max_scan_gap"), QcStatus::Fail);
        assert_eq!(row(&rows, "max_scan_gap").observed, "30");
        assert!(row(&rows, "max_scan_gap").message.contains("after 1.45 min"), "{rows:?}");
    }

    #[test]
    fn rt_coverage_needs_both_ends() {
        let doc = write_doc(&run_scans(false), true); // 1.0 to 1.95 min
        let ok = QcRules::from_toml("[rt_coverage]\nfrom_min = 1.0\nto_min = 1.9\n").unwrap();
        let rows = screen(&ok, "a.mzML", &doc);
        assert_eq!(status(&rows, "rt_coverage"), QcStatus::Pass);
        assert_eq!(row(&rows, "rt_coverage").observed, format!("1 to {}", 1.0 + 0.05 * 19.0));
        for (from, to) in [(0.9, 1.5), (1.2, 2.0)] {
            let r =
                QcRules::from_toml(&format!("[rt_coverage]\nfrom_min = {from}\nto_min = {to}\n"))
                    .unwrap();
            assert_eq!(
                status(&screen(&r, "a.mzML", &doc), "rt_coverage"),
                QcStatus::Fail,
                "{from}..{to}"
            );
        }
    }

    #[test]
    fn median_tic_and_empty_fraction() {
        // 20 MS1 scans summing to 4000 except two that sum to 4000 + 6000; the median is 4000.
        let mut scans = run_scans(false);
        scans[3].peaks.push((150.0, 6000.0));
        scans[5].peaks.push((150.0, 6000.0));
        // Two of 22 spectra empty (then 18 MS1 with points, and the median of 20 MS1 sums
        // [0, 0, 4000 x 16, 10000 x 2] is 4000).
        scans[7].peaks.clear();
        scans[9].peaks.clear();
        let doc = write_doc(&scans, true);
        let rules = QcRules::from_toml(
            "[min_median_tic]\nlimit = 4000\n[max_empty_fraction]\nlimit = 0.1\n",
        )
        .unwrap();
        let rows = screen(&rules, "a.mzML", &doc);
        assert_eq!(row(&rows, "min_median_tic").observed, "4000");
        assert_eq!(status(&rows, "min_median_tic"), QcStatus::Pass);
        assert_eq!(row(&rows, "max_empty_fraction").observed, num(2.0 / 22.0));
        assert_eq!(status(&rows, "max_empty_fraction"), QcStatus::Pass);
        let strict = QcRules::from_toml(
            "[min_median_tic]\nlimit = 4001\n[max_empty_fraction]\nlimit = 0.05\n",
        )
        .unwrap();
        let rows = screen(&strict, "a.mzML", &doc);
        assert_eq!(status(&rows, "min_median_tic"), QcStatus::Fail);
        assert_eq!(status(&rows, "max_empty_fraction"), QcStatus::Fail);
    }

    #[test]
    fn checksum_verified_absent_and_mismatch() {
        let rules = QcRules::from_toml("[checksum]\n").unwrap();
        let lenient = QcRules::from_toml("[checksum]\nallow_absent = true\n").unwrap();
        let indexed = write_doc(&run_scans(false), true);
        assert_eq!(row(&screen(&rules, "a.mzML", &indexed), "checksum").observed, "verified");
        assert_eq!(status(&screen(&rules, "a.mzML", &indexed), "checksum"), QcStatus::Pass);
        let plain = write_doc(&run_scans(false), false);
        assert_eq!(row(&screen(&rules, "a.mzML", &plain), "checksum").observed, "absent");
        assert_eq!(status(&screen(&rules, "a.mzML", &plain), "checksum"), QcStatus::Fail);
        assert_eq!(status(&screen(&lenient, "a.mzML", &plain), "checksum"), QcStatus::Pass);
        // Change one hex digit of the stored SHA-1.
        let text = String::from_utf8(indexed).unwrap();
        let at = text.find("<fileChecksum>").unwrap() + "<fileChecksum>".len();
        let flipped = if &text[at..at + 1] == "0" { "1" } else { "0" };
        let damaged = format!("{}{flipped}{}", &text[..at], &text[at + 1..]);
        let rows = screen(&lenient, "a.mzML", damaged.as_bytes());
        assert_eq!(
            (status(&rows, "checksum"), row(&rows, "checksum").observed.as_str()),
            (QcStatus::Fail, "mismatch")
        );
    }

    #[test]
    fn unreadable_spectra_are_counted() {
        let rules = QcRules::from_toml("[max_unreadable]\nlimit = 0\n").unwrap();
        let lenient = QcRules::from_toml("[max_unreadable]\nlimit = 1\n").unwrap();
        let text = String::from_utf8(write_doc(&run_scans(false), false)).unwrap();
        assert_eq!(row(&screen(&rules, "a.mzML", text.as_bytes()), "max_unreadable").observed, "0");
        // Break the base64 text of the third spectrum's first array.
        let third = text.match_indices("<binary>").nth(4).unwrap().0 + "<binary>".len();
        let damaged = format!("{}!!!!{}", &text[..third], &text[third + 4..]);
        let rows = screen(&rules, "a.mzML", damaged.as_bytes());
        let r = row(&rows, "max_unreadable");
        assert_eq!((r.status, r.observed.as_str()), (QcStatus::Fail, "1"), "{rows:?}");
        assert_eq!(
            status(&screen(&lenient, "a.mzML", damaged.as_bytes()), "max_unreadable"),
            QcStatus::Pass
        );
        // An indexed file whose second spectrum the reader cannot see (its start tag renamed):
        // listed in the index, never read, counted once.
        let indexed = String::from_utf8(write_doc(&run_scans(false), true)).unwrap();
        let second = indexed.match_indices("<spectrum ").nth(1).unwrap().0;
        let hidden = format!("{}<spectrun{}", &indexed[..second], &indexed[second + 9..]);
        let hidden = hidden.replacen("</spectrum>", "</spectrun>", 2).replacen(
            "</spectrun>",
            "</spectrum>",
            1,
        );
        let rows = screen(&lenient, "a.mzML", hidden.as_bytes());
        let r = row(&rows, "max_unreadable");
        assert_eq!((r.status, r.observed.as_str()), (QcStatus::Pass, "1"), "{rows:?}");
    }

    #[test]
    fn checksum_not_verified_fails() {
        let rules = QcRules::from_toml("[checksum]\nallow_absent = true\n").unwrap();
        let pool = crate::pipeline::thread_pool(1).unwrap();
        let mut config = ScreenConfig::default();
        config.reader.verify_checksum = false;
        let doc = write_doc(&run_scans(false), true);
        let report =
            screen_reader_traced(Sha256Reader::new(&doc[..]), &config, &pool, &[]).unwrap();
        let rows = rules.evaluate("a.mzML", &report);
        assert_eq!(
            (status(&rows, "checksum"), row(&rows, "checksum").observed.as_str()),
            (QcStatus::Fail, "not_checked")
        );
    }

    const CAFFEINE: &str = r#"
[[compound]]
name = "caffeine-d9"
formula = "C8HD9N4O2"
ion = "M+H"
rt_from_min = 1.2
rt_to_min = 1.4
min_intensity = 5000
tolerance_ppm = 10
"#;

    fn caffeine_d9_mz() -> f64 {
        // Deuterium is written D in formulas; [M+H]+ of C8HD9N4O2.
        let f = Formula::parse("C8HD9N4O2").unwrap();
        IonType::parse("M+H").unwrap().mz(&f).unwrap()
    }

    #[test]
    fn required_compound_found_missing_and_misplaced() {
        let rules = QcRules::from_toml(CAFFEINE).unwrap();
        let mz = caffeine_d9_mz();
        let with = |rt_of_peak: f64, shift: f64, height: f64| {
            let mut scans = run_scans(false);
            for s in scans.iter_mut().filter(|s| s.level == 1) {
                let h = height * (-((s.rt - rt_of_peak) / 0.05).powi(2)).exp();
                s.peaks.push((mz + shift, h.max(1.0)));
                s.peaks.sort_by(|a, b| a.0.total_cmp(&b.0));
            }
            write_doc(&scans, true)
        };
        let found = screen(&rules, "a.mzML", &with(1.3, 0.0005, 20_000.0));
        assert_eq!(status(&found, "compound:caffeine-d9"), QcStatus::Pass, "{found:?}");
        assert_eq!(row(&found, "compound:caffeine-d9").observed, num(f64::from(20_000.0f32)));
        // Too weak, outside the RT window, or 30 ppm off: each fails.
        for (rt, shift, h) in
            [(1.3, 0.0, 3000.0), (1.8, 0.0, 20_000.0), (1.3, mz * 30e-6, 20_000.0)]
        {
            let rows = screen(&rules, "a.mzML", &with(rt, shift, h));
            assert_eq!(
                status(&rows, "compound:caffeine-d9"),
                QcStatus::Fail,
                "{rt} {shift} {h}: {rows:?}"
            );
        }
        // A negative ion is not looked for in positive scans.
        let neg = QcRules::from_toml(&CAFFEINE.replace("M+H", "M-H")).unwrap();
        let rows = screen(&neg, "a.mzML", &with(1.3, 0.0, 20_000.0));
        assert_eq!(status(&rows, "compound:caffeine-d9"), QcStatus::Fail);
        assert!(row(&rows, "compound:caffeine-d9").message.contains("matching polarity"));
    }

    #[test]
    fn carry_over_applies_to_blanks_only() {
        let rules = QcRules::from_toml(
            "[carry_over]\nlimit = 1\nfiles = [\"*blank*\"]\n[min_spectra]\nlimit = 1\n",
        )
        .unwrap();
        let pool = crate::pipeline::thread_pool(1).unwrap();
        let doc = write_doc(&run_scans(false), true);
        let mut report = crate::screen::screen_reader(
            Sha256Reader::new(&doc[..]),
            &ScreenConfig::default(),
            &pool,
        )
        .unwrap();
        assert_eq!(rules.rule_names("sample.mzML"), ["min_spectra"]);
        assert_eq!(rules.evaluate("sample.mzML", &report).len(), 1);
        for (n, want) in [(0, QcStatus::Pass), (1, QcStatus::Pass), (2, QcStatus::Fail)] {
            report.summary.halogen_features = n;
            let rows = rules.evaluate("runs/Night-BLANK-1.mzML", &report);
            assert_eq!(status(&rows, "carry_over"), want, "{n}");
            assert_eq!(row(&rows, "carry_over").observed, n.to_string());
        }
    }

    #[test]
    fn rules_files_name_the_bad_key() {
        for (text, key) in [
            ("[min_spectra]\nlimt = 3\n", "limt"),
            ("[min_spectrum]\nlimit = 3\n", "min_spectrum"),
            ("[min_spectra]\nlimit = \"many\"\n", "limit"),
            ("[max_scan_gap]\nseconds = -1.0\n", "max_scan_gap.seconds"),
            ("[max_empty_fraction]\nlimit = 1.5\n", "max_empty_fraction.limit"),
            ("[carry_over]\nlimit = 0\nfiles = []\n", "carry_over.files"),
            (&CAFFEINE.replace("C8HD9N4O2", "C8Qx"), "compound[0] ('caffeine-d9').formula"),
            (&CAFFEINE.replace("M+H", "M+Zz"), "compound[0] ('caffeine-d9').ion"),
            (
                &CAFFEINE.replace("tolerance_ppm = 10", "tolerance_ppm = 10\ntolerance_mz = 0.01"),
                "tolerance_mz, tolerance_ppm",
            ),
            (&CAFFEINE.replace("rt_to_min = 1.4", "rt_to_min = 1.0"), "rt_to_min"),
            (&format!("{CAFFEINE}{CAFFEINE}"), "given twice"),
        ] {
            let e = QcRules::from_toml(text).expect_err(text).to_string();
            assert!(e.contains(key), "{key} not in: {e}");
        }
    }

    #[test]
    fn glob_table() {
        for (p, n, want) in [
            ("*blank*", "proc-blank-2.mzML", true),
            ("*BLANK*", "proc-blank-2.mzML", true),
            ("blank*", "proc-blank.mzML", false),
            ("*.mzML", "a.mzML.gz", false),
            ("*.mzML*", "a.mzML.gz", true),
            ("a?c", "abc", true),
            ("a?c", "ac", false),
            ("*", "", true),
            ("**x", "yx", true),
        ] {
            assert_eq!(glob_match(p, n), want, "{p} {n}");
        }
    }

    #[test]
    fn junit_is_well_formed_with_one_case_per_row() {
        use quick_xml::events::Event;
        let rules = QcRules::from_toml("[min_spectra]\nlimit = 1\n[min_ms1]\nlimit = 100\non_breach = \"warn\"\n[max_scan_gap]\nseconds = 1\n").unwrap();
        let doc = write_doc(&run_scans(false), true);
        let mut rows = screen(&rules, "odd <&\"'> name.mzML", &doc);
        rows.extend(rules.unreadable_file("gone\\there.mzML", "No such file & <dir>"));
        assert_eq!(rows.len(), 6);
        let mut xml = Vec::new();
        write_junit(&mut xml, &rows).unwrap();
        let mut reader = quick_xml::Reader::from_reader(&xml[..]);
        let (mut cases, mut failures, mut suites, mut names) = (0, 0, 0, Vec::new());
        let mut buf = Vec::new();
        loop {
            match reader.read_event_into(&mut buf).expect("well-formed XML") {
                Event::Eof => break,
                Event::Start(e) => match e.name().as_ref() {
                    b"testcase" => cases += 1,
                    b"failure" => failures += 1,
                    b"testsuite" => {
                        suites += 1;
                        let name = e.try_get_attribute("name").unwrap().unwrap();
                        names.push(name.unescape_value().unwrap().into_owned());
                    }
                    _ => {}
                },
                _ => {}
            }
            buf.clear();
        }
        assert_eq!((suites, cases), (2, 6));
        // min_ms1 warns (no failure element); max_scan_gap fails; three unreadable rows fail.
        assert_eq!(failures, 4);
        assert_eq!(names, ["odd <&\"'> name.mzML", "gone\\there.mzML"]);
    }
}
