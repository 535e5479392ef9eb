#!/usr/bin/python3
"""Records reference values for the many-waves and banner statistics.

Run with Debian's system python3 and R (all from apt):

    apt-get install -y python3-scipy python3-statsmodels python3-numpy python3-pandas \
        r-base-core r-cran-cardata r-cran-survey
    /usr/bin/python3 scripts/record_waves_reference.py

It writes fixtures/reference/waves-banner.json. Every data set is real and
comes from a registry package, fetched here:
  vocab        GSS vocabulary test, 22 yearly waves 1974-2016 (R package carData,
               data set Vocab; Debian r-cran-cardata), read through Rscript
  esoph        Ille-et-Vilaine oesophageal cancer case-control study
               (Tuyns et al. 1977; Breslow & Day 1980, vol. 1, Appendix I;
               R datasets::esoph in Debian r-base-core), read through Rscript
  china        lung cancer and smoking in eight Chinese cities (Liu 1992,
               Int. J. Epidemiol. 21, 197-201; statsmodels.datasets.china_smoking)
  api          California Academic Performance Index schools, stratified sample
               with weights (R package survey, data set api: apistrat;
               Debian r-cran-survey), read through Rscript
Sources of each reference value:
  noThreeWay      numpy IPF written from Bishop, Fienberg & Holland (1975) and,
                  independently, statsmodels GLM Poisson of [ij][ik][jk] on the cells
                  with a positive fit (deviance, Pearson chi2, df_resid = cells - rank)
  equalOdds       statsmodels StratifiedTable.test_equal_odds(adjust=False / True)
  oddsRatioTrend  Breslow & Day (1980, vol. 1, §4.4) score test for a linear trend in the
                  log odds ratio, evaluated with numpy from the published formula;
                  Woolf-weighted regression of log OR on the wave index by
                  statsmodels WLS with the scale fixed at 1
  layerTrend      log-multiplicative layer effect with a log-linear trend
                  (Xie 1992): statsmodels GLM Poisson profiled over the trend by
                  scipy.optimize (bounded Brent), against GLM of [ij][ik][jk]
  marginDrift     scipy.stats.chi2_contingency on margin x wave
  columnProportions  statsmodels.stats.proportion.proportions_ztest (pooled)
  welch           scipy.stats.ttest_ind_from_stats(equal_var=False); df from the
                  Welch-Satterthwaite formula with numpy
  multipleResponse   Bilder & Loughin (2004) / Bilder, Loughin & Nettleton (2000)
                  Rao-Scott adjustments evaluated with numpy from Appendix A
                  (multinomial of the response patterns)
"""
import io
import json
import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import scipy
import scipy.linalg
import statsmodels
import statsmodels.api as sm
from scipy import optimize, stats
from statsmodels.stats.contingency_tables import StratifiedTable
from statsmodels.stats.proportion import proportions_ztest

OUT = Path(__file__).resolve().parent.parent / "fixtures" / "reference" / "waves-banner.json"


def r_csv(expression):
    """A data frame printed as CSV by Rscript."""
    text = subprocess.run(["Rscript", "-e", f"write.csv({expression}, stdout(), row.names = FALSE)"],
                          check=True, capture_output=True, text=True).stdout
    return pd.read_csv(io.StringIO(text))


def r_version():
    return subprocess.run(["Rscript", "-e", "cat(R.version.string)"], check=True, capture_output=True, text=True).stdout


def f(x):
    x = float(x)
    return x if math.isfinite(x) else None


# ---- data --------------------------------------------------------------------------
vocab = r_csv("carData::Vocab")
years = sorted(vocab.year.unique())
vocab["edu"] = pd.cut(vocab.education, [-1, 11, 12, 15, 20], labels=False)  # <12, 12, 13-15, 16+
vocab["voc"] = pd.cut(vocab.vocabulary, [-1, 4, 6, 10], labels=False)    # 0-4, 5-6, 7-10
vocab["college"] = (vocab.education >= 16).astype(int)
vocab["high"] = (vocab.vocabulary >= 7).astype(int)


def layers_of(frame, row, col, r, c, wave="year", waves=None):
    waves = waves if waves is not None else sorted(frame[wave].unique())
    out = []
    for w in waves:
        t = np.zeros((r, c), dtype=int)
        sub = frame[frame[wave] == w]
        for (i, j), n in sub.groupby([row, col]).size().items():
            t[int(i), int(j)] = n
        out.append(t.tolist())
    return out


