#!/usr/bin/python3
"""Records the limits for the noncentrality of an observed X^2 at ordinary
sizes, where tabsight sums the Poisson mixture (below 1e6): the 95% limits
and the median-unbiased point (the limit at confidence 0), found by
scipy.optimize.brentq on the tails of scipy.stats.ncx2 (Boost's algorithms),
independently of tabsight's code. The tests compare noncentralityInterval and
cramersVMedianEstimate against them.

Run with Debian's system python3 (python3-scipy from apt), from the
repository root:

    /usr/bin/python3 scripts/record_noncentrality.py

It writes fixtures/reference/noncentrality.json.
"""
import json
import sys
from pathlib import Path

import scipy
from scipy.optimize import brentq
from scipy.stats import ncx2

OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "noncentrality.json"


def limit(x, df, tail, target):
    """The lambda where ncx2's tail at x equals target (the tail rises with lambda: sf; falls: cdf)."""
    f = (lambda lam: ncx2.sf(x, df, lam) - target) if tail == "upper" else (lambda lam: target - ncx2.cdf(x, df, lam))
    hi = max(1.0, x)
    while f(hi) < 0:
        hi *= 2
    return brentq(f, 1e-300, hi, xtol=1e-12, rtol=1e-15, maxiter=500)


# X^2 and df as a single table gives them: a 2x2 table (the Physicians' Health
# Study's X^2 = 25.01), small and large r x c tables, up to the X^2 of
# 100,000 rows with a strong association (7e4) and past 1e5.
cases = [(25.01, 1), (40.0, 6), (12.5, 4), (300.0, 15), (3000.0, 4), (72665.0, 15), (2.5e5, 8)]
limits = []
for x, df in cases:
    lower = limit(x, df, "upper", 0.025) if ncx2.sf(x, df, 1e-300) < 0.025 else 0.0
    upper = limit(x, df, "lower", 0.025)
    median = limit(x, df, "upper", 0.5) if ncx2.sf(x, df, 1e-300) < 0.5 else 0.0
    limits.append({"x": x, "df": df, "confidence": 0.95, "lower": lower, "upper": upper, "median": median})

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "scipy": scipy.__version__},
    "source": "scipy.optimize.brentq on scipy.stats.ncx2.sf / ncx2.cdf",
    "limits": limits,
}, indent=1) + "\n")
print(f"wrote {OUT}")
