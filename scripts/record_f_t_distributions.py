#!/usr/bin/python3
"""Records high-precision reference values for the incomplete beta function
and the F and Student t distributions (tails and quantiles), which the tests
of src/stats/incompleteBeta.ts, fDistribution.ts and studentTDistribution.ts
compare against.

Run with Debian's system python3 (apt: python3-mpmath python3-scipy):

    /usr/bin/python3 scripts/record_f_t_distributions.py

It writes fixtures/reference/f-t-distributions.json.

Reference library: mpmath (Debian package python3-mpmath; the version is
recorded in the fixture), working at 80 significant digits.

  * I_x(a, b) is mpmath.betainc(a, b, 0, x, regularized=True) where its
    hypergeometric series converges; for large a and b it does not, and the
    value is then the continued fraction of Abramowitz & Stegun 26.5.8 with
    the prefactor x^a (1-x)^b / (a B(a, b)) from mpmath.loggamma, evaluated in
    80-digit arithmetic (at that precision the rounding that the double code
    must avoid is irrelevant). Where both routes converge they are compared
    and must agree to 1e-40 relative (the script stops otherwise).
  * Arguments are the exact binary doubles stored in the fixture: the F and t
    arguments x = df1 f/(df1 f + df2), t^2/(nu + t^2) are formed in mpmath
    from those doubles, so the fixture measures only the error of our code.
  * The grid points f and t are placed at upper-tail levels from 0.5 down to
    1e-300 with scipy.stats.f.isf / t.isf (only as a way to place points;
    their values are not the reference), rounded to 10 significant digits.
  * Quantiles: the exact root of (tail - target) by mpmath.findroot in 80
    digits, started from scipy's value.
"""
import json
import math
import sys
from pathlib import Path

import warnings

import mpmath
import numpy as np
import scipy
from scipy import stats

mpmath.mp.dps = 80
warnings.simplefilter("ignore")  # scipy only places grid points; its convergence warnings do not matter
OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "f-t-distributions.json"
mpf = mpmath.mpf


def lentz_lower(a, b, x):
    """I_x(a, b) by A&S 26.5.8 in mp arithmetic; valid for x < (a+1)/(a+b+2)."""
    tiny = mpf(10) ** -600
    eps = mpf(10) ** -75
    front = mpmath.exp(a * mpmath.log(x) + b * mpmath.log1p(-x) - (mpmath.loggamma(a) + mpmath.loggamma(b) - mpmath.loggamma(a + b))) / a
    c = mpf(1)
    d = 1 - (a + b) * x / (a + 1)
    if abs(d) < tiny:
        d = tiny
    d = 1 / d
    h = d
    m = 0
    while True:
        m += 1
        m2 = 2 * m
        aa = m * (b - m) * x / ((a - 1 + m2) * (a + m2))
        d = 1 + aa * d
        d = tiny if abs(d) < tiny else d
        c = 1 + aa / c
        c = tiny if abs(c) < tiny else c
        d = 1 / d
        h *= d * c
        aa = -(a + m) * (a + b + m) * x / ((a + m2) * (a + 1 + m2))
        d = 1 + aa * d
        d = tiny if abs(d) < tiny else d
        c = 1 + aa / c
        c = tiny if abs(c) < tiny else c
        d = 1 / d
        delta = d * c
        h *= delta
        if abs(delta - 1) < eps:
            return front * h
        if m > 5_000_000:
            raise RuntimeError(f"continued fraction did not converge a={a} b={b} x={x}")


def beta_tails(a, b, x, y=None):
    """(lower, upper) of Beta(a, b) at x, each to ~1e-70 relative; y = 1 - x, passed
    separately where x is within 1e-80 of 1 (80 digits would not hold 1 - x)."""
    a, b, x = mpf(a), mpf(b), mpf(x)
    y = 1 - x if y is None else mpf(y)
    if x * (a + b + 2) < a + 1:
        cf = lentz_lower(a, b, x)
        lower, upper = cf, 1 - cf
        small, which = cf, "lower"
    else:
        cf = lentz_lower(b, a, y)
        lower, upper = 1 - cf, cf
        small, which = cf, "upper"
    # cross-check with mpmath's own betainc where its series converges (moderate a, b)
    if max(a, b) > 1e5:
        return lower, upper
    try:
        if which == "lower":
            check = mpmath.betainc(a, b, 0, x, regularized=True)
        else:
            check = mpmath.betainc(b, a, 0, y, regularized=True)
        if small != 0 and abs(check - small) / small > mpf(10) ** -40:
            raise RuntimeError(f"mpmath.betainc and the continued fraction disagree at a={a} b={b} x={x}: {check} vs {small}")
    except (mpmath.libmp.NoConvergence, ValueError):
        pass
    return lower, upper