vocab_edu_voc = layers_of(vocab, "edu", "voc", 4, 3)
# 2x2 per wave: rows college degree (yes, no), columns vocabulary 7+ (yes, no)
vocab_college_high = [[[t[1][1], t[1][0]], [t[0][1], t[0][0]]] for t in layers_of(vocab, "college", "high", 2, 2)]

esoph = r_csv("datasets::esoph")
esoph["age"] = esoph.agegp.map({"25-34": 0, "35-44": 1, "45-54": 2, "55-64": 3, "65-74": 4, "75+": 5})
esoph["alc"] = esoph.alcgp.map({"0-39g/day": 0, "40-79": 1, "80-119": 2, "120+": 3})
esoph_case_alcohol = []  # per age group: rows case, control; columns the four alcohol groups
esoph_2x2 = []           # per age group: rows case, control; columns 80+ g/day, under 80 (Breslow & Day Table 4.2)
for a in range(6):
    sub = esoph[esoph.age == a]
    cases = [int(sub[sub.alc == g].ncases.sum()) for g in range(4)]
    controls = [int(sub[sub.alc == g].ncontrols.sum()) for g in range(4)]
    esoph_case_alcohol.append([cases, controls])
    esoph_2x2.append([[cases[2] + cases[3], cases[0] + cases[1]], [controls[2] + controls[3], controls[0] + controls[1]]])

china = sm.datasets.china_smoking.load_pandas().data
china_strata = [[[int(row.smoking_yes_cancer_yes), int(row.smoking_yes_cancer_no)],
                 [int(row.smoking_no_cancer_yes), int(row.smoking_no_cancer_no)]] for row in china.itertuples()]

api = r_csv("{data(api, package = 'survey'); apistrat}")


# ---- no three-way interaction ---------------------------------------------------------
def ipf(n, structural=None, iterations=20000):
    n = np.asarray(n, dtype=float)  # K x r x c
    m = np.ones_like(n) if structural is None else np.where(structural, 0.0, 1.0)
    for _ in range(iterations):
        prev = m.copy()
        for axis in (0, 2, 1):  # n_ij+, n_i+k, n_+jk as in the TypeScript sweep order
            fit = m.sum(axis=axis, keepdims=True)
            obs = n.sum(axis=axis, keepdims=True)
            m = m * np.where(fit > 0, obs / np.where(fit > 0, fit, 1), 0)
        if np.max(np.abs(m - prev) / np.maximum(1, np.abs(m))) < 1e-13:
            break
    return m


def glm_no_three_way(layers, structural=None):
    """[ij][ik][jk] by Poisson GLM on the cells whose fit can be positive."""
    n = np.asarray(layers, dtype=float)
    K, r, c = n.shape
    rows = []
    for k in range(K):
        for i in range(r):
            for j in range(c):
                if structural is not None and structural[k][i][j]:
                    continue
                if n[:, i, j].sum() == 0 or n[k, i, :].sum() == 0 or n[k, :, j].sum() == 0:
                    continue
                rows.append({"k": k, "i": i, "j": j, "y": n[k, i, j]})
    d = pd.DataFrame(rows)
    X = pd.get_dummies(d.i.astype(str) + "_" + d.j.astype(str), prefix="ij", dtype=float)
    X = X.join(pd.get_dummies(d.i.astype(str) + "_" + d.k.astype(str), prefix="ik", dtype=float))
    X = X.join(pd.get_dummies(d.j.astype(str) + "_" + d.k.astype(str), prefix="jk", dtype=float))
    # keep a linearly independent set of columns (pivoted QR), so that IRLS works on a full-rank design
    _q, rr, pivot = scipy.linalg.qr(X.values, mode="economic", pivoting=True)
    rank = int(np.sum(np.abs(np.diag(rr)) > 1e-9 * np.abs(rr[0, 0])))
    assert rank == int(np.linalg.matrix_rank(X.values))
    X = X.iloc[:, sorted(pivot[:rank])]
    fit = sm.GLM(d.y, X, family=sm.families.Poisson()).fit(tol=1e-14, maxiter=500)
    df = len(d) - rank
    return {"statistic": f(fit.deviance), "pearson": f(fit.pearson_chi2), "df": df,
            "pValue": f(stats.chi2.sf(fit.deviance, df)), "pearsonPValue": f(stats.chi2.sf(fit.pearson_chi2, df))}


