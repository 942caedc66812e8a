#!/usr/bin/env python3
"""Cross-check what `plumb fit` adds beside the coefficient table (bands, `at`, the grid
independence test of `cues`, LOESS) and weighted `plumb influence` (JSON) against statsmodels,
scipy and independent numpy implementations, on seeded random data and the demo files
jar-tests.csv (semicolons, decimal commas) and field-survey.csv.

Reference libraries (pinned in requirements.txt, versions printed at start): numpy 2.1.3,
scipy 1.14.1, statsmodels 0.14.4, pandas 2.2.3 (reads the demo files). Every field agrees to
1e-9 relative unless said below; p-values below 1e-10 are compared as ln p.

1. `bands` (41 points evenly from the lowest to the highest x: numpy `linspace`) and `at`
   (--at X): statsmodels OLS/WLS on the design [1, x, x²…] built here,
   `get_prediction(rows at plumb's x, weights=1).summary_frame(alpha = 1 − level)`: `mean`,
   `mean_ci_lower/upper`, `obs_ci_lower/upper`. Like with like for WLS: plumb's prediction
   band is that of a new observation of weight 1 (σ̂² + x₀ᵀΣx₀), and weights=1 passed to
   get_prediction makes statsmodels use the same variance σ̂²/1 for it. `at` also gives
   z_x = (X − x̄)/s_x (s_x with n − 1) and expected_z_y = r·z_x (r: scipy `pearsonr`).
2. `cues.grid_independence`: the k×k table of quantile bins rebuilt here, k = clamp(⌊√(n/5)⌋,
   2, 6), bin = ⌊k(rank − 1)/n⌋ capped at k − 1 with scipy `stats.rankdata` average ranks;
   empty rows and columns dropped; scipy `stats.chi2_contingency(table, correction=False)`:
   χ², dof (exactly) and p. `null` expected for n < 20. One case has x on three values
   (n = 180, so three of six x bins are empty: df = 2·5 = 10).
3. `loess`: an independent re-implementation here, in numpy, of Cleveland's (1979) locally
   weighted regression as plumb documents it (crates/plumb-core/src/alternative/loess.rs),
   not a library: local degree 2, no robustness iterations; at each x₀ of the data's x
   (ascending, repeats kept), q = min(⌈span·n⌉, n), d_max the q-th smallest |xᵢ − x₀| (x₀ itself
   included; times span when span > 1), tricube weights (1 − min(d/d_max, 1)³)³ (points at
   d_max get 0), weighted least squares in powers of (x − x₀) by numpy `lstsq` on √w-scaled
   rows, the constant term the value; a window with fewer than 3 distinct x of positive weight
   gives the weighted mean of y instead (plumb's documented fallback). Fitted values and
   r_squared = 1 − Σ(y − ŷ)²/Σ(y − ȳ)² to 1e-9.
4. Weighted `plumb influence` (--weights W, or --weighting 1/x on jar-tests.csv). statsmodels
   0.14.4 has no get_influence for WLS results, and its OLSInfluence applied to them defines
   everything differently (hat diagonal √wᵢ·xᵢᵀ(XᵀWX)⁻¹xᵢ, raw residuals eᵢ, leave-one-out
   refits without the weights). So the reference is the definition, in numpy: leverage the
   diagonal of the hat matrix of W^{1/2}X (from its QR), residuals rᵢ = √wᵢeᵢ, s² = Σr²/(n − p),
   internal rᵢ/(s√(1 − hᵢᵢ)); s₍ᵢ₎ and β̂₍ᵢ₎ from brute-force weighted refits without row i;
   external rᵢ/(s₍ᵢ₎√(1 − hᵢᵢ)), Cook's D = internal²·h/(p(1 − h)), DFFITS = external·√(h/(1 − h)),
   DFBETAS = (β̂ − β̂₍ᵢ₎)/(s₍ᵢ₎√Cⱼⱼ), C = (XᵀWX)⁻¹; flags from plumb's thresholds (2p/n, 4/min(n, 1000), 3).
   Beside it, statsmodels OLSInfluence of OLS on the whitened model (WLS `model.wexog`,
   `model.wendog`), whose definitions are exactly these; fitted values and raw residuals eᵢ
   from statsmodels WLS.

Usage: extras_vs_references.py PATH_TO_PLUMB
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
from scipy import stats

from tally import TINY, Tally

TALLY = Tally()
RTOL = 1e-9
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

    def nums(self, got, want, key, ref="reference"):
        if len(got) != len(want):
            self.problems.append(f"{key}: plumb has {len(got)} values, {ref} {len(want)}")
            return
        for i, (g, w) in enumerate(zip(got, want)):
            self.num(g, w, key, f"{key}[{i}]", ref=ref)

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
    cells = [[repr(float(v)) for v in cols[c]] for c in names]
    with open(path, "w", encoding="utf-8") as f:
        f.write(",".join(names) + "\n" + "".join(",".join(row) + "\n" for row in zip(*cells)))
    return path


def design(x, degree):
    return np.column_stack([np.asarray(x, float) ** k for k in range(degree + 1)])


class Data:
    """A table on disk and its numeric columns here; `weights` turns a rule or column into w."""

    def __init__(self, path, cols):
        self.path, self.cols = path, cols

    def weights(self, y, x, weights=None, rule=None):
        if rule == "1/x":
            return 1.0 / self.cols[x]
        return None if weights is None else self.cols[weights]

    def args(self, cmd, y, x, degree=1, weights=None, rule=None):
        args = [cmd, self.path, "--y", y, "--x", x, "--degree", str(degree)]
        return args + (["--weights", weights] if weights else []) + (["--weighting", rule] if rule else [])


# ---------------------------------------------------------------- 1. bands and `at`

def bands_case(plumb, data, y, x, degree=1, weights=None, rule=None, at=None, level=None):
    def check(case):
        args = data.args("fit", y, x, degree, weights, rule)
        args += (["--at", repr(at)] if at is not None else []) + (["--level", str(level)] if level else [])
        got = plumb_json(plumb, args)
        yv, xv = data.cols[y], data.cols[x]
        w = data.weights(y, x, weights, rule)
        res = (sm.OLS(yv, design(xv, degree)) if w is None else sm.WLS(yv, design(xv, degree), weights=w)).fit()
        alpha = 1.0 - got["level"]
        if level is not None:
            case.same(got["level"], level, "level")

        def compare(part, xs, key):
            frame = res.get_prediction(design(xs, degree), weights=np.ones(len(xs))).summary_frame(alpha=alpha)
            for mine, theirs in (("fitted", "mean"), ("mean_low", "mean_ci_lower"), ("mean_high", "mean_ci_upper"),
                                 ("predict_low", "obs_ci_lower"), ("predict_high", "obs_ci_upper")):
                case.nums(np.atleast_1d(part[mine]), frame[theirs].to_numpy(), f"{key}.{mine}", ref="statsmodels")

        b = got["bands"]
        case.nums(b["x"], np.linspace(xv.min(), xv.max(), 41), "bands.x", ref="numpy linspace")
        compare(b, np.asarray(b["x"], float), "bands")
        if at is not None:
            a = got["at"]
            case.same(a["x"], at, "at.x")
            compare(a, np.array([at]), "at")
            z = (at - xv.mean()) / xv.std(ddof=1)
            case.num(a["z_x"], z, "at.z_x", ref="numpy")
            case.num(a["expected_z_y"], stats.pearsonr(xv, yv)[0] * z, "at.expected_z_y", ref="scipy")
    return check


# ---------------------------------------------------------------- 2. grid independence

def grid_table(x, y):
    n = len(x)
    k = min(max(int(np.floor(np.sqrt(n / 5))), 2), 6)
    bins = lambda v: np.minimum(np.floor(k * (stats.rankdata(v) - 1) / n).astype(int), k - 1)
    table = np.zeros((k, k))
    np.add.at(table, (bins(x), bins(y)), 1)
    return table[table.sum(axis=1) > 0][:, table.sum(axis=0) > 0]


def grid_case(plumb, data, y, x, want_df=None):
    def check(case):
        g = plumb_json(plumb, data.args("fit", y, x))["cues"]["grid_independence"]
        xv, yv = data.cols[x], data.cols[y]
        table = grid_table(xv, yv) if len(xv) >= 20 else None
        if table is None or min(table.shape) < 2:
            case.same(g, None, "grid_independence (n < 20 or a single row/column)")
            return
        ref = stats.chi2_contingency(table, correction=False)
        case.num(g["chi_square"], ref.statistic, "grid.chi_square", ref="scipy")
        case.same(g["df"], int(ref.dof), "grid.df (scipy chi2_contingency dof)")
        case.num(g["p_value"], ref.pvalue, "grid.p_value", ref="scipy")
        if want_df is not None:
            case.same(g["df"], want_df, "grid.df (worked by hand)")
    return check


# ---------------------------------------------------------------- 3. LOESS

def loess_ref(x, y, span, degree=2):
    """Cleveland's local regression as plumb documents it, re-implemented here (see item 3)."""
    order = np.argsort(x, kind="stable")
    xs, ys, n = x[order], y[order], len(x)
    q = min(int(np.ceil(span * n)), n)
    fitted = np.empty(n)
    for i, x0 in enumerate(xs):
        d = np.abs(xs - x0)
        d_max = np.sort(d)[q - 1] * (span if span > 1 else 1.0)
        d_max = d_max if d_max > 0 else np.finfo(float).tiny
        w = (1 - np.minimum(d / d_max, 1.0) ** 3) ** 3
        keep = w > 0
        if len(np.unique(xs[keep])) < degree + 1:
            fitted[i] = np.sum(w * ys) / np.sum(w)
            continue
        rw = np.sqrt(w[keep])
        beta = np.linalg.lstsq(design(xs[keep] - x0, degree) * rw[:, None], ys[keep] * rw, rcond=None)[0]
        fitted[i] = beta[0]
    r2 = 1 - np.sum((ys - fitted) ** 2) / np.sum((ys - ys.mean()) ** 2)
    return xs, fitted, r2


