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
  layered       the generalized Cochran-Mantel-Haenszel statistic (Landis, Heyman &
                Koch 1978) and the Mantel-Haenszel odds ratio of layered tables near
                conditional independence at n = 1e6 ... 1e12, in exact rationals
  chi2Df1       the upper tail of chi-square with 1 df, erfc(sqrt(x/2)), mpmath
  noncentralLarge, noncentralityIntervals
                noncentral chi-square tails at noncentrality 3e5 to 1e8 from
                scipy.stats.ncx2, and 95% limits for the noncentrality found by
                scipy.optimize.brentq on those tails
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

# ---- the statistic battery -------------------------------------------------------
def chi2_sf(x, df):
    if x <= 0:
        return mpmath.mpf(1)
    return mpmath.gammainc(mpmath.mpf(df) / 2, x / 2, mpmath.inf, regularized=True)


def two_sided_normal(z):
    return mpmath.erfc(abs(z) / mpmath.sqrt(2))


def entropy(values, n):
    return -sum(mpf(Fraction(v, n)) * mpmath.log(mpf(Fraction(v, n))) for v in values if v > 0)


def statistics(counts):
    """Every statistic tabsight reports for a two-way table, from its published
    definition: rational quantities exactly, the rest at 80 digits."""
    t = [[Fraction(v) for v in row] for row in counts]
    r, c = len(t), len(t[0])
    R = [sum(row) for row in t]
    C = [sum(t[i][j] for i in range(r)) for j in range(c)]
    n = sum(R)
    E = [[R[i] * C[j] / n for j in range(c)] for i in range(r)]
    D = [[t[i][j] - E[i][j] for j in range(c)] for i in range(r)]
    df = (r - 1) * (c - 1)
    out = {}
    x2 = sum(D[i][j] ** 2 / E[i][j] for i in range(r) for j in range(c))
    out["pearson"] = {"statistic": num(mpf(x2)), "pValue": num(chi2_sf(mpf(x2), df))}
    g2 = 2 * sum(mpf(t[i][j]) * mpmath.log(mpf(t[i][j] / E[i][j])) for i in range(r) for j in range(c) if t[i][j] > 0)
    out["likelihoodRatio"] = {"statistic": num(g2), "pValue": num(chi2_sf(g2, df))}
    m = min(r, c)
    X = mpf(x2)
    N = mpf(n)
    out["phi"] = num(mpmath.sqrt(X / N))
    out["contingencyC"] = num(mpmath.sqrt(X / (X + N)))
    out["correctedC"] = num(mpmath.sqrt(X / (X + N)) * mpmath.sqrt(mpmath.mpf(m) / (m - 1)))
    out["cramersV"] = num(mpmath.sqrt(X / (N * (m - 1))))
    out["tschuprowT"] = num(mpmath.sqrt(X / (N * mpmath.sqrt((r - 1) * (c - 1)))))
    phi2 = x2 / n - Fraction((r - 1) * (c - 1)) / (n - 1)
    rt = r - Fraction((r - 1) ** 2) / (n - 1)
    ct = c - Fraction((c - 1) ** 2) / (n - 1)
    out["biasCorrectedV"] = num(mpmath.sqrt(mpf(max(phi2, 0) / min(rt - 1, ct - 1))))
    out["residualsPearson"] = [[num(mpf(D[i][j]) / mpmath.sqrt(mpf(E[i][j]))) for j in range(c)] for i in range(r)]
    out["residualsAdjusted"] = [[num(mpf(D[i][j]) / mpmath.sqrt(mpf(E[i][j] * (1 - R[i] / n) * (1 - C[j] / n)))) for j in range(c)] for i in range(r)]
    if r == 2 and c == 2:
        (a, b), (cc, d) = t
        y = sum((abs(D[i][j]) - min(Fraction(1, 2), abs(D[i][j]))) ** 2 / E[i][j] for i in range(2) for j in range(2))
        out["yates"] = {"statistic": num(mpf(y)), "pValue": num(chi2_sf(mpf(y), 1))}
        out["yulesQ"] = num(mpf((a * d - b * cc) / (a * d + b * cc)))
        sad, sbc = mpmath.sqrt(mpf(a * d)), mpmath.sqrt(mpf(b * cc))
        out["yulesY"] = num((sad - sbc) / (sad + sbc))
        out["signedPhi"] = num(mpf(a * d - b * cc) / mpmath.sqrt(mpf((a + b) * (cc + d) * (a + cc) * (b + d))))
        if min(a, b, cc, d) > 0:
            z = mpmath.sqrt(2) * mpmath.erfinv(mpmath.mpf("0.95"))
            lor = mpmath.log(mpf(a * d / (b * cc)))
            se = mpmath.sqrt(mpf(1 / a + 1 / b + 1 / cc + 1 / d))
            out["oddsRatio"] = {"estimate": num(mpmath.exp(lor)), "lower": num(mpmath.exp(lor - z * se)), "upper": num(mpmath.exp(lor + z * se))}
            lrr = mpmath.log(mpf((a / (a + b)) / (cc / (cc + d))))
            se = mpmath.sqrt(mpf(1 / a - 1 / (a + b) + 1 / cc - 1 / (cc + d)))
            out["relativeRisk"] = {"estimate": num(mpmath.exp(lrr)), "lower": num(mpmath.exp(lrr - z * se)), "upper": num(mpmath.exp(lrr + z * se))}
    # predictive measures (Goodman & Kruskal 1954; Theil 1970)
    max_col, max_row = max(C), max(R)
    row_max = sum(max(row) for row in t)
    col_max = sum(max(t[i][j] for i in range(r)) for j in range(c))
    out["lambdaColsGivenRows"] = num(mpf((row_max - max_col) / (n - max_col))) if n > max_col else None
    out["lambdaRowsGivenCols"] = num(mpf((col_max - max_row) / (n - max_row))) if n > max_row else None
    out["lambdaSymmetric"] = num(mpf((row_max + col_max - max_col - max_row) / (2 * n - max_col - max_row)))
    within_rows = sum(t[i][j] ** 2 / R[i] for i in range(r) for j in range(c))
    within_cols = sum(t[i][j] ** 2 / C[j] for i in range(r) for j in range(c))
    sc, sr = sum(v * v for v in C), sum(v * v for v in R)
    out["gkTauColsGivenRows"] = num(mpf((n * within_rows - sc) / (n * n - sc)))
    out["gkTauRowsGivenCols"] = num(mpf((n * within_cols - sr) / (n * n - sr)))
    hr, hc = entropy(R, n), entropy(C, n)
    mutual = g2 / (2 * N)  # I(R; C) = H(R) + H(C) - H(R, C) = G^2 / 2n
    hj = entropy([v for row in t for v in row], n)
    assert abs(hr + hc - hj - mutual) < mpmath.mpf(10) ** -60 * max(1, hr + hc)
    out["uncertaintyColsGivenRows"] = num(mutual / hc)
    out["uncertaintyRowsGivenCols"] = num(mutual / hr)
    out["uncertaintySymmetric"] = num(2 * mutual / (hr + hc))
    out["ordinal"] = ordinal(t, R, C, n)
    # linear-by-linear association, integer scores (Mantel 1963)
    sx = sum((i + 1) * R[i] for i in range(r))
    sy = sum((j + 1) * C[j] for j in range(c))
    sxy = sum((i + 1) * (j + 1) * t[i][j] for i in range(r) for j in range(c)) - sx * sy / n
    sxx = sum((i + 1) ** 2 * R[i] for i in range(r)) - sx * sx / n
    syy = sum((j + 1) ** 2 * C[j] for j in range(c)) - sy * sy / n
    m2 = (n - 1) * sxy * sxy / (sxx * syy)
    out["linearByLinear"] = {"statistic": num(mpf(m2)), "pValue": num(chi2_sf(mpf(m2), 1))}
    return out


