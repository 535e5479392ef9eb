#!/usr/bin/python3
"""Records reference values that the tests compare tabsight against.

Run with Debian's system python3 (which has scipy, statsmodels and mpmath
from apt: python3-scipy python3-statsmodels python3-mpmath):

    /usr/bin/python3 scripts/record_reference.py

It writes fixtures/reference/reference.json. Sources of each block:
  chi2_sf        scipy.stats.chi2.sf, and mpmath (40 digits) as the
                 high-precision reference: Q(df/2, x/2) = gammainc(..., regularized)
  tables         scipy.stats.chi2_contingency (with and without correction,
                 lambda_="log-likelihood"), scipy.stats.contingency.association,
                 scipy.stats.fisher_exact, contingency.odds_ratio(kind="sample"),
                 contingency.relative_risk, somersd, kendalltau (b and c)
  exact_rxc      Fisher-Freeman-Halton p-values by full enumeration in exact
                 rational arithmetic (fractions.Fraction), from the definition
  ncx2           noncentral chi-square tails by mpmath, Poisson mixture at 40 digits
  multipletests  statsmodels.stats.multitest.multipletests (fdr_bh, holm, bonferroni)
  normal         mpmath normal quantiles, for the interval code
"""
import json
import itertools
import math
import sys
from fractions import Fraction
from pathlib import Path

import mpmath
import numpy as np
import scipy
import statsmodels
from scipy import stats
from scipy.stats import contingency
from statsmodels.stats.multitest import multipletests

mpmath.mp.dps = 40
OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "reference.json"


def f(x):
    x = float(x)
    return x if math.isfinite(x) else None


def mp_chi2_sf(x, df):
    return mpmath.gammainc(mpmath.mpf(df) / 2, mpmath.mpf(x) / 2, mpmath.inf, regularized=True)


# ---- chi-square upper tail grid -------------------------------------------------
chi2_grid = []
dfs = [1, 2, 3, 4, 5, 7, 10, 15, 20, 30, 50, 100, 200, 500, 1000, 5000, 10000, 50000, 100000]
factors = [0.001, 0.1, 0.5, 0.9, 1.0, 1.1, 1.5, 2.0, 3.0, 5.0]
targets = [1e-3, 1e-8, 1e-20, 1e-50, 1e-100, 1e-200, 1e-300]
for df in dfs:
    xs = [df * k for k in factors]
    for p in targets:
        x = float(stats.chi2.isf(p, df))
        if math.isfinite(x):
            xs.append(float(f"{x:.6g}"))
    for x in xs:
        ref = mp_chi2_sf(x, df)
        if ref < mpmath.mpf("1e-305"):
            continue
        chi2_grid.append({"x": x, "df": df, "scipy": f(stats.chi2.sf(x, df)), "mpmath": float(ref)})

def mp_fisher_2x2(c):
    """Two-sided Fisher p from the hypergeometric pmf at 40 digits (same 1e-7 rule)."""
    a, b, cc, d = (int(v) for v in c.flatten())
    row1, col1, n = a + b, a + cc, a + b + cc + d
    lo, hi = max(0, col1 - (cc + d)), min(row1, col1)
    lg = lambda k: mpmath.loggamma(k + 1)
    const = lg(row1) + lg(n - row1) + lg(col1) + lg(n - col1) - lg(n)
    pmf = lambda k: mpmath.exp(const - lg(k) - lg(row1 - k) - lg(col1 - k) - lg(n - row1 - col1 + k))
    observed = pmf(a)
    mode = (row1 + 1) * (col1 + 1) // (n + 2)
    total = mpmath.mpf(0)
    for direction in (1, -1):
        k = mode if direction == 1 else mode - 1
        while lo <= k <= hi:
            p = pmf(k)
            if p <= observed * (1 + mpmath.mpf("1e-7")):
                total += p
            if p < observed * mpmath.mpf("1e-30") and p < mpmath.mpf("1e-330"):
                break
            k += direction
    return float(total)


