#!/usr/bin/python3
"""Records reference values for `tabsight banner`, run through the command.

Run with Debian's system python3 and R (all from apt):

    apt-get install -y python3-scipy python3-statsmodels python3-numpy python3-pandas \
        r-base-core r-cran-survey
    /usr/bin/python3 scripts/record_banner_reference.py

It writes two files:
  fixtures/reference/banner-api.csv   the California Academic Performance Index
        schools, stratified sample (R package survey, data set api: apistrat;
        Debian r-cran-survey), read through Rscript: one line per school with
        school type, an enrolment band (thirds of enroll), the four yes/no
        targets and programmes (sch.wide, comp.imp, awards, yr.rnd) as columns
        and as one ';'-separated column, the API 2000 score, the sampling
        weight pw and a pupil weight pw x enroll (weights that vary within a
        column, so that Kish's effective base is below n).
  fixtures/reference/banner-api.json  the values the banner must give on that file:
    columnTests   statsmodels.stats.proportion.proportions_ztest (pooled), per
                  answer and pair of columns, unweighted and with the pupil weight
                  on Kish's effective bases (weighted share x effective base)
    chiSquare     scipy.stats.chi2_contingency(correction=False) of answer x break
    welch         scipy.stats.ttest_ind_from_stats(equal_var=False) of api00, with
                  weighted means and SDs sqrt(sum w(x-m)^2/sum w * ne/(ne-1)) and ne as n
    multiple      Bilder, Loughin & Nettleton (2000) multiple marginal independence:
                  numpy evaluation of Appendix A (Sigma = H B H', eigenvalues of D^-1 Sigma),
                  first- and second-order Rao-Scott-type referrals with scipy.stats.chi2.sf;
                  unweighted, and with the pupil weight by the rule tabsight states (each
                  respondent counts w x n_eff / sum w, Kish's effective size of the break's
                  respondents; shares and answer covariances weighted, numpy.average and
                  numpy.cov(aweights=...)): an independent evaluation of that rule, which is
                  common practice (as pair rescales a weighted table), not a published test
    bases         unweighted, weighted and effective bases per column (numpy)
"""
import io
import json
import subprocess
from pathlib import Path

import numpy as np
import pandas as pd
import scipy
import scipy.linalg
import statsmodels
from scipy import stats
from statsmodels.stats.proportion import proportions_ztest

ROOT = Path(__file__).resolve().parent.parent
CSV = ROOT / "fixtures" / "reference" / "banner-api.csv"
OUT = ROOT / "fixtures" / "reference" / "banner-api.json"

text = subprocess.run(["Rscript", "-e", "data(api, package = 'survey'); write.csv(apistrat, stdout(), row.names = FALSE)"],
                      check=True, capture_output=True, text=True).stdout
api = pd.read_csv(io.StringIO(text))
r_version = subprocess.run(["Rscript", "-e", "cat(R.version.string)"], check=True, capture_output=True, text=True).stdout

frame = pd.DataFrame({
    "school": api["cds"].astype(str),
    "stype": api["stype"],
    "size_band": pd.qcut(api["enroll"], 3, labels=["small", "middle", "large"]).astype(str),
    "sch_wide": api["sch.wide"],
    "comp_imp": api["comp.imp"],
    "awards": api["awards"],
    "yr_rnd": api["yr.rnd"],
    "api00": api["api00"],
    "pw": api["pw"],
    "pupil_weight": api["pw"] * api["enroll"],
})
ITEMS = ["sch_wide", "comp_imp", "awards", "yr_rnd"]
# a school with none of the four writes a lone separator: in the base, no answer chosen
frame["programmes"] = [";".join(i for i in ITEMS if row[i] == "Yes") or ";" for _, row in frame.iterrows()]
frame.to_csv(CSV, index=False, lineterminator="\n")


def natural(levels):
    return sorted(levels, key=str)


def kish(w):
    w = np.asarray(w, dtype=float)
    return float(w.sum() ** 2 / (w ** 2).sum())


def column_tests(question, answer, brk, weight=None):
    levels = natural(frame[brk].unique())
    cols = []
    for level in levels:
        sub = frame[frame[brk] == level]
        w = np.ones(len(sub)) if weight is None else sub[weight].to_numpy(float)
        chosen = (sub[question] == answer).to_numpy()
        base = float(w.sum())
        ne = float(len(sub)) if weight is None else kish(w)
        share = float(w[chosen].sum()) / base
        cols.append({"level": level, "count": float(w[chosen].sum()), "base": base, "effectiveBase": ne, "unweightedBase": int(len(sub)), "share": share})
    pairs = []
    for a in range(len(cols)):
        for b in range(a + 1, len(cols)):
            ca, cb = cols[a], cols[b]
            z, p = proportions_ztest([ca["share"] * ca["effectiveBase"], cb["share"] * cb["effectiveBase"]], [ca["effectiveBase"], cb["effectiveBase"]])
            pairs.append({"a": a, "b": b, "z": float(z), "pValue": float(p)})
    return {"question": question, "answer": answer, "break": brk, "weight": weight, "columns": cols, "pairs": pairs}