def ordinal(t, R, C, n):
    """Gamma, tau-b, tau-c, Somers' d with the standard errors of Brown & Benedetti
    (1977), exactly in rational arithmetic up to the final square roots."""
    r, c = len(t), len(t[0])
    A = [[sum(t[k][l] for k in range(r) for l in range(c) if (k < i and l < j) or (k > i and l > j)) for j in range(c)] for i in range(r)]
    Dd = [[sum(t[k][l] for k in range(r) for l in range(c) if (k < i and l > j) or (k > i and l < j)) for j in range(c)] for i in range(r)]
    P = sum(t[i][j] * A[i][j] for i in range(r) for j in range(c))
    Q = sum(t[i][j] * Dd[i][j] for i in range(r) for j in range(c))
    cells = [(i, j) for i in range(r) for j in range(c)]
    d = {(i, j): A[i][j] - Dd[i][j] for i, j in cells}
    core = sum(t[i][j] * d[i, j] ** 2 for i, j in cells) - (P - Q) ** 2 / n
    sqrt = lambda q: mpmath.sqrt(mpf(q))
    out = {}

    def entry(estimate, ase1_squared, ase0):
        z = estimate / ase0 if ase0 is not None and ase0 > 0 else None
        return {"estimate": num(estimate), "standardError": num(mpmath.sqrt(ase1_squared)) if ase1_squared is not None else None,
                "z": num(z), "pValue": num(two_sided_normal(z)) if z is not None else None}

    if P + Q > 0:
        out["gamma"] = entry(mpf((P - Q) / (P + Q)), mpf(Fraction(16) / (P + Q) ** 4 * sum(t[i][j] * (Q * A[i][j] - P * Dd[i][j]) ** 2 for i, j in cells)), 2 / mpf(P + Q) * sqrt(core))
    wr = n * n - sum(v * v for v in R)
    wc = n * n - sum(v * v for v in C)
    if wr > 0 and wc > 0:
        v = {(i, j): R[i] * wc + C[j] * wr for i, j in cells}
        ase1 = (sum(t[i][j] * (2 * wr * wc * d[i, j] + (P - Q) * v[i, j]) ** 2 for i, j in cells) - n ** 3 * (P - Q) ** 2 * (wr + wc) ** 2) / (wr * wc) ** 3
        out["kendallTauB"] = entry(mpf(P - Q) / sqrt(wr * wc), mpf(ase1), 2 / sqrt(wr * wc) * sqrt(core))
    m = min(r, c)
    factor = Fraction(2 * m, (m - 1)) / (n * n)
    out["kendallTauC"] = entry(mpf(m * (P - Q) / (n * n * (m - 1))), mpf(factor * factor * core), mpf(factor) * sqrt(core))
    for name, w, margin in [("somersDColsGivenRows", wr, lambda i, j: R[i]), ("somersDRowsGivenCols", wc, lambda i, j: C[j])]:
        if w > 0:
            ase1 = Fraction(4) / w ** 4 * sum(t[i][j] * (w * d[i, j] - (P - Q) * (n - margin(i, j))) ** 2 for i, j in cells)
            out[name] = entry(mpf((P - Q) / w), mpf(ase1), 2 / mpf(w) * sqrt(core))
    return out


