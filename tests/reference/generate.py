#!/usr/bin/env python3
"""Reference values for sheaf's statistics core, computed with numpy and scipy.

Reads every datasets/*.csv (lines starting with '#' are notes, then a header
line, then one value a line) and writes expected.tsv: dataset, statistic,
value(s) as Python's repr (comma separated for lists). tests/reference.rs
compares sheaf's figures with these to 1e-12 relative. Rows named exact_*
are the moment statistics in exact rational arithmetic (stdlib only).

Usage: python3 generate.py [OUTPUT]   (default: expected.tsv beside this file)
Pinned versions: requirements.txt.
"""
import math
import pathlib
import sys
from decimal import Decimal, getcontext
from fractions import Fraction

import numpy as np
from scipy import stats
from scipy.stats import mstats

HERE = pathlib.Path(__file__).resolve().parent
# numpy's names for Hyndman and Fan's types 1..9.
HF_METHODS = ["inverted_cdf", "averaged_inverted_cdf", "closest_observation",
              "interpolated_inverted_cdf", "hazen", "weibull", "linear",
              "median_unbiased", "normal_unbiased"]
PERCENTILES = [0, 1, 5, 10, 25, 33, 50, 66.6, 75, 90, 95, 99, 100]
SHARES = [0.05, 0.1, 0.2, 0.25]
FENCE_FACTORS = [1.5, 3.0]
FIXED_BINS = [1, 5, 7, 12]
BIN_RULES = {"sturges": "sturges", "scott": "scott", "freedman_diaconis": "fd"}
MAD_SCALE = 1.4826  # the rounding sheaf's spec fixes


def read(path):
    lines = [l.strip() for l in path.read_text().splitlines() if l.strip() and not l.startswith("#")]
    return np.array([float(v) for v in lines[1:]])


def rows(x):
    q = lambda p, m="linear": float(np.percentile(x, p, method=m))
    yield "count", len(x)
    yield "sum", math.fsum(x)
    yield "min", x.min()
    yield "max", x.max()
    yield "range", np.ptp(x)
    yield "mean", np.mean(x)
    yield "median", np.median(x)
    yield "variance_sample", np.var(x, ddof=1)
    yield "variance_population", np.var(x, ddof=0)
    yield "sd_sample", np.std(x, ddof=1)
    yield "sd_population", np.std(x, ddof=0)
    for t, method in enumerate(HF_METHODS, start=1):
        for p in PERCENTILES:
            yield f"percentile_hf{t}_{p}", q(p, method)
        yield f"iqr_hf{t}", q(75, method) - q(25, method)
    yield "skewness", stats.skew(x, bias=True)
    yield "skewness_adjusted", stats.skew(x, bias=False)
    yield "kurtosis", stats.kurtosis(x, fisher=False, bias=True)
    yield "excess_kurtosis", stats.kurtosis(x, fisher=True, bias=True)
    yield "excess_kurtosis_adjusted", stats.kurtosis(x, fisher=True, bias=False)
    q1, q2, q3 = q(25), q(50), q(75)
    yield "bowley", (q3 + q1 - 2 * q2) / (q3 - q1)
    yield "mad", stats.median_abs_deviation(x)
    yield "mad_scaled", stats.median_abs_deviation(x, scale=1 / MAD_SCALE)
    for a in SHARES:
        yield f"trimmed_mean_{a}", stats.trim_mean(x, a)
        yield f"winsorized_mean_{a}", float(np.mean(mstats.winsorize(x, limits=(a, a))))
    for k in FENCE_FACTORS:
        low, high = q1 - k * (q3 - q1), q3 + k * (q3 - q1)
        yield f"fence_low_{k}", low
        yield f"fence_high_{k}", high
        yield f"outliers_low_{k}", int(np.sum(x < low))
        yield f"outliers_high_{k}", int(np.sum(x > high))
    values, counts = np.unique(x, return_counts=True)
    yield "modes", list(values[counts == counts.max()])
    mad = stats.median_abs_deviation(x)
    yield "modified_z", list(0.6745 * (x - np.median(x)) / mad)
    for k in FIXED_BINS:
        yield f"histogram_{k}", list(np.histogram(x, bins=k)[0])
        counts, edges = np.histogram(x, bins=k)
        sums = np.histogram(x, bins=k, weights=x)[0]
        full = counts == counts.max()
        yield f"binned_mode_{k}", list(sums[full] / counts[full])
    for ours, theirs in BIN_RULES.items():
        yield f"histogram_{ours}", list(np.histogram(x, bins=theirs)[0])


def exact_rows(x):
    """Moment statistics in exact rational arithmetic (stdlib fractions),
    rounded once at the end with 50-digit decimals. scipy's moments are a
    plain two-pass sum and lose a few digits on data with a large offset;
    these are the arbiter there."""
    getcontext().prec = 50
    xs = [Fraction(float(v)) for v in x]
    n = len(xs)
    mean = sum(xs) / n
    m2, m3, m4 = (sum((v - mean) ** k for v in xs) / n for k in (2, 3, 4))
    dec = lambda f: Decimal(f.numerator) / Decimal(f.denominator)
    g1 = dec(m3) / dec(m2) ** Decimal("1.5")
    g2 = dec(m4 / (m2 * m2)) - 3
    N = Decimal(n)
    yield "exact_mean", float(dec(mean))
    yield "exact_variance_sample", float(dec(m2 * n / (n - 1)))
    yield "exact_skewness", float(g1)
    yield "exact_skewness_adjusted", float(g1 * (N * (N - 1)).sqrt() / (N - 2))
    yield "exact_kurtosis", float(g2 + 3)
    yield "exact_excess_kurtosis", float(g2)
    yield "exact_excess_kurtosis_adjusted", float(((N + 1) * g2 + 6) * (N - 1) / ((N - 2) * (N - 3)))


def text(value):
    if isinstance(value, list):
        return ",".join(text(v) for v in value)
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    return repr(float(value))


def main():
    out = pathlib.Path(sys.argv[1]) if len(sys.argv) > 1 else HERE / "expected.tsv"
    lines = [f"# generated by generate.py with numpy {np.__version__}, scipy {__import__('scipy').__version__}"]
    for path in sorted((HERE / "datasets").glob("*.csv")):
        x = read(path)
        lines += [f"{path.stem}\t{name}\t{text(value)}" for name, value in [*rows(x), *exact_rows(x)]]
    out.write_text("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
