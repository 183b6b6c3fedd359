//! The scenario description read from TOML: instruments, a compound library, and runs.
//!
//! A scenario is a batch: named instrument methods, a library of compounds (formula and
//! optional fragment ions), and one or more runs, each naming its instrument and listing the
//! compounds it contains with their ion type, retention-time apex, width and abundance.
//! See [`crate::synth`] for an example.

use std::collections::BTreeMap;

use serde::{Deserialize, Serialize};

use crate::error::{Error, ErrorKind, Result};
use crate::mzml::binary::{BinaryEncoding, Compression, NumericType};

/// A batch of synthetic acquisitions.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Scenario {
    /// Name of the batch.
    pub name: String,
    /// Free text describing the batch.
    #[serde(default)]
    pub description: String,
    /// Seed of every random stream in the batch.
    pub seed: u64,
    /// Instrument methods by name.
    pub instruments: BTreeMap<String, Instrument>,
    /// The compound library.
    #[serde(default, rename = "compound")]
    pub compounds: Vec<Compound>,
    /// The runs (one mzML file each).
    #[serde(default, rename = "run")]
    pub runs: Vec<Run>,
}

/// Ion source of an instrument.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Source {
    /// Electron ionization (GC-MS): molecular radical ions and fragments in MS1.
    Ei,
    /// Electrospray ionization (LC-MS): even-electron adduct ions.
    Esi,
}

/// Scan polarity of an instrument.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum ScanPolarity {
    /// Positive ions.
    Positive,
    /// Negative ions.
    Negative,
}

/// Written representation of the spectra.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Output {
    /// Sampled peak shapes on an m/z grid.
    Profile,
    /// One point per resolved peak.
    Centroid,
}

/// The word `unit` in `resolving_power = "unit"`.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum Unit {
    /// Unit (nominal-mass) resolution.
    Unit,
}

/// Resolving power m / FWHM, or unit resolution (constant FWHM, see `unit_fwhm`).
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
#[serde(untagged)]
pub enum ResolvingPower {
    /// Constant resolving power m / FWHM.
    Value(f64),
    /// Unit resolution.
    Named(Unit),
}

/// Intensity and mass noise of an instrument.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct Noise {
    /// Shot-like noise: standard deviation `shot * sqrt(signal)`.
    pub shot: f64,
    /// Baseline level added to every profile point.
    pub baseline: f64,
    /// Standard deviation of the baseline noise.
    pub baseline_sd: f64,
    /// Random noise peaks ("grass") per spectrum.
    pub grass_peaks: usize,
    /// Mean height of a noise peak (exponentially distributed).
    pub grass_intensity: f64,
    /// Standard deviation of the m/z of each peak in each scan, in ppm.
    pub mz_sd_ppm: f64,
}

impl Default for Noise {
    fn default() -> Self {
        Noise {
            shot: 1.0,
            baseline: 0.0,
            baseline_sd: 0.0,
            grass_peaks: 0,
            grass_intensity: 0.0,
            mz_sd_ppm: 0.0,
        }
    }
}

/// Array encodings, as `f64`, `f32-zlib`, `numpress-linear-zlib`, `numpress-slof`, ...
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields, default)]
pub struct Encoding {
    /// Encoding of m/z arrays.
    pub mz: String,
    /// Encoding of intensity arrays.
    pub intensity: String,
}

impl Default for Encoding {
    fn default() -> Self {
        Encoding { mz: "f64-zlib".into(), intensity: "f32-zlib".into() }
    }
}

