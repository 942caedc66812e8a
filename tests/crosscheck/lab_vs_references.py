#!/usr/bin/env python3
"""Cross-check the laboratory side of Plumbline (JSON) against numpy, scipy and statsmodels:
the residual checks of `plumb fit` (`checks`), fits weighted by a rule, `plumb calibrate` and
`plumb agree`, on seeded random data and the demo files trace-copper.csv, calibration-run.csv
and chlorine-meters.csv.

Reference libraries (pinned in requirements.txt, versions printed at start): numpy 2.1.3,
scipy 1.14.1, statsmodels 0.14.4, pandas 2.2.3 (reads the demo files). Every field agrees to
1e-9 relative unless said below; p-values below 1e-10 are compared as ln p.

1. `checks` of `plumb fit`, on the residuals eᵢ·√wᵢ of statsmodels OLS/WLS on the same design:
   * spread: statsmodels `het_breuschpagan(e, [1, fitted], robust=True)` (Koenker's LM);
   * sequence (with --order; `null` without): statsmodels `durbin_watson` of the residuals
     sorted by the order column (numpy stable argsort: ties keep file order); the runs of signs
     about zero (Wald–Wolfowitz, μ = 2n₊n₋/n + 1, σ² = 2n₊n₋(2n₊n₋ − n)/(n²(n − 1)), no
     continuity correction, p from scipy `norm.sf`), an independent re-implementation in numpy;
   * normality, n ≤ 5000: scipy `stats.shapiro`, W to 1e-9 and p to 1e-6 relative (ln p below
     1e-10, also 1e-6). scipy runs the same AS R94 algorithm, but measured against an exact
     evaluation its W is off by up to ~3e-9 on heavy-tailed samples of n ≥ 500 and its p by up
     to ~1e-6 at n = 5000 (the cases here stay below 1e-9 in W). Beside it, AS R94 evaluated
     here in double precision (scores from scipy `special.ndtri`, the published constants):
     W to 1e-12, p to 1e-10;
   * normality, n > 5000: statsmodels `normal_ad`, like with like — the plain A² (neither
     reports the small-sample factor) and the D'Agostino–Stephens p of A*² = A²(1 + 0.75/n +
     2.25/n²). normal_ad forms ln(1 − Φ(z)) as log1p(−Φ(z)), which loses digits in the upper
     tail (∞ in the lognormal case), so its A² is used while max|z| ≤ 4.5; A² is always also
     compared with the same sum evaluated with scipy `norm.logcdf`/`logsf`. normal_ad's p formula
     covers A*² ≤ 13; above, it returns 0, meaning (its comment) p < 4.95e-31: plumb's p must
     then be below that bound;
   * `flagged`: the topics whose reference p is below 0.05 or whose Durbin–Watson d is outside
     [1.5, 2.5] (plumb's thresholds: common practice, no source).
2. Weighted fits (--weighting 1/x, 1/x2, 1/y2, 1/s2, --weights COL; 1/s2 = the inverse sample
   variance, ddof 1, of the readings at each distinct x, in numpy): statsmodels WLS estimates,
   SEs, t, p, intervals, R², adjusted R², σ̂, log-likelihood, AIC, BIC. Plumb's weighted
   definitions are statsmodels' WLS ones, so statsmodels serves directly: R² = 1 − Σwe²/
   Σw(y − ȳ_w)², R²_adj = 1 − (1 − R²)(n − 1)/(n − p), ℓ = −(n/2)(ln 2π + ln(Σwe²/n) + 1) +
   ½Σ ln w, AIC = −2ℓ + 2p, BIC = −2ℓ + p ln n.
3. `plumb calibrate`: coefficients, R², σ̂ (statsmodels); `lack_of_fit` against statsmodels
   `anova_lm(curve, cell means)`, the cell-means model OLS/WLS on one indicator per distinct x.
   Each unknown: x̂ = (ȳ₀ − a)/b (a quadratic: numpy `roots`, one Newton step); the first-order
   SE, for an unweighted line the textbook (s/|b|)·√(1/m + 1/n + (ȳ₀ − ȳ)²/(b²Sxx)), otherwise
   √(s²/(m·w(x̂)) + gᵀΣg)/|f′(x̂)|, in numpy from statsmodels' params, cov_params and scale;
   for an unweighted line the exact interval from Fieller's quadratic solved in numpy (an
   independent implementation), 1e-9; for a 1/x2 line (w(x) = 1/x²) or a quadratic, a
   brute-force numpy inversion of (ȳ₀ − f(x))² ≤ t²(s²/(m·w(x)) + g(x)ᵀΣg(x)) on a grid over
   plumb's search domain (the standards' range widened by its width each side), ends bisected,
   1e-6. Limits 3.3σ/|b| and 10σ/|b|, σ the residual SD (s/√w_low when weighted, w_low the mean
   weight at the lowest standard, as plumb defines it) or the intercept's SE.
4. `plumb agree`: bias, SD, limits bias ± z·sd (z = scipy `norm.ppf(0.975)`), their intervals
   (bias ± t_{n−1}·sd/√n, limit ± t_{n−1}·sd·√(3/n), scipy t) in numpy; the proportional-bias
   regression of d on the means (statsmodels OLS); Passing–Bablok by a brute-force numpy
   implementation written here from the published method (pairwise slopes i < j, identical
   points and slopes of exactly −1 dropped, equal-x pairs ±∞, K slopes below −1, shifted
   median, C = z·√(n(n−1)(2n+5)/18), M₁ = (N − C)/2 rounded half away from zero,
   M₂ = N − M₁ + 1), 1e-12, slope counts exactly; Deming's closed form with λ, its jackknife
   SEs and t_{n−2} intervals in numpy.

Usage: lab_vs_references.py PATH_TO_PLUMB
Prints one line per case and closes with 'N passed, M failed'; exits 1 on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import pandas as pd
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import special, stats
from statsmodels.stats.anova import anova_lm
from statsmodels.stats.diagnostic import het_breuschpagan, normal_ad
from statsmodels.stats.stattools import durbin_watson

from tally import TINY, Tally

TALLY = Tally()
RTOL = 1e-9
SW_P_RTOL = 1e-6          # scipy's p of Shapiro–Wilk (see the docstring)
R94_W_RTOL, R94_P_RTOL = 1e-12, 1e-10  # AS R94 evaluated here in double precision
BAND_RTOL = 1e-6          # grid + bisection inversion of the prediction band
PB_RTOL = 1e-12           # Passing–Bablok, brute force
AD_Z_MAX = 4.5            # normal_ad's ln(1 − Φ(z)) is good to ~3e-11 absolute up to here
AD_P_BOUND = float(np.exp(1.2937 - 5.709 * 13 + 0.0186 * 13**2))  # normal_ad's p at A*² = 13
DEMO = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "demo-scenarios", "data")


def close(a, b, key, rtol):
    if a is None or b is None:
        return a is None and b is None
    a, b = float(a), float(b)
    if key.endswith("p_value") and 0 < a < 1e-10 and 0 < b < 1e-10:
        a, b, key = float(np.log(a)), float(np.log(b)), key + " (ln)"
    if abs(a) < TINY and abs(b) < TINY:
        return True
    rel = abs(a - b) / max(abs(a), abs(b)) if a != b else 0.0
    TALLY.note(key, rel)
    return rel <= rtol


class Case:
    def __init__(self):
        self.problems = []

    def num(self, got, want, key, what=None, rtol=RTOL, ref="reference"):
        if not close(got, want, key, rtol):
            self.problems.append(f"{what or key}: plumb {got!r} vs {ref} {want if want is None else float(want)!r}")

    def same(self, got, want, what):
        if got != want:
            self.problems.append(f"{what}: plumb {got!r} vs expected {want!r}")


def record(label, check):
    case = Case()
    try:
        check(case)
    except Exception as e:  # a crash or a missing key fails the case, not the run
        case.problems.append(f"{type(e).__name__}: {e}")
    TALLY.record(label, case.problems)


def plumb_json(plumb, args):
    run = subprocess.run([plumb, *args, "--format", "json"], capture_output=True, text=True)
    if run.returncode != 0:
        raise RuntimeError(f"plumb exited {run.returncode}: {run.stderr.strip()}")
    return json.loads(run.stdout)


def write_csv(path, cols):
    names = list(cols)
    cells = [[repr(float(v)) if isinstance(v, float | np.floating) else str(v) for v in cols[c]] for c in names]
    with open(path, "w", encoding="utf-8") as f:
        f.write(",".join(names) + "\n" + "".join(",".join(row) + "\n" for row in zip(*cells)))
    return path


def rule_weights(rule, x, y):
    if rule != "1/s2":
        return {"1/x": lambda: 1.0 / x, "1/x2": lambda: 1.0 / (x * x), "1/y2": lambda: 1.0 / (y * y)}[rule]()
    levels = np.unique(x)
    return 1.0 / np.array([np.var(y[x == v], ddof=1) for v in levels])[np.searchsorted(levels, x)]


def wls(y, X, w):
    return (sm.OLS(y, X) if w is None else sm.WLS(y, X, weights=w)).fit()


# ---------------------------------------------------------------- 1. checks of the residuals

def shapiro_wilk_r94(v):
    """AS R94 (Royston 1995) in double precision: W and its p, evaluated here from the formulas."""
    poly = lambda c, t: sum(ck * t**k for k, ck in enumerate(c))
    x, n = np.sort(v), len(v)
    m = special.ndtri((np.arange(1, n // 2 + 1) - 0.375) / (n + 0.25))
    summ2, rsn = 2.0 * m @ m, 1.0 / np.sqrt(n)
    a1 = poly([0.0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056], rsn) - m[0] / np.sqrt(summ2)
    if n > 5:
        a2 = -m[1] / np.sqrt(summ2) + poly([0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633], rsn)
        a = -m / np.sqrt((summ2 - 2 * m[0] ** 2 - 2 * m[1] ** 2) / (1 - 2 * a1**2 - 2 * a2**2))
        a[:2] = a1, a2
    else:
        a = -m / np.sqrt((summ2 - 2 * m[0] ** 2) / (1 - 2 * a1**2))
        a[0] = a1
    w = min((a @ (x[::-1][: n // 2] - x[: n // 2])) ** 2 / np.sum((x - x.mean()) ** 2), 1.0)
    if n <= 11:
        z = (-np.log(-2.273 + 0.459 * n - np.log1p(-w)) - poly([0.544, -0.39978, 0.025054, -6.714e-4], n)) \
            / np.exp(poly([1.3822, -0.77857, 0.062767, -0.0020322], n))
    else:
        ln = np.log(n)
        z = (np.log1p(-w) - poly([-1.5861, -0.31082, -0.083751, 0.0038915], ln)) / np.exp(poly([-0.4803, -0.082676, 0.0030302], ln))
    return w, stats.norm.sf(z)


def sign_runs(e):
    """Wald–Wolfowitz runs of signs about zero, re-implemented here (no continuity correction)."""
    s = e[e != 0] > 0
    n, pos, neg = len(s), int(s.sum()), int((~s).sum())
    runs = 1 + int(np.count_nonzero(s[1:] != s[:-1]))
    mu = 2.0 * pos * neg / n + 1.0
    z = (runs - mu) / np.sqrt(2.0 * pos * neg * (2.0 * pos * neg - n) / (n * n * (n - 1.0)))
    return {"runs": runs, "positive": pos, "negative": neg, "expected": mu, "z": z, "p_value": 2 * stats.norm.sf(abs(z))}


def compare_checks(case, got, res, X, y, w, order=None):
    fitted = X @ res.params
    e = (y - fitted) * (1.0 if w is None else np.sqrt(w))
    flags = []
    lm, lm_p, _, _ = het_breuschpagan(e, np.column_stack([np.ones_like(fitted), fitted]), robust=True)
    sp = got["spread"]
    case.same((sp["test"], sp["against"], sp["df"]), ("breusch-pagan-studentized", "fitted values", 1), "spread test")
    case.num(sp["statistic"], lm, "checks.bp.statistic", ref="statsmodels")
    case.num(sp["p_value"], lm_p, "checks.bp.p_value", ref="statsmodels")
    flags += ["spread"] if lm_p < 0.05 else []
    if order is None:
        case.same(got["sequence"], None, "sequence")
    else:
        eo, seq = e[np.argsort(order[1], kind="stable")], got["sequence"]
        case.same(seq["column"], order[0], "sequence.column")
        dw, runs = durbin_watson(eo), sign_runs(eo)
        case.num(seq["durbin_watson"], dw, "checks.durbin_watson", ref="statsmodels")
        for k in ("runs", "positive", "negative"):
            case.same(seq["sign_runs"][k], runs[k], f"sign_runs.{k}")
        for k in ("expected", "z", "p_value"):
            case.num(seq["sign_runs"][k], runs[k], f"checks.runs.{k}", ref="numpy")
        flags += ["sequence"] if not 1.5 <= dw <= 2.5 or runs["p_value"] < 0.05 else []
    nm = got["normality"]
    if len(e) <= 5000:
        case.same(nm["test"], "shapiro-wilk", "normality.test")
        sw_w, sw_p = stats.shapiro(e)
        case.num(nm["statistic"], sw_w, "checks.shapiro.W", ref="scipy")
        case.num(nm["p_value"], sw_p, "checks.shapiro.p_value", rtol=SW_P_RTOL, ref="scipy")
        ex_w, ex_p = shapiro_wilk_r94(e)
        case.num(nm["statistic"], ex_w, "checks.shapiro.W (AS R94 numpy)", rtol=R94_W_RTOL, ref="numpy")
        case.num(nm["p_value"], ex_p, "checks.shapiro.p (AS R94 numpy)", rtol=R94_P_RTOL, ref="numpy")
        p = sw_p
    else:
        case.same(nm["test"], "anderson-darling", "normality.test")
        n, z = len(e), (np.sort(e) - e.mean()) / e.std(ddof=1)
        a2 = -n - np.sum((2 * np.arange(1, n + 1) - 1) / n * (stats.norm.logcdf(z) + stats.norm.logsf(z[::-1])))
        case.num(nm["statistic"], a2, "checks.anderson.A2 (numpy, exact tails)", ref="numpy/scipy")
        sm_a2, p = normal_ad(e)
        if np.abs(z).max() <= AD_Z_MAX:
            case.num(nm["statistic"], sm_a2, "checks.anderson.A2", ref="statsmodels")
        if a2 * (1 + 0.75 / n + 2.25 / n**2) <= 13:
            case.num(nm["p_value"], p, "checks.anderson.p_value", ref="statsmodels")
        elif not nm["p_value"] <= AD_P_BOUND:
            case.problems.append(f"normality.p_value: plumb {nm['p_value']!r} for A² {a2:.6g}; statsmodels normal_ad gives {p!r}, "
                                 f"meaning p < {AD_P_BOUND:.3g} once A²(1 + 0.75/n + 2.25/n²) > 13")
    flags += ["normality"] if p < 0.05 else []
    case.same(got["flagged"], flags, "flagged")
    return flags


def compare_fit(case, got, res, level=0.95):
    ci = res.conf_int(alpha=1.0 - level)
    case.same(len(got["coefficients"]), len(res.params), "number of coefficients")
    for j, c in enumerate(got["coefficients"]):
        for k, want in [("estimate", res.params[j]), ("std_error", res.bse[j]), ("t", res.tvalues[j]),
                        ("p_value", res.pvalues[j]), ("ci_low", ci[j, 0]), ("ci_high", ci[j, 1])]:
            case.num(c[k], want, f"fit.{k}", f"{c['term']}.{k}", ref="statsmodels")
    for k, want in [("r_squared", res.rsquared), ("adj_r_squared", res.rsquared_adj), ("residual_std_error", np.sqrt(res.scale)),
                    ("log_likelihood", res.llf), ("aic", res.aic), ("bic", res.bic)]:
        case.num(got[k], want, f"fit.{k}", ref="statsmodels")


def fit_case(plumb, path, cols, y_name, x_names, degree=1, rule=None, weights=None, order=None, must_flag=()):
    """`plumb fit` with its checks against statsmodels; `must_flag` topics must be flagged."""
    def check(case):
        args = ["fit", path, "--y", y_name, "--degree", str(degree)] + [a for xn in x_names for a in ("--x", xn)]
        for flag, value in (("--weighting", rule), ("--weights", weights), ("--order", order)):
            args += [flag, value] if value else []
        got = plumb_json(plumb, args)
        y = np.asarray(cols[y_name], float)
        xs = [np.asarray(cols[xn], float) for xn in x_names]
        X = np.column_stack([np.ones_like(y)] + [xs[0] ** k for k in range(1, degree + 1)] + xs[1:])
        w = rule_weights(rule, xs[0], y) if rule else (np.asarray(cols[weights], float) if weights else None)
        case.same((got["weight_rule"], got["weights"]), (rule, weights), "weight_rule, weights")
        res = wls(y, X, w)
        compare_fit(case, got, res)
        flags = compare_checks(case, got["checks"], res, X, y, w, (order, np.asarray(cols[order], float)) if order else None)
        for topic in must_flag:
            if topic not in flags or topic not in got["checks"]["flagged"]:
                case.problems.append(f"the data were made to flag {topic}: plumb flags {got['checks']['flagged']}, reference {flags}")
    return check


# ---------------------------------------------------------------- 3. calibration

def band_by_grid(h, x0, domain):
    """The stretch around x0 where h ≤ 0: a grid of 400 001 points over the domain, each end
    refined by 200 bisections; None for an end that runs past the domain."""
    grid = np.linspace(min(domain[0], x0), max(domain[1], x0), 400_001)
    out = np.flatnonzero(h(grid) > 0)
    k = np.searchsorted(grid, x0)
    ends = []
    for at in (out[out < k][-1:], out[out >= k][:1]):
        if not len(at):
            ends.append(None)
            continue
        a, b = sorted((grid[at[0]], grid[at[0] + (1 if at[0] < k else -1)]))
        for _ in range(200):
            mid = 0.5 * (a + b)
            if (h(np.array([mid]))[0] > 0) == (h(np.array([a]))[0] > 0):
                a = mid
            else:
                b = mid
        ends.append(0.5 * (a + b))
    return ends


def compare_unknown(case, u, readings, c):
    """One unknown read back, against numpy evaluations from statsmodels' fit `c`."""
    r = np.array(readings)
    m, y0, beta, cov, s2, name = len(r), r.sum() / len(r), c["beta"], c["cov"], c["s2"], u["name"]
    lo, hi = c["range"]
    case.same(u["replicates"], m, f"{name}.replicates")
    case.num(u["mean_reading"], y0, "unknown.mean_reading", ref="numpy")
    if c["line"]:
        x0 = (y0 - beta[0]) / beta[1]
    else:
        roots = np.roots(np.r_[beta[:0:-1], beta[0] - y0])
        real = roots[roots.imag == 0].real
        inside = real[(real >= lo) & (real <= hi)]
        x0 = inside[0] if len(inside) == 1 else min(real, key=lambda v: max(lo - v, v - hi))
        x0 -= (c["f"](x0) - y0) / c["df"](x0)  # one Newton step polishes the eigenvalue root
    g = lambda v: np.vander(np.atleast_1d(v), len(beta), increasing=True)
    var = lambda v: s2 / (m * c["w"](np.asarray(v, float))) + np.einsum("ij,jk,ik->i", g(v), cov, g(v))
    if c["line"] and c["rule"] is None:  # the textbook form
        x, y, b = c["x"], c["y"], beta[1]
        se = np.sqrt(s2) / abs(b) * np.sqrt(1 / m + 1 / len(x) + (y0 - y.mean()) ** 2 / (b * b * np.sum((x - x.mean()) ** 2)))
    else:
        se = np.sqrt(var(x0)[0]) / abs(c["df"](x0))
    t = c["t"]
    for k, want in [("x", x0), ("std_error", se), ("approx_low", x0 - t * se), ("approx_high", x0 + t * se)]:
        case.num(u[k], want, f"unknown.{k}", f"{name}.{k}", ref="numpy")
    case.same((u["outside_range"], u["exact"]["kind"]), (bool(x0 < lo or x0 > hi), "bounded"), f"{name}.outside_range, exact.kind")
    if c["line"] and c["rule"] is None:  # Fieller: A x² + B x + C ≤ 0, solved here
        d = y0 - beta[0]
        qa = beta[1] ** 2 - t * t * cov[1, 1]
        qb = -2 * beta[1] * d - 2 * t * t * cov[0, 1]
        qc = d * d - t * t * (s2 / m + cov[0, 0])
        root = np.sqrt(qb * qb - 4 * qa * qc)
        ends, key, tol, ref = sorted([(-qb - root) / (2 * qa), (-qb + root) / (2 * qa)]), "unknown.fieller", RTOL, "numpy Fieller"
    else:
        domain = (lo - (hi - lo), hi + (hi - lo))
        ends = band_by_grid(lambda v: (y0 - c["f"](v)) ** 2 - t * t * var(v), x0, domain)
        key, tol, ref = "unknown.band (grid)", BAND_RTOL, "numpy grid"
    case.num(u["exact"].get("low"), ends[0], key, f"{name}.exact.low", tol, ref)
    case.num(u["exact"].get("high"), ends[1], key, f"{name}.exact.high", tol, ref)


