#!/usr/bin/env python3
"""Validates mzQC files written by mzsift against the published standard.

Sources of truth (shared/standards, HUPO-PSI, CC BY 4.0):
- mzQC/mzqc_schema.json: JSON Schema of mzQC 1.0.0 (draft-07), checked with the `jsonschema`
  package (PyPI), formats (uri, date-time) included;
- psi-ms-qc-subset.obo and psi-ms-subset.obo (psi-ms.obo data-version 4.1.257): every MS
  accession used must exist with the name used; every metric must be a QC term whose value
  type (`is_a` single value / n-tuple / table) matches the JSON value, whose unit is one the
  term names (`has_units`), and whose table columns are ones it names (`has_column`,
  `has_optional_column`). UO units (and MS unit terms outside the subsets) are checked against the
  names the QC terms give them in their `has_units` lines (the Unit Ontology itself is not
  copied here).
Exit status 1 on any problem. Usage: check_mzqc.py STANDARDS_DIR FILE_OR_DIR...
"""
import json
import sys
from pathlib import Path

from jsonschema import Draft7Validator


def load_obo(path, terms):
    current = None
    for line in Path(path).read_text(encoding="utf-8").splitlines():
        if line.startswith("[Term]"):
            current = None
        elif line.startswith("id: "):
            current = line[4:].strip()
            terms.setdefault(current, {"name": None, "is_a": set(), "units": {}, "columns": set()})
        elif current is None:
            continue
        elif line.startswith("name: "):
            terms[current]["name"] = line[6:].strip()
        elif line.startswith("is_a: "):
            terms[current]["is_a"].add(line[6:].split("!")[0].strip())
        elif line.startswith("relationship: has_units "):
            rest = line[len("relationship: has_units "):]
            acc, _, name = rest.partition("!")
            terms[current]["units"][acc.strip()] = name.strip()
        elif line.startswith("relationship: has_column ") or line.startswith(
            "relationship: has_optional_column "
        ):
            terms[current]["columns"].add(line.split()[2])


def cv_params(node, out):
    """Every object with an accession and a name, anywhere in the document."""
    if isinstance(node, dict):
        if "accession" in node and "name" in node:
            out.append(node)
        for v in node.values():
            cv_params(v, out)
    elif isinstance(node, list):
        for v in node:
            cv_params(v, out)


def check(path, validator, terms, unit_names):
    doc = json.loads(Path(path).read_text(encoding="utf-8"))
    bad = [f"schema: {e.message} at {list(e.absolute_path)}" for e in validator.iter_errors(doc)]
    params = []
    cv_params(doc, params)
    for p in params:
        acc, name = p["accession"], p["name"]
        if acc.startswith("MS:"):
            # Unit terms outside the subsets (MS:1000043 intensity unit) are named by the
            # QC terms' has_units lines.
            known = terms.get(acc, {}).get("name") or unit_names.get(acc)
            if known != name:
                bad.append(f"{acc} '{name}' (ontology: {known!r})")
        elif acc.startswith("UO:"):
            if unit_names.get(acc) != name:
                bad.append(f"{acc} '{name}' (QC terms call it {unit_names.get(acc)!r})")
        else:
            bad.append(f"{acc}: not a PSI-MS or UO accession")
    metrics = 0
    for run in doc["mzQC"].get("runQualities", []) + doc["mzQC"].get("setQualities", []):
        for m in run["qualityMetrics"]:
            metrics += 1
            t = terms.get(m["accession"])
            if t is None:
                continue  # reported above
            kinds = t["is_a"]
            v = m.get("value")
            if "MS:4000003" in kinds and not isinstance(v, (int, float)):
                bad.append(f"{m['accession']}: single value expected, got {v!r:.60}")
            if "MS:4000004" in kinds and not (isinstance(v, list) and v):
                bad.append(f"{m['accession']}: n-tuple expected")
            if "MS:4000005" in kinds:
                if not isinstance(v, dict) or len({len(c) for c in v.values()}) != 1:
                    bad.append(f"{m['accession']}: table of equal-length columns expected")
                else:
                    extra = set(v) - t["columns"]
                    if extra:
                        bad.append(f"{m['accession']}: columns {sorted(extra)} not in the term")
            if not kinds & {"MS:4000003", "MS:4000004", "MS:4000005", "MS:4000006"}:
                bad.append(f"{m['accession']}: not a QC metric value type")
            unit = m.get("unit")
            if unit is not None:
                units = unit if isinstance(unit, list) else [unit]
                for u in units:
                    if t["units"] and u["accession"] not in t["units"]:
                        bad.append(f"{m['accession']}: unit {u['accession']} not in {sorted(t['units'])}")
            elif t["units"]:
                bad.append(f"{m['accession']}: the term names a unit {sorted(t['units'])}, none given")
    return bad, len(params), metrics


def main():
    standards = Path(sys.argv[1])
    schema = json.loads((standards / "mzQC" / "mzqc_schema.json").read_text(encoding="utf-8"))
    validator = Draft7Validator(schema, format_checker=Draft7Validator.FORMAT_CHECKER)
    terms = {}
    load_obo(standards / "psi-ms-subset.obo", terms)
    load_obo(standards / "psi-ms-qc-subset.obo", terms)
    unit_names = {}
    for t in terms.values():
        for acc, name in t["units"].items():
            unit_names[acc] = name
    files = []
    for arg in sys.argv[2:]:
        p = Path(arg)
        files.extend(sorted(p.rglob("*.mzQC")) if p.is_dir() else [p])
    if not files:
        print("check_mzqc: no mzQC files given")
        sys.exit(1)
    failed = 0
    for f in files:
        bad, params, metrics = check(f, validator, terms, unit_names)
        for b in bad:
            print(f"{f}: {b}")
        failed += bool(bad)
        print(f"{f}: {params} CV terms, {metrics} metrics, {len(bad)} problems")
    print(f"check_mzqc: {len(files)} files, {failed} with problems")
    sys.exit(1 if failed else 0)


if __name__ == "__main__":
    main()
