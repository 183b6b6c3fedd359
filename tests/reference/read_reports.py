"""Every TSV report reads into pandas without options (read_csv(sep="\t")), with numeric
columns as numbers and text as text, as the README documents.

Usage: read_reports.py REPORT_DIR...   (the output folders of `mzsift run` / `mzsift check`)
The column kinds follow the README's "Numbers" table; pandas is the reference reader.
"""
import pathlib
import sys

import pandas as pd
from pandas.api import types

INTEGER = {
    "index", "ms_level", "points", "peaks", "clusters", "flagged_ions", "best_n_cl", "best_n_br",
    "scan", "charge", "n_cl", "n_br", "nominal_mass", "feature", "scans", "apex_scan", "spectra",
    "ms1", "ms2", "flagged_spectra", "halogen_features", "odd_nominal_features",
    "unreadable_spectra", "compound", "halogen_compounds", "odd_nominal_compounds",
}
DECIMAL = {
    "mz", "m2_delta", "tolerance_da", "neutral_mass", "fwhm", "area", "support", "misfit",
    "m2_ratio", "m2_expected", "m4_ratio", "m4_expected", "snr", "halogen_probability",
    "seconds", "intensity_sum",
}


def numeric_kind(column):
    if column in INTEGER:
        return "integer"
    if (column in DECIMAL or column.endswith(("_min", "_mz", "_score", "_ppm"))
            or "intensity" in column or column == "score"):
        return "number"
    return None


def check(path):
    df = pd.read_csv(path, sep="\t")
    # cluster.tsv: observed and expected relative heights (check.tsv's "observed" is text).
    extra = {"observed", "expected"} if path.name == "cluster.tsv" else set()
    problems = []
    for column in df.columns:
        kind = "number" if column in extra else numeric_kind(column)
        series = df[column]
        if kind is None or series.isna().all():
            continue
        if kind == "integer" and not (types.is_integer_dtype(series)
                                      or (types.is_float_dtype(series)
                                          and (series.dropna() % 1 == 0).all())):
            problems.append(f"{column}: dtype {series.dtype}, expected integers")
        if kind == "number" and not types.is_numeric_dtype(series):
            problems.append(f"{column}: dtype {series.dtype}, expected numbers")
    return len(df), problems


def main(dirs):
    failed = 0
    tables = 0
    for d in dirs:
        for path in sorted(pathlib.Path(d).rglob("*.tsv")):
            rows, problems = check(path)
            tables += 1
            for p in problems:
                print(f"{path}: {p}")
                failed += 1
    print(f"pandas {pd.__version__} read {tables} tables; {failed} problems")
    if tables == 0 or failed:
        sys.exit(1)


if __name__ == "__main__":
    main(sys.argv[1:])