def calibration_case(plumb, path, x, y, x_name, y_name, unknowns, rule=None, degree=1, sigma="residual"):
    def check(case):
        args = ["calibrate", path, "--y", y_name, "--x", x_name, "--degree", str(degree), "--sigma", sigma]
        args += ["--weighting", rule] if rule else []
        for name, readings in unknowns.items():
            args += ["--unknown", f"{name}=" + ",".join(repr(r) for r in readings)]
        got = plumb_json(plumb, args)
        w = rule_weights(rule, x, y) if rule else None
        X = np.vander(x, degree + 1, increasing=True)
        res = wls(y, X, w)
        beta = res.params
        for j, c in enumerate(got["coefficients"]):
            case.num(c["estimate"], beta[j], "cal.estimate", f"{c['term']}.estimate", ref="statsmodels")
            case.num(c["std_error"], res.bse[j], "cal.std_error", f"{c['term']}.std_error", ref="statsmodels")
        case.num(got["r_squared"], res.rsquared, "cal.r_squared", ref="statsmodels")
        case.num(got["residual_std_error"], np.sqrt(res.scale), "cal.residual_std_error", ref="statsmodels")
        case.same(got["df_residual"], int(res.df_resid), "df_residual")
        # Lack of fit: the curve against one mean per distinct x.
        levels = np.unique(x)
        cells = wls(y, (x[:, None] == levels[None, :]).astype(float), w)
        a = anova_lm(res, cells)
        lof = got["lack_of_fit"]
        case.same((lof["levels"], lof["pure_error_df"], lof["lack_of_fit_df"]), (len(levels), int(cells.df_resid), int(a["df_diff"][1])), "lack_of_fit levels/df")
        for k, want in [("pure_error_ss", cells.ssr), ("lack_of_fit_ss", a["ss_diff"][1]), ("f_statistic", a["F"][1]), ("p_value", a["Pr(>F)"][1])]:
            case.num(lof[k], want, f"lack_of_fit.{k}", ref="statsmodels anova_lm")
        curve = {"beta": beta, "cov": np.asarray(res.cov_params()), "s2": res.scale, "t": stats.t.ppf(0.975, res.df_resid),
                 "range": (x.min(), x.max()), "line": degree == 1, "rule": rule, "x": x, "y": y,
                 "f": lambda v: sum(beta[k] * v**k for k in range(degree + 1)),
                 "df": lambda v: sum(k * beta[k] * v ** (k - 1) for k in range(1, degree + 1)),
                 "w": (lambda v: 1.0 / (v * v)) if rule == "1/x2" else np.ones_like}
        assert rule in (None, "1/x2"), "the reading weight w(x) is written here for 1/x2 only"
        for u in got["unknowns"]:
            compare_unknown(case, u, unknowns[u["name"]], curve)
        # Limits of detection and quantitation (straight line only).
        for which in ("limits", "limits_other_sigma"):
            lim = got[which]
            if degree != 1:
                case.same(list(lim), ["undefined"], which)
                continue
            residual = (which == "limits") == (sigma == "residual")
            case.same(lim["sigma_source"], "residual standard deviation" if residual else "standard error of the intercept", f"{which}.sigma_source")
            w_low = 1.0 if w is None else w[x == x.min()].mean()
            sd = np.sqrt(res.scale / w_low) if residual else res.bse[0]
            for k, want in [("sigma", sd), ("slope", beta[1]), ("detection", 3.3 * sd / abs(beta[1])), ("quantitation", 10 * sd / abs(beta[1]))]:
                case.num(lim[k], want, f"limits.{k}", f"{which}.{k}", ref="statsmodels")
        compare_checks(case, got["checks"], res, X, y, w)
    return check


