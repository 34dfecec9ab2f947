#!/usr/bin/env python3
"""The stronger peers for bench/run.sh: the same job as bench/panel.sheaf
(the standard panel and robustness per depot for six columns, written to an
xlsx file), reading the data with polars or duckdb instead of Python's csv
module and openpyxl, and computing every figure with the same numpy code as
bench/baseline.py (imported from it, so the three scripts cannot drift).

Usage:
  python3 bench/peer.py polars|duckdb DATA(.csv|.xlsx) OUT.xlsx
  python3 bench/peer.py polars|duckdb DATA --read-only     (read, nothing else)
  python3 bench/peer.py polars|duckdb DATA --figures OUT.json
      (the deterministic figures per (depot, column), for bench/check.py)
"""
import json
import os
import sys

import numpy as np
import openpyxl

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from baseline import COLUMNS, panel  # noqa: E402

# panel()'s figures in order; the last four are the Monte Carlo bootstrap
# bounds, which differ from sheaf's exact ones by design and are not checked.
FIGURES = [
    "n", "mean", "sd", "min", "q1", "median", "q3", "max", "range", "iqr", "skewness",
    "bowley", "kurtosis", "low outliers", "high outliers", "far outliers",
    "mean without", "sd without", "skewness without", "leave-one-out mean",
    "leave-one-out sd", "modified z beyond",
]


def read_polars(path):
    import polars as pl

    if path.endswith(".csv"):
        frame = pl.read_csv(path, schema_overrides={c: pl.Float64 for c in COLUMNS})
    else:
        frame = pl.read_excel(path, engine="calamine")
    frame = frame.with_columns([pl.col(c).cast(pl.Float64, strict=False) for c in COLUMNS])
    return [
        (key[0], {c: part[c].to_numpy() for c in COLUMNS})
        for key, part in frame.partition_by("depot", as_dict=True, maintain_order=True).items()
    ]


def read_duckdb(path):
    import duckdb

    con = duckdb.connect()
    if path.endswith(".csv"):
        source = f"read_csv('{path}', header = true)"
    else:
        sys.exit("duckdb reads xlsx only through an extension downloaded at run time; not used here")
    casts = ", ".join(f"TRY_CAST({c} AS DOUBLE) AS {c}" for c in COLUMNS)
    arrays = con.execute(f"SELECT depot, {casts} FROM {source}").fetchnumpy()
    depots = np.asarray(arrays["depot"]).astype(str)
    names, first, codes = np.unique(depots, return_index=True, return_inverse=True)
    order = np.argsort(first)
    return [
        (names[g], {c: np.asarray(arrays[c], dtype=float)[codes == g] for c in COLUMNS})
        for g in order
    ]


def at_fences(x):
    """How many values lie on a 1.5 IQR fence to a relative 1e-12: whether
    such a value counts as beyond depends on the fence's last digit, which
    sheaf (from deviations about a middle value) and numpy round differently."""
    x = x[~np.isnan(x)]
    q1, q3 = np.percentile(x, [25, 75])
    on = lambda fence: int((np.abs(x - fence) <= 1e-12 * max(abs(fence), 1.0)).sum())
    return {"on low fence": on(q1 - 1.5 * (q3 - q1)), "on high fence": on(q3 + 1.5 * (q3 - q1))}


READERS = {"polars": read_polars, "duckdb": read_duckdb}


def main():
    engine, data_path = sys.argv[1], sys.argv[2]
    groups = READERS[engine](data_path)
    if sys.argv[3] == "--read-only":
        print(sum(len(cols[COLUMNS[0]]) for _, cols in groups), "rows")
        return
    rng = np.random.default_rng(2026)
    rows = [
        (str(depot), name, panel(cols[name], rng)) for depot, cols in groups for name in COLUMNS
    ]
    if sys.argv[3] == "--figures":
        figures = [
            {"depot": d, "column": c, **dict(zip(FIGURES, (None if v is None else float(v) for v in f)))}
            for d, c, f in rows
        ]
        for row, (depot, cols) in zip(figures, ((d, cols) for d, cols in groups for _ in COLUMNS)):
            row.update(at_fences(cols[row["column"]]))
        with open(sys.argv[4], "w") as out:
            json.dump(figures, out)
        return
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Panel"
    for depot, name, figures in rows:
        ws.append([depot, name, *[None if v is None else float(v) for v in figures]])
    wb.save(sys.argv[3])


if __name__ == "__main__":
    main()
