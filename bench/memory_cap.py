#!/usr/bin/env python3
"""The whole-file loader's memory cap against what loading really takes.

Usage: bench/memory_cap.py [--megabytes M]   (from the repository root; needs the release
binary: cargo build --release -p plumb)

Writes delimited files of about M MB (default 40) in many shapes: numbers and text of 1 to
100 bytes a cell, text with few and with many distinct values, numeric columns with a stray
word far down (each such column is read again as text), and files that take the
cell-by-cell path (a numeric missing token `-999` whose value also appears as `-999.0`).
Runs `plumb columns` on each as a whole process and reads its peak resident memory from the
kernel (os.wait4). Prints, per shape, the peak beside the cap's estimate
`TEXT_BYTE_FACTOR * bytes + TEXT_CELL_BYTES * cells` (constants read from
crates/plumb-data/src/budget.rs) and exits non-zero when a peak exceeds its estimate: the
cap would then let through a file it cannot hold.
"""

import argparse
import os
import random
import re
import subprocess
import sys
import tempfile

PLUMB = os.path.join("target", "release", "plumb")
BUDGET = os.path.join("crates", "plumb-data", "src", "budget.rs")
DIGITS = "0123456789"


def constant(name):
    """A `pub const NAME: u64 = V;` of the budget module."""
    text = open(BUDGET).read()
    match = re.search(rf"pub const {name}: u64 = (\d+);", text)
    if not match:
        sys.exit(f"{name} not found in {BUDGET}")
    return int(match.group(1))


def hexes(width):
    return lambda rng: "%0*x" % (width, rng.getrandbits(4 * width))


def number(decimals, scale):
    return lambda rng: f"{rng.random() * scale:.{decimals}f}"


# name, columns, cell maker for column 0, for the others, how the file is spoilt
SHAPES = [
    ("numbers, 1 byte", 20, None, lambda rng: rng.choice(DIGITS), None),
    ("numbers, 5 bytes", 10, None, number(2, 100), None),
    ("numbers, 12 bytes", 8, None, number(7, 1000), None),
    ("numbers, 30 bytes", 4, None, number(27, 1), None),
    ("text, 1 byte, 10 values", 20, None, lambda rng: rng.choice("abcdefghij"), None),
    ("text, 5 bytes, many values", 10, None, hexes(5), None),
    ("text, 12 bytes, distinct", 8, None, hexes(12), None),
    ("text, 30 bytes, distinct", 4, None, hexes(30), None),
    ("text, 100 bytes, distinct", 2, None, hexes(100), None),
    ("numbers, 1 byte, a stray word", 20, None, lambda rng: rng.choice(DIGITS), "stray"),
    ("numbers, 5 bytes, a stray word", 10, None, number(2, 100), "stray"),
    ("cell by cell: numbers, 1 byte", 20, None, lambda rng: rng.choice(DIGITS), "token"),
    ("cell by cell: numbers, 5 bytes", 10, None, number(2, 100), "token"),
    ("cell by cell: text, 1 byte", 20, number(2, 100), lambda rng: rng.choice("abcdefghij"), "token"),
    ("cell by cell: text, 5 bytes", 10, number(2, 100), hexes(5), "token"),
    ("cell by cell: text, 12 bytes", 8, number(2, 100), hexes(12), "token"),
    ("cell by cell: text, 30 bytes", 4, number(2, 100), hexes(30), "token"),
    ("cell by cell: text, 100 bytes", 2, number(2, 100), hexes(100), "token"),
]


def write(path, size, columns, first, other, spoil, rng):
    """Writes the file; returns its bytes and cells (header included)."""
    first = first or other
    rows = 0
    with open(path, "w") as f:
        written = f.write(",".join(f"c{j}" for j in range(columns)) + "\n")
        while written < size:
            cells = [first(rng)] + [other(rng) for _ in range(columns - 1)]
            if rows == 5000 and spoil == "token":
                cells[0] = "-999.0"
            written += f.write(",".join(cells) + "\n")
            rows += 1
        if spoil == "stray":
            written += f.write(",".join(["oops"] + [other(rng) for _ in range(columns - 1)]) + "\n")
            rows += 1
    return written, (rows + 1) * columns


def peak_mib(argv):
    """Peak resident MiB of one whole process."""
    proc = subprocess.Popen(argv, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    err = proc.stderr.read().decode(errors="replace")
    proc.stderr.close()
    if os.waitstatus_to_exitcode(status) != 0:
        sys.exit(f"{' '.join(argv)} failed: {err}")
    return usage.ru_maxrss / 1024


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--megabytes", type=float, default=40)
    args = parser.parse_args()
    if not os.path.exists(PLUMB):
        sys.exit(f"{PLUMB} not found: cargo build --release -p plumb")
    per_byte, per_cell = constant("TEXT_BYTE_FACTOR"), constant("TEXT_CELL_BYTES")
    size = int(args.megabytes * 1e6)
    rng = random.Random(20261203)
    print(f"cap: {per_byte} bytes per byte + {per_cell} per cell\n")
    print("| shape | MB | cells (M) | peak (MiB) | cap's estimate (MiB) | estimate / peak |")
    print("|---|---|---|---|---|---|")
    worst = float("inf")
    with tempfile.TemporaryDirectory() as tmp:
        for name, columns, first, other, spoil in SHAPES:
            path = os.path.join(tmp, "shape.csv")
            written, cells = write(path, size, columns, first, other, spoil, rng)
            token = ["--missing=-999"] if spoil == "token" else []
            peak = peak_mib([PLUMB, "columns", *token, path])
            estimate = (per_byte * written + per_cell * cells) / 2**20
            worst = min(worst, estimate / peak)
            print(
                f"| {name} | {written / 1e6:.0f} | {cells / 1e6:.2f} | {peak:.0f} "
                f"| {estimate:.0f} | {estimate / peak:.2f} |"
            )
    print(f"\nsmallest estimate / peak: {worst:.2f}")
    if worst < 1:
        sys.exit("the cap's estimate is below a measured peak: raise its constants")


if __name__ == "__main__":
    main()
