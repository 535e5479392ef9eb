#!/usr/bin/python3
"""Fetches a real coded survey export for the tests: the 1996 American
National Election Study extract that statsmodels ships
(statsmodels.datasets.anes96), and records reference values about it.

Run with Debian's system python3 (python3-statsmodels, python3-pandas,
python3-scipy from apt):

    /usr/bin/python3 scripts/fetch_anes96.py

It writes, under fixtures/anes96/:
  anes96.csv        the data file exactly as the package ships it (944 rows,
                    tab-separated, numeric codes, header names in single quotes)
  published.txt     the package's documentation of the variables and their
                    code labels (the module's NOTE), from which codebook.json
                    was transcribed by hand
  reference.json    values computed by pandas and scipy on the data, for the
                    tests: per column the distinct values and their counts
                    (pandas value_counts), and cross tabulations of labelled
                    columns (pandas crosstab after mapping the codes to the
                    published labels) with Pearson's chi-square
                    (scipy.stats.chi2_contingency, no correction)

Source: American National Election Studies, 1996 (electionstudies.org), as
extracted in statsmodels. Licence: the package states "This is public
domain." (statsmodels.datasets.anes96.COPYRIGHT); statsmodels itself is
BSD-3-Clause.
"""
import hashlib
import json
import shutil
from pathlib import Path

import pandas as pd
import scipy
import statsmodels
import statsmodels.datasets.anes96 as anes96
from scipy import stats

ROOT = Path(__file__).resolve().parent.parent
OUT = ROOT / "fixtures" / "anes96"

# The published code labels (anes96.NOTE), transcribed as they stand,
# typing slips included ("Indpendent", "$14.999", "89,999").
PUBLISHED = {
    "PID": ["Strong Democrat", "Weak Democrat", "Independent-Democrat", "Independent-Indpendent",
            "Independent-Republican", "Weak Republican", "Strong Republican"],
    "educ": ["1-8 grades", "Some high school", "High school graduate", "Some college",
             "College degree", "Master's degree", "PhD"],
    "vote": ["Clinton", "Dole"],
    "selfLR": ["Extremely liberal", "Liberal", "Slightly liberal", "Moderate",
               "Slightly conservative", "Conservative", "Extremely Conservative"],
}
FIRST_CODE = {"PID": 0, "educ": 1, "vote": 0, "selfLR": 1}


def main():
    OUT.mkdir(parents=True, exist_ok=True)
    source = Path(anes96.__file__).resolve().parent / "anes96.csv"
    target = OUT / "anes96.csv"
    shutil.copyfile(source, target)
    (OUT / "published.txt").write_text(
        f"statsmodels {statsmodels.__version__}, statsmodels.datasets.anes96\n"
        f"TITLE: {anes96.TITLE}\nSOURCE: {anes96.SOURCE.strip()}\nCOPYRIGHT: {anes96.COPYRIGHT.strip()}\n"
        f"DESCRSHORT: {anes96.DESCRSHORT.strip()}\n\nNOTE:\n{anes96.NOTE}"
    )
    data = pd.read_csv(target, sep="\t")
    data.columns = [c.strip("'") for c in data.columns]
    columns = {}
    for name in data.columns:
        counts = data[name].value_counts()
        columns[name] = {
            "distinct": int(data[name].nunique()),
            "counts": {str(k): int(v) for k, v in sorted(counts.items())},
        }
    labelled = data.copy()
    for name, labels in PUBLISHED.items():
        labelled[name] = data[name].map({FIRST_CODE[name] + k: label for k, label in enumerate(labels)})
    for name in ("ClinLR", "DoleLR"):
        labelled[name] = data[name].map({1 + k: label for k, label in enumerate(PUBLISHED["selfLR"])})
    tables = []
    for rows, cols in (("PID", "vote"), ("educ", "vote"), ("selfLR", "PID"), ("educ", "PID")):
        table = pd.crosstab(labelled[rows], labelled[cols])
        table = table.reindex(index=[l for l in PUBLISHED[rows] if l in table.index],
                              columns=[l for l in PUBLISHED[cols] if l in table.columns])
        chi2, p, dof, _ = stats.chi2_contingency(table.values, correction=False)
        tables.append({
            "rows": rows, "cols": cols,
            "rowLevels": list(table.index), "colLevels": list(table.columns),
            "counts": table.values.tolist(),
            "pearson": {"statistic": chi2, "df": int(dof), "pValue": p},
        })
    reference = {
        "source": "statsmodels.datasets.anes96 (American National Election Studies 1996 extract)",
        "libraries": {"statsmodels": statsmodels.__version__, "pandas": pd.__version__, "scipy": scipy.__version__},
        "sha256": hashlib.sha256(target.read_bytes()).hexdigest(),
        "rows": int(len(data)),
        "columns": columns,
        "tables": tables,
    }
    (OUT / "reference.json").write_text(json.dumps(reference, indent=1) + "\n")
    print(f"wrote {target} ({len(data)} rows) and {OUT / 'reference.json'}")


if __name__ == "__main__":
    main()