def fl(v):
    v = float(v)
    return v if math.isfinite(v) else None


def sig(v, digits=10):
    return float(f"{v:.{digits - 1}e}")


# ---- incomplete beta on a grid, including small and huge parameters ----------------------
beta_points = []
shapes = [0.05, 0.5, 1, 3.7, 40, 1e4, 1e7]
for a in shapes:
    for b in shapes:
        xs = set()
        for level in [0.5, 0.025, 1e-10, 1e-100, 1e-300]:
            for fn in (stats.beta.ppf, stats.beta.isf):
                v = float(fn(level, a, b))
                if 0 < v < 1 and math.isfinite(v):
                    xs.add(sig(v))
        for x in sorted(xs):
            lower, upper = beta_tails(a, b, x)
            beta_points.append({"a": a, "b": b, "x": x, "lower": fl(lower), "upper": fl(upper)})
print(f"beta: {len(beta_points)} points", file=sys.stderr)

# ---- F distribution tails ----------------------------------------------------------------
dfs = [0.3, 1, 1.7, 2, 3.3, 10, 24.6, 100, 1e3, 1e5, 1e7, 1e10]
levels = [0.5, 0.05, 1e-3, 1e-10, 1e-50, 1e-100, 1e-200, 1e-300]
f_points = []
for df1 in dfs:
    for df2 in dfs:
        fs = set()
        for level in levels:
            v = float(stats.f.isf(level, df1, df2))
            if math.isfinite(v) and v > 0:
                fs.add(sig(v))
        for level in [0.05, 1e-10, 1e-100]:
            v = float(stats.f.ppf(level, df1, df2))
            if math.isfinite(v) and v > 0:
                fs.add(sig(v))
        for f in sorted(fs):
            m1, m2, mfv = mpf(df1), mpf(df2), mpf(f)
            x = m1 * mfv / (m1 * mfv + m2)
            lower, upper = beta_tails(m1 / 2, m2 / 2, x, m2 / (m1 * mfv + m2))
            if upper < mpf("1e-305") and lower < mpf("1e-305"):
                continue
            f_points.append({"f": f, "df1": df1, "df2": df2, "upper": fl(upper), "lower": fl(lower)})
print(f"F: {len(f_points)} points", file=sys.stderr)

# ---- Student t tails ----------------------------------------------------------------------
nus = [0.3, 1, 1.5, 2, 3, 4.7, 10, 29, 100, 1e3, 1e5, 1e8, 1e12]
t_points = []
for nu in nus:
    ts = set()
    for level in [0.45, 0.25, 0.05, 0.025, 1e-3, 1e-10, 1e-50, 1e-100, 1e-200, 1e-300]:
        v = float(stats.t.isf(level, nu))
        if math.isfinite(v) and v > 0:
            ts.add(sig(v))
    for t in sorted(ts):
        mt, mnu = mpf(t), mpf(nu)
        x = mnu / (mnu + mt * mt)
        lower, upper = beta_tails(mnu / 2, mpf(1) / 2, x, mt * mt / (mnu + mt * mt))
        tail = lower / 2  # P(T > t) for t > 0
        if tail < mpf("1e-305"):
            continue
        t_points.append({"t": t, "df": nu, "upper": fl(tail), "lowerOfNegative": fl(tail), "upperOfNegative": fl(1 - tail)})
print(f"t: {len(t_points)} points", file=sys.stderr)


