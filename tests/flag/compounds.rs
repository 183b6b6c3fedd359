//! Test compounds: real formulas (common practice; names for orientation only) with the ion
//! an LC-HRMS method would see and their role in the accuracy tables.

#![allow(dead_code)]

/// Role of a compound.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Role {
    /// Carries Cl and/or Br within the model's range (Cl <= 8, Br <= 6).
    Halogenated,
    /// No Cl or Br; no S or Si beyond what drugs usually carry.
    Plain,
    /// S- or Si-rich look-alike.
    Decoy,
}

/// One compound.
#[derive(Debug, Clone, Copy)]
pub struct Compound {
    /// Name for orientation.
    pub name: &'static str,
    /// Formula.
    pub formula: &'static str,
    /// Ion type at high resolution (LC-ESI, or GC-HRMS `M+.` for compounds that do not
    /// protonate).
    pub hr_ion: &'static str,
    /// Role.
    pub role: Role,
}

const fn c(
    name: &'static str,
    formula: &'static str,
    hr_ion: &'static str,
    role: Role,
) -> Compound {
    Compound { name, formula, hr_ion, role }
}

use Role::{Decoy, Halogenated as Hal, Plain};

/// The compound list (more than 40 formulas).
pub const COMPOUNDS: &[Compound] = &[
    // Pesticides
    c("atrazine", "C8H14ClN5", "[M+H]+", Hal),
    c("simazine", "C7H12ClN5", "[M+H]+", Hal),
    c("DDT", "C14H9Cl5", "M+.", Hal),
    c("DDE", "C14H8Cl4", "M+.", Hal),
    c("lindane", "C6H6Cl6", "M+.", Hal),
    c("chlorpyrifos", "C9H11Cl3NO3PS", "[M+H]+", Hal),
    c("endosulfan", "C9H6Cl6O3S", "M+.", Hal),
    c("dieldrin", "C12H8Cl6O", "M+.", Hal),
    c("chlordane", "C10H6Cl8", "M+.", Hal),
    c("2,4-D", "C8H6Cl2O3", "[M-H]-", Hal),
    c("MCPA", "C9H9ClO3", "[M-H]-", Hal),
    c("diuron", "C9H10Cl2N2O", "[M+H]+", Hal),
    c("metolachlor", "C15H22ClNO2", "[M+H]+", Hal),
    c("bromoxynil", "C7H3Br2NO", "[M-H]-", Hal),
    c("profenofos", "C11H15BrClO3PS", "[M+H]+", Hal),
    c("pentachlorophenol", "C6HCl5O", "[M-H]-", Hal),
    // Disinfection by-products
    c("chloroform", "CHCl3", "M+.", Hal),
    c("bromodichloromethane", "CHBrCl2", "M+.", Hal),
    c("dibromochloromethane", "CHBr2Cl", "M+.", Hal),
    c("bromoform", "CHBr3", "M+.", Hal),
    c("trichloroacetic acid", "C2HCl3O2", "[M-H]-", Hal),
    c("dibromoacetic acid", "C2H2Br2O2", "[M-H]-", Hal),
    c("bromochloroacetic acid", "C2H2BrClO2", "[M-H]-", Hal),
    c("dichloroacetonitrile", "C2HCl2N", "M+.", Hal),
    // Flame retardants and industrial
    c("BDE-47", "C12H6Br4O", "M+.", Hal),
    c("BDE-99", "C12H5Br5O", "M+.", Hal),
    c("TBBPA", "C15H12Br4O2", "[M-H]-", Hal),
    c("HBCD", "C12H18Br6", "[M-H]-", Hal),
    c("TCEP", "C6H12Cl3O4P", "[M+H]+", Hal),
    c("TDCPP", "C9H15Cl6O4P", "[M+H]+", Hal),
    c("PCB-28", "C12H7Cl3", "M+.", Hal),
    c("PCB-153", "C12H4Cl6", "M+.", Hal),
    c("TCDD", "C12H4Cl4O2", "M+.", Hal),
    c("chlorobenzene", "C6H5Cl", "M+.", Hal),
    c("dichlorobenzene", "C6H4Cl2", "M+.", Hal),
    c("trichlorobenzene", "C6H3Cl3", "M+.", Hal),
    c("tetrachlorobenzene", "C6H2Cl4", "M+.", Hal),
    c("pentachlorobenzene", "C6HCl5", "M+.", Hal),
    c("hexachlorobenzene", "C6Cl6", "M+.", Hal),
    c("bromobenzene", "C6H5Br", "M+.", Hal),
    c("dibromobenzene", "C6H4Br2", "M+.", Hal),
    c("tribromobenzene", "C6H3Br3", "M+.", Hal),
    c("tetrabromobenzene", "C6H2Br4", "M+.", Hal),
    c("triclosan", "C12H7Cl3O2", "[M-H]-", Hal),
    c("bromochlorobenzene", "C6H4BrCl", "M+.", Hal),
    c("dibromodichlorobenzene", "C6H2Br2Cl2", "M+.", Hal),
    // Pharmaceuticals with halogens
    c("diclofenac", "C14H11Cl2NO2", "[M+H]+", Hal),
    c("ketamine", "C13H16ClNO", "[M+H]+", Hal),
    c("hydrochlorothiazide", "C7H8ClN3O4S2", "[M-H]-", Hal),
    c("chlorpromazine", "C17H19ClN2S", "[M+H]+", Hal),
    c("haloperidol", "C21H23ClFNO2", "[M+H]+", Hal),
    c("bromazepam", "C14H10BrN3O", "[M+H]+", Hal),
    c("sertraline", "C17H17Cl2N", "[M+H]+", Hal),
    // Pharmaceuticals without Cl/Br (odd and even N)
    c("caffeine", "C8H10N4O2", "[M+H]+", Plain),
    c("metoprolol", "C15H25NO3", "[M+H]+", Plain),
    c("carbamazepine", "C15H12N2O", "[M+H]+", Plain),
    c("ibuprofen", "C13H18O2", "[M-H]-", Plain),
    c("paracetamol", "C8H9NO2", "[M+H]+", Plain),
    c("sulfamethoxazole", "C10H11N3O3S", "[M+H]+", Plain),
    c("trimethoprim", "C14H18N4O3", "[M+H]+", Plain),
    c("naproxen", "C14H14O3", "[M-H]-", Plain),
    c("venlafaxine", "C17H27NO2", "[M+H]+", Plain),
    c("fluoxetine", "C17H18F3NO", "[M+H]+", Plain),
    c("omeprazole", "C17H19N3O3S", "[M+H]+", Plain),
    // S and Si look-alikes
    c("thianthrene", "C12H8S2", "M+.", Decoy),
    c("methylbenzothiophene", "C9H8S", "M+.", Decoy),
    c("C10H8S", "C10H8S", "M+.", Decoy),
    c("dibenzothiophene", "C12H8S", "M+.", Decoy),
    c("tetrathiafulvalene", "C6H4S4", "M+.", Decoy),
    c("octamethylcyclotetrasiloxane D4", "C8H24O4Si4", "M+.", Decoy),
    c("decamethylcyclopentasiloxane D5", "C10H30O5Si5", "M+.", Decoy),
    c("dodecamethylcyclohexasiloxane D6", "C12H36O6Si6", "M+.", Decoy),
    c("hexamethyldisiloxane", "C6H18OSi2", "M+.", Decoy),
    c("octasulfur", "S8", "M+.", Decoy),
];

/// (n_cl, n_br) of a formula.
pub fn halogens(formula: &str) -> (u8, u8) {
    let f = mzcore::chem::Formula::parse(formula).expect("formula");
    (f.count("Cl") as u8, f.count("Br") as u8)
}
