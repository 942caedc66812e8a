#!/usr/bin/env python3
"""Writes the Parquet files of the bad-input corpus whose column types Plumbline does not hold
(timestamps, dates, times, decimals, lists, structs, dictionaries) and one with no rows.

Run once by hand with pyarrow (26.0.1 when the committed files were made):
    python3 tests/bad-input/make/parquet_types.py tests/bad-input
The files are committed; the tests only read them.
"""
import datetime
import decimal
import sys

import pyarrow as pa
import pyarrow.parquet as pq

out = sys.argv[1]
n = 6
t0 = datetime.datetime(2026, 3, 1, 8, 0, 0)
table = pa.table({
    "reading": pa.array([1.0, 2.1, 2.9, 4.2, 5.0, 6.1]),
    "level": pa.array([2.0, 4.1, 6.2, 7.9, 10.1, 12.0]),
    "taken_at": pa.array([t0 + datetime.timedelta(minutes=15 * i) for i in range(n)], pa.timestamp("ms")),
    "day": pa.array([datetime.date(2026, 3, 1 + i) for i in range(n)], pa.date32()),
    "clock": pa.array([datetime.time(8, i) for i in range(n)], pa.time64("us")),
    "amount": pa.array([decimal.Decimal(f"{i}.25") for i in range(n)], pa.decimal128(10, 2)),
    "tags": pa.array([["a", "b"]] * n, pa.list_(pa.string())),
    "pair": pa.array([{"u": i, "v": 2 * i} for i in range(n)]),
    "site": pa.array(["north", "south"] * 3).dictionary_encode(),
})
pq.write_table(table, f"{out}/parquet-many-types.parquet")
pq.write_table(table.slice(0, 0), f"{out}/parquet-no-rows.parquet")