def loess_case(plumb, data, y, x, span):
    def check(case):
        got = plumb_json(plumb, data.args("fit", y, x) + ["--loess", repr(span)])["loess"]
        xs, fitted, r2 = loess_ref(data.cols[x], data.cols[y], span)
        case.same((got["span"], got["degree"]), (span, 2), "loess span, degree")
        case.nums(got["x"], xs, "loess.x", ref="numpy sort")
        case.nums(got["fitted"], fitted, "loess.fitted", ref="numpy re-implementation")
        case.num(got["r_squared"], r2, "loess.r_squared", ref="numpy re-implementation")
    return check


# ---------------------------------------------------------------- 4. weighted influence

def influence_ref(X, y, w):
    """Case diagnostics of the WLS fit from their definitions, leave-one-out by brute force."""
    n, p = X.shape
    rw = np.sqrt(w)
    Z = X * rw[:, None]
    beta = np.linalg.lstsq(Z, y * rw, rcond=None)[0]
    Q, R = np.linalg.qr(Z)
    h = np.sum(Q * Q, axis=1)
    Rinv = np.linalg.inv(R)
    c_diag = np.sum(Rinv * Rinv, axis=1)  # diag of (XᵀWX)⁻¹ = R⁻¹R⁻ᵀ
    r = rw * (y - X @ beta)
    s = np.sqrt(r @ r / (n - p))
    s_i, shift = np.empty(n), np.empty((n, p))
    for i in range(n):
        keep = np.arange(n) != i
        b_i = np.linalg.lstsq(Z[keep], (y * rw)[keep], rcond=None)[0]
        e_i = (y * rw - Z @ b_i)[keep]
        s_i[i], shift[i] = np.sqrt(e_i @ e_i / (n - 1 - p)), beta - b_i
    internal = r / (s * np.sqrt(1 - h))
    external = r / (s_i * np.sqrt(1 - h))
    return {"leverage": h, "studentized_internal": internal, "studentized_external": external,
            "cooks_distance": internal**2 * h / (p * (1 - h)), "dffits": external * np.sqrt(h / (1 - h)),
            "dfbetas": shift / (s_i[:, None] * np.sqrt(c_diag)[None, :])}


