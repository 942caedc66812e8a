#!/usr/bin/env python3
"""Cross-check the overlays and diagnostics that `plumb fit --format json` adds.

Reference libraries (pinned in requirements.txt): scipy 1.14.1 `stats.theilslopes` (slope,
intercept and Sen's slope interval, default method 'separate') and statsmodels 0.14.4
`stats.outliers_influence.variance_inflation_factor` (on the design with its constant column).
Agreement to 1e-9 relative.

Usage: alternatives_vs_references.py PATH_TO_PLUMB
"""

import json
import os
import subprocess
import sys
import tempfile

import numpy as np
from scipy import stats
from statsmodels.stats.outliers_influence import variance_inflation_factor

from tally import Tally

TALLY = Tally()
close = TALLY.close


def run(plumb, args):
    out = subprocess.run([plumb, "fit", *args, "--format", "json"], capture_output=True, text=True)
    if out.returncode != 0:
        raise RuntimeError(out.stderr.strip())
    return json.loads(out.stdout)


def main():
    if len(sys.argv) != 2:
        sys.exit(__doc__)
    plumb = sys.argv[1]
    rng = np.random.default_rng(3_2026_12_02)
    with tempfile.TemporaryDirectory() as tmp:
        for idx, (n, ties, level) in enumerate([(15, False, 0.95), (40, True, 0.9), (120, True, 0.95), (333, False, 0.99)]):
            x = rng.uniform(0, 10, n)
            y = 1.5 * x + rng.standard_t(3, n)
            if ties:
                x, y = np.round(x), np.round(y, 1)
            path = os.path.join(tmp, f"ts{idx}.csv")
            with open(path, "w") as f:
                f.write("x,y\n" + "".join(f"{a!r},{b!r}\n" for a, b in zip(x.tolist(), y.tolist())))
            label = f"theil-sen case {idx}: n={n} ties={ties} level={level}"
            try:
                got = run(plumb, [path, "--y", "y", "--x", "x", "--robust", "theil-sen", "--level", str(level)])["robust"]
            except RuntimeError as e:
                TALLY.record(label, [str(e)])
                continue
            ref = stats.theilslopes(y, x, alpha=level)
            want = {"slope": ref.slope, "intercept": ref.intercept, "slope_ci_low": ref.low_slope, "slope_ci_high": ref.high_slope}
            bad = [f"{k}: plumb {got[k]!r} vs scipy {v!r}" for k, v in want.items() if not close(got[k], float(v), f"theil-sen.{k}")]
            TALLY.record(label, bad)

        for idx, (n, rho) in enumerate([(30, 0.3), (200, 0.9), (80, 0.99)]):
            base = rng.normal(size=n)
            X = np.column_stack([base * rho + rng.normal(size=n) * np.sqrt(1 - rho**2) for _ in range(3)])
            y = X @ np.array([1.0, -2.0, 0.5]) + rng.normal(size=n)
            path = os.path.join(tmp, f"vif{idx}.csv")
            with open(path, "w") as f:
                f.write("y,a,b,c\n" + "".join(",".join(repr(float(v)) for v in (y[i], *X[i])) + "\n" for i in range(n)))
            label = f"vif case {idx}: n={n} shared factor {rho}"
            got = run(plumb, [path, "--y", "y", "--x", "a", "--x", "b", "--x", "c"])["vif"]
            exog = np.column_stack([np.ones(n), X])
            bad = []
            # One VIF per predictor, in order: an empty or short list must fail, not pass.
            terms = [entry["term"] for entry in got]
            if terms != ["a", "b", "c"]:
                bad.append(f"expected a VIF for each of a, b, c; got {terms!r}")
            for j, entry in enumerate(got):
                want = variance_inflation_factor(exog, j + 1)
                if not close(entry["vif"], float(want), "vif"):
                    bad.append(f"{entry['term']}: plumb {entry['vif']!r} vs statsmodels {want!r}")
            TALLY.record(label, bad)
    TALLY.finish()


if __name__ == "__main__":
    main()
