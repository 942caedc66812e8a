#!/usr/bin/env python3
"""Side-by-side timings: Plumbline's core against numpy, statsmodels and scipy on the same
generated data, plus a plain single pass over the same buffer (the memory-bandwidth floor).

Usage: bench/compare.py [--rows N]   (from the repository root; builds the release example)
Prints a Markdown table of median seconds and ratios; BENCHMARKS.md holds its latest output.
"""

import argparse
import json
import os
import platform
import subprocess
import sys
import tempfile
import time

import numpy as np
import scipy
import statsmodels
import statsmodels.api as sm
from scipy import stats


def median(reps, f):
    t = []
    for _ in range(reps):
        s = time.perf_counter()
        f()
        t.append(time.perf_counter() - s)
    return sorted(t)[len(t) // 2]


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=1_000_000)
    n = ap.parse_args().rows
    rng = np.random.default_rng(20261202)
    X = rng.normal(size=(n, 8))
    y = X @ rng.uniform(-2, 2, 8) + 3.0 + rng.normal(size=n)
    with tempfile.TemporaryDirectory() as tmp:
        y.astype("<f8").tofile(os.path.join(tmp, "y.f64"))
        for j in range(8):
            np.ascontiguousarray(X[:, j]).astype("<f8").tofile(os.path.join(tmp, f"x{j}.f64"))
        subprocess.run(["cargo", "build", "-q", "--release", "-p", "plumb-core", "--example", "timings"], check=True)
        out = subprocess.run(["target/release/examples/timings", tmp], check=True, capture_output=True, text=True)
        ours = json.loads(out.stdout)

    small = 100_000
    x0 = X[:, 0].copy()
    ref = {
        "plain pass (sum of x and y)": median(5, lambda: (x0.sum(), y.sum())),
        "ols_simple_1m": median(5, lambda: np.linalg.lstsq(np.column_stack([np.ones(n), x0]), y, rcond=None)),
        "ols_simple_1m statsmodels": median(3, lambda: sm.OLS(y, sm.add_constant(x0)).fit().bse),
        "ols_p8_1m": median(3, lambda: sm.OLS(y, sm.add_constant(X)).fit().bse),
        "influence_20k_p5": median(1, lambda: sm.OLS(y[:20_000], sm.add_constant(X[:20_000, :4])).fit().get_influence().summary_frame()),
        "pearson_pair_1m": median(5, lambda: stats.pearsonr(x0, y)),
        "spearman_pair_100k": median(5, lambda: stats.spearmanr(x0[:small], y[:small])),
        "kendall_pair_100k": median(5, lambda: stats.kendalltau(x0[:small], y[:small])),
        "kendall_pair_1m": median(3, lambda: stats.kendalltau(x0, y)),
    }
    rows = [
        ("simple OLS + inference, 1 M rows", "ols_simple_1m", "numpy lstsq", ref["ols_simple_1m"]),
        ("simple OLS + inference, 1 M rows", "ols_simple_1m", "statsmodels OLS", ref["ols_simple_1m statsmodels"]),
        ("OLS p = 8 + inference, 1 M rows", "ols_p8_1m", "statsmodels OLS", ref["ols_p8_1m"]),
        ("influence measures, 20 k rows, p = 5", "influence_20k_p5", "statsmodels get_influence", ref["influence_20k_p5"]),
        ("Pearson r + p, one pair, 1 M rows", "pearson_pair_1m", "scipy pearsonr", ref["pearson_pair_1m"]),
        ("Spearman, one pair, 100 k rows", "spearman_pair_100k", "scipy spearmanr", ref["spearman_pair_100k"]),
        ("Kendall τ-b, one pair, 100 k rows", "kendall_pair_100k", "scipy kendalltau", ref["kendall_pair_100k"]),
        ("Kendall τ-b, one pair, 1 M rows", "kendall_pair_1m", "scipy kendalltau", ref["kendall_pair_1m"]),
    ]
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}, "
          f"numpy {np.__version__}, scipy {scipy.__version__}, statsmodels {statsmodels.__version__}")
    try:
        from threadpoolctl import threadpool_info
        print("numpy BLAS: " + ", ".join(f"{i.get('internal_api')} {i.get('version')}" for i in threadpool_info()))
    except ImportError:
        cfg = np.show_config(mode="dicts") if hasattr(np, "show_config") else {}
        blas = cfg.get("Build Dependencies", {}).get("blas", {}) if isinstance(cfg, dict) else {}
        print(f"numpy BLAS: {blas.get('name', 'unknown')} {blas.get('version', '')}")
    print(f"plain single pass over x and y ({n} rows): {ref['plain pass (sum of x and y)']:.4f} s\n")
    print("| workload | Plumbline (s) | reference | reference (s) | reference / Plumbline |")
    print("|---|---|---|---|---|")
    for label, key, who, theirs in rows:
        print(f"| {label} | {ours[key]:.4f} | {who} | {theirs:.4f} | {theirs / ours[key]:.2f} |")
    print(f"| influence measures, 1 M rows, p = 5 | {ours['influence_1m_p5']:.4f} | (statsmodels not run: n leave-one-out refits) | — | — |")
    print(f"| one live exclusion update at 1 M rows | {ours['live_toggle_1m'] * 1e6:.1f} µs | full refit (Plumbline) | {ours['ols_simple_1m']:.4f} | {ours['ols_simple_1m'] / ours['live_toggle_1m']:.0f} |")


if __name__ == "__main__":
    sys.exit(main())