def influence_case(plumb, data, y, x, degree=1, weights=None, rule=None):
    def check(case):
        got = plumb_json(plumb, data.args("influence", y, x, degree, weights, rule))
        yv, X = data.cols[y], design(data.cols[x], degree)
        w = data.weights(y, x, weights, rule)
        n, p = X.shape
        rows = got["rows"]
        case.same(len(rows), n, "rows")
        res = sm.WLS(yv, X, weights=w).fit()
        ref = influence_ref(X, yv, w)
        white = sm.OLS(res.model.wendog, res.model.wexog).fit().get_influence()
        sm_ref = {"leverage": white.hat_matrix_diag, "studentized_internal": white.resid_studentized_internal,
                  "studentized_external": white.resid_studentized_external, "cooks_distance": white.cooks_distance[0],
                  "dffits": white.dffits[0], "dfbetas": white.dfbetas}
        pick = lambda k: [r[k] for r in rows]
        case.nums(pick("fitted"), res.fittedvalues, "influence.fitted", ref="statsmodels WLS")
        case.nums(pick("residual"), res.resid, "influence.residual", ref="statsmodels WLS")
        for k in ref:
            mine = np.asarray(pick(k), float)
            case.nums(mine.ravel(), ref[k].ravel(), f"influence.{k}", ref="numpy definition")
            case.nums(mine.ravel(), np.asarray(sm_ref[k]).ravel(), f"influence.{k} (statsmodels, whitened OLS)", ref="statsmodels")
        flags = [[f for f, on in (("high-leverage", ref["leverage"][i] > 2 * p / n),
                                  ("large-cooks-distance", ref["cooks_distance"][i] > 4 / min(n, 1000)),
                                  ("large-residual", abs(ref["studentized_external"][i]) > 3)) if on] for i in range(n)]
        case.same(pick("flags"), flags, "flags")
    return check