def chi_square(question, brk):
    table = pd.crosstab(frame[question], frame[brk]).reindex(index=natural(frame[question].unique()), columns=natural(frame[brk].unique()))
    stat, p, df, _ = stats.chi2_contingency(table.to_numpy(), correction=False)
    return {"question": question, "break": brk, "counts": table.to_numpy().tolist(), "statistic": float(stat), "df": int(df), "pValue": float(p)}


def welch(brk, weight=None):
    levels = natural(frame[brk].unique())
    groups = []
    for level in levels:
        sub = frame[frame[brk] == level]
        x = sub["api00"].to_numpy(float)
        w = np.ones(len(x)) if weight is None else sub[weight].to_numpy(float)
        m = float((w * x).sum() / w.sum())
        ne = float(len(x)) if weight is None else kish(w)
        sd = float(np.sqrt((w * (x - m) ** 2).sum() / w.sum() * ne / (ne - 1)))
        groups.append({"level": level, "mean": m, "sd": sd, "n": ne})
    pairs = []
    for a in range(len(groups)):
        for b in range(a + 1, len(groups)):
            ga, gb = groups[a], groups[b]
            t, p = stats.ttest_ind_from_stats(ga["mean"], ga["sd"], ga["n"], gb["mean"], gb["sd"], gb["n"], equal_var=False)
            pairs.append({"a": a, "b": b, "t": float(t), "pValue": float(p)})
    return {"break": brk, "weight": weight, "groups": groups, "pairs": pairs}


def mmi(brk, weight=None):
    """Appendix A of Bilder, Loughin & Nettleton (2000): the covariance of the group shares is
    H B H' with B the block diagonal of each group's answer covariance over its share of n;
    the referrals use the sum and the sum of squares of the eigenvalues of D^-1 Sigma.
    With a weight, each respondent counts w * n_eff / sum(w) (n the Kish effective size)."""
    levels = natural(frame[brk].unique())
    answers = np.column_stack([(frame[i] == "Yes").to_numpy(float) for i in ITEMS])
    c = answers.shape[1]
    w = np.ones(len(frame)) if weight is None else frame[weight].to_numpy(float)
    if weight is not None:
        w = w * kish(w) / w.sum()
    n = w.sum()
    r = len(levels)
    members = [(frame[brk] == g).to_numpy() for g in levels]
    share = np.array([w[m].sum() / n for m in members])
    within = [np.average(answers[m], axis=0, weights=w[m]) for m in members]
    overall = np.average(answers, axis=0, weights=w)
    statistic = 0.0
    for g in range(r):
        statistic += float(n * share[g] * (((within[g] - overall) ** 2) / (overall * (1 - overall))).sum())
    blocks = [np.cov(answers[m].T, aweights=w[m], bias=True) / share[g] for g, m in enumerate(members)]
    B = scipy.linalg.block_diag(*blocks)
    centring = np.eye(r) - np.outer(np.ones(r), share)
    H = np.kron(centring, np.eye(c))
    sigma = H @ B @ H.T
    scale = np.concatenate([overall * (1 - overall) / share[g] for g in range(r)])
    eigenvalues = np.linalg.eigvals(np.diag(1 / scale) @ sigma).real
    m = (r - 1) * c
    s1, s2 = float(eigenvalues.sum()), float((eigenvalues ** 2).sum())
    first, second = statistic * m / s1, statistic * m / s2
    return {"break": brk, "weight": weight, "statistic": statistic, "df": m,
            "firstOrder": {"statistic": first, "df": m, "pValue": float(stats.chi2.sf(first, m))},
            "secondOrder": {"statistic": second, "df": m * m / s2, "pValue": float(stats.chi2.sf(second, m * m / s2))}}


def bases(brk, weight):
    out = []
    for level in natural(frame[brk].unique()):
        w = frame.loc[frame[brk] == level, weight].to_numpy(float)
        out.append({"level": level, "unweighted": int(len(w)), "weighted": float(w.sum()), "effective": kish(w)})
    return out


reference = {
    "recordedWith": {"python": ".".join(map(str, __import__("sys").version_info[:3])), "numpy": np.__version__, "scipy": scipy.__version__,
                     "statsmodels": statsmodels.__version__, "pandas": pd.__version__, "R": r_version},
    "source": "R package survey, data set api (apistrat): California Academic Performance Index, stratified sample of 200 schools",
    "columnTests": [column_tests(q, "Yes", brk, w) for q in ["sch_wide", "awards"] for brk in ["stype", "size_band"] for w in [None, "pupil_weight"]],
    "chiSquare": [chi_square(q, brk) for q in ["sch_wide", "awards"] for brk in ["stype", "size_band"]],
    "welch": [welch("stype", w) for w in [None, "pupil_weight"]],
    "multiple": [mmi(brk, w) for brk in ["stype", "size_band"] for w in [None, "pupil_weight"]],
    "bases": {"stype": bases("stype", "pupil_weight"), "size_band": bases("size_band", "pupil_weight")},
}
OUT.write_text(json.dumps(reference, indent=1) + "\n")
print(f"wrote {CSV.relative_to(ROOT)} and {OUT.relative_to(ROOT)}")
