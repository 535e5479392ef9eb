#!/usr/bin/python3
"""The banner a data team would write instead of tabsight: pandas reads the
CSV; per question and break variable a weighted crosstab normalised per
column, the bases and Kish's effective bases, scipy's chi2_contingency on the
table rescaled to the effective size, and the pooled two-proportion z-test of
statsmodels for every pair of columns of every row in a loop; the Total
column; the long table written as CSV. Run with Debian's python3
(python3-pandas, python3-scipy, python3-statsmodels).

    banner_reference.py FILE BREAKS WEIGHT OUT.csv
"""
import itertools
import sys

import pandas as pd
from scipy.stats import chi2_contingency
from statsmodels.stats.proportion import proportions_ztest


def main():
    path, breaks, weight, out = sys.argv[1], sys.argv[2].split(","), sys.argv[3], sys.argv[4]
    frame = pd.read_csv(path, dtype=str, keep_default_na=False, na_values=[""])
    frame["_w"] = frame[weight].astype(float)
    questions = [c for c in frame.columns if c not in breaks and c not in (weight, "_w")]
    lines = []
    for q in questions:
        answered = frame[frame[q].notna()]
        total = answered.groupby(q)["_w"].sum() / answered["_w"].sum()
        for level, share in total.items():
            lines.append((q, level, "Total", "", share, "", ""))
        for b in breaks:
            sub = answered[answered[b].notna()]
            shares = pd.crosstab(sub[q], sub[b], values=sub["_w"], aggfunc="sum", normalize="columns").fillna(0)
            counts = pd.crosstab(sub[q], sub[b], values=sub["_w"], aggfunc="sum").fillna(0)
            base = sub.groupby(b)["_w"].sum()
            effective = base ** 2 / sub.groupby(b)["_w"].apply(lambda w: (w ** 2).sum())
            scaled = counts * (effective.sum() / base.sum())
            stat, p, dof, _ = chi2_contingency(scaled.values, correction=False)
            lines.append((q, "", b, "chi2", stat, dof, p))
            for level in shares.index:
                for a, c in itertools.combinations(shares.columns, 2):
                    z, pz = proportions_ztest([shares.at[level, a] * effective[a], shares.at[level, c] * effective[c]], [effective[a], effective[c]])
                    lines.append((q, level, b, f"{a}|{c}", shares.at[level, a], z, pz))
    pd.DataFrame(lines, columns=["question", "level", "break", "column", "value", "z", "p"]).to_csv(out, index=False)


main()