rng = random.Random(20261214)


def near_independence(n, shape, spread):
    """Counts n p_i q_j rounded, then moved by a few units (spread) or by about one
    standard deviation (spread None): the association is tiny against n."""
    r, c = shape
    p = [rng.randint(1, 9) for _ in range(r)]
    q = [rng.randint(1, 9) for _ in range(c)]
    sp, sq = sum(p), sum(q)
    table = []
    for i in range(r):
        row = []
        for j in range(c):
            e = Fraction(n * p[i] * q[j], sp * sq)
            move = rng.randint(-spread, spread) if spread is not None else int(rng.gauss(0, math.sqrt(float(e))))
            row.append(max(1, round(e) + move))
        table.append(row)
    return table


battery = []
for exponent in range(6, 13):
    for shape in [(2, 2), (2, 3), (3, 4), (4, 4)]:
        for spread, label in [(3, "a few units off independence"), (None, "sampling noise")]:
            counts = near_independence(10 ** exponent, shape, spread)
            battery.append({"name": f"{shape[0]}x{shape[1]} at n 1e{exponent}, {label}", "regime": "near-independence", "counts": counts})
for counts in [
    [[10 ** 9, 3], [2, 7]],
    [[10 ** 9, 3, 1], [2, 5, 0], [1, 0, 4]],
    [[10 ** 9, 2, 1], [3, 1, 2]],
    [[4, 10 ** 9, 1, 3], [2, 6, 0, 5]],
    [[10 ** 12, 9], [8, 10 ** 12]],
    [[5, 10 ** 9], [10 ** 9, 7]],
]:
    battery.append({"name": f"dominant cell {counts}", "regime": "dominant-cell", "counts": counts})