def no_three_way_case(name, layers, structural=None):
    m = ipf(layers, structural)
    n = np.asarray(layers, dtype=float)
    mask = n > 0
    g2_ipf = float(2 * np.sum(n[mask] * np.log(n[mask] / m[mask])))
    glm = glm_no_three_way(layers, structural)
    K, r, c = n.shape
    departures = []
    for k in range(K):
        others = [t for x, t in enumerate(layers) if x != k]
        rest_structural = None if structural is None else [t for x, t in enumerate(structural) if x != k]
        rest = glm_no_three_way(others, rest_structural) if len(others) >= 2 else {"statistic": 0.0, "df": 0}
        df = glm["df"] - rest["df"]
        stat = glm["statistic"] - rest["statistic"]
        departures.append({"statistic": f(stat), "df": df, "pValue": f(stats.chi2.sf(stat, df))})
    return {"name": name, "layers": layers, "structuralZeros": structural, "ipfStatistic": g2_ipf,
            "nominalDf": (K - 1) * (r - 1) * (c - 1), **glm, "departures": departures}


# a level absent from one wave: the 1974 wave without its 16+ education row (as if not asked that year)
vocab_missing_level = [ [row[:] for row in t] for t in vocab_edu_voc[:6] ]
vocab_missing_level[0][3] = [0, 0, 0]
# a structural zero: esoph's 75+ age group had no control drinking 80+ g/day; the 120+ column in the
# first age group is declared impossible here (it holds no case or control in the data)
esoph_structural = [[[False] * 4 for _ in range(2)] for _ in range(6)]
structural_cells = [(k, i, j) for k in range(6) for i in range(2) for j in range(4) if esoph_case_alcohol[k][i][j] == 0]
for k, i, j in structural_cells[:1]:
    esoph_structural[k][i][j] = True

no_three_way = [
    no_three_way_case("GSS vocabulary: education band x vocabulary band, 22 yearly waves (carData Vocab)", vocab_edu_voc),
    no_three_way_case("Ille-et-Vilaine: case/control x alcohol group, 6 age groups (datasets esoph)", esoph_case_alcohol),
    no_three_way_case("GSS vocabulary, first 6 waves, 16+ education absent from 1974 (zero margin)", vocab_missing_level),
    no_three_way_case(f"Ille-et-Vilaine case/control x alcohol with a structural zero at {structural_cells[0]}", esoph_case_alcohol, esoph_structural),
    no_three_way_case("GSS vocabulary: college x vocabulary 7+, 22 yearly waves (2x2xK)", vocab_college_high),
]


# ---- equal odds ratios ---------------------------------------------------------------
def equal_odds_case(name, strata):
    st = StratifiedTable([np.array(t, dtype=float) for t in strata])
    plain = st.test_equal_odds(adjust=False)
    tarone = st.test_equal_odds(adjust=True)
    return {"name": name, "strata": strata, "commonOddsRatio": f(st.oddsratio_pooled),
            "breslowDay": {"statistic": f(plain.statistic), "pValue": f(plain.pvalue)},
            "tarone": {"statistic": f(tarone.statistic), "pValue": f(tarone.pvalue)}}


equal_odds = [
    equal_odds_case("smoking and lung cancer in eight Chinese cities (Liu 1992; statsmodels china_smoking)", china_strata),
    equal_odds_case("Ille-et-Vilaine: alcohol 80+ g/day by case status, 6 age groups (Breslow & Day 1980, Table 4.2)", esoph_2x2),
    equal_odds_case("GSS vocabulary: college x vocabulary 7+, 22 yearly waves", vocab_college_high),
]


# ---- trend in the log odds ratio --------------------------------------------------------
def expected_a(r1, c1, n, theta):
    """Breslow & Day (4.29): the a within the margins with odds ratio theta."""
    lo, hi = max(0, r1 + c1 - n), min(r1, c1)
    g = lambda a: a * (n - r1 - c1 + a) - theta * (r1 - a) * (c1 - a)
    return optimize.brentq(g, lo, hi, xtol=1e-15, rtol=4 * np.finfo(float).eps, maxiter=500)


