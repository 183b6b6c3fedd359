//! `mzsift pattern`: the isotope pattern of a formula as TSV.

use anyhow::{Context, Result, bail};
use mzcore::chem::isotopes::{self, Resolution};
use mzcore::chem::{Formula, IonType};
use mzcore::report::digits::{self, Kind};

/// Arguments of `mzsift pattern`.
#[derive(Debug, Clone, clap::Args)]
#[command(after_long_help = "Examples:\n  \
    mzsift pattern C12H7Cl3O2 --ion M-H --shells\n  \
    mzsift pattern C14H9Cl5 --ion M+. --resolution 60000 --threshold 0.001\n  \
    mzsift pattern C8H10N4O2 --charge 2\n\n\
    Columns: label, mz, relative_abundance (most abundant = 100), abundance (fraction of all \
    isotopologues). Without --resolution or --shells every isotopologue is listed, labelled by \
    its shell and heavy isotopes (e.g. 'M+2 37Cl').")]
pub struct PatternArgs {
    /// Formula, e.g. `C6H4(NO2)2` or `[13C]6H12O6`.
    #[arg(help = "Formula, e.g. C6H4(NO2)2 or [13C]6H12O6")]
    pub formula: String,
    /// Ion type: [M+H]+, M+H, M-H, M+Na, M+NH4, M+Cl, M+HCOO, M+2H, M+., ...
    #[arg(long)]
    pub ion: Option<String>,
    /// Charge; alone it means z-fold (de)protonation ([M+zH]z+ or [M-zH]z-); with --ion it
    /// must agree with the ion's charge.
    #[arg(long, allow_hyphen_values = true)]
    pub charge: Option<i32>,
    /// Merge fine peaks closer than m/R (resolving power R, e.g. 60000).
    #[arg(long, conflicts_with = "shells")]
    pub resolution: Option<f64>,
    /// Nominal shells M, M+1, ... instead of fine structure.
    #[arg(long)]
    pub shells: bool,
    /// Drop peaks below this fraction of the most abundant one.
    #[arg(long, default_value_t = 1e-4)]
    pub threshold: f64,
}

/// Resolves `--ion` and `--charge` into an ion type (or none for the neutral molecule).
pub fn resolve_ion(ion: Option<&str>, charge: Option<i32>) -> Result<Option<IonType>> {
    let ion = match ion {
        Some(text) => Some(IonType::parse(text)?),
        None => None,
    };
    match (ion, charge) {
        (Some(i), Some(z)) if i.charge() != z => {
            bail!("--charge {z} disagrees with ion type {i} (charge {})", i.charge())
        }
        (Some(i), _) => Ok(Some(i)),
        (None, Some(0)) => Ok(None),
        (None, Some(z)) => {
            let text = match z {
                1 => "M+H".to_string(),
                -1 => "M-H".to_string(),
                z if z > 0 => format!("M+{z}H"),
                z => format!("M-{}H", -z),
            };
            Ok(Some(IonType::parse(&text)?))
        }
        (None, None) => Ok(None),
    }
}

/// Writes the pattern as TSV to `out` (m/z and relative abundance, %, with 6 decimals; the
/// abundance, a fraction, with 6 significant digits).
pub fn run(args: &PatternArgs, out: &mut dyn std::io::Write) -> Result<()> {
    let formula = Formula::parse(&args.formula)?;
    let ion = resolve_ion(args.ion.as_deref(), args.charge)?;
    let resolution = match (args.shells, args.resolution) {
        (true, _) => Resolution::Shells,
        (false, Some(r)) => Resolution::ResolvingPower(r),
        (false, None) => Resolution::Fine,
    };
    let peaks = isotopes::pattern(&formula, ion.as_ref(), resolution, args.threshold)
        .with_context(|| format!("isotope pattern of {formula}"))?;
    let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
    w.write_record(["label", "mz", "relative_abundance", "abundance"])?;
    for p in peaks {
        w.write_record([
            p.label,
            digits::text(Kind::Theoretical, p.mz),
            digits::text(Kind::Theoretical, p.relative),
            digits::text(Kind::Intensity, p.abundance),
        ])?;
    }
    w.flush()?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn run_to_string(args: &PatternArgs) -> Result<String> {
        let mut buf = Vec::new();
        run(args, &mut buf)?;
        Ok(String::from_utf8(buf)?)
    }

    fn args(formula: &str) -> PatternArgs {
        PatternArgs {
            formula: formula.into(),
            ion: None,
            charge: None,
            resolution: None,
            shells: false,
            threshold: 1e-4,
        }
    }

    #[test]
    fn shells_of_chloroform() {
        let mut a = args("CHCl3");
        a.shells = true;
        a.threshold = 0.01;
        let s = run_to_string(&a).unwrap();
        let lines: Vec<&str> = s.lines().collect();
        assert_eq!(lines[0], "label\tmz\trelative_abundance\tabundance");
        assert!(lines[1].starts_with("M\t117.914"), "{}", lines[1]);
        // Cl3 about 100:96:31:3 (common practice); with 13C the M+2 is 95.9 %.
        let m2: Vec<&str> = lines[3].split('\t').collect();
        assert_eq!(m2[0], "M+2");
        let rel: f64 = m2[2].parse().unwrap();
        assert!((rel - 96.0).abs() < 0.6, "{rel}");
    }

    #[test]
    fn charge_alone_means_protonation() {
        let ion = resolve_ion(None, Some(2)).unwrap().unwrap();
        assert_eq!(ion.to_string(), "[M+2H]2+");
        assert_eq!(resolve_ion(None, Some(-1)).unwrap().unwrap().to_string(), "[M-H]-");
        assert!(resolve_ion(Some("M+H"), Some(2)).is_err());
        assert!(resolve_ion(None, None).unwrap().is_none());
    }

    #[test]
    fn fine_and_resolution_rows() {
        let mut a = args("C12H8S");
        a.threshold = 1e-3;
        let fine = run_to_string(&a).unwrap();
        assert!(fine.contains("M+2 34S\t"), "{fine}");
        assert!(fine.contains("M+2 13C2\t"), "{fine}");
        a.resolution = Some(1000.0);
        let merged = run_to_string(&a).unwrap();
        assert!(merged.lines().count() < fine.lines().count());
        assert!(run_to_string(&args("C6Xx")).is_err());
    }
}
