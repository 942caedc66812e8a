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


def write(tmp, name, v):
    np.ascontiguousarray(v).astype("<f8").tofile(os.path.join(tmp, f"{name}.f64"))


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--rows", type=int, default=1_000_000)
    ap.add_argument("--large-rows", type=int, default=10_000_000)
    args = ap.parse_args()
    n, nl = args.rows, args.large_rows
    rng = np.random.default_rng(20261202)
    X = rng.normal(size=(n, 8))
    y = X @ rng.uniform(-2, 2, 8) + 3.0 + rng.normal(size=n)
    xl = rng.normal(size=nl)
    yl = 1.5 * xl - 2.0 + rng.normal(size=nl)
    # 64 columns that share a few factors, so the matrix is not all noise.
    F = rng.normal(size=(4, n))
    M = rng.uniform(-1, 1, size=(64, 4)) @ F + rng.normal(size=(64, n))
    with tempfile.TemporaryDirectory() as tmp:
        write(tmp, "y", y)
        for j in range(8):
            write(tmp, f"x{j}", X[:, j])
        write(tmp, "xl", xl)
        write(tmp, "yl", yl)
        for j in range(64):
            write(tmp, f"m{j}", M[j])
        subprocess.run(["cargo", "build", "-q", "--release", "-p", "plumb-core", "--example", "timings"], check=True)
        out = subprocess.run(["target/release/examples/timings", tmp], check=True, capture_output=True, text=True)
        ours = json.loads(out.stdout)

    small = 100_000
    x0 = X[:, 0].copy()
    S = np.ascontiguousarray(M[:32, :small].T)
    ref = {
        "plain_1m": median(5, lambda: (x0.sum(), y.sum())),
        "plain_10m": median(5, lambda: (xl.sum(), yl.sum())),
        "lstsq_1m": median(5, lambda: np.linalg.lstsq(np.column_stack([np.ones(n), x0]), y, rcond=None)),
        "sm_1m": median(3, lambda: sm.OLS(y, sm.add_constant(x0)).fit().bse),
        "lstsq_10m": median(3, lambda: np.linalg.lstsq(np.column_stack([np.ones(nl), xl]), yl, rcond=None)),
        "sm_10m": median(3, lambda: sm.OLS(yl, sm.add_constant(xl)).fit().bse),
        "sm_p8": median(3, lambda: sm.OLS(y, sm.add_constant(X)).fit().bse),
        "sm_influence_20k": median(1, lambda: sm.OLS(y[:20_000], sm.add_constant(X[:20_000, :4])).fit().get_influence().summary_frame()),
        "pearsonr_1m": median(5, lambda: stats.pearsonr(x0, y)),
        "corrcoef_1m_64": median(3, lambda: np.corrcoef(M)),
        "spearmanr_100k": median(5, lambda: stats.spearmanr(x0[:small], y[:small])),
        "spearmanr_100k_32": median(3, lambda: stats.spearmanr(S)),
        "kendalltau_100k": median(5, lambda: stats.kendalltau(x0[:small], y[:small])),
        "kendalltau_1m": median(3, lambda: stats.kendalltau(x0, y)),
    }
    rows = [
        ("simple OLS + R² (one-pass line), 1 M rows", "line_1m", "numpy lstsq", "lstsq_1m"),
        ("simple OLS + R² (one-pass line), 1 M rows", "line_1m", "statsmodels OLS", "sm_1m"),
        ("simple OLS + R² (one-pass line), 10 M rows", "line_10m", "numpy lstsq", "lstsq_10m"),
        ("simple OLS + R² (one-pass line), 10 M rows", "line_10m", "statsmodels OLS", "sm_10m"),
        ("simple OLS, full fit with residuals, 1 M rows", "ols_simple_1m", "statsmodels OLS", "sm_1m"),
        ("simple OLS, full fit with residuals, 10 M rows", "ols_simple_10m", "statsmodels OLS", "sm_10m"),
        ("OLS p = 8 + inference, 1 M rows", "ols_p8_1m", "statsmodels OLS", "sm_p8"),
        ("influence measures, 20 k rows, p = 5", "influence_20k_p5", "statsmodels get_influence", "sm_influence_20k"),
        ("Pearson r + p, one pair, 1 M rows", "pearson_pair_1m", "scipy pearsonr", "pearsonr_1m"),
        ("Pearson matrix + p, 1 M × 64", "pearson_matrix_1m_64", "numpy corrcoef (r only)", "corrcoef_1m_64"),
        ("Spearman, one pair, 100 k rows", "spearman_pair_100k", "scipy spearmanr", "spearmanr_100k"),
        ("Spearman matrix + p, 100 k × 32", "spearman_matrix_100k_32", "scipy spearmanr", "spearmanr_100k_32"),
        ("Kendall τ-b, one pair, 100 k rows", "kendall_pair_100k", "scipy kendalltau", "kendalltau_100k"),
        ("Kendall τ-b, one pair, 1 M rows", "kendall_pair_1m", "scipy kendalltau", "kendalltau_1m"),
    ]
    print(f"machine: {platform.machine()}, {os.cpu_count()} cores, Python {platform.python_version()}, "
          f"numpy {np.__version__}, scipy {scipy.__version__}, statsmodels {statsmodels.__version__}")
    try:
        from threadpoolctl import threadpool_info
        print("numpy BLAS: " + ", ".join(f"{i.get('internal_api')} {i.get('version')} ({i.get('num_threads')} threads)" for i in threadpool_info()))
    except ImportError:
        cfg = np.show_config(mode="dicts") if hasattr(np, "show_config") else {}
        blas = cfg.get("Build Dependencies", {}).get("blas", {}) if isinstance(cfg, dict) else {}
        print(f"numpy BLAS: {blas.get('name', 'unknown')} {blas.get('version', '')}")
    print(f"plain single pass over x and y: numpy {ref['plain_1m']:.4f} s (1 M), {ref['plain_10m']:.4f} s (10 M); "
          f"Rust {ours['plain_pass_1m']:.4f} s (1 M), {ours.get('plain_pass_10m', float('nan')):.4f} s (10 M)\n")
    print("| workload | Plumbline (s) | reference | reference (s) | reference / Plumbline |")
    print("|---|---|---|---|---|")
    for label, key, who, theirs in rows:
        if key in ours:
            print(f"| {label} | {ours[key]:.4f} | {who} | {ref[theirs]:.4f} | {ref[theirs] / ours[key]:.2f} |")
    print(f"| influence measures, 1 M rows, p = 5 | {ours['influence_1m_p5']:.4f} | (statsmodels not run: n leave-one-out refits) | — | — |")
    print(f"| one live exclusion update at 1 M rows (median) | {ours['live_toggle_1m'] * 1e6:.1f} µs | full refit (Plumbline) | {ours['ols_simple_1m']:.4f} | {ours['ols_simple_1m'] / ours['live_toggle_1m']:.0f} |")
    print(f"| slowest of 128 live updates (a drift-guard rebuild) | {ours['live_toggle_1m_worst'] * 1e3:.2f} ms | full refit (Plumbline) | {ours['ols_simple_1m']:.4f} | {ours['ols_simple_1m'] / ours['live_toggle_1m_worst']:.0f} |")
    print(f"| live change (exclude or put back), p = 12 at 1 M rows (median of 256) | {ours['live_change_p12_1m'] * 1e6:.1f} µs | opening that model (first solve) | {ours['live_open_p12_1m']:.4f} | {ours['live_open_p12_1m'] / ours['live_change_p12_1m']:.0f} |")
    print(f"| slowest of those 256 changes (a drift-guard rebuild), p = 12 | {ours['live_change_p12_1m_worst'] * 1e3:.2f} ms | opening that model (first solve) | {ours['live_open_p12_1m']:.4f} | {ours['live_open_p12_1m'] / ours['live_change_p12_1m_worst']:.0f} |")
    if "line_10m" in ours:
        floor = ours["plain_pass_10m"]
        print(f"\none-pass line at 10 M rows / Rust plain pass: {ours['line_10m'] / floor:.2f}; "
              f"/ numpy plain pass: {ours['line_10m'] / ref['plain_10m']:.2f}")


if __name__ == "__main__":
    sys.exit(main())
