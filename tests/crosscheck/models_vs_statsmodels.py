#!/usr/bin/env python3
"""Cross-check the model-building flags of `plumb fit` (JSON) against statsmodels and scipy.

Reference libraries (pinned in requirements.txt):
* statsmodels 0.14.4 OLS on the same design matrix built here (intercept, predictors, an
  indicator per non-reference level, the first predictor times each indicator): estimates,
  standard errors, t, p, intervals, R², adjusted R², σ̂, AIC, BIC;
* statsmodels `anova_lm` (parallel lines against separate lines: equal slopes; one line
  against separate lines: common line) and `RegressionResults.compare_f_test` for
  `--compare-without`; `RegressionResults.t_test` for each group's own slope;
* the response and predictors transformed with numpy 2.1.3 before the OLS fit;
* p-values below 1e-10 are compared as ln p (their relative error is about t² times that of
  t, whoever computes them);
* Box–Cox λ: the profile log-likelihood ℓ(λ) = −(n/2)·ln(RSS(λ)/n) + (λ − 1)·Σ ln y with RSS
  from numpy's lstsq, maximized by scipy 1.14.1 `optimize.minimize_scalar` (Brent, tolerance
  1e-12); the interval ends where ℓ falls ½χ²₁ (scipy `stats.chi2.ppf`) below its top, by
  `optimize.brentq`. λ and the ends must agree to 1e-6.

Cases: several levels with different slopes, a chosen and a default reference level, missing
cells (in the response, a predictor and the grouping column), and a hidden offset (x in
[1000, 1001]). Every field must agree to 1e-9 relative (λ: 1e-6 absolute). Larger offsets
(x = 1e4 + a spread of 0.01) are checked against exact rational arithmetic in tests/exact.rs,
where statsmodels itself keeps only about eight digits.

Usage: models_vs_statsmodels.py PATH_TO_PLUMB
Prints one line per case and closes with 'N passed, M failed'; exits 1 on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import optimize, stats
from statsmodels.stats.anova import anova_lm

from tally import Tally

TALLY = Tally()
LAMBDA_TOL = 1e-6


def make_table(rng, n, levels, offset, missing):
    site = rng.choice(levels, size=n)
    spread = 0.1 if offset else 1.0
    x = offset + rng.uniform(0.0, 10.0, size=n) * spread
    z = rng.normal(size=n) * 3.0 + 1.0
    slopes = {lv: 1.0 + 0.4 * k for k, lv in enumerate(levels)}
    shifts = {lv: 2.0 * k for k, lv in enumerate(levels)}
    xs = (x - offset) / spread
    y = np.array([20.0 + shifts[s] + slopes[s] * v for s, v in zip(site, xs)]) + 0.5 * z + rng.normal(scale=0.8, size=n)
    cols = {"y": y, "x": x, "z": z, "site": site.astype(object)}
    holes = {}
    if missing:
        for name in cols:
            holes[name] = set(int(r) for r in rng.choice(n, size=max(1, n // 20), replace=False))
    return cols, holes


def write_csv(path, cols, holes):
    names = list(cols)
    n = len(cols["y"])
    with open(path, "w", encoding="utf-8") as f:
        f.write(",".join(names) + "\n")
        for i in range(n):
            cells = []
            for name in names:
                if i in holes.get(name, ()):
                    cells.append("NA")
                elif name == "site":
                    cells.append(str(cols[name][i]))
                else:
                    cells.append(repr(float(cols[name][i])))
            f.write(",".join(cells) + "\n")


def used_rows(cols, holes, needed):
    n = len(cols["y"])
    return [i for i in range(n) if not any(i in holes.get(c, ()) for c in needed)]


def design(cols, keep, xnames, x_transform, group, reference, separate):
    """The design matrix and term names, coded as plumb codes them."""
    names = ["intercept"]
    columns = [np.ones(len(keep))]
    for x in xnames:
        v = cols[x][keep].astype(float)
        t = x_transform.get(x)
        if t == "sqrt":
            v = np.sqrt(v)
            names.append(f"sqrt({x})")
        elif t == "ln":
            v = np.log(v)
            names.append(f"ln({x})")
        else:
            names.append(x)
        columns.append(v)
    if group:
        g = cols[group][keep]
        levels = sorted(set(g))
        ref = reference or levels[0]
        others = [lv for lv in levels if lv != ref]
        for lv in others:
            names.append(f"{group}={lv}")
            columns.append((g == lv).astype(float))
        if separate:
            for lv in others:
                names.append(f"{names[1]}×{group}={lv}")
                columns.append(columns[1] * (g == lv))
    return np.column_stack(columns), names


def close(a, b, field):
    """A p-value's relative error grows with |t| (its tail's condition number, about t²
    times the relative error of t): below 1e-10 p-values are compared as ln p."""
    if field.endswith("p_value") or field.endswith(".p"):
        if a is not None and b is not None and 0 < a < 1e-10 and 0 < b < 1e-10:
            return TALLY.close(float(np.log(a)), float(np.log(b)), field + " (ln)")
    return TALLY.close(a, b, field)


def compare_fit(got, res, names, level):
    problems = []
    terms = [c["term"] for c in got["coefficients"]]
    if terms != names:
        return [f"terms {terms} vs {names}"]
    ci = res.conf_int(alpha=1.0 - level)
    for j, c in enumerate(got["coefficients"]):
        for field, want in [("estimate", res.params[j]), ("std_error", res.bse[j]), ("t", res.tvalues[j]),
                            ("p_value", res.pvalues[j]), ("ci_low", ci[j, 0]), ("ci_high", ci[j, 1])]:
            if not close(c[field], float(want), field):
                problems.append(f"{c['term']}.{field}: plumb {c[field]!r} vs statsmodels {want!r}")
    for key, want in [("r_squared", res.rsquared), ("adj_r_squared", res.rsquared_adj),
                      ("residual_std_error", np.sqrt(res.scale)), ("aic", res.aic), ("bic", res.bic)]:
        if not close(got[key], float(want), key):
            problems.append(f"{key}: plumb {got[key]!r} vs statsmodels {want!r}")
    return problems


def compare_test(got, want_f, want_p, df_num, field):
    problems = []
    if got["df_num"] != df_num:
        problems.append(f"{field}.df_num {got['df_num']} vs {df_num}")
    if not close(got["f_statistic"], float(want_f), f"{field}.F"):
        problems.append(f"{field}.F: plumb {got['f_statistic']!r} vs statsmodels {want_f!r}")
    if not close(got["p_value"], float(want_p), f"{field}.p"):
        problems.append(f"{field}.p: plumb {got['p_value']!r} vs statsmodels {want_p!r}")
    return problems


def group_checks(got, y, cols, keep, case):
    """Equal slopes and common line by anova_lm; each group's slope by t_test."""
    X_sep, names = design(cols, keep, case["x"], {}, "site", case["reference"], True)
    X_par, _ = design(cols, keep, case["x"], {}, "site", case["reference"], False)
    X_one, _ = design(cols, keep, case["x"], {}, None, None, False)
    sep, par, one = (sm.OLS(y, X).fit() for X in (X_sep, X_par, X_one))
    problems = []
    a = anova_lm(par, sep)
    problems += compare_test(got["groups"]["equal_slopes"], a["F"][1], a["Pr(>F)"][1], int(a["df_diff"][1]), "equal_slopes")
    a = anova_lm(one, sep)
    problems += compare_test(got["groups"]["common_line"], a["F"][1], a["Pr(>F)"][1], int(a["df_diff"][1]), "common_line")
    for k, row in enumerate(got["groups"]["table"]):
        c = np.zeros(len(names))
        c[1] = 1.0
        if k > 0:
            c[names.index(f"x×site={row['level']}")] = 1.0
        t = sep.t_test(c)
        ci = t.conf_int(alpha=0.05)[0]
        for field, want in [("slope", t.effect[0]), ("std_error", t.sd[0, 0]), ("ci_low", ci[0]), ("ci_high", ci[1])]:
            if not close(row[field], float(want), f"group.{field}"):
                problems.append(f"group {row['level']}.{field}: plumb {row[field]!r} vs statsmodels {want!r}")
    return problems