# ---- contingency tables ---------------------------------------------------------
rng = np.random.default_rng(20261201)
tables = [
    {"name": "party identification by gender (Agresti, GSS)", "counts": [[762, 327, 468], [484, 239, 477]]},
    {"name": "tea tasting (Fisher 1935)", "counts": [[3, 1], [1, 3]]},
    {"name": "aspirin and myocardial infarction (Physicians' Health Study)", "counts": [[189, 10845], [104, 10933]]},
    {"name": "job satisfaction by income (Agresti)", "counts": [[1, 2, 1, 0], [3, 3, 6, 1], [10, 10, 14, 9], [6, 7, 12, 11]]},
    {"name": "sparse 2x2", "counts": [[0, 5], [7, 2]]},
    {"name": "large 2x2, tiny p-value", "counts": [[90000, 10000], [10000, 90000]]},
    {"name": "huge n, trivial effect", "counts": [[501000, 499000], [499000, 501000]]},
]
for shape, n in [((2, 3), 40), ((3, 3), 200), ((3, 5), 1200), ((4, 6), 5000), ((5, 5), 60), ((2, 8), 3000), ((6, 4), 150000)]:
    probs = rng.dirichlet(np.ones(shape[0] * shape[1]) * 2.0)
    counts = rng.multinomial(n, probs).reshape(shape)
    # keep margins positive
    counts[counts.sum(axis=1) == 0, 0] += 1
    counts[0, counts.sum(axis=0) == 0] += 1
    tables.append({"name": f"random {shape[0]}x{shape[1]} n={n} (numpy seed 20261201)", "counts": counts.tolist()})

records = []
for t in tables:
    c = np.array(t["counts"])
    rec = {"name": t["name"], "counts": t["counts"]}
    stat, p, dof, expected = stats.chi2_contingency(c, correction=False)
    rec["pearson"] = {"statistic": f(stat), "pValue": f(p), "df": int(dof), "pValueMpmath": float(mp_chi2_sf(stat, dof))}
    rec["expected"] = expected.tolist()
    g, gp, _, _ = stats.chi2_contingency(c, correction=False, lambda_="log-likelihood")
    rec["likelihoodRatio"] = {"statistic": f(g), "pValue": f(gp)}
    rec["cramersV"] = f(contingency.association(c, method="cramer"))
    rec["tschuprowT"] = f(contingency.association(c, method="tschuprow"))
    rec["contingencyC"] = f(contingency.association(c, method="pearson"))
    if c.shape == (2, 2):
        ys, yp, _, _ = stats.chi2_contingency(c, correction=True)
        rec["yates"] = {"statistic": f(ys), "pValue": f(yp)}
        rec["fisher"] = {"pValue": f(stats.fisher_exact(c)[1]), "pValueMpmath": mp_fisher_2x2(c)}
        if (c > 0).all():
            o = contingency.odds_ratio(c, kind="sample")
            ci = o.confidence_interval(0.95)
            rec["oddsRatio"] = {"estimate": f(o.statistic), "lower": f(ci.low), "upper": f(ci.high)}
            rr = contingency.relative_risk(int(c[0, 0]), int(c[0].sum()), int(c[1, 0]), int(c[1].sum()))
            rci = rr.confidence_interval(0.95)
            rec["relativeRisk"] = {"estimate": f(rr.relative_risk), "lower": f(rci.low), "upper": f(rci.high)}
    if c.sum() <= 20000:
        rec["somersDColsGivenRows"] = f(stats.somersd(c).statistic)
        rec["somersDRowsGivenCols"] = f(stats.somersd(c.T).statistic)
        x, y = [], []
        for i in range(c.shape[0]):
            for j in range(c.shape[1]):
                x += [i] * int(c[i, j])
                y += [j] * int(c[i, j])
        rec["kendallTauB"] = f(stats.kendalltau(x, y, variant="b").statistic)
        rec["kendallTauC"] = f(stats.kendalltau(x, y, variant="c").statistic)
    records.append(rec)


# ---- exact r x c by enumeration in rational arithmetic ----------------------------
def tables_with_margins(rows, cols):
    r, c = len(rows), len(cols)
    if r == 1:
        yield [list(cols)]
        return
    first = rows[0]

    def fill(j, left, prefix):
        if j == c - 1:
            if left <= cols[j]:
                yield prefix + [left]
            return
        for v in range(0, min(left, cols[j]) + 1):
            yield from fill(j + 1, left - v, prefix + [v])

    for row in fill(0, first, []):
        rest_cols = [cols[j] - row[j] for j in range(c)]
        for rest in tables_with_margins(rows[1:], rest_cols):
            yield [row] + rest


def exact_probability(table, rows, cols, n):
    num = math.prod(math.factorial(v) for v in rows) * math.prod(math.factorial(v) for v in cols)
    den = math.factorial(n) * math.prod(math.factorial(v) for row in table for v in row)
    return Fraction(num, den)


exact = []
for counts in [[[3, 1, 0], [1, 3, 2], [0, 2, 5]], [[2, 0, 1, 3], [0, 3, 1, 0], [1, 1, 2, 0]], [[5, 0], [1, 4], [0, 3]], [[1, 2, 1, 0], [3, 3, 6, 1], [2, 1, 4, 3]], [[4, 1, 0, 0, 2], [0, 3, 2, 1, 0]]]:
    rows = [sum(r) for r in counts]
    cols = [sum(r[j] for r in counts) for j in range(len(counts[0]))]
    n = sum(rows)
    observed = exact_probability(counts, rows, cols, n)
    total = Fraction(0)
    for t in tables_with_margins(rows, cols):
        p = exact_probability(t, rows, cols, n)
        if p <= observed * Fraction(10000001, 10000000):
            total += p
    exact.append({"counts": counts, "pValue": float(total)})

