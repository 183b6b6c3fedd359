//! Inputs found by the fuzz targets in `mzcore/fuzz/` that once crashed or broke a property,
//! kept as regression tests (each named after what it guards).

use mzcore::chem::Formula;

/// Found by `formula`: `(C6C)66666` parsed to 466,662 carbons (within the per-element ceiling),
/// but its Hill form `C466662` was rejected because a written count was capped lower than the
/// number of atoms a formula may hold. Every formula the library writes must read back.
#[test]
fn hill_form_of_a_multiplied_group_reads_back() {
    let f = Formula::parse("(C6C)66666").unwrap();
    assert_eq!(f.count("C"), 7 * 66_666);
    let hill = f.hill();
    assert_eq!(hill, "C466662");
    assert_eq!(Formula::parse(&hill).unwrap(), f);
    // The ceilings themselves still hold: one element at most MAX_ATOMS atoms, however written.
    let max = mzcore::chem::formula::MAX_ATOMS;
    assert!(Formula::parse(&format!("C{max}")).is_ok());
    assert!(Formula::parse(&format!("C{}", max + 1)).is_err());
    assert!(Formula::parse(&format!("(C2){}", max / 2 + 1)).is_err());
}