# ---------------------------------------------------------------- cases

def seeded(tmp, rng):
    def table(name, x, y):
        cols = {"x": np.asarray(x, float), "y": np.asarray(y, float), "w": rng.uniform(0.5, 3.0, len(x))}
        return Data(write_csv(f"{tmp}/{name}.csv", cols), cols)
    x = rng.uniform(0, 10, 25)
    line25 = table("line25", x, 2.0 + 0.5 * x + rng.normal(size=25))
    x = rng.uniform(-5, 15, 200)
    line200 = table("line200", x, 1.0 - 0.8 * x + rng.normal(scale=2.0, size=200))
    x = rng.uniform(0, 10, 80)
    quad80 = table("quad80", x, 1.0 + 2.0 * x - 0.3 * x * x + rng.normal(scale=0.8, size=80))
    x = rng.permutation(np.repeat([0.3, 0.7, 1.1], 60))
    ties180 = table("ties180", x, 4.0 * x + rng.normal(size=180))
    x = rng.uniform(-3, 3, 120)
    bowl120 = table("bowl120", x, x * x + rng.normal(scale=0.5, size=120))
    x = rng.uniform(0, 1, 100)
    noise100 = table("noise100", x, rng.normal(size=100))
    x = np.append(rng.uniform(0, 5, 59), 12.0)  # one far x, and one far y
    y = 3.0 + x + rng.normal(size=60)
    y[7] += 6.0
    outlier60 = table("outlier60", x, y)
    x = rng.uniform(0, 10, 15)
    small15 = table("small15", x, x + rng.normal(size=15))
    return line25, line200, quad80, ties180, bowl120, noise100, outlier60, small15


def demo(name, **read):
    table = pd.read_csv(f"{DEMO}/{name}", **read)
    return Data(f"{DEMO}/{name}", {c: table[c].to_numpy(float) for c in table.select_dtypes("number").columns})