/// Parses an encoding name: a numeric type `f32`, `f64`, `i32`, `i64` with an optional
/// `-zlib`, or `numpress-linear`, `numpress-pic`, `numpress-slof` with an optional `-zlib`.
pub fn parse_encoding(name: &str) -> Result<BinaryEncoding> {
    let (base, zlib) = match name.strip_suffix("-zlib") {
        Some(b) => (b, true),
        None => (name, false),
    };
    let numeric = match base {
        "f32" => Some(NumericType::F32),
        "f64" => Some(NumericType::F64),
        "i32" => Some(NumericType::I32),
        "i64" => Some(NumericType::I64),
        _ => None,
    };
    let encoding = match (numeric, base, zlib) {
        (Some(n), _, false) => BinaryEncoding { numeric: n, compression: Compression::None },
        (Some(n), _, true) => BinaryEncoding { numeric: n, compression: Compression::Zlib },
        (None, "numpress-linear", z) => BinaryEncoding {
            numeric: NumericType::F64,
            compression: if z {
                Compression::NumpressLinearZlib
            } else {
                Compression::NumpressLinear
            },
        },
        (None, "numpress-pic", z) => BinaryEncoding {
            numeric: NumericType::F64,
            compression: if z { Compression::NumpressPicZlib } else { Compression::NumpressPic },
        },
        (None, "numpress-slof", z) => BinaryEncoding {
            numeric: NumericType::F64,
            compression: if z { Compression::NumpressSlofZlib } else { Compression::NumpressSlof },
        },
        _ => {
            return Err(Error::new(ErrorKind::InvalidValue {
                field: "encoding".into(),
                value: format!(
                    "{name} (use f32, f64, i32, i64, numpress-linear, numpress-pic or \
                     numpress-slof, each optionally followed by -zlib)"
                ),
            }));
        }
    };
    Ok(encoding)
}

fn d_points_per_fwhm() -> f64 {
    8.0
}
fn d_unit_fwhm() -> f64 {
    0.6
}
fn d_isolation() -> f64 {
    1.0
}
fn d_exclusion() -> f64 {
    0.25
}
fn d_yield() -> f64 {
    0.3
}
fn d_residual() -> f64 {
    0.1
}

/// An instrument method: source, analyser, acquisition and noise.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Instrument {
    /// Ion source.
    pub ionization: Source,
    /// Scan polarity.
    pub polarity: ScanPolarity,
    /// Resolving power (a number) or `"unit"`.
    pub resolving_power: ResolvingPower,
    /// Peak FWHM in m/z at unit resolution.
    #[serde(default = "d_unit_fwhm")]
    pub unit_fwhm: f64,
    /// Lower end of the scan range.
    pub mz_min: f64,
    /// Upper end of the scan range.
    pub mz_max: f64,
    /// Profile or centroid output.
    pub output: Output,
    /// Grid points per FWHM in profile mode.
    #[serde(default = "d_points_per_fwhm")]
    pub points_per_fwhm: f64,
    /// MS1 scans per second.
    pub scan_rate_hz: f64,
    /// Start of the acquisition, in minutes.
    pub rt_start_min: f64,
    /// End of the acquisition, in minutes.
    pub rt_end_min: f64,
    /// Data-dependent MS2 of the N most intense compound ions after each MS1 scan (0: MS1 only).
    #[serde(default)]
    pub ms2_top_n: usize,
    /// Isolation window width in m/z.
    #[serde(default = "d_isolation")]
    pub ms2_isolation_width: f64,
    /// Least MS1 height (noise-free) of an ion selected for MS2.
    #[serde(default)]
    pub ms2_min_intensity: f64,
    /// Dynamic exclusion after an ion was selected, in minutes.
    #[serde(default = "d_exclusion")]
    pub ms2_exclusion_min: f64,
    /// Product ion height relative to the precursor's MS1 height at 100 % relative intensity.
    #[serde(default = "d_yield")]
    pub ms2_yield: f64,
    /// Height of the surviving precursor in MS2, relative to its MS1 height.
    #[serde(default = "d_residual")]
    pub ms2_residual: f64,
    /// Intensity and mass noise.
    #[serde(default)]
    pub noise: Noise,
    /// Write profile data as instruments often do: only points above `drop_below` plus one
    /// zero-intensity point either side of each run of them.
    #[serde(default)]
    pub dropped_zeros: bool,
    /// Threshold for dropped-zero sampling (profile) or for keeping a centroid.
    #[serde(default)]
    pub drop_below: f64,
    /// Chemical background ions present in every scan.
    #[serde(default)]
    pub background: Vec<Background>,
    /// Side lobes or shoulders beside intense peaks (Fourier-transform analysers show them).
    #[serde(default)]
    pub side_lobes: Option<SideLobes>,
    /// Array encodings.
    #[serde(default)]
    pub encoding: Encoding,
    /// Write scan start times in seconds instead of minutes.
    #[serde(default)]
    pub rt_in_seconds: bool,
}

