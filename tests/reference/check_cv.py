#!/usr/bin/env python3
"""Checks every PSI-MS accession that mzsift reads or writes against the PSI-MS CV.

Source of truth: shared/standards/psi-ms-subset.obo and psi-ms-qc-subset.obo (HUPO-PSI
psi-ms.obo, data-version 4.1.257, CC BY 4.0; give both, comma-separated). Two checks:
1. every ("MS:nnnnnnn", "name") pair written in mzcore's source exists with that exact name;
2. every cvParam in the given mzML files (fixtures, demo data) names an existing term with
   the ontology's name.
Exit status 1 on any mismatch. Usage: check_cv.py OBO[,OBO...] SRC_DIR [MZML ...]
"""
import re
import sys
from pathlib import Path


def load_obo(paths):
    """Terms of one or more OBO files (comma-separated paths); unit terms that only appear as
    the target of a `has_units` relationship get the name the relationship gives them."""
    terms, units, current = {}, {}, None
    for path in paths.split(","):
        for line in Path(path).read_text(encoding="utf-8").splitlines():
            if line.startswith("[Term]"):
                current = None
            elif line.startswith("id: "):
                current = line[4:].strip()
            elif line.startswith("name: ") and current:
                terms[current] = line[6:].strip()
            elif line.startswith("relationship: has_units MS:"):
                acc, _, name = line[len("relationship: has_units "):].partition("!")
                units[acc.strip()] = name.strip()
    for acc, name in units.items():
        terms.setdefault(acc, name)
    return terms


def main():
    obo, src = sys.argv[1], Path(sys.argv[2])
    terms = load_obo(obo)
    bad, seen = [], 0
    pair = re.compile(r'\(\s*"(MS:\d{7})",\s*"([^"]+)"\s*,?\s*\)')
    for rs in sorted(src.rglob("*.rs")):
        for acc, name in pair.findall(rs.read_text(encoding="utf-8")):
            seen += 1
            if terms.get(acc) != name:
                bad.append(f"{rs}: {acc} '{name}' (ontology: {terms.get(acc)!r})")
    lone = re.compile(r'"(MS:\d{7})"')
    for rs in sorted(src.rglob("*.rs")):
        for line in rs.read_text(encoding="utf-8").splitlines():
            # Tests that feed deliberately unknown accessions mark the line "not-a-term".
            if "not-a-term" in line:
                continue
            for acc in lone.findall(line):
                seen += 1
                if acc not in terms:
                    bad.append(f"{rs}: {acc} is not in the ontology")
    param = re.compile(rb'<(?:\w+:)?cvParam[^>]*?accession="(MS:\d{7})"[^>]*?name="([^"]*)"')
    files = 0
    for f in sys.argv[3:]:
        data = Path(f).read_bytes()
        if f.endswith(".gz"):
            import gzip
            data = gzip.decompress(data)
        files += 1
        for acc, name in set(param.findall(data)):
            acc, name = acc.decode(), name.decode("latin-1")
            seen += 1
            if terms.get(acc) != name:
                bad.append(f"{f}: {acc} '{name}' (ontology: {terms.get(acc)!r})")
    for b in bad:
        print("CV mismatch:", b)
    print(f"check_cv: {seen} accession uses checked in {src} and {files} files, {len(bad)} mismatches")
    sys.exit(1 if bad else 0)


if __name__ == "__main__":
    main()
