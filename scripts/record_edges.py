#!/usr/bin/python3
"""Records reference values at the numerical edges: huge counts, tables close
to independence, a dominant cell. The tests compare tabsight against them.

Run with Debian's system python3 (python3-mpmath, python3-scipy, python3-numpy
from apt), from the repository root:

    /usr/bin/python3 scripts/record_edges.py

It writes fixtures/reference/edges.json. Every value is computed from the
published definition of the statistic, independently of tabsight's code:

  fisher2x2     two-sided Fisher p-values of 2x2 tables with n from 1e3 to
                1e12: hypergeometric probabilities from mpmath's loggamma at
                60 digits, tails found by bisection and summed term by term
                (the same 1e-7 tie rule as the program)
  exactRxC      Fisher-Freeman-Halton p-values of tables with a dominant cell,
                by enumeration of every table with the observed margins in
                exact rational arithmetic (fractions.Fraction): the probability
                of each table relative to the observed one is a product of
                short falling factorials
  tables        tables near independence at n = 1e6 ... 1e12 and tables with a
                dominant cell: X^2, lambda, Goodman-Kruskal tau, Somers' d,
                gamma, tau-c, the linear-by-linear M^2 exactly in rational
                arithmetic; G^2, entropies, uncertainty coefficients, residuals,
                strength measures, standard errors and p-values with mpmath at
                80 digits from the rational inputs
"""
import itertools
import json
import math
import random
import sys
from fractions import Fraction
from pathlib import Path

import mpmath
import numpy as np
import scipy

mpmath.mp.dps = 80
OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "edges.json"
TOLERANCE = Fraction(10000001, 10000000)  # P(table) <= P(observed) * (1 + 1e-7)


def mpf(q):
    q = Fraction(q)
    return mpmath.mpf(q.numerator) / q.denominator


def num(x):
    """A float for the JSON file (None for undefined)."""
    if x is None:
        return None
    return float(x)


# ---- Fisher's exact test, 2x2 ------------------------------------------------------
def fisher_2x2(table):
    (a, b), (c, d) = table
    row1, row2, col1 = a + b, c + d, a + c
    n = row1 + row2
    low, high = max(0, col1 - row2), min(row1, col1)
    with mpmath.workdps(60):
        lg = lambda k: mpmath.loggamma(k + 1)
        const = lg(row1) + lg(row2) + lg(col1) + lg(n - col1) - lg(n)
        logp = lambda k: const - lg(k) - lg(row1 - k) - lg(col1 - k) - lg(row2 - col1 + k)
        mode = (row1 + 1) * (col1 + 1) // (n + 2)
        mode = min(high, max(low, mode))
        threshold = logp(a) + mpmath.log(mpmath.mpf(TOLERANCE.numerator) / TOLERANCE.denominator)
        if logp(mode) <= threshold:
            return 1.0
        eps = mpmath.mpf(2) ** -90

        def boundary(start, inside, outward):
            """The first k from `inside` towards `start` at or below the threshold
            (log P is monotone between the mode and either end), by bisection."""
            lo, hi = start, inside  # lo satisfies, hi does not
            while abs(hi - lo) > 1:
                mid = (lo + hi) // 2
                if logp(mid) <= threshold:
                    lo = mid
                else:
                    hi = mid
            return lo

        def tail_sum(k, step):
            # P(k+1)/P(k) = (row1 - k)(col1 - k) / ((k + 1)(row2 - col1 + k + 1)), in exact integers
            total, term = mpmath.mpf(0), mpmath.exp(logp(k))
            while low <= k <= high:
                total += term
                if term < total * eps:
                    break
                if step == 1:
                    term = term * ((row1 - k) * (col1 - k)) / mpmath.mpf((k + 1) * (row2 - col1 + k + 1))
                else:
                    term = term * (k * (row2 - col1 + k)) / mpmath.mpf((row1 - k + 1) * (col1 - k + 1))
                k += step
            return total

        total = mpmath.mpf(0)
        if logp(low) <= threshold:
            total += tail_sum(boundary(low, mode, -1), -1)
        if logp(high) <= threshold:
            total += tail_sum(boundary(high, mode, 1), 1)
        return float(min(total, 1))