# ---- noncentral chi-square --------------------------------------------------------
def mp_ncx2(x, df, lam, upper):
    x, df, lam = mpmath.mpf(x), mpmath.mpf(df), mpmath.mpf(lam)
    half = lam / 2
    total = mpmath.mpf(0)
    j = 0
    while True:
        w = mpmath.exp(-half) * half ** j / mpmath.factorial(j)
        if upper:
            term = mpmath.gammainc(df / 2 + j, x / 2, mpmath.inf, regularized=True)
        else:
            term = mpmath.gammainc(df / 2 + j, 0, x / 2, regularized=True)
        total += w * term
        if j > half and w < mpmath.mpf("1e-45"):
            break
        j += 1
    return total


ncx2 = []
for x, df, lam in [(5, 2, 1), (10, 4, 3), (30, 6, 10), (100, 12, 60), (50, 12, 60), (300, 20, 250), (12, 1, 0.5), (2, 3, 8)]:
    ncx2.append({"x": x, "df": df, "lambda": lam, "upper": float(mp_ncx2(x, df, lam, True)), "lower": float(mp_ncx2(x, df, lam, False))})

# ---- multiple testing -------------------------------------------------------------
mt_inputs = [
    [0.01, 0.04, 0.03, 0.005, 0.2, 0.5, 0.04, 0.9],
    [1e-10, 0.001, 0.0015, 0.02, 0.0201, 0.3, 0.31, 0.6, 0.75, 1.0],
    [0.05],
]
mt = []
for p in mt_inputs:
    mt.append({
        "p": p,
        "bh": multipletests(p, method="fdr_bh")[1].tolist(),
        "holm": multipletests(p, method="holm")[1].tolist(),
        "bonferroni": multipletests(p, method="bonferroni")[1].tolist(),
    })

# ---- stratified tables -------------------------------------------------------------
from statsmodels.stats.contingency_tables import StratifiedTable

# Graduate admissions by department (Bickel, Hammel & O'Connell 1975, Science 187, 398-404):
# rows male/female, columns admitted/rejected, one table per department A-F.
berkeley = [
    [[512, 313], [89, 19]], [[353, 207], [17, 8]], [[120, 205], [202, 391]],
    [[138, 279], [131, 244]], [[53, 138], [94, 299]], [[22, 351], [24, 317]],
]
st = StratifiedTable([np.array(t) for t in berkeley])
null = st.test_null_odds(correction=False)
eq = st.test_equal_odds(adjust=False)
lo, hi = st.oddsratio_pooled_confint()
stratified_2x2 = {"name": "graduate admissions by department (Bickel, Hammel & O'Connell 1975)", "strata": berkeley,
                  "cmh": {"statistic": float(null.statistic), "pValue": float(null.pvalue)},
                  "commonOddsRatio": {"estimate": float(st.oddsratio_pooled), "lower": float(lo), "upper": float(hi)},
                  "breslowDay": {"statistic": float(eq.statistic), "pValue": float(eq.pvalue)}}


def generalized_cmh(strata):
    """Landis, Heyman & Koch (1978) general association statistic, from its published formula."""
    strata = [np.array(t, dtype=float) for t in strata]
    r, c = strata[0].shape
    dev = np.zeros((r - 1) * (c - 1))
    var = np.zeros(((r - 1) * (c - 1), (r - 1) * (c - 1)))
    for t in strata:
        n = t.sum()
        if n < 2:
            continue
        pr = t.sum(axis=1)[:-1] / n
        pc = t.sum(axis=0)[:-1] / n
        dev += (t[:-1, :-1] - n * np.outer(pr, pc)).flatten()
        var += n * n / (n - 1) * np.kron(np.diag(pr) - np.outer(pr, pr), np.diag(pc) - np.outer(pc, pc))
    q = float(dev @ np.linalg.solve(var, dev))
    df = (r - 1) * (c - 1)
    return {"statistic": q, "df": df, "pValue": float(stats.chi2.sf(q, df))}


rng2 = np.random.default_rng(7)
generalized = []
for shape, k, n in [((3, 3), 4, 300), ((2, 4), 3, 200), ((4, 3), 5, 800)]:
    strata = [rng2.multinomial(n, rng2.dirichlet(np.ones(shape[0] * shape[1]) * 3)).reshape(shape).tolist() for _ in range(k)]
    generalized.append({"strata": strata, **generalized_cmh(strata)})
generalized.append({"strata": berkeley, **generalized_cmh(berkeley)})

