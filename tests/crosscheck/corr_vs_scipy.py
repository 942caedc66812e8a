#!/usr/bin/env python3
"""Cross-check `plumb corr --format json` against scipy and statsmodels on seeded data with
ties and missing values.

Reference libraries (pinned in requirements.txt): scipy 1.14.1 (stats.pearsonr with its
Fisher-z confidence_interval(0.95), spearmanr, kendalltau, with their default p-values) and statsmodels 0.14.4 (stats.multitest.multipletests,
methods 'holm' and 'fdr_bh'). Coefficients, p-values and adjusted p-values must agree to 1e-9
relative; the pair counts exactly.

Usage: corr_vs_scipy.py PATH_TO_PLUMB
Prints one line per case and closes with 'N passed, M failed'; exits 1 on any failure.
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
import scipy
from scipy import stats
from statsmodels.stats.multitest import multipletests

from tally import Tally

TALLY = Tally()
close = TALLY.close


def make_table(rng, n, k, ties, missing):
    base = rng.normal(size=n)
    cols = []
    for j in range(k):
        c = 0.6 * base * rng.uniform(-1, 1) + rng.normal(size=n)
        if ties:
            c = np.round(c * 2) / 2  # half-unit grid: many ties
        cols.append(c)
    holes = [set(rng.choice(n, size=n // 10, replace=False).tolist()) if missing else set() for _ in range(k)]
    return cols, holes


def write_csv(path, cols, holes):
    n = len(cols[0])
    with open(path, "w", encoding="utf-8") as f:
        f.write(",".join(f"c{j}" for j in range(len(cols))) + "\n")
        for i in range(n):
            f.write(",".join("NA" if i in holes[j] else repr(float(cols[j][i])) for j in range(len(cols))) + "\n")


def reference(cols, holes, method, adjust):
    k = len(cols)
    r = [[None] * k for _ in range(k)]
    p = [[None] * k for _ in range(k)]
    n = [[0] * k for _ in range(k)]
    tested = []
    ci = {}
    for i in range(k):
        for j in range(i + 1, k):
            keep = [t for t in range(len(cols[i])) if t not in holes[i] and t not in holes[j]]
            x, y = cols[i][keep], cols[j][keep]
            n[i][j] = n[j][i] = len(keep)
            if method == "pearson":
                res = stats.pearsonr(x, y)
                interval = res.confidence_interval(0.95)
                ci[(i, j)] = (float(interval.low), float(interval.high))
            elif method == "spearman":
                res = stats.spearmanr(x, y)
            else:
                res = stats.kendalltau(x, y)
            r[i][j] = r[j][i] = float(res.statistic)
            p[i][j] = p[j][i] = float(res.pvalue)
            tested.append((i, j, float(res.pvalue)))
    padj = [[None] * k for _ in range(k)]
    raw = [t[2] for t in tested]
    if adjust != "none" and len(raw) > 1:
        adjusted = multipletests(raw, method={"holm": "holm", "bh": "fdr_bh"}[adjust])[1]
    else:
        adjusted = raw
    for (i, j, _), a in zip(tested, adjusted):
        padj[i][j] = padj[j][i] = float(a)
    return r, p, padj, n, len(tested), ci


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    print(f"reference: scipy {scipy.__version__}, statsmodels multipletests")
    rng = np.random.default_rng(7_2026_12_02)
    with tempfile.TemporaryDirectory() as tmp:
        idx = 0
        for n in (8, 25, 30, 120):
            for ties in (False, True):
                for method in ("pearson", "spearman", "kendall"):
                    adjust = ["holm", "bh", "none"][idx % 3]
                    missing = n >= 25
                    cols, holes = make_table(rng, n, 4, ties, missing)
                    path = os.path.join(tmp, f"corr{idx}.csv")
                    write_csv(path, cols, holes)
                    label = f"case {idx:2d}: n={n} ties={ties} missing={missing} {method} adjust={adjust}"
                    idx += 1
                    run = subprocess.run([plumb, "corr", path, "--method", method, "--adjust", adjust, "--format", "json"], capture_output=True, text=True)
                    if run.returncode != 0:
                        TALLY.record(label, [f"exit {run.returncode}: {run.stderr.strip()}"])
                        continue
                    got = json.loads(run.stdout)
                    r, p, padj, cnt, n_tests, ci = reference(cols, holes, method, adjust)
                    problems = []
                    if got["n_tests"] != n_tests:
                        problems.append(f"n_tests {got['n_tests']} vs {n_tests}")
                    for i in range(4):
                        for j in range(4):
                            if i == j:
                                continue
                            if got["n"][i][j] != cnt[i][j]:
                                problems.append(f"n[{i}][{j}] {got['n'][i][j]} vs {cnt[i][j]}")
                            for field, want in (("r", r), ("p_value", p), ("p_adjusted", padj)):
                                if not close(got[field][i][j], want[i][j], f"{method}.{field}"):
                                    problems.append(f"{field}[{i}][{j}]: plumb {got[field][i][j]!r} vs reference {want[i][j]!r}")
                    for (i, j), (lo, hi) in ci.items():
                        for field, want in (("ci_low", lo), ("ci_high", hi)):
                            if not close(got[field][i][j], want, f"pearson.{field}"):
                                problems.append(f"{field}[{i}][{j}]: plumb {got[field][i][j]!r} vs scipy {want!r}")
                    TALLY.record(label, problems)
    TALLY.finish()


if __name__ == "__main__":
    main()
