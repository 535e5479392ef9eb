#!/usr/bin/env python3
"""The route a data team would write with a multi-threaded dataframe library:
polars reads the CSV (every column as text), counts each pair of columns with
group_by, and scipy's chi2_contingency tests the table. Run with a python3
that has polars and scipy (the bench installs polars from the registry for
the python3 on the PATH when it is missing).

    polars_route.py scan FILE              every pair of columns
    polars_route.py pair FILE ROWS COLS    one pair
"""
import itertools
import json
import sys

import numpy as np
import polars as pl
from scipy.stats import chi2_contingency
from scipy.stats.contingency import association


def table(frame, a, b):
    counts = frame.select(a, b).drop_nulls().group_by(a, b).len()
    rows = {v: i for i, v in enumerate(sorted(counts[a].unique().to_list()))}
    cols = {v: j for j, v in enumerate(sorted(counts[b].unique().to_list()))}
    matrix = np.zeros((len(rows), len(cols)), dtype=np.int64)
    for r, c, n in counts.iter_rows():
        matrix[rows[r], cols[c]] = n
    return matrix


def analyse(frame, a, b):
    matrix = table(frame, a, b)
    if matrix.shape[0] < 2 or matrix.shape[1] < 2:
        return None
    stat, p, dof, _ = chi2_contingency(matrix, correction=False)
    return {"rows": a, "cols": b, "statistic": float(stat), "df": int(dof), "pValue": float(p),
            "cramersV": float(association(matrix, method="cramer"))}


def main():
    mode, path = sys.argv[1], sys.argv[2]
    if mode == "pair":
        a, b = sys.argv[3], sys.argv[4]
        frame = pl.read_csv(path, columns=[a, b], infer_schema=False)
        print(json.dumps(analyse(frame, a, b)))
        return
    frame = pl.read_csv(path, infer_schema=False)
    results = [r for a, b in itertools.combinations(frame.columns, 2) if (r := analyse(frame, a, b))]
    print(json.dumps({"pairs": len(results)}))


main()