battery.append({"name": "job satisfaction by income, 4x4, n 104 (the table of reference.json)", "regime": "moderate",
                "counts": [[1, 2, 1, 0], [3, 3, 6, 1], [10, 10, 14, 9], [6, 7, 12, 11]]})
battery.append({"name": "party identification by gender, 2x3, n 2757 (the table of reference.json)", "regime": "moderate",
                "counts": [[762, 327, 468], [484, 239, 477]]})
battery.append({"name": "aspirin and myocardial infarction (Physicians' Health Study 1989)", "regime": "moderate",
                "counts": [[189, 10845], [104, 10933]]})
for item in battery:
    item.update(statistics(item["counts"]))

# ---- noncentral chi-square at large noncentrality ----------------------------------
# scipy.stats.ncx2 (Boost's algorithms; scipy stops at noncentrality near 1e10),
# and the confidence limits for the noncentrality by Brent's method on its tails.
from scipy.optimize import brentq
from scipy.stats import ncx2 as scipy_ncx2

noncentral_large = []
for lam in [3e5, 1e6, 1e7, 1e8]:
    for dz in [-2, 0, 2]:
        df = 3
        x = float(f"{df + lam + dz * math.sqrt(2 * (df + 2 * lam)):.9g}")
        noncentral_large.append({"x": x, "df": df, "lambda": lam, "upper": float(scipy_ncx2.sf(x, df, lam)), "lower": float(scipy_ncx2.cdf(x, df, lam))})
noncentrality_intervals = []
for x, df in [(3.5e5, 2), (2.5e6, 4), (4e7, 1)]:
    lower = brentq(lambda lam: scipy_ncx2.sf(x, df, lam) - 0.025, x / 2, x, xtol=1e-9, rtol=1e-15)
    upper = brentq(lambda lam: scipy_ncx2.cdf(x, df, lam) - 0.025, x, 2 * x, xtol=1e-9, rtol=1e-15)
    noncentrality_intervals.append({"x": x, "df": df, "confidence": 0.95, "lower": lower, "upper": upper})

# ---- the chi-square tail with 1 df in closed form: erfc(sqrt(x/2)) (A&S 26.4.4 with 7.1.2)
chi2_df1 = [{"x": x, "p": float(mpmath.erfc(mpmath.sqrt(mpmath.mpf(x) / 2)))} for x in [1e-6, 0.01, 0.5, 1, 3.841458820694124, 10, 50, 200, 700, 1380]]

# ---- layered tables: the generalized Cochran-Mantel-Haenszel statistic ----------------
def solve_exact(matrix, rhs):
    """Gaussian elimination in exact rational arithmetic."""
    n = len(rhs)
    a = [list(row) + [rhs[i]] for i, row in enumerate(matrix)]
    for col in range(n):
        pivot = next(r for r in range(col, n) if a[r][col] != 0)
        a[col], a[pivot] = a[pivot], a[col]
        for r in range(n):
            if r != col and a[r][col] != 0:
                f = a[r][col] / a[col][col]
                a[r] = [x - f * y for x, y in zip(a[r], a[col])]
    return [a[i][n] / a[i][i] for i in range(n)]


