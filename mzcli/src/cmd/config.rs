//! `mzsift config`: the default configuration as a commented TOML file.

use std::io::Write;

use mzcore::screen::ScreenConfig;

use crate::output;

/// Arguments of `mzsift config`.
#[derive(clap::Args, Debug)]
pub struct ConfigArgs {
    /// Check this configuration file and print it with every default filled in, instead of
    /// printing the defaults.
    #[arg(long, value_hint = clap::ValueHint::FilePath)]
    pub check: Option<std::path::PathBuf>,
}

/// One line of explanation per setting, keyed by `section.key`.
const DOCS: &[(&str, &str)] = &[
    ("threads", "worker threads shared by all files and spectra; 0 = one per core (-j overrides)"),
    ("reader.verify_checksum", "verify the SHA-1 fileChecksum of indexed files"),
    ("reader.max_event_bytes", "ceiling on one XML tag or one <binary> text, bytes"),
    ("reader.max_array_length", "ceiling on a declared array length, values"),
    ("reader.max_depth", "ceiling on element nesting (inside a spectrum, and in the document)"),
    ("reader.max_spectrum_bytes", "ceiling on the <binary> text held for one spectrum, bytes"),
    (
        "reader.max_elements",
        "ceiling on the elements of one spectrum (referenced cvParams included)",
    ),
    ("reader.max_gzip_ratio", "ceiling on decompressed/compressed size of .gz input (bombs)"),
    (
        "pipeline.in_flight",
        "spectra alive at once; bounds memory together with the largest spectrum",
    ),
    ("pipeline.resolution", "\"auto\" (from each spectrum's peaks), \"unit\" or \"high\""),
    ("centroid.min_snr", "least S/N of a profile peak's apex (noise: median/MAD)"),
    (
        "centroid.noise",
        "noise estimate: \"global\"; { sliding = { window = N } } for a changing baseline; { fixed = { baseline = B, sigma = S } } when the spectra cannot show their noise (zeros and low points dropped)",
    ),
    (
        "centroid.apex",
        "apex m/z: \"gaussian_fit\", \"gaussian3\" (3-point log-parabola) or \"weighted_half_height\"",
    ),
    (
        "centroid.min_valley_depth",
        "two maxima stay separate if the valley is this fraction of the smaller",
    ),
    ("centroid.min_valley_snr", "... and this many noise sigmas deep"),
    (
        "centroid.spike_ratio",
        "a one-point maximum is a spike unless a neighbour reaches this fraction",
    ),
    (
        "centroid.gap_factor",
        "a spacing this many times the neighbouring one is a gap (dropped points)",
    ),
    (
        "centroid.centroided_min_snr",
        "least S/N of a peak in clean centroided data, against the list's floor",
    ),
    ("flag.tolerance", "isotope partner tolerance: \"auto\", { ppm = 5.0 } or { da = 0.3 }"),
    ("flag.min_snr", "least S/N of a cluster's monoisotopic peak"),
    ("flag.max_charge", "highest charge tried at high resolution (1 to 3)"),
    (
        "flag.ion_type",
        "ion type for the nitrogen rule, e.g. \"M+.\" or \"[M+H]+\"; unset = from ionization and polarity",
    ),
    ("flag.min_halogen_probability", "least posterior probability of Cl/Br for a halogen flag"),
    ("flag.max_misfit", "largest chi-square per degree of freedom of the best hypothesis"),
    ("flag.relative_error", "relative intensity error of isotope peaks beyond the noise"),
    (
        "flag.ei_min_relative",
        "EI molecular-ion candidate: least intensity relative to the base peak",
    ),
    ("flag.feature_min_scans", "least consecutive MS1 scans for a feature"),
    ("flag.feature_max_gap", "MS1 scans that may be missing inside a feature"),
    (
        "flag.side_lobe_ratio",
        "a candidate beside a peak this many times taller whose M+1/M+2 is that peak's isotopologue is a side lobe",
    ),
    ("flag.side_lobe_fwhm", "... when within this many FWHM of it (0 turns the rule off)"),
    ("compound.apex_tolerance_scans", "co-elution: apexes at most this many MS1 scans apart"),
    ("compound.min_correlation", "co-elution: least Pearson r of two traces over shared scans"),
    ("compound.min_shared_scans", "co-elution: least shared scans for the correlation"),
    ("compound.tolerance_ppm", "adduct and loss spacings at high resolution, ppm"),
    ("compound.tolerance_da", "adduct and loss spacings at unit resolution, u"),
    (
        "compound.adducts_positive",
        "adducts and multimers of positive ions; the first is taken for a lone ion",
    ),
    (
        "compound.adducts_negative",
        "adducts and multimers of negative ions; the first is taken for a lone ion",
    ),
    ("compound.losses", "neutral losses of in-source and EI fragments, as formulas"),
    ("compound.max_loss_steps", "losses that may follow each other (1 or 2)"),
    ("compound.min_support", "halogen call: least fraction of the feature's scans that agree"),
    ("compound.min_m2_correlation", "halogen call: least Pearson r of the M+2 trace with M"),
    ("compound.m2_trace_min_scans", "agreeing scans needed before the M+2 trace is tested"),
    (
        "compound.background_fraction",
        "a feature longer than this fraction of the run is a background level ...",
    ),
    ("compound.background_peak_ratio", "... unless its apex stands this many times its median"),
    ("compound.min_halogen_probability", "halogen call: least calibrated probability"),
    (
        "output.mzqc",
        "write mzQC 1.0.0 metrics: run.mzQC (mzsift run), check.mzQC (mzsift check -o)",
    ),
    (
        "output.centroided_mzml",
        "write <name>/centroided.mzML, the picked peaks with the metadata (--write-centroided)",
    ),
    (
        "output.centroided_encoding",
        "\"zlib\" (m/z 64-bit, intensity 32-bit) or \"numpress\" (MS-Numpress linear / short logged float, then zlib)",
    ),
];

/// The TOML text with a `# ...` comment line above every documented key.
pub fn commented(config: &ScreenConfig) -> String {
    let mut out = String::from(
        "# mzsift configuration. Every key is optional; a missing key takes the value shown.\n\
         # Flags are screening hints, not identifications.\n",
    );
    let mut section = String::new();
    for line in config.to_toml().lines() {
        let trimmed = line.trim();
        if let Some(name) = trimmed.strip_prefix('[').and_then(|s| s.strip_suffix(']')) {
            section = name.to_owned();
            out.push('\n');
        } else if let Some((key, _)) = trimmed.split_once(" = ") {
            let full = if section.is_empty() { key.to_owned() } else { format!("{section}.{key}") };
            if let Some((_, doc)) = DOCS.iter().find(|(k, _)| *k == full) {
                out.push_str(&format!("# {doc}\n"));
            }
        }
        out.push_str(line);
        out.push('\n');
    }
    out
}

/// Runs `mzsift config`; returns the exit code.
pub fn run(args: &ConfigArgs, out: &mut dyn Write) -> anyhow::Result<u8> {
    let config = match &args.check {
        Some(path) => match super::run::load_config(Some(path), None) {
            Ok(c) => c,
            Err(e) => {
                eprintln!("mzsift: {e:#}");
                return Ok(output::USAGE);
            }
        },
        None => ScreenConfig::default(),
    };
    out.write_all(commented(&config).as_bytes())?;
    Ok(output::OK)
}
