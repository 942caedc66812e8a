#!/usr/bin/env python3
"""End to end, as whole processes: `plumb columns|fit|corr` on a generated CSV beside Python
yardsticks doing the same job (polars' read_csv to load; numpy polyfit for one predictor;
statsmodels OLS for eight; numpy corrcoef with scipy p-values and Holm for the matrix).

Usage: bench/end_to_end.py [--rows N] [--runs K] [--only NAME]   (from the repository root;
needs the release binary: cargo build --release -p plumb)

Each job runs K times (after one warm-up), the two commands in turn; wall seconds and peak
resident memory come from the kernel (os.wait4). Prints a Markdown table of medians with
min–max, and the ratio Plumbline / yardstick of the medians.
"""

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np

PLUMB = os.path.join("target", "release", "plumb")

# Each yardstick is a Python program run as its own process: argv[1] is the CSV.
LOAD = """
import sys, polars as pl
df = pl.read_csv(sys.argv[1])
print(df.height, df.width)
"""

FIT_ONE = """
import sys, numpy as np, polars as pl
df = pl.read_csv(sys.argv[1], columns=["y", "x1"]).drop_nulls()
b = np.polyfit(df["x1"].to_numpy(), df["y"].to_numpy(), 1)
print(b)
"""

FIT_EIGHT = """
import sys, polars as pl, statsmodels.api as sm
xs = [f"x{j}" for j in range(1, 9)]
df = pl.read_csv(sys.argv[1], columns=["y"] + xs).drop_nulls()
fit = sm.OLS(df["y"].to_numpy(), sm.add_constant(df.select(xs).to_numpy())).fit()
print(fit.rsquared, fit.params[:2])
"""

CORR = """
import sys, numpy as np, polars as pl
from scipy import stats
from statsmodels.stats.multitest import multipletests
df = pl.read_csv(sys.argv[1])
num = df.select([c for c, t in zip(df.columns, df.dtypes) if t.is_numeric()]).drop_nulls()
m = num.to_numpy()
r = np.corrcoef(m, rowvar=False)
n = m.shape[0]
iu = np.triu_indices_from(r, k=1)
t = r[iu] * np.sqrt((n - 2) / np.maximum(1e-300, 1 - r[iu] ** 2))
p = 2 * stats.t.sf(np.abs(t), n - 2)
print(multipletests(p, method="holm")[1].min())
"""


def jobs(path):
    xs = [a for j in range(1, 9) for a in ("--x", f"x{j}")]
    return {
        "load (`plumb columns` / polars read_csv)": (
            [PLUMB, "columns", path], LOAD),
        "fit, one predictor (`plumb fit` / polars + numpy polyfit)": (
            [PLUMB, "fit", path, "--y", "y", "--x", "x1"], FIT_ONE),
        "fit, eight predictors (`plumb fit` / polars + statsmodels OLS)": (
            [PLUMB, "fit", path, "--y", "y", *xs], FIT_EIGHT),
        "correlation matrix (`plumb corr` / polars + corrcoef + t p-values + Holm)": (
            [PLUMB, "corr", path], CORR),
    }


def run(argv):
    """Wall seconds and peak resident MiB of one whole process."""
    start = time.perf_counter()
    proc = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - start
    err = proc.stderr.read().decode(errors="replace")
    proc.stderr.close()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit(f"{' '.join(argv)} failed: {err}")
    return wall, usage.ru_maxrss / 1024


def generate(path, rows):
    """Eight predictors, a response built from them, and a text column (seeded)."""
    rng = np.random.default_rng(20261203)
    x = rng.normal(size=(rows, 8)) * 10 + 50
    y = x @ np.arange(1, 9) / 10 + rng.normal(size=rows)
    site = np.array(["north", "south", "east", "west", "lab-a"])[rng.integers(0, 5, rows)]
    with open(path, "w") as f:
        f.write(",".join([f"x{j}" for j in range(1, 9)] + ["y", "site"]) + "\n")
        for i in range(rows):
            f.write(",".join(f"{v:.6f}" for v in x[i]) + f",{y[i]:.6f},{site[i]}\n")


def spread(values, fmt):
    return f"{fmt(statistics.median(values))} [{fmt(min(values))}–{fmt(max(values))}]"


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=1_500_000)
    ap.add_argument("--runs", type=int, default=5)
    ap.add_argument("--only", help="run the jobs whose name contains this")
    args = ap.parse_args()
    if not os.path.exists(PLUMB):
        sys.exit(f"{PLUMB} not found: cargo build --release -p plumb")
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "measurements.csv")
        generate(path, args.rows)
        size = os.path.getsize(path) / 1e6
        print(f"{args.rows} rows × 10 columns, {size:.0f} MB; medians of {args.runs} runs [min–max]\n")
        print("| job | Plumbline wall s | yardstick wall s | ratio | Plumbline MiB | yardstick MiB |")
        print("|---|---|---|---|---|---|")
        for name, (plumb, script) in jobs(path).items():
            if args.only and args.only not in name:
                continue
            yard = [sys.executable, "-c", script, path]
            run(plumb), run(yard)  # warm-up: the file is in the page cache for both
            a, b = [], []
            for _ in range(args.runs):
                a.append(run(plumb))
                b.append(run(yard))
            wa, ma = [w for w, _ in a], [m for _, m in a]
            wb, mb = [w for w, _ in b], [m for _, m in b]
            ratio = statistics.median(wa) / statistics.median(wb)
            print(f"| {name} | {spread(wa, lambda v: f'{v:.2f}')} | {spread(wb, lambda v: f'{v:.2f}')} "
                  f"| {ratio:.2f} × | {statistics.median(ma):.0f} | {statistics.median(mb):.0f} |")


if __name__ == "__main__":
    main()
