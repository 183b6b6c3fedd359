//! `mzsift mass`: masses, ion m/z and nitrogen-rule parity of a formula.

use anyhow::Result;
use mzcore::chem::{Formula, IonType};
use mzcore::report::digits::{self, Kind};

/// Arguments of `mzsift mass`.
#[derive(Debug, Clone, clap::Args)]
#[command(after_long_help = "Examples:\n  \
    mzsift mass C8H14ClN5\n  \
    mzsift mass C12Br10O --ion M+.\n\n\
    Prints TSV rows 'quantity<TAB>value': formula (Hill), monoisotopic_mass, nominal_mass, \
    average_mass, nitrogen_count, nominal_mass_parity, nitrogen_rule (consistent, \
    inconsistent, or not_applicable for elements or isotopes the rule does not cover), \
    and with --ion: ion, ion_charge, ion_mz, ion_nominal_mass, ion_nominal_parity.")]
pub struct MassArgs {
    /// Formula, e.g. C8H14ClN5.
    pub formula: String,
    /// Ion type (default M+.): [M+H]+, M+H, M-H, M+Na, M+2H, M+., ...
    #[arg(long)]
    pub ion: Option<String>,
}

/// Writes the masses as TSV rows to `out`.
pub fn run(args: &MassArgs, out: &mut dyn std::io::Write) -> Result<()> {
    let f = Formula::parse(&args.formula)?;
    let ion = IonType::parse(args.ion.as_deref().unwrap_or("M+."))?;
    let rule = f.nitrogen_rule();
    let verdict = if !rule.applies {
        "not_applicable"
    } else if rule.consistent() {
        "consistent"
    } else {
        "inconsistent"
    };
    let ion_nominal = ion.nominal_mass(&f)?;
    let rows: Vec<(&str, String)> = vec![
        ("formula", f.hill()),
        ("monoisotopic_mass", digits::text(Kind::Theoretical, f.monoisotopic_mass())),
        ("nominal_mass", rule.nominal_mass.to_string()),
        (
            "average_mass", // Standard atomic weights carry at most 5 decimals.
            digits::text(Kind::Mz, f.average_mass()),
        ),
        ("nitrogen_count", rule.nitrogen.to_string()),
        ("nominal_mass_parity", rule.parity.to_string()),
        ("nitrogen_rule", verdict.to_string()),
        ("ion", ion.to_string()),
        ("ion_charge", ion.charge().to_string()),
        ("ion_mz", digits::text(Kind::Theoretical, ion.mz(&f)?)),
        ("ion_nominal_mass", ion_nominal.to_string()),
        ("ion_nominal_parity", mzcore::chem::Parity::of(ion_nominal).to_string()),
    ];
    let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
    w.write_record(["quantity", "value"])?;
    for (k, v) in rows {
        w.write_record([k, v.as_str()])?;
    }
    w.flush()?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn table(formula: &str, ion: Option<&str>) -> Vec<(String, String)> {
        let mut buf = Vec::new();
        run(&MassArgs { formula: formula.into(), ion: ion.map(String::from) }, &mut buf).unwrap();
        String::from_utf8(buf)
            .unwrap()
            .lines()
            .skip(1)
            .map(|l| {
                let (k, v) = l.split_once('\t').unwrap();
                (k.to_string(), v.to_string())
            })
            .collect()
    }

    fn get(t: &[(String, String)], k: &str) -> String {
        t.iter().find(|(a, _)| a == k).unwrap().1.clone()
    }

    #[test]
    fn atrazine_odd_nitrogen() {
        // Atrazine C8H14ClN5: monoisotopic 215.0938 u (molmass); odd N, odd nominal mass.
        let t = table("C8H14ClN5", Some("M+H"));
        assert_eq!(get(&t, "nominal_mass"), "215");
        assert!((get(&t, "monoisotopic_mass").parse::<f64>().unwrap() - 215.093773).abs() < 1e-5);
        assert_eq!(get(&t, "nitrogen_rule"), "consistent");
        assert_eq!(get(&t, "ion"), "[M+H]+");
        assert_eq!(get(&t, "ion_nominal_parity"), "even");
    }

    #[test]
    fn decabromo_ether_nominal_mass() {
        let t = table("C12Br10O", None);
        assert_eq!(get(&t, "nominal_mass"), "950");
        assert_eq!(get(&t, "ion"), "M+.");
        assert_eq!(get(&t, "nominal_mass_parity"), "even");
        assert_eq!(get(&table("C6D6", None), "nitrogen_rule"), "not_applicable");
    }
}