def breslow_day_trend(strata, scores):
    st = StratifiedTable([np.array(t, dtype=float) for t in strata])
    theta = st.oddsratio_pooled
    # first pass: the variance-weighted mean score, at which the scores are centred (so that the
    # statistic does not depend on where the score scale starts; the published formula assumes
    # sum(a - A) = 0, which the Mantel-Haenszel estimate meets only approximately)
    parts = []
    for t in strata:
        (a, b), (c, d) = t
        n = a + b + c + d
        r1, c1 = a + b, a + c
        if r1 == 0 or c1 == 0 or r1 == n or c1 == n:
            parts.append(None)
            continue
        A = expected_a(r1, c1, n, theta)
        parts.append((A, 1 / (1 / A + 1 / (r1 - A) + 1 / (c1 - A) + 1 / (n - r1 - c1 + A))))
    centre = sum(x * p[1] for x, p in zip(scores, parts) if p) / sum(p[1] for p in parts if p)
    num, sxv, sx2v, sv = 0.0, 0.0, 0.0, 0.0
    residuals = []
    for t, x, part in zip(strata, scores, parts):
        if part is None:
            residuals.append(None)
            continue
        x = x - centre
        a = t[0][0]
        A, V = part
        num += x * (a - A)
        sxv += x * V
        sx2v += x * x * V
        sv += V
        residuals.append((a - A) / math.sqrt(V))
    stat = num * num / (sx2v - sxv * sxv / sv)
    return {"statistic": f(stat), "pValue": f(stats.chi2.sf(stat, 1)), "residuals": residuals}


def woolf_trend(strata, scores):
    y, w, x = [], [], []
    for t, s in zip(strata, scores):
        (a, b), (c, d) = t
        if min(a, b, c, d) == 0:
            a, b, c, d = a + 0.5, b + 0.5, c + 0.5, d + 0.5
        y.append(math.log(a * d / (b * c)))
        w.append(1 / (1 / a + 1 / b + 1 / c + 1 / d))
        x.append(s)
    X = sm.add_constant(np.array(x, dtype=float))
    fit = sm.WLS(np.array(y), X, weights=np.array(w)).fit(cov_type="fixed scale", cov_kwds={"scale": 1.0})
    slope, se = float(fit.params[1]), float(fit.bse[1])
    z = slope / se
    resid = float(np.sum(np.array(w) * (np.array(y) - fit.fittedvalues) ** 2))
    return {"slope": slope, "standardError": se, "z": z, "pValue": f(2 * stats.norm.sf(abs(z))),
            "lower": slope - stats.norm.isf(0.025) * se, "upper": slope + stats.norm.isf(0.025) * se,
            "intercept": float(fit.params[0]),
            "residualHeterogeneity": {"statistic": resid, "df": len(y) - 2, "pValue": f(stats.chi2.sf(resid, len(y) - 2))}}


odds_ratio_trend = []
for name, strata, scores in [
    ("Ille-et-Vilaine: alcohol 80+ g/day by case status over 6 ordered age groups, scores 1..6", esoph_2x2, list(range(1, 7))),
    ("GSS vocabulary: college x vocabulary 7+ over 22 waves, scores = survey year", vocab_college_high, [int(y) for y in years]),
    ("GSS vocabulary: college x vocabulary 7+ over 22 waves, scores = wave index 0..21", vocab_college_high, list(range(len(years)))),
]:
    odds_ratio_trend.append({"name": name, "strata": strata, "scores": scores,
                             "breslowDayTrend": breslow_day_trend(strata, scores), "woolf": woolf_trend(strata, scores)})