def boxcox_reference(y, X, level):
    sum_ln = np.sum(np.log(y))
    n = len(y)

    def llf(lam):
        ty = np.log(y) if abs(lam) < 1e-12 else (y ** lam - 1.0) / lam
        beta, *_ = np.linalg.lstsq(X, ty, rcond=None)
        rss = float(np.sum((ty - X @ beta) ** 2))
        return -0.5 * n * np.log(rss / n) + (lam - 1.0) * sum_ln

    best = optimize.minimize_scalar(lambda l: -llf(l), bracket=(-2.0, 2.0), method="brent", tol=1e-12)
    lam = float(best.x)
    target = llf(lam) - 0.5 * stats.chi2.ppf(level, 1)
    lo = optimize.brentq(lambda l: llf(l) - target, lam - 10.0, lam, xtol=1e-12)
    hi = optimize.brentq(lambda l: llf(l) - target, lam, lam + 10.0, xtol=1e-12)
    return lam, lo, hi


def run_case(plumb, path, cols, holes, case):
    needed = ["y"] + case["x"] + (["site"] if case["group"] else [])
    keep = used_rows(cols, holes, needed)
    args = [plumb, "fit", path, "--y", "y", "--format", "json"]
    for x in case["x"]:
        args += ["--x", x]
    if case["group"]:
        args += ["--group", "site"]
        if case["reference"]:
            args += ["--reference", case["reference"]]
        if case["separate"]:
            args.append("--separate-slopes")
    for x, t in case["x_transform"].items():
        args += ["--transform", f"{x}={t}"]
    if case["y_transform"]:
        args += ["--transform-y", case["y_transform"]]
    if case["compare_without"]:
        args += ["--compare-without", case["compare_without"]]
    run = subprocess.run(args, capture_output=True, text=True)
    if run.returncode != 0:
        return [f"plumb exited {run.returncode}: {run.stderr.strip()}"]
    got = json.loads(run.stdout)
    y = cols["y"][keep].astype(float)
    X, names = design(cols, keep, case["x"], case["x_transform"], case["group"] and "site", case["reference"], case["separate"])
    problems = []
    if case["y_transform"] == "ln":
        y = np.log(y)
    elif case["y_transform"] == "box-cox":
        lam, lo, hi = boxcox_reference(y, X, 0.95)
        b = got["box_cox"]
        for field, want in [("lambda", lam), ("ci_low", lo), ("ci_high", hi)]:
            TALLY.note(f"box_cox.{field} (absolute)", abs(b[field] - want))
            if abs(b[field] - want) > LAMBDA_TOL:
                problems.append(f"box_cox.{field}: plumb {b[field]!r} vs scipy {want!r}")
        ours = b["lambda"]
        y = np.log(y) if abs(ours) < 1e-12 else (y ** ours - 1.0) / ours
    res = sm.OLS(y, X).fit()
    problems += compare_fit(got, res, names, 0.95)
    if case["group"]:
        problems += group_checks(got, cols["y"][keep].astype(float) if not case["y_transform"] else y, cols, keep, case)
    if case["compare_without"]:
        drop = case["compare_without"]
        keep_cols = [j for j, nm in enumerate(names) if not (nm == drop or nm.startswith(f"{drop}=") or (drop == "slopes" and "×" in nm) or f"×{drop}=" in nm)]
        small = sm.OLS(y, X[:, keep_cols]).fit()
        f, p, df = res.compare_f_test(small)
        problems += compare_test(got["comparison"]["partial_f"], f, p, int(df), "compare_f_test")
    return problems


