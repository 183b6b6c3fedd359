//! `mzsift pattern` and `mzsift mass`.

use crate::util::{run, stderr, stdout, tsv};

#[test]
fn pattern_shells_of_dichlorobenzene_follow_the_handbook_cluster() {
    // Cl2 cluster about 100:64:10 (common practice, textbook isotope tables); the carbon and
    // hydrogen of C6H4Cl2 add their own M+1 and M+3.
    let (o, _d) = run(&["pattern", "C6H4Cl2", "--shells", "--ion", "M+."]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (header, rows) = tsv(&stdout(&o));
    assert_eq!(header, ["label", "mz", "relative_abundance", "abundance"]);
    let rel = |label: &str| -> f64 {
        rows.iter().find(|r| r[0] == label).map(|r| r[2].parse().unwrap()).unwrap()
    };
    assert_eq!(rel("M"), 100.0);
    assert!((rel("M+2") - 64.0).abs() < 1.5, "M+2 {}", rel("M+2"));
    assert!((rel("M+4") - 10.2).abs() < 0.6, "M+4 {}", rel("M+4"));
    let total: f64 = rows.iter().map(|r| r[3].parse::<f64>().unwrap()).sum();
    assert!((total - 1.0).abs() < 1e-3, "abundances sum to {total}");
}

#[test]
fn mass_of_decabromodiphenyl_ether_rounds_the_defect_correctly() {
    // C12Br10O: exact mass 949.18, nominal mass 950 (../shared/DESIGN.md): a naive rounding of
    // the exact mass gives 949.
    let (o, _d) = run(&["mass", "C12Br10O"]);
    assert!(o.status.success(), "{}", stderr(&o));
    let (_, rows) = tsv(&stdout(&o));
    let get = |k: &str| rows.iter().find(|r| r[0] == k).map(|r| r[1].clone()).unwrap();
    assert_eq!(get("nominal_mass"), "950");
    let mono: f64 = get("monoisotopic_mass").parse().unwrap();
    assert!((mono - 949.18).abs() < 0.01, "{mono}");
    assert_eq!(get("nominal_mass_parity"), "even");
}

#[test]
fn bad_formula_is_a_usage_error_naming_the_position() {
    let (o, _d) = run(&["pattern", "C6H5Qq"]);
    assert_eq!(o.status.code(), Some(2));
    assert!(stderr(&o).contains("at character 4"), "{}", stderr(&o));
}