# ---- layer-effect (unidiff) trend ------------------------------------------------------------
def layer_trend(layers, scores):
    n = np.asarray(layers, dtype=float)
    K, r, c = n.shape
    rows = [{"k": k, "i": i, "j": j, "y": n[k, i, j]} for k in range(K) for i in range(r) for j in range(c)]
    d = pd.DataFrame(rows)
    base = pd.get_dummies(d.i.astype(str) + "_" + d.k.astype(str), prefix="ik", dtype=float)
    # columns j >= 1 only, so that the design of [ik][jk] has full rank
    jk = pd.get_dummies(d.j.astype(str) + "_" + d.k.astype(str), prefix="jk", dtype=float)
    base = base.join(jk[[name for name in jk.columns if not name.startswith("jk_0_")]])
    # association psi_ij with the first row and column as reference (identifiable)
    assoc_cols = [(i, j) for i in range(1, r) for j in range(1, c)]
    x = np.array([scores[k] for k in d.k], dtype=float)
    x_centre = float(np.mean(scores))

    def deviance(beta):
        phi = np.exp(beta * (x - x_centre))
        A = pd.DataFrame({f"a{i}{j}": ((d.i == i) & (d.j == j)).astype(float) * phi for i, j in assoc_cols})
        fit = sm.GLM(d.y, base.join(A), family=sm.families.Poisson()).fit(tol=1e-14, maxiter=500)
        return fit.deviance

    homogeneous = deviance(0.0)
    span = float(max(scores) - min(scores))
    bound = 4.0 / span
    best = optimize.minimize_scalar(deviance, bounds=(-bound, bound), method="bounded", options={"xatol": 1e-11})
    assert abs(best.x) < 0.99 * bound, "the trend estimate sits at the search bound"
    lr = homogeneous - best.fun
    # profile-likelihood 95% interval for beta
    crit = stats.chi2.isf(0.05, 1)
    g = lambda b: deviance(b) - best.fun - crit
    step = 0.05
    lo = best.x - step
    while g(lo) < 0:
        lo -= step
    hi = best.x + step
    while g(hi) < 0:
        hi += step
    lower = optimize.brentq(g, lo, best.x, xtol=1e-12)
    upper = optimize.brentq(g, best.x, hi, xtol=1e-12)
    return {"homogeneousDeviance": f(homogeneous), "trendDeviance": f(best.fun), "beta": f(best.x),
            "statistic": f(lr), "pValue": f(stats.chi2.sf(lr, 1)), "lower": f(lower), "upper": f(upper),
            "scoreCentre": x_centre}


layer_trend_cases = [
    {"name": "GSS vocabulary: education band x vocabulary band over 22 waves, scores = wave index 0..21",
     "layers": vocab_edu_voc, "scores": list(range(len(years))), **layer_trend(vocab_edu_voc, list(range(len(years))))},
    {"name": "Ille-et-Vilaine: case/control x alcohol group over 6 ordered age groups, scores 0..5",
     "layers": esoph_case_alcohol, "scores": list(range(6)), **layer_trend(esoph_case_alcohol, list(range(6)))},
]


# ---- margin drift ------------------------------------------------------------------------
def drift(layers):
    n = np.asarray(layers, dtype=float)
    rows = n.sum(axis=2).T  # r x K
    cols = n.sum(axis=1).T  # c x K
    out = {}
    for key, t in (("rows", rows), ("columns", cols)):
        t = t[t.sum(axis=1) > 0][:, t.sum(axis=0) > 0]
        x2, p, dof, _ = stats.chi2_contingency(t, correction=False)
        g2, gp, _, _ = stats.chi2_contingency(t, correction=False, lambda_="log-likelihood")
        out[key] = {"pearson": {"statistic": f(x2), "pValue": f(p), "df": int(dof)}, "likelihoodRatio": {"statistic": f(g2), "pValue": f(gp)}}
    return out


margin_drift = [{"name": "GSS vocabulary: education band and vocabulary band over 22 waves", "layers": vocab_edu_voc, **drift(vocab_edu_voc)},
                {"name": "GSS vocabulary, first 6 waves, 16+ education absent from 1974", "layers": vocab_missing_level, **drift(vocab_missing_level)}]


# ---- column proportions ----------------------------------------------------------------------
def kish(w):
    w = np.asarray(w, dtype=float)
    return float(w.sum() ** 2 / (w ** 2).sum())