def cases():
    base = {"x": ["x"], "group": False, "reference": None, "separate": False, "x_transform": {},
            "y_transform": None, "compare_without": None, "offset": 0.0, "missing": False}
    yield "separate slopes, default reference", {**base, "group": True, "separate": True}
    yield "separate slopes, reference C, missing cells", {**base, "group": True, "separate": True, "reference": "C", "missing": True}
    yield "parallel lines, two predictors", {**base, "x": ["x", "z"], "group": True}
    yield "parallel lines, hidden offset 1e3", {**base, "group": True, "offset": 1e3}
    yield "separate slopes, hidden offset 1e3, missing cells", {**base, "group": True, "separate": True, "offset": 1e3, "missing": True}
    yield "compare without the separate slopes", {**base, "group": True, "separate": True, "compare_without": "slopes"}
    yield "compare without a predictor", {**base, "x": ["x", "z"], "compare_without": "z"}
    yield "compare without the grouping", {**base, "group": True, "compare_without": "site"}
    yield "ln response, sqrt predictor", {**base, "x_transform": {"x": "sqrt"}, "y_transform": "ln"}
    yield "Box-Cox response", {**base, "y_transform": "box-cox"}
    yield "Box-Cox response, two predictors, missing cells", {**base, "x": ["x", "z"], "y_transform": "box-cox", "missing": True}


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    print(f"reference: statsmodels {statsmodels.__version__}, scipy {scipy.__version__}, numpy {np.__version__}")
    rng = np.random.default_rng(20261203)
    with tempfile.TemporaryDirectory() as tmp:
        for idx, (label, case) in enumerate(cases()):
            cols, holes = make_table(rng, 150, ["A", "B", "C"], case["offset"], case["missing"])
            path = os.path.join(tmp, f"model{idx}.csv")
            write_csv(path, cols, holes)
            TALLY.record(f"case {idx:2d}: {label}", run_case(plumb, path, cols, holes, case))
    TALLY.finish()


if __name__ == "__main__":
    main()