def cases(plumb, tmp, rng):
    line25, line200, quad80, ties180, bowl120, noise100, outlier60, small15 = seeded(tmp, rng)
    jar = demo("jar-tests.csv", sep=";", decimal=",")
    field = demo("field-survey.csv")
    # 1. Bands and `at`.
    yield "bands: line n = 25", bands_case(plumb, line25, "y", "x")
    yield "bands: line n = 25, --weights w, --at 4", bands_case(plumb, line25, "y", "x", weights="w", at=4.0)
    yield "bands: line n = 200, --at 20 (beyond the data), --level 0.9", bands_case(plumb, line200, "y", "x", at=20.0, level=0.9)
    yield "bands: quadratic n = 80, --degree 2, --at 5", bands_case(plumb, quad80, "y", "x", degree=2, at=5.0)
    yield "bands: quadratic n = 80, --degree 2, --weights w, --at -1", bands_case(plumb, quad80, "y", "x", degree=2, weights="w", at=-1.0)
    yield "bands: x on three values n = 180, --weights w", bands_case(plumb, ties180, "y", "x", weights="w", at=0.5)
    yield "bands: demo jar-tests.csv settled_ntu ~ dose_mg_l, --at 20", bands_case(plumb, jar, "settled_ntu", "dose_mg_l", at=20.0)
    yield "bands: demo jar-tests.csv --degree 2 --at 20", bands_case(plumb, jar, "settled_ntu", "dose_mg_l", degree=2, at=20.0)
    yield "bands: demo jar-tests.csv --weighting 1/x --at 30", bands_case(plumb, jar, "settled_ntu", "dose_mg_l", rule="1/x", at=30.0)
    yield "bands: demo field-survey.csv leaf_n_pct ~ soil_temp_c, --at 15", bands_case(plumb, field, "leaf_n_pct", "soil_temp_c", at=15.0)
    # 2. The grid independence test.
    yield "grid: line n = 25 (k = 2)", grid_case(plumb, line25, "y", "x")
    yield "grid: line n = 200 (k = 6)", grid_case(plumb, line200, "y", "x")
    yield "grid: quadratic n = 80 (k = 4)", grid_case(plumb, quad80, "y", "x")
    yield "grid: x on three values n = 180 (empty bins, df 10)", grid_case(plumb, ties180, "y", "x", want_df=10)
    yield "grid: y = x² n = 120 (dependence without correlation)", grid_case(plumb, bowl120, "y", "x")
    yield "grid: independent noise n = 100", grid_case(plumb, noise100, "y", "x")
    yield "grid: n = 15 (null)", grid_case(plumb, small15, "y", "x")
    yield "grid: demo jar-tests.csv settled_ntu ~ dose_mg_l", grid_case(plumb, jar, "settled_ntu", "dose_mg_l")
    yield "grid: demo jar-tests.csv ph ~ morning (x on 8 values)", grid_case(plumb, jar, "ph", "morning")
    yield "grid: demo field-survey.csv sward_height_cm ~ species_count (ties)", grid_case(plumb, field, "sward_height_cm", "species_count")
    yield "grid: demo field-survey.csv leaf_n_pct ~ soil_temp_c", grid_case(plumb, field, "leaf_n_pct", "soil_temp_c")
    # 3. LOESS.
    yield "loess: line n = 25, span 0.75", loess_case(plumb, line25, "y", "x", 0.75)
    yield "loess: line n = 25, span 1.2 (d_max widened)", loess_case(plumb, line25, "y", "x", 1.2)
    yield "loess: line n = 200, span 0.3", loess_case(plumb, line200, "y", "x", 0.3)
    yield "loess: quadratic n = 80, span 0.5", loess_case(plumb, quad80, "y", "x", 0.5)
    yield "loess: y = x² n = 120, span 0.25", loess_case(plumb, bowl120, "y", "x", 0.25)
    yield "loess: x on three values, span 0.4 (one x per window)", loess_case(plumb, ties180, "y", "x", 0.4)
    yield "loess: x on three values, span 0.7 (two x per window)", loess_case(plumb, ties180, "y", "x", 0.7)
    x10 = {"x": np.round(ties180.cols["x"] * 10, 12), "y": ties180.cols["y"]}  # the same data, x on 3, 7, 11
    yield "loess: x on three values ×10, span 0.7 (two x per window)", loess_case(plumb, Data(write_csv(f"{tmp}/ties-x10.csv", x10), x10), "y", "x", 0.7)
    yield "loess: x on three values, span 1.5 (d_max widened: three x per window)", loess_case(plumb, ties180, "y", "x", 1.5)
    yield "loess: demo jar-tests.csv, span 0.75", loess_case(plumb, jar, "settled_ntu", "dose_mg_l", 0.75)
    yield "loess: demo field-survey.csv sward_height_cm ~ species_count, span 0.5", loess_case(plumb, field, "sward_height_cm", "species_count", 0.5)
    yield "loess: demo field-survey.csv leaf_n_pct ~ soil_temp_c, span 0.3", loess_case(plumb, field, "leaf_n_pct", "soil_temp_c", 0.3)
    # 4. Weighted influence.
    yield "influence: line n = 25, --weights w", influence_case(plumb, line25, "y", "x", weights="w")
    yield "influence: line n = 200, --weights w", influence_case(plumb, line200, "y", "x", weights="w")
    yield "influence: quadratic n = 80, --degree 2 --weights w", influence_case(plumb, quad80, "y", "x", degree=2, weights="w")
    yield "influence: x on three values n = 180, --weights w", influence_case(plumb, ties180, "y", "x", weights="w")
    yield "influence: a far x and a far y n = 60, --weights w", influence_case(plumb, outlier60, "y", "x", weights="w")
    yield "influence: demo jar-tests.csv --weighting 1/x", influence_case(plumb, jar, "settled_ntu", "dose_mg_l", rule="1/x")
    yield "influence: demo jar-tests.csv --degree 2 --weighting 1/x", influence_case(plumb, jar, "settled_ntu", "dose_mg_l", degree=2, rule="1/x")


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    print(f"reference: statsmodels {statsmodels.__version__}, scipy {scipy.__version__}, numpy {np.__version__}, pandas {pd.__version__}")
    rng = np.random.default_rng(20261205)
    with tempfile.TemporaryDirectory() as tmp:
        for label, check in cases(plumb, tmp, rng):
            record(label, check)
    TALLY.finish()


if __name__ == "__main__":
    main()
