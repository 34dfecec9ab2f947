#!/usr/bin/env python3
"""The plain-script baseline for bench/run.sh: the same job as bench/panel.sheaf
(the standard panel and robustness per depot for six columns) written directly
with numpy, scipy and openpyxl, as an analyst might script it.

Usage: python3 bench/baseline.py DATA(.csv|.xlsx) OUT.xlsx
"""
import csv
import sys

import numpy as np
import openpyxl
from scipy import stats

COLUMNS = ["minutes_late", "weight_kg", "distance_km", "stops", "fuel_l", "parcel_value"]


def read(path):
    if path.endswith(".csv"):
        with open(path, newline="") as f:
            reader = csv.reader(f)
            header = next(reader)
            rows = list(reader)
    else:
        wb = openpyxl.load_workbook(path, read_only=True, data_only=True)
        ws = wb.worksheets[0]
        it = ws.iter_rows(values_only=True)
        header = [str(h) for h in next(it)]
        rows = [list(r) for r in it]
    groups = [r[0] for r in rows]
    data = {}
    for name in COLUMNS:
        i = header.index(name)
        col = []
        for r in rows:
            try:
                col.append(float(r[i]))
            except (TypeError, ValueError):
                col.append(np.nan)
        data[name] = np.array(col)
    return np.array(groups), data


def panel(x, rng):
    x = x[~np.isnan(x)]
    n = len(x)
    q1, med, q3 = np.percentile(x, [25, 50, 75])
    iqr = q3 - q1
    mean, sd = x.mean(), x.std(ddof=1)
    low, high = q1 - 1.5 * iqr, q3 + 1.5 * iqr
    far_low, far_high = q1 - 3 * iqr, q3 + 3 * iqr
    out = (x < low) | (x > high)
    kept = x[~out]
    mad = np.median(np.abs(x - med))
    modz = 0.6745 * (x - med) / mad if mad > 0 else np.zeros(n)
    loo_mean = (n * mean - x) / (n - 1)
    m2 = ((x - mean) ** 2).sum()
    loo_sd = np.sqrt((m2 - (x - mean) * (x - loo_mean)) / (n - 2))
    b = max(100, min(2000, 20_000_000 // n))
    idx = rng.integers(0, n, size=(b, n)) if b * n <= 50_000_000 else None
    if idx is None:
        means = np.array([x[rng.integers(0, n, n)].mean() for _ in range(b)])
        medians = np.array([np.median(x[rng.integers(0, n, n)]) for _ in range(b)])
    else:
        sample = x[idx]
        means, medians = sample.mean(axis=1), np.median(sample, axis=1)
    return [
        n, mean, sd, x.min(), q1, med, q3, x.max(), x.max() - x.min(), iqr,
        stats.skew(x), (q3 + q1 - 2 * med) / iqr if iqr else None, stats.kurtosis(x, fisher=False),
        int((x < low).sum()), int((x > high).sum()), int(((x < far_low) | (x > far_high)).sum()),
        kept.mean(), kept.std(ddof=1), stats.skew(kept),
        float(np.abs(loo_mean - mean).max()), float(np.abs(loo_sd - sd).max()), int((np.abs(modz) > 3.5).sum()),
        *np.percentile(means, [2.5, 97.5]), *np.percentile(medians, [2.5, 97.5]),
    ]


def main():
    data_path, out_path = sys.argv[1], sys.argv[2]
    groups, data = read(data_path)
    rng = np.random.default_rng(2026)
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Panel"
    for g in dict.fromkeys(groups):
        mask = groups == g
        for name in COLUMNS:
            ws.append([g, name, *[None if v is None else float(v) for v in panel(data[name][mask], rng)]])
    wb.save(out_path)


if __name__ == "__main__":
    main()
