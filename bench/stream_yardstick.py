#!/usr/bin/env python3
"""The Python yardstick for `plumb stream`: the least-squares line of Y on X over a delimited
file read in chunks by pandas (bounded memory, as `plumb stream` reads), with slope,
intercept and R² from the running sums. Timed beside `plumb stream` as whole processes:

    /usr/bin/time -v bench/stream_yardstick.py FILE Y X
    /usr/bin/time -v target/release/plumb stream FILE --y Y --x X

Prints one JSON line, so the two answers can be compared too.
"""

import json
import sys

import pandas as pd


def main() -> None:
    path, y, x = sys.argv[1:4]
    n = sx = sy = sxx = syy = sxy = 0.0
    for chunk in pd.read_csv(path, usecols=[x, y], chunksize=2_000_000):
        chunk = chunk.dropna()
        cx = chunk[x].to_numpy(dtype=float)
        cy = chunk[y].to_numpy(dtype=float)
        n += len(cx)
        sx += cx.sum()
        sy += cy.sum()
        sxx += (cx * cx).sum()
        syy += (cy * cy).sum()
        sxy += (cx * cy).sum()
    # Raw sums are fine for a timing yardstick; Plumbline merges centred co-moments.
    mx, my = sx / n, sy / n
    cxx, cyy, cxy = sxx - n * mx * mx, syy - n * my * my, sxy - n * mx * my
    slope = cxy / cxx
    print(json.dumps({
        "n": int(n),
        "slope": slope,
        "intercept": my - slope * mx,
        "r_squared": cxy * cxy / (cxx * cyy),
    }))


if __name__ == "__main__":
    main()
