#!/usr/bin/env python3
"""Regenerates the chemistry reference tables in tests/reference/ from general-purpose
reference libraries, so that mzcore's chem module can be checked against something outside
the project.

- molmass (its element table is NIST's "Atomic Weights and Isotopic Compositions"): isotope
  masses and abundances, monoisotopic and nominal masses of formulas.
- IsoSpecPy 2.x (Lacki et al., Anal. Chem. 2017), fed with molmass's isotope data: nominal
  shells (aggregated from isotopologues that cover all but 1e-9 of the probability) and the
  fine structure above 1e-4 of the most abundant isotopologue. The shells are cross-checked
  against molmass's own spectrum() before they are written.

Deterministic: fixed formula list, fixed ordering, fixed number formatting. CI runs it and
`git diff --exit-code tests/reference/`.

Usage: python3 tests/reference/chem_reference.py   (needs molmass and IsoSpecPy)
"""

import os
import sys

import IsoSpecPy
import molmass
from molmass import ELEMENTS

HERE = os.path.dirname(os.path.abspath(__file__))

# The elements of mzcore/src/chem/elements.rs.
SYMBOLS = ["H", "Li", "B", "C", "N", "O", "F", "Na", "Mg", "Al", "Si", "P", "S", "Cl", "K",
           "Ca", "Fe", "Cu", "Zn", "As", "Se", "Br", "Sn", "I", "Hg"]

# (category, name, formula). Real compounds; categories as in issue 3.
COMPOUNDS = [
    ("rule_of_thumb", "one chlorine", "Cl"),
    ("rule_of_thumb", "two chlorines", "Cl2"),
    ("rule_of_thumb", "three chlorines", "Cl3"),
    ("rule_of_thumb", "one bromine", "Br"),
    ("rule_of_thumb", "two bromines", "Br2"),
    ("rule_of_thumb", "chlorine and bromine", "ClBr"),
    ("pesticide", "p,p'-DDT", "C14H9Cl5"),
    ("pesticide", "p,p'-DDE", "C14H8Cl4"),
    ("pesticide", "lindane", "C6H6Cl6"),
    ("pesticide", "atrazine", "C8H14ClN5"),
    ("pesticide", "chlorpyrifos", "C9H11Cl3NO3PS"),
    ("pesticide", "dieldrin", "C12H8Cl6O"),
    ("pesticide", "endosulfan", "C9H6Cl6O3S"),
    ("pesticide", "pentachlorophenol", "C6HCl5O"),
    ("pesticide", "2,4-D", "C8H6Cl2O3"),
    ("pesticide", "mirex", "C10Cl12"),
    ("pesticide", "bromoxynil", "C7H3Br2NO"),
    ("pesticide", "chlorothalonil", "C8Cl4N2"),
    ("pesticide", "PCB-153", "C12H4Cl6"),
    ("pesticide", "2,3,7,8-TCDD", "C12H4Cl4O2"),
    ("pesticide", "triclosan", "C12H7Cl3O2"),
    ("dbp", "chloroform", "CHCl3"),
    ("dbp", "bromodichloromethane", "CHBrCl2"),
    ("dbp", "dibromochloromethane", "CHBr2Cl"),
    ("dbp", "bromoform", "CHBr3"),
    ("dbp", "dichloroacetic acid", "C2H2Cl2O2"),
    ("dbp", "trichloroacetic acid", "C2HCl3O2"),
    ("dbp", "bromochloroacetic acid", "C2H2BrClO2"),
    ("dbp", "dichloroacetonitrile", "C2HCl2N"),
    ("dbp", "MX", "C5H3Cl3O3"),
    ("flame_retardant", "BDE-47", "C12H6Br4O"),
    ("flame_retardant", "BDE-209", "C12Br10O"),
    ("flame_retardant", "TBBPA", "C15H12Br4O2"),
    ("flame_retardant", "HBCD", "C12H18Br6"),
    ("flame_retardant", "TCEP", "C6H12Cl3O4P"),
    ("flame_retardant", "TDCPP", "C9H15Cl6O4P"),
    ("flame_retardant", "Dechlorane Plus", "C18H12Cl12"),
    ("decoy", "dibenzothiophene", "C12H8S"),
    ("decoy", "octamethylcyclotetrasiloxane", "C8H24O4Si4"),
    ("decoy", "decamethylcyclopentasiloxane", "C10H30O5Si5"),
    ("decoy", "cyclooctasulfur", "S8"),
    ("decoy", "benzothiazole", "C7H5NS"),
    ("drug", "caffeine", "C8H10N4O2"),
    ("drug", "carbamazepine", "C15H12N2O"),
    ("drug", "diclofenac", "C14H11Cl2NO2"),
    ("drug", "ibuprofen", "C13H18O2"),
    ("drug", "sulfamethoxazole", "C10H11N3O3S"),
    ("drug", "hydrochlorothiazide", "C7H8ClN3O4S2"),
    ("drug", "fluoxetine", "C17H18F3NO"),
    ("drug", "ketamine", "C13H16ClNO"),
    ("drug", "iohexol", "C19H26I3N3O9"),
    ("drug", "bromazepam", "C14H10BrN3O"),
    ("benchmark", "benchmark molecule", "C100H200Cl6Br4N10O20S2"),
]