# ---------------------------------------------------------------- 4. agreement

def passing_bablok(x, y, level):
    """Brute force from the published method (Passing & Bablok 1983), written here."""
    n = len(x)
    i, j = np.triu_indices(n, 1)
    dx, dy = x[j] - x[i], y[j] - y[i]
    keep = ~((dx == 0) & (dy == 0))
    dx, dy = dx[keep], dy[keep]
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.where(dx == 0, np.where(dy > 0, np.inf, -np.inf), dy / dx)
    minus_one = int(np.count_nonzero(s == -1.0))
    s = np.sort(s[s != -1.0])
    big_n, k = len(s), int(np.count_nonzero(s < -1.0))
    b = s[(big_n + 1) // 2 + k - 1] if big_n % 2 else 0.5 * (s[big_n // 2 + k - 1] + s[big_n // 2 + k])
    out = {"slope": b, "intercept": np.median(y - b * x), "slopes": big_n, "below_minus_one": k, "minus_one": minus_one}
    c = stats.norm.ppf(1 - (1 - level) / 2) * np.sqrt(n * (n - 1) * (2 * n + 5) / 18)
    m1 = int(np.sign(big_n - c) * np.floor(abs(big_n - c) / 2 + 0.5))  # rounded half away from zero
    m2 = big_n - m1 + 1
    if m1 >= 1 and m2 + k <= big_n:
        lo, hi = s[m1 + k - 1], s[m2 + k - 1]
        out["interval"] = {"slope_low": lo, "slope_high": hi, "intercept_low": np.median(y - hi * x), "intercept_high": np.median(y - lo * x)}
    return out


def deming_line(x, y, lam):
    dx, dy = x - x.mean(), y - y.mean()
    d = dy @ dy - lam * (dx @ dx)
    b = (d + np.sqrt(d * d + 4 * lam * (dx @ dy) ** 2)) / (2 * (dx @ dy))
    return b, y.mean() - b * x.mean()


def agree_case(plumb, path, x, y, ref_name, test_name, level=0.95, ratio=1.0, percent=False):
    def check(case):
        args = ["agree", path, "--reference", ref_name, "--test", test_name, "--level", repr(level), "--deming-ratio", repr(ratio)]
        got = plumb_json(plumb, args + (["--percent"] if percent else []))
        n = len(x)
        case.same(got["n"], n, "n")
        # Differences.
        mean = 0.5 * x + 0.5 * y
        d = 100 * (y - x) / mean if percent else y - x
        bias, sd = d.mean(), d.std(ddof=1)
        z, t1 = stats.norm.ppf(0.975), stats.t.ppf(1 - (1 - level) / 2, n - 1)
        g = got["differences"]
        case.same(g["scale"], "percent of mean" if percent else "test - reference", "differences.scale")
        want = {"bias": bias, "sd": sd, "multiplier": z, "lower": bias - z * sd, "upper": bias + z * sd,
                "bias_low": bias - t1 * sd / np.sqrt(n), "bias_high": bias + t1 * sd / np.sqrt(n)}
        for end in ("lower", "upper"):
            want[f"{end}_low"] = want[end] - t1 * sd * np.sqrt(3 / n)
            want[f"{end}_high"] = want[end] + t1 * sd * np.sqrt(3 / n)
        for k, v in want.items():
            case.num(g[k], v, f"agree.{k}", ref="numpy/scipy")
        ols = sm.OLS(d, sm.add_constant(mean)).fit()
        pr = g["proportional"]
        for k, v in [("intercept", ols.params[0]), ("slope", ols.params[1]), ("slope_se", ols.bse[1]), ("t", ols.tvalues[1]), ("p_value", ols.pvalues[1])]:
            case.num(pr[k], v, f"agree.proportional.{k}", ref="statsmodels")
        case.same(pr["df"], int(ols.df_resid), "proportional.df")
        # Passing–Bablok.
        pb, ref = got["passing_bablok"], passing_bablok(x, y, level)
        for k in ("slopes", "below_minus_one", "minus_one"):
            case.same(pb[k], ref[k], f"passing_bablok.{k}")
        for k in ("slope", "intercept"):
            case.num(pb[k], ref[k], f"passing_bablok.{k}", rtol=PB_RTOL, ref="numpy brute force")
        if "interval" in ref:
            for k, v in ref["interval"].items():
                case.num(pb["interval"].get(k), v, f"passing_bablok.{k}", rtol=PB_RTOL, ref="numpy brute force")
        else:
            case.same(list(pb["interval"]), ["undefined"], "passing_bablok.interval")
        # Deming with jackknife standard errors.
        b, a = deming_line(x, y, ratio)
        loo = np.array([deming_line(np.delete(x, i), np.delete(y, i), ratio) for i in range(n)])
        se = np.sqrt((n - 1) / n * np.sum((loo - loo.mean(axis=0)) ** 2, axis=0))
        t2 = stats.t.ppf(1 - (1 - level) / 2, n - 2)
        dm = got["deming"]
        for k, v in [("slope", b), ("intercept", a), ("slope_se", se[0]), ("intercept_se", se[1]), ("slope_low", b - t2 * se[0]),
                     ("slope_high", b + t2 * se[0]), ("intercept_low", a - t2 * se[1]), ("intercept_high", a + t2 * se[1]), ("lambda", ratio)]:
            case.num(dm[k], v, f"deming.{k}", ref="numpy")
    return check


# ---------------------------------------------------------------- cases

def replicated(rng, levels, reps, a, b, rel_sd, abs_sd=0.0):
    x = np.repeat(np.asarray(levels, float), reps)
    y = a + b * x + rng.normal(size=len(x)) * (rel_sd * b * x + abs_sd)
    p = rng.permutation(len(x))
    return x[p], y[p]


def demo(name):
    table = pd.read_csv(f"{DEMO}/{name}")
    return f"{DEMO}/{name}", {c: table[c].to_numpy(float) for c in table.select_dtypes("number").columns}


def fit_cases(plumb, tmp, rng):
    def line(name, x, y, **kw):
        cols = {"x": x, "y": y}
        return fit_case(plumb, write_csv(f"{tmp}/{name}.csv", cols), cols, "y", ["x"], **kw)
    x = rng.uniform(0, 10, 60)
    yield "checks: homoscedastic line, no order", line("even", x, 2.0 + 0.5 * x + rng.normal(size=60))
    x = rng.uniform(0, 10, 9)
    yield "checks: short line n = 9 (Shapiro-Wilk small-sample branch)", line("short", x, 1.0 - 0.3 * x + rng.normal(size=9))
    x = rng.uniform(1, 10, 80)
    yield "checks: noise grows with x (spread must flag)", line("grow", x, 1.0 + 2.0 * x + rng.normal(size=80) * 0.4 * x, must_flag=["spread"])
    # An AR(1) series along time, rows shuffled in the file; the order column ties in pairs.
    n, noise = 120, np.zeros(120)
    for k in range(1, n):
        noise[k] = 0.8 * noise[k - 1] + rng.normal()
    x, p = rng.uniform(0, 20, n), rng.permutation(n)
    cols = {"run": (np.arange(n) // 2 + 1)[p], "x": x[p], "y": (3.0 + 1.5 * x + noise)[p]}
    yield "checks: autocorrelated series, --order with ties", fit_case(plumb, write_csv(f"{tmp}/ar.csv", cols), cols, "y", ["x"], order="run", must_flag=["sequence"])
    x, y = replicated(rng, [1, 2, 5, 10, 20, 50, 100], 4, 0.5, 3.0, 0.04)
    cols = {"x": x, "y": y, "w": rng.uniform(0.5, 2.0, len(x)), "z": rng.normal(size=len(x)), "seq": rng.permutation(len(x)) + 1}
    path = write_csv(f"{tmp}/weighted.csv", cols)
    for rule in ("1/x", "1/x2", "1/y2", "1/s2"):
        yield f"weighted fit --weighting {rule}", fit_case(plumb, path, cols, "y", ["x"], rule=rule, order="seq" if rule == "1/x2" else None)
    yield "weighted fit --weights w, --order seq", fit_case(plumb, path, cols, "y", ["x"], weights="w", order="seq")
    yield "weighted fit --weights w, two predictors", fit_case(plumb, path, cols, "y", ["x", "z"], weights="w")
    yield "weighted fit --weighting 1/x2, degree 2", fit_case(plumb, path, cols, "y", ["x"], degree=2, rule="1/x2")
    x = rng.uniform(0, 10, 6000)
    yield "checks: n = 6000 (Anderson-Darling)", line("big", x, 4.0 - 0.7 * x + rng.normal(size=6000))
    yield "checks: n = 6000, t5 noise (Anderson-Darling)", line("big-t", x, 4.0 - 0.7 * x + rng.standard_t(5, 6000), must_flag=["normality"])
    yield "checks: n = 6000, lognormal noise (Anderson-Darling)", line("big-ln", x, 4.0 - 0.7 * x + rng.lognormal(0.0, 1.0, 6000), must_flag=["normality"])
    path, cols = demo("trace-copper.csv")
    for rule in ("1/x", "1/x2", "1/y2", "1/s2"):
        yield f"demo trace-copper.csv --weighting {rule} --order run", fit_case(plumb, path, cols, "counts", ["copper_ug_l"], rule=rule, order="run")
    path, cols = demo("calibration-run.csv")
    yield "demo calibration-run.csv --order read_order", fit_case(plumb, path, cols, "absorbance", ["standard_mg_l"], order="read_order")
    yield "demo calibration-run.csv --weighting 1/s2 --order lamp_hours", fit_case(plumb, path, cols, "absorbance", ["standard_mg_l"], rule="1/s2", order="lamp_hours")


def calibration_cases(plumb, tmp, rng):
    x, y = replicated(rng, [1, 2, 5, 10, 20, 40], 3, 0.05, 0.02, 0.0, 0.004)
    path = write_csv(f"{tmp}/cal-line.csv", {"conc": x, "signal": y})
    unknowns = {"U1": [0.30, 0.31], "U2": [0.75], "U3": [0.08, 0.085, 0.079], "U4": [0.95]}  # U4 lies beyond the standards
    yield "calibrate: straight line, unweighted", calibration_case(plumb, path, x, y, "conc", "signal", unknowns)
    yield "calibrate: straight line, --sigma intercept", calibration_case(plumb, path, x, y, "conc", "signal", unknowns, sigma="intercept")
    x, y = replicated(rng, [0.5, 1, 2, 5, 10, 20, 50, 100], 3, 10.0, 900.0, 0.03)
    path = write_csv(f"{tmp}/cal-weighted.csv", {"conc": x, "counts": y})
    unknowns = {"U1": [3000.0, 3100.0], "U2": [450.0], "U3": [60000.0, 61000.0, 59000.0]}
    yield "calibrate: straight line, --weighting 1/x2", calibration_case(plumb, path, x, y, "conc", "counts", unknowns, rule="1/x2")
    x, y = replicated(rng, [0, 1, 2, 4, 6, 8, 10], 3, 0.01, 0.1, 0.0, 0.004)
    path = write_csv(f"{tmp}/cal-quad.csv", {"conc": x, "signal": y - 0.003 * x * x})
    yield "calibrate: --degree 2, unweighted", calibration_case(plumb, path, x, y - 0.003 * x * x, "conc", "signal", {"U1": [0.35, 0.36], "U2": [0.12]}, degree=2)
    path, cols = demo("calibration-run.csv")
    yield "demo calibration-run.csv calibrate", calibration_case(plumb, path, cols["standard_mg_l"], cols["absorbance"], "standard_mg_l", "absorbance",
                                                                   {"A": [0.5, 0.51], "B": [0.05], "C": [0.012, 0.015, 0.011]})
    path, cols = demo("trace-copper.csv")
    yield "demo trace-copper.csv calibrate --weighting 1/x2", calibration_case(plumb, path, cols["copper_ug_l"], cols["counts"], "copper_ug_l", "counts",
                                                                                 {"S1": [3000.0, 3100.0], "S2": [60000.0], "S3": [700.0, 720.0]}, rule="1/x2")


def agree_cases(plumb, tmp, rng):
    def pair(n, lo, hi, decimals=None, discordant=0, noise=0.0125):
        truth = rng.uniform(lo, hi, n)
        x = truth + rng.normal(scale=noise * (hi - lo), size=n)
        y = 0.2 + 1.05 * truth + rng.normal(scale=noise * (hi - lo), size=n)
        y[rng.choice(n, discordant, replace=False)] *= 1.6
        return (x, y) if decimals is None else (np.round(x, decimals), np.round(y, decimals))
    continuous = pair(40, 1, 20)
    sets = [("continuous n = 40", continuous, {}), ("continuous n = 40, --percent", continuous, {"percent": True}),
            ("rounded to 2 decimals (equal x, identical points, a slope of -1), n = 80", pair(80, 1, 3, 2), {}),
            ("whole numbers (many equal x and identical points, slopes of -1), n = 30", pair(30, 0, 12, 0, noise=0.1), {}),
            ("a few discordant points, n = 50, --level 0.9 --deming-ratio 2", pair(50, 5, 50, discordant=4), {"level": 0.9, "ratio": 2.0})]
    for idx, (label, (x, y), opts) in enumerate(sets):
        path = write_csv(f"{tmp}/agree{idx}.csv", {"ref": x, "new": y})
        yield f"agree: {label}", agree_case(plumb, path, x, y, "ref", "new", **opts)
    path, cols = demo("chlorine-meters.csv")
    for opts in ({}, {"percent": True}):
        yield "demo chlorine-meters.csv agree" + (" --percent" if opts else ""), agree_case(plumb, path, cols["lab_mg_l"], cols["meter_mg_l"], "lab_mg_l", "meter_mg_l", **opts)


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    print(f"reference: statsmodels {statsmodels.__version__}, scipy {scipy.__version__}, numpy {np.__version__}, pandas {pd.__version__}")
    rng = np.random.default_rng(20261204)
    with tempfile.TemporaryDirectory() as tmp:
        for make in (fit_cases, calibration_cases, agree_cases):
            for label, check in make(plumb, tmp, rng):
                record(label, check)
    TALLY.finish()


if __name__ == "__main__":
    main()