# ---- numerical limits: huge counts, near independence, the level cap -----------------
def exact_limits(counts):
    """X² exactly in rational arithmetic, G² and p-values with mpmath at 60 digits."""
    cells = [[Fraction(v) for v in row] for row in counts]
    rows = [sum(r) for r in cells]
    cols = [sum(r[j] for r in cells) for j in range(len(cells[0]))]
    n = sum(rows)
    x2 = Fraction(0)
    g2 = mpmath.mpf(0)
    with mpmath.workdps(60):
        for i, r in enumerate(cells):
            for j, v in enumerate(r):
                e = rows[i] * cols[j] / n
                x2 += (v - e) ** 2 / e
                if v > 0:
                    g2 += 2 * mpmath.mpf(v.numerator) / v.denominator * mpmath.log((mpmath.mpf(v.numerator) / v.denominator) / (mpmath.mpf(e.numerator) / e.denominator))
        df = (len(rows) - 1) * (len(cols) - 1)
        x2m = mpmath.mpf(x2.numerator) / x2.denominator
        return {"counts": counts, "pearson": float(x2m), "pearsonP": float(mp_chi2_sf(x2m, df)),
                "likelihoodRatio": float(g2), "likelihoodRatioP": float(mp_chi2_sf(g2, df)), "df": df}


rng3 = np.random.default_rng(12)
limits = [
    [[10 ** 12 + 3, 5 * 10 ** 11 + 1], [7 * 10 ** 11 - 2, 12 * 10 ** 11 + 7]],
    # near independence at 10^12: margins 10^12, 2*10^12 by 1.5*10^12 twice, cells moved by 3
    [[5 * 10 ** 11 + 3, 5 * 10 ** 11 - 3], [10 ** 12 - 3, 10 ** 12 + 3]],
    [[333333333333, 333333333334, 333333333333], [666666666667, 666666666666, 666666666668]],
    # non-integer weighted sums (exact binary fractions) near 10^12
    [[123456789012.25, 98765432109.5, 55555555555.75], [111111111111.125, 222222222222.0, 99999999999.5]],
    (rng3.integers(1, 10 ** 6, size=(50, 50))).tolist(),
    (rng3.integers(10 ** 9, 10 ** 12, size=(6, 7))).tolist(),
]
numerical_limits = [exact_limits(t) for t in limits]

# ---- no three-way interaction, fitted by IPF (numpy, written from Bishop, Fienberg & Holland 1975) ----
def ipf_no_three_way(layers, iterations=5000):
    n = np.array(layers, dtype=float)  # K x r x c
    m = np.ones_like(n)
    for _ in range(iterations):
        prev = m.copy()
        m *= np.where(m.sum(0) > 0, n.sum(0) / np.where(m.sum(0) > 0, m.sum(0), 1), 0)[None, :, :]
        m *= np.where(m.sum(2) > 0, n.sum(2) / np.where(m.sum(2) > 0, m.sum(2), 1), 0)[:, :, None]
        m *= np.where(m.sum(1) > 0, n.sum(1) / np.where(m.sum(1) > 0, m.sum(1), 1), 0)[:, None, :]
        if np.max(np.abs(m - prev)) < 1e-13:
            break
    mask = n > 0
    g2 = float(2 * np.sum(n[mask] * np.log(n[mask] / m[mask])))
    k, r, c = n.shape
    df = (r - 1) * (c - 1) * (k - 1)
    return {"layers": layers, "statistic": g2, "df": df, "pValue": float(stats.chi2.sf(g2, df))}


rng4 = np.random.default_rng(31)
three_way = [ipf_no_three_way([[[30, 10], [12, 25]], [[22, 18], [15, 20]]])]
for shape in [(3, 3), (2, 4), (4, 3)]:
    three_way.append(ipf_no_three_way([rng4.integers(3, 60, size=shape).tolist() for _ in range(2)]))

normal = [{"p": p, "z": float(mpmath.sqrt(2) * mpmath.erfinv(2 * mpmath.mpf(p) - 1))} for p in [0.975, 0.995, 0.95, 0.5, 0.9995, 1e-10]]

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "scipy": scipy.__version__, "numpy": np.__version__,
                      "statsmodels": statsmodels.__version__, "mpmath": mpmath.__version__},
    "chi2Sf": chi2_grid,
    "tables": records,
    "exactRxC": exact,
    "ncx2": ncx2,
    "multipleTesting": mt,
    "normalQuantiles": normal,
    "stratified2x2": stratified_2x2,
    "generalizedCmh": generalized,
    "numericalLimits": numerical_limits,
    "noThreeWay": three_way,
}, indent=1) + "\n")
print(f"wrote {OUT}: {len(chi2_grid)} chi2 points, {len(records)} tables, {len(exact)} exact r x c")