FINE_THRESHOLD = 1e-4  # relative to the most abundant isotopologue
SHELL_COVERAGE = 1 - 1e-9


def natural(symbol):
    """(mass numbers, masses, abundances) of the naturally occurring isotopes."""
    isos = [i for i in ELEMENTS[symbol].isotopes.values() if i.abundance > 0]
    isos.sort(key=lambda i: i.massnumber)
    return [i.massnumber for i in isos], [i.mass for i in isos], [i.abundance for i in isos]


def composition(formula):
    """Element counts of a plain formula, in molmass's order."""
    comp = molmass.Formula(formula).composition()
    return [(sym, item.count) for sym, item in comp.items()]


def isospec_input(formula):
    counts, masses, probs, numbers = [], [], [], []
    for sym, n in composition(formula):
        a, m, p = natural(sym)
        counts.append(n)
        masses.append(m)
        probs.append(p)
        numbers.append(a)
    return counts, masses, probs, numbers


def shift_of(numbers, probs, conf):
    """Neutrons above the monoisotopic isotopologue (each element at its most abundant isotope)."""
    s = 0
    for a, p, c in zip(numbers, probs, conf):
        ref = a[max(range(len(p)), key=lambda i: p[i])]
        s += sum(ci * (ai - ref) for ai, ci in zip(a, c))
    return s


def shells(formula):
    counts, masses, probs, numbers = isospec_input(formula)
    iso = IsoSpecPy.IsoTotalProb(SHELL_COVERAGE, atomCounts=counts, isotopeMasses=masses,
                                 isotopeProbabilities=probs, get_confs=True)
    acc = {}
    for m, p, conf in zip(iso.masses, iso.probs, iso.confs):
        k = shift_of(numbers, probs, conf)
        a, b = acc.get(k, (0.0, 0.0))
        acc[k] = (a + p, b + p * m)
    return {k: (b / a, a) for k, (a, b) in acc.items()}


def fine(formula):
    counts, masses, probs, _ = isospec_input(formula)
    iso = IsoSpecPy.IsoThreshold(FINE_THRESHOLD, absolute=False, atomCounts=counts,
                                 isotopeMasses=masses, isotopeProbabilities=probs)
    return sorted(zip(iso.masses, iso.probs))


def cross_check_with_molmass(formula, sh):
    """molmass's own nominal spectrum must agree with the IsoSpecPy shells."""
    spec = molmass.Formula(formula).spectrum()
    nominal = molmass.Formula(formula).nominal_mass
    for item in spec.values():
        k = item.massnumber - nominal
        frac = item.fraction
        if frac < 1e-6:
            continue
        got = sh.get(k, (0.0, 0.0))[1]
        if abs(got - frac) > 1e-6:
            sys.exit(f"{formula}: shell {k}: IsoSpecPy {got} vs molmass {frac}")


def write(name, header, rows):
    with open(os.path.join(HERE, name), "w", encoding="utf-8", newline="\n") as f:
        f.write("\t".join(header) + "\n")
        for r in rows:
            f.write("\t".join(r) + "\n")


def main():
    rows = []
    for sym in SYMBOLS:
        for a, m, p in zip(*natural(sym)):
            rows.append((sym, str(a), f"{m:.11f}", f"{p:.6f}"))
    write("isotopes.tsv", ("symbol", "mass_number", "mass", "abundance"), rows)

    mrows, srows, frows = [], [], []
    for cat, name, formula in COMPOUNDS:
        f = molmass.Formula(formula)
        counts, masses, probs, _ = isospec_input(formula)
        average = sum(n * sum(mi * pi for mi, pi in zip(m, p)) / sum(p)
                      for n, m, p in zip(counts, masses, probs))
        n_count = dict(composition(formula)).get("N", 0)
        nominal = f.nominal_mass
        mrows.append((cat, name, formula, f"{f.monoisotopic_mass:.9f}", str(nominal),
                      f"{average:.9f}", str(n_count), "odd" if nominal % 2 else "even"))
        sh = shells(formula)
        if cat != "benchmark":
            cross_check_with_molmass(formula, sh)
        top = max(a for _, a in sh.values())
        for k in sorted(sh):
            m, a = sh[k]
            if a >= 1e-7 * top:
                srows.append((formula, str(k), f"{m:.9f}", f"{a:.9e}"))
        if cat != "benchmark":
            for m, p in fine(formula):
                frows.append((formula, f"{m:.9f}", f"{p:.9e}"))
    write("formulas.tsv", ("category", "name", "formula", "monoisotopic_mass", "nominal_mass",
                           "average_mass", "nitrogen", "nominal_parity"), mrows)
    write("shells.tsv", ("formula", "shell", "mass", "abundance"), srows)
    write("fine.tsv", ("formula", "mass", "abundance"), frows)


if __name__ == "__main__":
    main()