# ---- quantiles -----------------------------------------------------------------------------
def mp_root(fun, start):
    """Root of a monotone fun(log z) in 80 digits: a bracket grown from log(start)
    (or from 0 when no start is known), then the Illinois method on it."""
    u0 = mpmath.log(mpf(start)) if start is not None else mpf(0)
    g0 = fun(u0)
    increasing = fun(u0 + mpf(1) / 4) > g0
    direction = 1 if (g0 < 0) == increasing else -1
    step = mpf(1) / 4
    while True:
        u1 = u0 + direction * step
        g1 = fun(u1)
        if g0 * g1 <= 0:
            break
        u0, g0 = u1, g1
        step *= 2
    return mpmath.exp(mpmath.findroot(fun, (min(u0, u1), max(u0, u1)), solver="illinois", tol=mpf(10) ** -60, maxsteps=400))


f_quantiles = []
for df1, df2 in [(1, 1), (1, 10), (2, 12), (3.3, 24.6), (0.3, 100), (10, 1.7), (24.6, 1e3), (1.7, 1e5), (1e3, 1e3), (3, 1e10), (1e5, 1e7)]:
    for q in [0.5, 0.05, 1e-10, 1e-100, 1e-300]:
        start = float(stats.f.isf(q, df1, df2))
        if not (math.isfinite(start) and start > 0):
            start = None
        m1, m2 = mpf(df1), mpf(df2)

        def g(u):
            fv = mpmath.exp(u)
            x = m1 * fv / (m1 * fv + m2)
            return mpmath.log(beta_tails(m1 / 2, m2 / 2, x, m2 / (m1 * fv + m2))[1]) - mpmath.log(mpf(q))

        root = mp_root(lambda u: g(u), start)
        f_quantiles.append({"q": q, "df1": df1, "df2": df2, "f": fl(root)})
print(f"F quantiles: {len(f_quantiles)}", file=sys.stderr)

t_quantiles = []
for nu in [0.3, 1, 2, 4.7, 10, 29, 100, 1e3, 1e5, 1e8]:
    for q in [0.25, 0.05, 0.025, 0.005, 1e-10, 1e-100, 1e-300]:
        start = float(stats.t.isf(q, nu))
        if not (math.isfinite(start) and start > 0):
            start = None
        mnu = mpf(nu)

        def g(u):
            tv = mpmath.exp(u)
            x = mnu / (mnu + tv * tv)
            return mpmath.log(beta_tails(mnu / 2, mpf(1) / 2, x, tv * tv / (mnu + tv * tv))[0] / 2) - mpmath.log(mpf(q))

        root = mp_root(g, start)
        t_quantiles.append({"q": q, "df": nu, "t": fl(root)})
print(f"t quantiles: {len(t_quantiles)}", file=sys.stderr)

beta_quantiles = []
for a, b in [(0.05, 1), (0.5, 0.5), (1, 3.7), (3.7, 40), (40, 1e4), (0.2, 1e4), (1e4, 1e7), (7.5, 1.5)]:
    for side, p in [("lower", 0.025), ("upper", 0.025), ("lower", 1e-10), ("upper", 1e-10), ("lower", 0.5)]:
        start = float((stats.beta.ppf if side == "lower" else stats.beta.isf)(p, a, b))
        if not (0 < start < 1):
            continue
        ma, mb = mpf(a), mpf(b)

        def g(u):
            # u = log odds of x
            x = 1 / (1 + mpmath.exp(-u))
            lo, up = beta_tails(ma, mb, x)
            return mpmath.log(lo if side == "lower" else up) - mpmath.log(mpf(p))

        u0 = mpmath.log(mpf(start) / (1 - mpf(start)))
        u = mpmath.findroot(g, (u0, u0 + mpf("1e-7")), solver="secant", tol=mpf(10) ** -60, maxsteps=200)
        x = 1 / (1 + mpmath.exp(-u))
        beta_quantiles.append({"side": side, "p": p, "a": a, "b": b, "x": fl(x), "oneMinusX": fl(1 - x)})
print(f"beta quantiles: {len(beta_quantiles)}", file=sys.stderr)

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "mpmath": mpmath.__version__, "scipy (grid placement only)": scipy.__version__,
                     "numpy": np.__version__, "digits": mpmath.mp.dps},
    "beta": beta_points,
    "f": f_points,
    "t": t_points,
    "fQuantiles": f_quantiles,
    "tQuantiles": t_quantiles,
    "betaQuantiles": beta_quantiles,
}, indent=1) + "\n")
print(f"wrote {OUT}")
