#!/usr/bin/python3
"""The route a data team would write instead of tabsight: a dataframe library
reads the CSV, then a crosstab and scipy's chi2_contingency per pair.
Run with Debian's python3 (python3-pandas, python3-scipy).

    reference_route.py scan FILE          every pair of columns
    reference_route.py pair FILE ROWS COLS   one pair
    reference_route.py waves ROWS COLS FILE…  one pair in each of several files (waves)
"""
import itertools
import json
import sys

import pandas as pd
from scipy.stats import chi2_contingency
from scipy.stats.contingency import association


def analyse(frame, a, b):
    table = pd.crosstab(frame[a], frame[b])
    if table.shape[0] < 2 or table.shape[1] < 2:
        return None
    stat, p, dof, _ = chi2_contingency(table.values, correction=False)
    return {"rows": a, "cols": b, "statistic": float(stat), "df": int(dof), "pValue": float(p),
            "cramersV": float(association(table.values, method="cramer"))}


def main():
    mode, path = sys.argv[1], sys.argv[2]
    if mode == "waves":
        a, b, files = sys.argv[2], sys.argv[3], sys.argv[4:]
        waves = []
        for f in files:
            frame = pd.read_csv(f, dtype=str, usecols=[a, b], keep_default_na=False, na_values=[""])
            waves.append(analyse(frame, a, b))
        print(json.dumps({"waves": len(waves)}))
        return
    if mode == "pair":
        a, b = sys.argv[3], sys.argv[4]
        frame = pd.read_csv(path, dtype=str, usecols=[a, b], keep_default_na=False, na_values=[""])
        print(json.dumps(analyse(frame, a, b)))
        return
    frame = pd.read_csv(path, dtype=str, keep_default_na=False, na_values=[""])
    results = [r for a, b in itertools.combinations(frame.columns, 2) if (r := analyse(frame, a, b))]
    print(json.dumps({"pairs": len(results)}))


main()