/// Side lobes: beside every peak at least `min_height` tall, one peak on each side at
/// `offset_fwhm` FWHM, `relative` times its height.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct SideLobes {
    /// Least height of a peak that shows lobes.
    pub min_height: f64,
    /// Height of a lobe relative to its peak (e.g. 0.03).
    pub relative: f64,
    /// Distance of a lobe from its peak, in FWHM of the peak.
    pub offset_fwhm: f64,
}

/// A further ion of a compound in one run: an adduct, multimer or in-source fragment
/// (any ion type, e.g. `M+Na`, `M+Cl`, `2M+H`, `M+H-H2O`, `M-H-HCl`).
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct ExtraIon {
    /// Ion type.
    pub ion: String,
    /// Height of its tallest peak, percent of the main ion's tallest peak.
    pub relative: f64,
}

/// A compound of the library.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Compound {
    /// Name (unique in the library).
    pub name: String,
    /// Molecular formula of the neutral molecule.
    pub formula: String,
    /// Fragment ions: in MS1 under electron ionization, as product ions in MS2.
    #[serde(default)]
    pub fragments: Vec<Fragment>,
}

/// A fragment ion, given by its elemental composition (isotope pattern included) or by m/z.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Fragment {
    /// Elemental composition of the fragment ion (charge 1 of the instrument's polarity).
    #[serde(default)]
    pub formula: Option<String>,
    /// m/z of a fragment given without a formula.
    #[serde(default)]
    pub mz: Option<f64>,
    /// Height of the fragment's tallest peak, percent of the molecular ion's tallest peak.
    pub relative: f64,
}

/// A chemical background ion, by formula and ion type (isotope pattern included) or by m/z.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Background {
    /// A name for people.
    #[serde(default)]
    pub name: String,
    /// Neutral formula.
    #[serde(default)]
    pub formula: Option<String>,
    /// Ion type of the formula (default as for compounds on the instrument).
    #[serde(default)]
    pub ion: Option<String>,
    /// m/z of an ion given without a formula.
    #[serde(default)]
    pub mz: Option<f64>,
    /// Height of the tallest peak.
    pub intensity: f64,
}

/// One acquisition: an instrument and the compounds in the sample.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Run {
    /// File stem: writes `<file>.mzML` and `<file>.truth.tsv`.
    pub file: String,
    /// Name of the instrument method.
    pub instrument: String,
    /// Sample description for people.
    #[serde(default)]
    pub sample: String,
    /// Extra background ions of this run.
    #[serde(default)]
    pub background: Vec<Background>,
    /// The compounds present.
    #[serde(default, rename = "compound")]
    pub compounds: Vec<RunCompound>,
}

/// A compound's appearance in one run.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct RunCompound {
    /// Name of a library compound.
    pub name: String,
    /// Ion type (default `M+.` for EI, `M+H` for positive and `M-H` for negative ESI).
    #[serde(default)]
    pub ion: Option<String>,
    /// Retention time of the apex in minutes.
    pub rt_apex_min: f64,
    /// Chromatographic FWHM of the Gaussian part, in minutes.
    pub width_min: f64,
    /// Exponential tailing time constant in minutes (0: Gaussian).
    #[serde(default)]
    pub tailing_min: f64,
    /// Apex height of the tallest peak of the molecular ion's isotope cluster.
    pub abundance: f64,
    /// Further ions of the compound (adducts, multimers, in-source fragments), co-eluting.
    #[serde(default)]
    pub adducts: Vec<ExtraIon>,
}

impl Scenario {
    /// Parses a scenario from TOML text.
    pub fn from_toml(text: &str) -> Result<Scenario> {
        let s: Scenario =
            toml::from_str(text).map_err(|e| Error::new(ErrorKind::Config(e.to_string())))?;
        Ok(s)
    }

    /// The compound of the library called `name`.
    pub fn compound(&self, name: &str) -> Option<&Compound> {
        self.compounds.iter().find(|c| c.name == name)
    }

    /// The run whose file stem is `file`.
    pub fn run(&self, file: &str) -> Option<&Run> {
        self.runs.iter().find(|r| r.file == file)
    }
}

/// A scenario error.
pub(crate) fn config(msg: impl Into<String>) -> Error {
    Error::new(ErrorKind::Config(msg.into()))
}
