//! `mzsift formula`: formula candidates for one neutral mass or ion m/z.

use anyhow::{Result, bail};
use mzcore::chem::formula_search::{self, ElementSet, FormulaQuery, Rule, RuleMode, RuleSet};
use mzcore::chem::{IonType, Parity};

/// Arguments of `mzsift formula`.
#[derive(Debug, Clone, clap::Args)]
#[command(after_long_help = "Examples:\n  \
    mzsift formula 195.92495 --neutral --cl 3 --parity even\n  \
    mzsift formula 288.0669 --ion M+H --cl 1 --ppm 3 --elements +F --top 5\n  \
    mzsift formula 563.6432 --ion M-H --br 4 --elements C H0-20 N0-2 O0-4\n  \
    mzsift formula 349.932 --neutral --cl 2 --br 1 --rule hc_ratio=annotate\n\n\
    Prints TSV with the columns of formulas.tsv: compound (empty here), rank, formula (Hill), \
    neutral_mass, error_ppm ((given - exact) / exact), rdbe, isotope_fit (empty: no observed \
    cluster), score (share of the evidence, from the mass error alone here), rules_passed.\n\n\
    --elements: symbols of C H N O S P F Si I, each optionally with bounds 'min-max' or an exact \
    count; a leading '+' adds to the default C H N O S P (e.g. '+F0-6+I'). Cl and Br are fixed \
    by --cl and --br. Rules (all required by default): element_limits, lewis, senior, hc_ratio, \
    hetero_ratio, element_probability, rdbe; --rule NAME=off|annotate|require.\n\n\
    Candidates are screening hints for a database search, not identifications.")]
pub struct FormulaArgs {
    /// Neutral monoisotopic mass (with --neutral) or monoisotopic ion m/z (with --ion), e.g.
    /// 195.92495.
    pub mass: f64,
    /// MASS is the neutral monoisotopic mass.
    #[arg(long, conflicts_with = "ion", required_unless_present = "ion")]
    pub neutral: bool,
    /// MASS is the m/z of this ion type: [M+H]+, M+H, M-H, M+Na, M+., ...
    #[arg(long)]
    pub ion: Option<String>,
    /// Chlorine atoms of the neutral.
    #[arg(long, default_value_t = 0)]
    pub cl: u32,
    /// Bromine atoms of the neutral.
    #[arg(long, default_value_t = 0)]
    pub br: u32,
    /// Tolerance, ppm.
    #[arg(long, default_value_t = 5.0)]
    pub ppm: f64,
    /// Elements and bounds (default C H N O S P).
    #[arg(long, default_value = "CHNOSP")]
    pub elements: String,
    /// Parity of the nitrogen count (= of the neutral's nominal mass), when known.
    #[arg(long, value_parser = ["even", "odd"])]
    pub parity: Option<String>,
    /// Print only the best K candidates.
    #[arg(long)]
    pub top: Option<usize>,
    /// Mode of one rule, NAME=off|annotate|require (repeatable).
    #[arg(long = "rule", value_name = "NAME=MODE")]
    pub rules: Vec<String>,
}

fn rule_set(specs: &[String]) -> Result<RuleSet> {
    let mut set = RuleSet::default();
    for spec in specs {
        let Some((name, mode)) = spec.split_once('=') else {
            bail!("--rule {spec}: expected NAME=off|annotate|require");
        };
        let Some(rule) = Rule::from_name(name) else {
            let names: Vec<&str> = Rule::ALL.iter().map(|r| r.name()).collect();
            bail!("--rule {spec}: unknown rule '{name}' (one of {})", names.join(", "));
        };
        let mode = match mode {
            "off" => RuleMode::Off,
            "annotate" => RuleMode::Annotate,
            "require" => RuleMode::Require,
            _ => bail!("--rule {spec}: unknown mode '{mode}' (off, annotate, require)"),
        };
        set.set(rule, mode);
    }
    Ok(set)
}

/// Writes the candidates as TSV to `out`.
pub fn run(args: &FormulaArgs, out: &mut dyn std::io::Write) -> Result<()> {
    let neutral_mass = match &args.ion {
        Some(text) => IonType::parse(text)?.mass_from_mz(args.mass),
        None => args.mass,
    };
    let query = FormulaQuery {
        neutral_mass,
        ppm: args.ppm,
        n_cl: args.cl,
        n_br: args.br,
        parity: args.parity.as_deref().map(|p| if p == "odd" { Parity::Odd } else { Parity::Even }),
        elements: ElementSet::parse(&args.elements)?,
        rules: rule_set(&args.rules)?,
        ..FormulaQuery::default()
    };
    let found = formula_search::candidates(&query, None)?;
    let mut w = csv::WriterBuilder::new().delimiter(b'\t').from_writer(out);
    let header = [
        "compound",
        "rank",
        "formula",
        "neutral_mass",
        "error_ppm",
        "rdbe",
        "isotope_fit",
        "score",
        "rules_passed",
    ];
    if found.is_empty() {
        w.write_record(header)?;
    }
    for c in found.iter().take(args.top.unwrap_or(usize::MAX)) {
        w.serialize(c)?;
    }
    w.flush()?;
    Ok(())
}

#[cfg(test)]
mod tests {
    use super::*;

    fn args(mass: f64) -> FormulaArgs {
        FormulaArgs {
            mass,
            neutral: true,
            ion: None,
            cl: 0,
            br: 0,
            ppm: 5.0,
            elements: "CHNOSP".into(),
            parity: None,
            top: None,
            rules: Vec::new(),
        }
    }

    fn lines(a: &FormulaArgs) -> Vec<String> {
        let mut buf = Vec::new();
        run(a, &mut buf).unwrap();
        String::from_utf8(buf).unwrap().lines().map(str::to_string).collect()
    }

    #[test]
    fn trichlorophenol_from_its_deprotonated_ion() {
        // 2,4,6-trichlorophenol C6H3Cl3O: [M-H]- at 194.91767 (neutral 195.92495, molmass).
        let a = FormulaArgs { ion: Some("M-H".into()), neutral: false, cl: 3, ..args(194.91767) };
        let out = lines(&a);
        assert_eq!(
            out[0],
            "compound\trank\tformula\tneutral_mass\terror_ppm\trdbe\tisotope_fit\tscore\trules_passed"
        );
        let first: Vec<&str> = out[1].split('\t').collect();
        assert_eq!(first[0], "");
        assert_eq!(first[1], "1");
        assert_eq!(first[2], "C6H3Cl3O");
        assert_eq!(first[5].parse::<f64>().unwrap(), 4.0);
        assert_eq!(first[6], "");
        assert!(first[8].contains("senior"));
        let top1 = lines(&FormulaArgs { top: Some(1), ..a });
        assert_eq!(top1.len(), 2);
    }

    #[test]
    fn empty_result_keeps_the_header_and_bad_rules_are_errors() {
        // Nothing within 0.1 ppm of 100.5 u with Cl10.
        let out = lines(&FormulaArgs { cl: 2, ppm: 0.1, ..args(100.5) });
        assert_eq!(out.len(), 1);
        let mut buf = Vec::new();
        let bad = FormulaArgs { rules: vec!["nonsense=off".into()], ..args(200.0) };
        assert!(run(&bad, &mut buf).is_err());
        let bad = FormulaArgs { rules: vec!["lewis=maybe".into()], ..args(200.0) };
        assert!(run(&bad, &mut buf).is_err());
    }
}