def generalized_cmh_exact(strata):
    """Landis, Heyman & Koch (1978): Q = d' V^-1 d with d = sum_k (n_k - m_k) over the
    first (r-1)(c-1) cells and V = sum_k n_k^2/(n_k - 1) (D_pr - pr pr') x (D_pc - pc pc'),
    all in exact rational arithmetic; the mantel-Haenszel odds ratio sum a d/n / sum b c/n
    for 2x2 layers."""
    r, c = len(strata[0]), len(strata[0][0])
    size = (r - 1) * (c - 1)
    d = [Fraction(0)] * size
    V = [[Fraction(0)] * size for _ in range(size)]
    for t in strata:
        t = [[Fraction(v) for v in row] for row in t]
        R = [sum(row) for row in t]
        C = [sum(t[i][j] for i in range(r)) for j in range(c)]
        n = sum(R)
        if n < 2:
            continue
        pr, pc = [x / n for x in R], [x / n for x in C]
        factor = n * n / (n - 1)
        for i in range(r - 1):
            for j in range(c - 1):
                u = i * (c - 1) + j
                d[u] += t[i][j] - n * pr[i] * pc[j]
                for i2 in range(r - 1):
                    for j2 in range(c - 1):
                        row_part = (pr[i] if i == i2 else 0) - pr[i] * pr[i2]
                        col_part = (pc[j] if j == j2 else 0) - pc[j] * pc[j2]
                        V[u][i2 * (c - 1) + j2] += factor * row_part * col_part
    x = solve_exact(V, d)
    q = sum(a * b for a, b in zip(d, x))
    out = {"statistic": num(mpf(q)), "df": size, "pValue": num(chi2_sf(mpf(q), size))}
    if r == 2 and c == 2:
        num_or = sum(Fraction(t[0][0] * t[1][1], sum(map(sum, t))) for t in strata)
        den_or = sum(Fraction(t[0][1] * t[1][0], sum(map(sum, t))) for t in strata)
        theta = num_or / den_or
        out["commonOddsRatio"] = num(mpf(theta))
        out["breslowDay"] = breslow_day_mp(strata, mpf(theta))
    return out


def breslow_day_mp(strata, theta):
    """Breslow & Day (1980) §4.4 without Tarone's adjustment: A_k the root of
    A(n - r1 - c1 + A) = theta (r1 - A)(c1 - A) within the margins, at 80 digits."""
    statistic, informative = mpmath.mpf(0), 0
    for (a, b), (c, d) in strata:
        n, r1, c1 = a + b + c + d, a + b, a + c
        if r1 in (0, n) or c1 in (0, n):
            continue
        qa, qb, qc = 1 - theta, n - r1 - c1 + theta * (r1 + c1), -theta * r1 * c1
        disc = mpmath.sqrt(qb * qb - 4 * qa * qc)
        roots = [(-qb + disc) / (2 * qa), (-qb - disc) / (2 * qa)] if qa != 0 else [-qc / qb]
        A = [x for x in roots if max(0, r1 + c1 - n) <= x <= min(r1, c1)][0]
        B, C, D = r1 - A, c1 - A, n - r1 - c1 + A
        statistic += (a - A) ** 2 * (1 / A + 1 / B + 1 / C + 1 / D)
        informative += 1
    return {"statistic": num(statistic), "df": informative - 1, "pValue": num(chi2_sf(statistic, informative - 1))}


layered = []
for exponent in [6, 8, 10, 12]:
    for shape in [(2, 2), (3, 3)]:
        strata = [near_independence(10 ** exponent, shape, 3) for _ in range(3)]
        layered.append({"name": f"three {shape[0]}x{shape[1]} layers at n 1e{exponent}, a few units off independence", "strata": strata, **generalized_cmh_exact(strata)})
dominant_layers = [[[10 ** 9, 3], [2, 7]], [[10 ** 9, 1], [4, 5]], [[6, 2], [3, 10 ** 9]]]
layered.append({"name": "three 2x2 layers, each with a dominant cell", "strata": dominant_layers, **generalized_cmh_exact(dominant_layers)})

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "mpmath": mpmath.__version__, "numpy": np.__version__, "scipy": scipy.__version__},
    "fisher2x2": fisher2x2,
    "exactRxC": exact_rxc,
    "tables": battery,
    "noncentralLarge": noncentral_large,
    "noncentralityIntervals": noncentrality_intervals,
    "chi2Df1": chi2_df1,
    "layered": layered,
}, indent=1) + "\n")
print(f"wrote {OUT}")
