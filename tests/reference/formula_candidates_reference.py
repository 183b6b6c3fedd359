#!/usr/bin/env python3
"""Regenerates tests/reference/formula_candidates.tsv: real halogenated compounds of
environmental interest with their monoisotopic mass and M+1/M and M+2/M shell ratios from
molmass (NIST element table), for the formula-candidate check in
mzcore/tests/formula_candidates.rs.

Formulas: where a systematic (IUPAC) name is given in the `source` column, the formula is the
atom count of that name; entries marked "from memory" are formulas recalled from handbooks
without a name worked through here. The ion type is the one a laboratory would usually see
(GC-EI M+. for neutral persistent compounds, ESI [M-H]- for acids and phenols, [M+H]+ for
bases).

Deterministic: fixed list, fixed order, fixed number formatting. CI runs it and
`git diff --exit-code tests/reference/`.

Usage: python3 tests/reference/formula_candidates_reference.py   (needs molmass)
"""

import os

import molmass

HERE = os.path.dirname(os.path.abspath(__file__))

# (category, name, formula, ion, source)
COMPOUNDS = [
    ("pesticide", "p,p'-DDT", "C14H9Cl5", "M+.", "IUPAC name: 1-chloro-4-[2,2,2-trichloro-1-(4-chlorophenyl)ethyl]benzene"),
    ("pesticide", "p,p'-DDE", "C14H8Cl4", "M+.", "IUPAC name: 1-chloro-4-[2,2-dichloro-1-(4-chlorophenyl)ethenyl]benzene"),
    ("pesticide", "p,p'-DDD", "C14H10Cl4", "M+.", "IUPAC name: 1-chloro-4-[2,2-dichloro-1-(4-chlorophenyl)ethyl]benzene"),
    ("pesticide", "lindane", "C6H6Cl6", "M+.", "IUPAC name: 1,2,3,4,5,6-hexachlorocyclohexane"),
    ("pesticide", "hexachlorobenzene", "C6Cl6", "M+.", "IUPAC name: 1,2,3,4,5,6-hexachlorobenzene"),
    ("pesticide", "pentachlorophenol", "C6HCl5O", "M-H", "IUPAC name: 2,3,4,5,6-pentachlorophenol"),
    ("pesticide", "atrazine", "C8H14ClN5", "M+H", "IUPAC name: 6-chloro-N2-ethyl-N4-(propan-2-yl)-1,3,5-triazine-2,4-diamine"),
    ("pesticide", "simazine", "C7H12ClN5", "M+H", "IUPAC name: 6-chloro-N2,N4-diethyl-1,3,5-triazine-2,4-diamine"),
    ("pesticide", "terbuthylazine", "C9H16ClN5", "M+H", "IUPAC name: N2-tert-butyl-6-chloro-N4-ethyl-1,3,5-triazine-2,4-diamine"),
    ("pesticide", "chlorpyrifos", "C9H11Cl3NO3PS", "M+H", "IUPAC name: O,O-diethyl O-(3,5,6-trichloropyridin-2-yl) phosphorothioate"),
    ("pesticide", "dieldrin", "C12H8Cl6O", "M+.", "from memory"),
    ("pesticide", "aldrin", "C12H8Cl6", "M+.", "from memory"),
    ("pesticide", "endosulfan", "C9H6Cl6O3S", "M+.", "from memory"),
    ("pesticide", "heptachlor", "C10H5Cl7", "M+.", "from memory"),
    ("pesticide", "chlordane", "C10H6Cl8", "M+.", "from memory"),
    ("pesticide", "mirex", "C10Cl12", "M+.", "from memory"),
    ("pesticide", "chlordecone", "C10Cl10O", "M+.", "from memory"),
    ("pesticide", "methoxychlor", "C16H15Cl3O2", "M+.", "IUPAC name: 1-methoxy-4-[2,2,2-trichloro-1-(4-methoxyphenyl)ethyl]benzene"),
    ("pesticide", "2,4-D", "C8H6Cl2O3", "M-H", "IUPAC name: (2,4-dichlorophenoxy)acetic acid"),
    ("pesticide", "MCPA", "C9H9ClO3", "M-H", "IUPAC name: (4-chloro-2-methylphenoxy)acetic acid"),
    ("pesticide", "2,4,5-T", "C8H5Cl3O3", "M-H", "IUPAC name: (2,4,5-trichlorophenoxy)acetic acid"),
    ("pesticide", "dicamba", "C8H6Cl2O3", "M-H", "IUPAC name: 3,6-dichloro-2-methoxybenzoic acid"),
    ("pesticide", "diuron", "C9H10Cl2N2O", "M+H", "IUPAC name: 3-(3,4-dichlorophenyl)-1,1-dimethylurea"),
    ("pesticide", "linuron", "C9H10Cl2N2O2", "M+H", "IUPAC name: 3-(3,4-dichlorophenyl)-1-methoxy-1-methylurea"),
    ("pesticide", "chlorothalonil", "C8Cl4N2", "M+.", "IUPAC name: 2,4,5,6-tetrachlorobenzene-1,3-dicarbonitrile"),
    ("pesticide", "bromoxynil", "C7H3Br2NO", "M-H", "IUPAC name: 3,5-dibromo-4-hydroxybenzonitrile"),
    ("pesticide", "metolachlor", "C15H22ClNO2", "M+H", "IUPAC name: 2-chloro-N-(2-ethyl-6-methylphenyl)-N-(1-methoxypropan-2-yl)acetamide"),
    ("pesticide", "alachlor", "C14H20ClNO2", "M+H", "IUPAC name: 2-chloro-N-(2,6-diethylphenyl)-N-(methoxymethyl)acetamide"),
    ("pesticide", "triclopyr", "C7H4Cl3NO3", "M-H", "IUPAC name: [(3,5,6-trichloropyridin-2-yl)oxy]acetic acid"),
    ("pesticide", "chloridazon", "C10H8ClN3O", "M+H", "IUPAC name: 5-amino-4-chloro-2-phenylpyridazin-3(2H)-one"),
    ("pesticide", "imidacloprid", "C9H10ClN5O2", "M+H", "IUPAC name: N-{1-[(6-chloropyridin-3-yl)methyl]-4,5-dihydro-1H-imidazol-2-yl}nitramide"),
    ("pesticide", "propiconazole", "C15H17Cl2N3O2", "M+H", "from memory"),
    ("pesticide", "tebuconazole", "C16H22ClN3O", "M+H", "from memory"),
    ("pesticide", "bromacil", "C9H13BrN2O2", "M+H", "IUPAC name: 5-bromo-3-(butan-2-yl)-6-methylpyrimidine-2,4(1H,3H)-dione"),
    ("pesticide", "profenofos", "C11H15BrClO3PS", "M+H", "IUPAC name: O-(4-bromo-2-chlorophenyl) O-ethyl S-propyl phosphorothioate"),
    ("pesticide", "dichlorvos", "C4H7Cl2O4P", "M+H", "IUPAC name: 2,2-dichloroethenyl dimethyl phosphate"),
    ("pcb_dioxin", "PCB-28", "C12H7Cl3", "M+.", "IUPAC name: 2,4,4'-trichloro-1,1'-biphenyl"),
    ("pcb_dioxin", "PCB-52", "C12H6Cl4", "M+.", "IUPAC name: 2,2',5,5'-tetrachloro-1,1'-biphenyl"),
    ("pcb_dioxin", "PCB-101", "C12H5Cl5", "M+.", "IUPAC name: 2,2',4,5,5'-pentachloro-1,1'-biphenyl"),
    ("pcb_dioxin", "PCB-153", "C12H4Cl6", "M+.", "IUPAC name: 2,2',4,4',5,5'-hexachloro-1,1'-biphenyl"),
    ("pcb_dioxin", "PCB-180", "C12H3Cl7", "M+.", "IUPAC name: 2,2',3,4,4',5,5'-heptachloro-1,1'-biphenyl"),
    ("pcb_dioxin", "PCB-209", "C12Cl10", "M+.", "IUPAC name: decachloro-1,1'-biphenyl"),
    ("pcb_dioxin", "2,3,7,8-TCDD", "C12H4Cl4O2", "M+.", "IUPAC name: 2,3,7,8-tetrachlorodibenzo-p-dioxin"),
    ("pcb_dioxin", "2,3,7,8-TCDF", "C12H4Cl4O", "M+.", "IUPAC name: 2,3,7,8-tetrachlorodibenzofuran"),
    ("pcb_dioxin", "OCDD", "C12Cl8O2", "M+.", "IUPAC name: 1,2,3,4,6,7,8,9-octachlorodibenzo-p-dioxin"),
    ("flame_retardant", "BDE-47", "C12H6Br4O", "M+.", "IUPAC name: 2,4-dibromo-1-(2,4-dibromophenoxy)benzene"),
    ("flame_retardant", "BDE-99", "C12H5Br5O", "M+.", "IUPAC name: 1,2,4-tribromo-5-(2,4-dibromophenoxy)benzene"),
    ("flame_retardant", "BDE-209", "C12Br10O", "M+.", "IUPAC name: 1,2,3,4,5-pentabromo-6-(pentabromophenoxy)benzene"),
    ("flame_retardant", "TBBPA", "C15H12Br4O2", "M-H", "IUPAC name: 4,4'-(propane-2,2-diyl)bis(2,6-dibromophenol)"),
    ("flame_retardant", "HBCD", "C12H18Br6", "M+.", "IUPAC name: 1,2,5,6,9,10-hexabromocyclododecane"),
    ("flame_retardant", "hexabromobenzene", "C6Br6", "M+.", "IUPAC name: 1,2,3,4,5,6-hexabromobenzene"),
    ("flame_retardant", "2,4,6-tribromophenol", "C6H3Br3O", "M-H", "IUPAC name: 2,4,6-tribromophenol"),
    ("flame_retardant", "pentabromotoluene", "C7H3Br5", "M+.", "IUPAC name: 1,2,3,4,5-pentabromo-6-methylbenzene"),
    ("flame_retardant", "BTBPE", "C14H8Br6O2", "M+.", "IUPAC name: 1,3,5-tribromo-2-[2-(2,4,6-tribromophenoxy)ethoxy]benzene"),
    ("flame_retardant", "DBDPE", "C14H4Br10", "M+.", "IUPAC name: 1,2,3,4,5-pentabromo-6-[2-(pentabromophenyl)ethyl]benzene"),
    ("flame_retardant", "TCEP", "C6H12Cl3O4P", "M+H", "IUPAC name: tris(2-chloroethyl) phosphate"),
    ("flame_retardant", "TCIPP", "C9H18Cl3O4P", "M+H", "IUPAC name: tris(1-chloropropan-2-yl) phosphate"),
    ("flame_retardant", "TDCIPP", "C9H15Cl6O4P", "M+H", "IUPAC name: tris(1,3-dichloropropan-2-yl) phosphate"),
    ("flame_retardant", "Dechlorane Plus", "C18H12Cl12", "M+.", "from memory"),
    ("dbp", "chloroform", "CHCl3", "M+.", "IUPAC name: trichloromethane"),
    ("dbp", "bromodichloromethane", "CHBrCl2", "M+.", "IUPAC name: bromodichloromethane"),
    ("dbp", "dibromochloromethane", "CHBr2Cl", "M+.", "IUPAC name: dibromochloromethane"),
    ("dbp", "bromoform", "CHBr3", "M+.", "IUPAC name: tribromomethane"),
    ("dbp", "dichloroacetic acid", "C2H2Cl2O2", "M-H", "IUPAC name: dichloroacetic acid"),
    ("dbp", "trichloroacetic acid", "C2HCl3O2", "M-H", "IUPAC name: trichloroacetic acid"),
    ("dbp", "bromochloroacetic acid", "C2H2BrClO2", "M-H", "IUPAC name: bromo(chloro)acetic acid"),
    ("dbp", "dibromoacetic acid", "C2H2Br2O2", "M-H", "IUPAC name: dibromoacetic acid"),
    ("dbp", "dichloroacetonitrile", "C2HCl2N", "M+.", "IUPAC name: dichloroacetonitrile"),
    ("dbp", "MX", "C5H3Cl3O3", "M-H", "IUPAC name: 3-chloro-4-(dichloromethyl)-5-hydroxyfuran-2(5H)-one"),
    ("dbp", "2,4,6-trichlorophenol", "C6H3Cl3O", "M-H", "IUPAC name: 2,4,6-trichlorophenol"),
    ("dbp", "chloral hydrate", "C2H3Cl3O2", "M-H", "IUPAC name: 2,2,2-trichloroethane-1,1-diol"),
    ("dbp", "chloropicrin", "CCl3NO2", "M+.", "IUPAC name: trichloro(nitro)methane"),
    ("dbp", "2,6-dichloro-1,4-benzoquinone", "C6H2Cl2O2", "M+.", "IUPAC name: 2,6-dichlorocyclohexa-2,5-diene-1,4-dione"),
    ("drug", "diclofenac", "C14H11Cl2NO2", "M+H", "IUPAC name: {2-[(2,6-dichlorophenyl)amino]phenyl}acetic acid"),
    ("drug", "triclosan", "C12H7Cl3O2", "M-H", "IUPAC name: 5-chloro-2-(2,4-dichlorophenoxy)phenol"),
    ("drug", "triclocarban", "C13H9Cl3N2O", "M-H", "IUPAC name: 1-(4-chlorophenyl)-3-(3,4-dichlorophenyl)urea"),
    ("drug", "hydrochlorothiazide", "C7H8ClN3O4S2", "M-H", "from memory"),
    ("drug", "furosemide", "C12H11ClN2O5S", "M-H", "IUPAC name: 4-chloro-2-[(furan-2-ylmethyl)amino]-5-sulfamoylbenzoic acid"),
    ("drug", "ketamine", "C13H16ClNO", "M+H", "IUPAC name: 2-(2-chlorophenyl)-2-(methylamino)cyclohexan-1-one"),
    ("drug", "bromazepam", "C14H10BrN3O", "M+H", "from memory"),
    ("drug", "diazepam", "C16H13ClN2O", "M+H", "from memory"),
    ("drug", "lorazepam", "C15H10Cl2N2O2", "M+H", "from memory"),
    ("drug", "clofibric acid", "C10H11ClO3", "M-H", "IUPAC name: 2-(4-chlorophenoxy)-2-methylpropanoic acid"),
    ("drug", "sertraline", "C17H17Cl2N", "M+H", "from memory"),
    ("drug", "loratadine", "C22H23ClN2O2", "M+H", "from memory"),
    ("drug", "clozapine", "C18H19ClN4", "M+H", "from memory"),
    ("drug", "chloramphenicol", "C11H12Cl2N2O5", "M-H", "IUPAC name: 2,2-dichloro-N-[1,3-dihydroxy-1-(4-nitrophenyl)propan-2-yl]acetamide"),
    ("drug", "indomethacin", "C19H16ClNO4", "M+H", "from memory"),
    ("drug", "fluoxetine", "C17H18F3NO", "M+H", "IUPAC name: N-methyl-3-phenyl-3-[4-(trifluoromethyl)phenoxy]propan-1-amine"),
    ("drug", "ciprofloxacin", "C17H18FN3O3", "M+H", "from memory"),
    ("drug", "amiodarone", "C25H29I2NO3", "M+H", "from memory"),
    ("drug", "iohexol", "C19H26I3N3O9", "M+H", "from memory"),
    ("pesticide", "fipronil", "C12H4Cl2F6N4OS", "M-H", "from memory"),
]


def shell_ratios(formula):
    """M+1/M and M+2/M of the nominal shells (molmass spectrum)."""
    f = molmass.Formula(formula)
    nominal = f.nominal_mass
    frac = {item.massnumber - nominal: item.fraction for item in f.spectrum().values()}
    m0 = frac[0]
    return frac.get(1, 0.0) / m0, frac.get(2, 0.0) / m0


def main():
    path = os.path.join(HERE, "formula_candidates.tsv")
    with open(path, "w", encoding="utf-8", newline="\n") as out:
        out.write("\t".join(("category", "name", "formula", "ion", "monoisotopic_mass",
                             "m1_ratio", "m2_ratio", "source")) + "\n")
        for cat, name, formula, ion, source in COMPOUNDS:
            f = molmass.Formula(formula)
            m1, m2 = shell_ratios(formula)
            out.write("\t".join((cat, name, f.formula, ion, f"{f.monoisotopic_mass:.9f}",
                                 f"{m1:.6f}", f"{m2:.6f}", source)) + "\n")


if __name__ == "__main__":
    main()