column_cases = []
# share of schools meeting the school-wide growth target, by enrolment band (thirds of apistrat's enroll);
# the sampling weights pw vary within each band, so the Kish effective base is below the count of schools
api["size_band"] = pd.qcut(api.enroll, 3, labels=False)
for weighted in (False, True):
    cols = []
    for band in (0, 1, 2):
        sub = api[api.size_band == band]
        w = sub.pw.values if weighted else np.ones(len(sub))
        yes = (sub["sch.wide"] == "Yes").values
        cols.append({"label": ["small", "middle", "large"][band], "count": float(w[yes].sum()), "base": float(w.sum()),
                     "effectiveBase": kish(w) if weighted else float(len(sub)), "unweightedBase": int(len(sub))})
    pairs = []
    for a in range(3):
        for b in range(a + 1, 3):
            pa = cols[a]["count"] / cols[a]["base"]
            pb = cols[b]["count"] / cols[b]["base"]
            na, nb = cols[a]["effectiveBase"], cols[b]["effectiveBase"]
            z, p = proportions_ztest([pa * na, pb * nb], [na, nb])
            pairs.append({"a": a, "b": b, "z": f(z), "pValue": f(p)})
    column_cases.append({"name": f"API stratified sample: met school-wide target by enrolment third ({'weighted by pw, Kish effective base' if weighted else 'unweighted'})",
                         "columns": cols, "pairs": pairs})


# ---- multiple response: Bilder & Loughin -------------------------------------------------------
def spmi(W, Y):
    """SPMI for two multiple-response sets (Bilder & Loughin 2004, Appendix A), from respondent 0/1 rows."""
    W = np.asarray(W, dtype=float)
    Y = np.asarray(Y, dtype=float)
    n = len(W)
    I, J = W.shape[1], Y.shape[1]
    pw, py = W.mean(0), Y.mean(0)
    pij = (W.T @ Y) / n
    D = np.outer(pw * (1 - pw), py * (1 - py)).reshape(-1)
    X2ij = n * ((pij - np.outer(pw, py)) ** 2).reshape(-1) / D
    # linearised contributions (W_i - pi_i)(Y_j - pi_j) per respondent; multinomial covariance (divisor n)
    g = ((W - pw)[:, :, None] * (Y - py)[:, None, :]).reshape(n, -1)
    sigma = np.cov(g, rowvar=False, bias=True)
    M = sigma / D[:, None]
    lam = np.real(np.linalg.eigvals(M))
    IJ = I * J
    X2 = float(X2ij.sum())
    s1, s2 = float(lam.sum()), float((lam ** 2).sum())
    return {"statistic": X2, "pairStatistics": X2ij.reshape(I, J).tolist(), "df": IJ,
            "sumEigenvalues": s1, "sumSquaredEigenvalues": s2,
            "firstOrder": {"statistic": X2 * IJ / s1, "df": IJ, "pValue": f(stats.chi2.sf(X2 * IJ / s1, IJ))},
            "secondOrder": {"statistic": X2 * IJ / s2, "df": IJ * IJ / s2, "pValue": f(stats.chi2.sf(X2 * IJ / s2, IJ * IJ / s2))}}


def mmi(groups, Y):
    """MMI for one single-response and one multiple-response variable (Bilder, Loughin & Nettleton 2000, Appendix A)."""
    Y = np.asarray(Y, dtype=float)
    groups = np.asarray(groups)
    levels = sorted(set(groups.tolist()))
    r, c = len(levels), Y.shape[1]
    n = len(Y)
    ni = np.array([(groups == g).sum() for g in levels], dtype=float)
    a = ni / n
    pij = np.array([Y[groups == g].mean(0) for g in levels])  # r x c
    pbar = Y.mean(0)
    X2j = np.array([sum(ni[i] * (pij[i, j] - pbar[j]) ** 2 for i in range(r)) / (pbar[j] * (1 - pbar[j])) for j in range(c)])
    # Sigma = H B H', B = blockdiag_i (1/a_i) Cov_i(Y) (divisor n_i), H: pi_ij -> pi_ij - sum_i' a_i' pi_i'j
    B = np.zeros((r * c, r * c))
    for i, g in enumerate(levels):
        B[i * c:(i + 1) * c, i * c:(i + 1) * c] = np.cov(Y[groups == g], rowvar=False, bias=True) / a[i]
    H = np.eye(r * c) - np.kron(np.ones((r, r)) @ np.diag(a), np.eye(c))
    sigma = H @ B @ H.T
    D = np.kron(1 / a, pbar * (1 - pbar))
    lam = np.real(np.linalg.eigvals(sigma / D[:, None]))
    m = (r - 1) * c
    X2 = float(X2j.sum())
    s1, s2 = float(lam.sum()), float((lam ** 2).sum())
    # each item's r x 2 Pearson statistic, checked against scipy too
    scipy_items = [float(stats.chi2_contingency(np.array([[((groups == g) & (Y[:, j] == 1)).sum(), ((groups == g) & (Y[:, j] == 0)).sum()] for g in levels]), correction=False)[0]) for j in range(c)]
    return {"statistic": X2, "itemStatistics": X2j.tolist(), "itemStatisticsScipy": scipy_items, "df": m,
            "sumEigenvalues": s1, "sumSquaredEigenvalues": s2,
            "firstOrder": {"statistic": X2 * m / s1, "df": m, "pValue": f(stats.chi2.sf(X2 * m / s1, m))},
            "secondOrder": {"statistic": X2 * m / s2, "df": m * m / s2, "pValue": f(stats.chi2.sf(X2 * m / s2, m * m / s2))}}