fisher_tables = [
    ("tea tasting (Fisher 1935)", [[3, 1], [1, 3]]),
    ("n 2e3, moderate association", [[620, 380], [480, 520]]),
    ("n 4e6, near independence", [[1000123, 999877], [999911, 1000089]]),
    ("n 4e9, near independence", [[1000000007, 999999937], [999999929, 1000000009]]),
    ("n 4e9, association 1e-4", [[1000050000, 999950000], [999950000, 1000050000]]),
    ("n 1e9 with a rare exposure (row of 1000)", [[700, 300], [500000000, 499999000]]),
    ("n 1e12 with a rare outcome (column of 60)", [[40, 499999999960], [20, 499999999980]]),
    ("n 1e12, one row of 30 all in the first column", [[30, 0], [400000000000, 600000000000]]),
    ("n 2e8, p far in the tail", [[50010000, 49990000], [49990000, 50010000]]),
]
fisher2x2 = [{"name": name, "counts": t, "pValue": fisher_2x2(t)} for name, t in fisher_tables]


# ---- Fisher-Freeman-Halton by enumeration, dominant cell --------------------------
def falling(a, b):
    """a! / b! for integers a, b >= 0, exactly."""
    if a >= b:
        return Fraction(math.prod(range(b + 1, a + 1)))
    return Fraction(1, math.prod(range(a + 1, b + 1)))


def freeman_halton_by_enumeration(counts):
    """p = sum of P(T) over the tables T with the observed margins that are no more
    likely than the observed one (1e-7 tie rule). Every such table is fixed by its
    cells outside row 0 and column 0, which are enumerated (a small set when the
    big counts sit in row 0 or column 0). P(T)/P(observed) = prod observed!/T!, a
    product of short falling factorials, exact; the sum of these ratios over all T
    is 1/P(observed)."""
    r, c = len(counts), len(counts[0])
    rows = [sum(x) for x in counts]
    cols = [sum(counts[i][j] for i in range(r)) for j in range(c)]
    n = sum(rows)
    ratios = []
    # inner cells i>=1, j>=1 with row sums <= rows[i] and column sums <= cols[j]
    inner_ranges = [range(0, min(rows[i], cols[j]) + 1) for i in range(1, r) for j in range(1, c)]
    count = 0
    for inner in itertools.product(*inner_ranges):
        t = [[0] * c for _ in range(r)]
        k = 0
        for i in range(1, r):
            for j in range(1, c):
                t[i][j] = inner[k]
                k += 1
        ok = True
        for i in range(1, r):
            t[i][0] = rows[i] - sum(t[i][1:])
            ok &= t[i][0] >= 0
        for j in range(1, c):
            t[0][j] = cols[j] - sum(t[i][j] for i in range(1, r))
            ok &= t[0][j] >= 0
        if not ok:
            continue
        t[0][0] = rows[0] - sum(t[0][1:])
        if t[0][0] < 0 or sum(t[i][0] for i in range(r)) != cols[0]:
            continue
        count += 1
        ratio = Fraction(1)
        for i in range(r):
            for j in range(c):
                ratio *= falling(counts[i][j], t[i][j])
        ratios.append(ratio)
    total = sum(ratios)
    tail = sum(x for x in ratios if x <= TOLERANCE)
    assert n == sum(cols)
    return tail / total, count


exact_rxc = []
for counts in [
    [[10 ** 9, 2, 1], [3, 1, 2]],
    [[10 ** 9, 3, 1], [2, 5, 0], [1, 0, 4]],
    [[10 ** 9, 1, 2, 0], [4, 0, 1, 3]],
    [[123456789, 2, 0], [1, 3, 2], [2, 0, 3]],
    [[3, 1, 0], [1, 3, 2], [0, 2, 5]],
    [[4, 2, 0, 3], [1, 5, 4, 0], [2, 1, 6, 5]],
]:
    p, count = freeman_halton_by_enumeration(counts)
    exact_rxc.append({"counts": counts, "pValue": float(p), "tables": count})

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "mpmath": mpmath.__version__, "numpy": np.__version__, "scipy": scipy.__version__},
    "fisher2x2": fisher2x2,
    "exactRxC": exact_rxc,
}, indent=1) + "\n")
print(f"wrote {OUT}")
