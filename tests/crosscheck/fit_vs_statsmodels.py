#!/usr/bin/env python3
"""Cross-check `plumb fit` and `plumb influence` (JSON) against statsmodels on seeded random data.

Reference libraries (pinned in requirements.txt): statsmodels 0.14.4 (OLS, WLS: estimates,
standard errors, t, p, confidence intervals, R², adjusted R², F and its p, log-likelihood,
AIC, BIC) and numpy 2.1.3 (standardized coefficients b·s_x/s_y, with weighted standard
deviations under weights). Every field must agree to 1e-9 relative.

`plumb influence` is compared, on the unweighted cases, with statsmodels 0.14.4
`OLSInfluence` (hat_matrix_diag, resid_studentized_internal, resid_studentized_external,
cooks_distance, dffits, dfbetas), to 1e-9 relative, where an entry smaller than 1e-3 of the
largest entry of its field is compared relative to that 1e-3 floor (such entries carry
cancellation of the same absolute size in both programs). statsmodels forms DFBETAS as
β̂ − β̂₍ᵢ₎ from n refits, a subtraction that loses digits when the change is small; each DFBETAS
entry is therefore also allowed that subtraction's own rounding, 64·eps·|β̂ⱼ|/(s₍ᵢ₎√Cⱼⱼ).

Usage: fit_vs_statsmodels.py PATH_TO_PLUMB
Prints one line per case and closes with 'N passed, M failed'; exits 1 on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import statsmodels
import statsmodels.api as sm

from tally import RTOL, Tally

TALLY = Tally()


def make_case(rng, n, p, intercept, degree, weighted, missing):
    """Random design with clearly non-zero true coefficients and moderate conditioning."""
    if degree > 1:
        x = rng.uniform(-2.0, 3.0, size=(n, 1))
        k = degree
    else:
        x = rng.normal(size=(n, p)) * rng.uniform(0.5, 20.0, size=p) + rng.uniform(-5, 5, size=p)
        k = p
    beta = rng.choice([-1.0, 1.0], size=k) * rng.uniform(0.5, 3.0, size=k)
    powers = np.column_stack([x[:, 0] ** j for j in range(1, degree + 1)]) if degree > 1 else x
    y = powers @ beta + (4.0 if intercept else 0.0) + rng.normal(scale=rng.uniform(0.3, 3.0), size=n)
    w = rng.uniform(0.2, 5.0, size=n) if weighted else None
    cols = {"y": y}
    xnames = []
    for j in range(x.shape[1]):
        cols[f"x{j + 1}"] = x[:, j]
        xnames.append(f"x{j + 1}")
    if weighted:
        cols["w"] = w
    holes = {}
    if missing:
        for name in list(cols):
            rows = rng.choice(n, size=max(1, n // 15), replace=False)
            holes[name] = set(int(r) for r in rows)
    return cols, xnames, holes


def write_csv(path, cols, holes, rng):
    names = list(cols)
    n = len(cols[names[0]])
    tokens = ["NA", "", "NaN", "."]
    with open(path, "w", encoding="utf-8") as f:
        f.write(",".join(names) + "\n")
        for i in range(n):
            cells = []
            for name in names:
                if i in holes.get(name, ()):
                    cells.append(tokens[int(rng.integers(len(tokens)))])
                else:
                    cells.append(repr(float(cols[name][i])))
            f.write(",".join(cells) + "\n")


def influence_reference(res):
    inf = res.get_influence()
    subtraction_floor = (
        64 * np.finfo(float).eps * np.abs(res.params)[None, :]
        / np.sqrt(inf.sigma2_not_obsi)[:, None]
        / np.sqrt(np.diag(res.normalized_cov_params))[None, :]
    )
    return subtraction_floor, {
        "leverage": inf.hat_matrix_diag,
        "studentized_internal": inf.resid_studentized_internal,
        "studentized_external": inf.resid_studentized_external,
        "cooks_distance": inf.cooks_distance[0],
        "dffits": inf.dffits[0],
        "dfbetas": inf.dfbetas,
    }


def compare_influence(got, reference_pair):
    dfbetas_floor, want = reference_pair
    problems = []
    rows = got["rows"]
    if len(rows) != len(want["leverage"]):
        return [f"row count {len(rows)} vs {len(want['leverage'])}"]
    for field, ref in want.items():
        ref = np.asarray(ref)
        mine = np.array([r[field] for r in rows], dtype=float)
        floor = 1e-3 * np.max(np.abs(ref))
        for idx in np.ndindex(ref.shape):
            a, b = float(mine[idx]), float(ref[idx])
            scale = max(abs(a), abs(b), floor)
            rel = abs(a - b) / scale
            if field == "dfbetas" and abs(a - b) <= dfbetas_floor[idx]:
                rel = 0.0
            TALLY.note(f"influence.{field}", rel)
            if rel > RTOL:
                problems.append(f"influence {field}{list(idx)}: plumb {a!r} vs reference {b!r}")
    return problems


def reference(cols, xnames, holes, intercept, degree, weighted, exclude, level):
    n = len(cols["y"])
    needed = ["y"] + xnames + (["w"] if weighted else [])
    keep = [
        i for i in range(n)
        if (i + 1) not in exclude and not any(i in holes.get(c, ()) for c in needed)
    ]
    n_dropped = sum(
        1 for i in range(n)
        if (i + 1) not in exclude and any(i in holes.get(c, ()) for c in needed)
    )
    y = cols["y"][keep]
    if degree > 1:
        x = cols[xnames[0]][keep]
        X = np.column_stack([x ** j for j in range(1, degree + 1)])
    else:
        X = np.column_stack([cols[c][keep] for c in xnames])
    design = sm.add_constant(X, prepend=True, has_constant="add") if intercept else X
    if weighted:
        w = cols["w"][keep]
        res = sm.WLS(y, design, weights=w).fit()
    else:
        w = np.ones(len(y))
        res = sm.OLS(y, design).fit()
    ci = res.conf_int(alpha=1.0 - level)

    def wsd(v):
        m = np.average(v, weights=w)
        return np.sqrt(np.sum(w * (v - m) ** 2))

    sd_y = wsd(y)
    std = [None] if intercept else []
    std += [float(res.params[j + int(intercept)] * wsd(X[:, j]) / sd_y) for j in range(X.shape[1])]
    return res, {
        "n": int(res.nobs),
        "n_dropped": n_dropped,
        "df_residual": int(res.df_resid),
        "r_squared": float(res.rsquared),
        "adj_r_squared": float(res.rsquared_adj),
        "residual_std_error": float(np.sqrt(res.scale)),
        "f_statistic": float(res.fvalue),
        "f_p_value": float(res.f_pvalue),
        "log_likelihood": float(res.llf),
        "aic": float(res.aic),
        "bic": float(res.bic),
        "r_squared_kind": "centered" if intercept else "uncentered",
        "coefficients": [
            {
                "estimate": float(res.params[j]),
                "std_error": float(res.bse[j]),
                "t": float(res.tvalues[j]),
                "p_value": float(res.pvalues[j]),
                "ci_low": float(ci[j, 0]),
                "ci_high": float(ci[j, 1]),
                "standardized": std[j],
            }
            for j in range(design.shape[1])
        ],
    }


close = TALLY.close


def compare(got, want):
    problems = []
    for key, value in want.items():
        if key == "coefficients":
            if len(got["coefficients"]) != len(value):
                problems.append("coefficient count")
                continue
            for j, (g, e) in enumerate(zip(got["coefficients"], value)):
                for field, v in e.items():
                    if not close(g[field], v, field):
                        problems.append(f"{g['term']}.{field}: plumb {g[field]!r} vs reference {v!r}")
        elif not close(got[key], value, key):
            problems.append(f"{key}: plumb {got[key]!r} vs reference {value!r}")
    return problems


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    print(f"reference: statsmodels {statsmodels.__version__}, numpy {np.__version__}")
    rng = np.random.default_rng(20261202)
    cases = []
    for n in (12, 60, 500):
        for p in (1, 3, 5):
            for intercept in (True, False):
                for weighted in (False, True):
                    cases.append((n, p, intercept, 1, weighted, n >= 60))
    for degree in (2, 3, 4):
        for intercept in (True, False):
            for weighted in (False, True):
                cases.append((80, 1, intercept, degree, weighted, True))
    with tempfile.TemporaryDirectory() as tmp:
        for idx, (n, p, intercept, degree, weighted, missing) in enumerate(cases):
            if n <= p + 2:
                continue
            cols, xnames, holes = make_case(rng, n, p, intercept, degree, weighted, missing)
            path = os.path.join(tmp, f"case{idx}.csv")
            write_csv(path, cols, holes, rng)
            exclude = sorted(set(int(r) for r in rng.choice(np.arange(1, n + 1), size=2, replace=False))) if n >= 60 else []
            level = [0.95, 0.9, 0.99][idx % 3]
            args = [plumb, "fit", path, "--y", "y", "--format", "json", "--level", str(level)]
            for x in xnames:
                args += ["--x", x]
            if not intercept:
                args.append("--no-intercept")
            if degree > 1:
                args += ["--degree", str(degree)]
            if weighted:
                args += ["--weights", "w"]
            if exclude:
                args += ["--exclude", ",".join(map(str, exclude))]
            label = f"case {idx:2d}: n={n} p={p} degree={degree} intercept={intercept} weights={weighted} missing={missing} excluded={exclude}"
            run = subprocess.run(args, capture_output=True, text=True)
            if run.returncode != 0:
                TALLY.record(label, [f"plumb exited {run.returncode}: {run.stderr.strip()}"])
                continue
            got = json.loads(run.stdout)
            if got["excluded_rows"] != exclude:
                TALLY.record(label, [f"excluded_rows {got['excluded_rows']} != {exclude}"])
                continue
            res, want = reference(cols, xnames, holes, intercept, degree, weighted, set(exclude), level)
            problems = compare(got, want)
            if not weighted:
                args[1] = "influence"
                inf_run = subprocess.run(args, capture_output=True, text=True)
                if inf_run.returncode != 0:
                    problems.append(f"plumb influence exited {inf_run.returncode}: {inf_run.stderr.strip()}")
                else:
                    problems += compare_influence(json.loads(inf_run.stdout), influence_reference(res))
            TALLY.record(label, problems)
    TALLY.finish()


if __name__ == "__main__":
    main()