def yes(col):
    return (api[col] == "Yes").astype(int).values


items = ["sch.wide", "comp.imp", "awards", "yr.rnd"]
api_items = np.column_stack([yes(c) for c in items])
mmi_case = {"name": "API stratified sample: school type x targets and programmes (sch.wide, comp.imp, awards, yr.rnd)",
            "groups": api.stype.map({"E": 0, "M": 1, "H": 2}).tolist(), "items": api_items.tolist(), "itemNames": items,
            **mmi(api.stype.map({"E": 0, "M": 1, "H": 2}).values, api_items)}
W = np.column_stack([yes("sch.wide"), yes("comp.imp")])
Y = np.column_stack([yes("awards"), yes("yr.rnd")])
spmi_case = {"name": "API stratified sample: growth targets met (sch.wide, comp.imp) x (awards, yr.rnd)",
             "W": W.tolist(), "Y": Y.tolist(), **spmi(W, Y)}

# ---- Welch t from summary statistics ---------------------------------------------------------
welch = []
for weighted in (False, True):
    groups = []
    for stype in ("E", "M", "H"):
        sub = api[api.stype == stype]
        x = sub.api00.values.astype(float)
        # weights that vary within a column: pw times enrolment (pupil-weighted means), so the Kish base is below n
        w = (sub.pw * sub.enroll).values.astype(float) if weighted else np.ones(len(sub))
        mean = float(np.sum(w * x) / np.sum(w))
        neff = kish(w)
        # weighted sd on the effective base: sqrt(sum w (x - mean)^2 / sum w * neff / (neff - 1)) (common practice)
        sd = float(math.sqrt(np.sum(w * (x - mean) ** 2) / np.sum(w) * neff / (neff - 1)))
        groups.append({"label": stype, "mean": mean, "sd": sd, "n": neff})
    pairs = []
    for a in range(3):
        for b in range(a + 1, 3):
            ga, gb = groups[a], groups[b]
            res = stats.ttest_ind_from_stats(ga["mean"], ga["sd"], ga["n"], gb["mean"], gb["sd"], gb["n"], equal_var=False)
            va, vb = ga["sd"] ** 2 / ga["n"], gb["sd"] ** 2 / gb["n"]
            df = (va + vb) ** 2 / (va ** 2 / (ga["n"] - 1) + vb ** 2 / (gb["n"] - 1))
            pairs.append({"a": a, "b": b, "t": f(res.statistic), "pValue": f(res.pvalue), "df": df})
    welch.append({"name": f"API stratified sample: API 2000 score by school type ({'weighted by pw x enrolment, Kish effective base' if weighted else 'unweighted'})",
                  "groups": groups, "pairs": pairs})

OUT.parent.mkdir(parents=True, exist_ok=True)
OUT.write_text(json.dumps({
    "recordedWith": {"python": sys.version.split()[0], "numpy": np.__version__, "scipy": scipy.__version__,
                      "statsmodels": statsmodels.__version__, "pandas": pd.__version__, "R": r_version()},
    "noThreeWay": no_three_way,
    "equalOdds": equal_odds,
    "oddsRatioTrend": odds_ratio_trend,
    "layerTrend": layer_trend_cases,
    "marginDrift": margin_drift,
    "columnProportions": column_cases,
    "multipleResponse": {"groups": mmi_case, "pairs": spmi_case},
    "welch": welch,
}, indent=1) + "\n")
print(f"wrote {OUT}")
