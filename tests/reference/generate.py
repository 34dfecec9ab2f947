#!/usr/bin/env python3
"""Reference values for sheaf's statistics core, computed with numpy and scipy.

Reads every datasets/*.csv (lines starting with '#' are notes, then a header
line, then one value a line) and writes expected.tsv: dataset, statistic,
value(s) as Python's repr (comma separated for lists). tests/reference.rs
compares sheaf's figures with these to 1e-12 relative. Rows named exact_*
are in exact rational arithmetic (stdlib fractions, square roots to 50
digits): the moment statistics, and the order statistics and robustness
figures (quartiles, IQR, Bowley, MAD, fences, mean-median gaps,
leave-one-out changes, the standard errors of G1 and G2 under normality).
A dataset whose notes say "exact only" sits far from zero, where numpy
and scipy lose digits: it gets the exact rows alone.

Usage: python3 generate.py [OUTPUT]   (default: expected.tsv beside this file)
Pinned versions: requirements.txt.
"""
import itertools
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
SE_QUANTILES = [0.1, 0.25, 0.5, 0.75, 0.9]
FENCE_FACTORS = [1.5, 3.0]
FIXED_BINS = [1, 5, 7, 12]
BIN_RULES = {"sturges": "sturges", "scott": "scott", "freedman_diaconis": "fd"}
MAD_SCALE = 1.4826  # the rounding sheaf's spec fixes


def read(path):
    lines = [l.strip() for l in path.read_text().splitlines() if l.strip() and not l.startswith("#")]
    return np.array([float(v) for v in lines[1:]])


def exact_only(path):
    """Whether the dataset's notes ask for the exact rows alone."""
    return any(l.startswith("# exact only") for l in path.read_text().splitlines())


def enumerated_only(path):
    """Whether the dataset is small enough to enumerate every resample, and
    its notes ask for that row alone."""
    return any(l.startswith("# enumerate resamples") for l in path.read_text().splitlines())


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
    yield from standard_error_rows(x)


def standard_error_rows(x):
    """Standard errors of single figures, for the noise rule of Changes."""
    for p in SE_QUANTILES:
        yield f"quantile_se_{p}", maritz_jarrett(x, p)
    for a in SHARES:
        # Tukey and McLaughlin (1963), scipy's implementation.
        yield f"trimmed_mean_se_{a}", float(mstats.trimmed_stde(x, limits=(a, a)))
    yield "mean_se", stats.sem(x)
    # A share: the rows at or below the mean, as a binomial proportion.
    n = len(x)
    p = float(np.mean(x <= np.mean(x)))
    yield "share_at_or_below_mean", p
    yield "share_se_at_or_below_mean", stats.binom(n, p).std() / n


def maritz_jarrett(x, p):
    """Maritz and Jarrett (1978) as scipy's `mstats.mjci` computes it (its
    beta weights from scipy's `beta.cdf`), but with the moments taken about
    the m-th value: mjci's C2 - C1^2 on raw data near 1000 loses about 1e-9
    of the result (checked against 40-digit mpmath on heavy_tail_57, where
    this form agrees to the last digit)."""
    x = np.sort(x)
    n = len(x)
    m = int(p * n + 0.5)
    upper = np.arange(1, n + 1) / n
    w = stats.beta.cdf(upper, m - 1, n - m) - stats.beta.cdf(upper - 1 / n, m - 1, n - m)
    d = x - x[m - 1]
    c1, c2 = w @ d, w @ (d * d)
    assert abs(math.sqrt(c2 - c1 * c1) - float(mstats.mjci(x, prob=[p])[0])) < 1e-7 * math.sqrt(c2)
    return math.sqrt(c2 - c1 * c1)


def exact_variance_of_variance(x):
    """The variance of the sample variance s^2 over every one of the n^n
    equally likely resamples of x (the ideal bootstrap), by enumeration in
    exact rational arithmetic. sheaf's formula with the data's own m2 and
    m4 must equal it."""
    xs = [Fraction(float(v)) for v in x]
    n = len(xs)
    total, total_sq, count = Fraction(0), Fraction(0), 0
    for pick in itertools.product(range(n), repeat=n):
        r = [xs[i] for i in pick]
        mean = sum(r) / n
        s2 = sum((v - mean) ** 2 for v in r) / (n - 1)
        total += s2
        total_sq += s2 * s2
        count += 1
    mean_s2 = total / count
    return float(total_sq / count - mean_s2 * mean_s2)


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
    G1 = g1 * (N * (N - 1)).sqrt() / (N - 2)
    G2 = ((N + 1) * g2 + 6) * (N - 1) / ((N - 2) * (N - 3))
    yield "exact_excess_kurtosis_adjusted", float(G2)
    # Standard errors of G1 and G2 for normal samples (Joanes and Gill 1998).
    ses = (Decimal(6 * n * (n - 1)) / Decimal((n - 2) * (n + 1) * (n + 3))).sqrt()
    sek = 2 * ses * (Decimal(n * n - 1) / Decimal((n - 3) * (n + 5))).sqrt()
    yield "exact_skewness_se", float(ses)
    yield "exact_kurtosis_se", float(sek)
    yield "exact_skewness_ratio", float(G1 / ses)
    yield "exact_kurtosis_ratio", float(G2 / sek)
    yield from exact_robustness_rows(xs)


def exact_quantile(sorted_xs, p):
    """Hyndman and Fan type 7 in exact arithmetic: h = (n - 1) p + 1 (1-based)."""
    h = (len(sorted_xs) - 1) * Fraction(p) + 1
    j = math.floor(h)
    lo, hi = sorted_xs[j - 1], sorted_xs[min(j, len(sorted_xs) - 1)]
    return lo + (h - j) * (hi - lo)


def exact_median(values):
    v = sorted(values)
    n = len(v)
    return v[n // 2] if n % 2 else (v[n // 2 - 1] + v[n // 2]) / 2


def sample_sd(values):
    """Sample sd (n - 1) to 50 digits."""
    n = len(values)
    mean = sum(values) / n
    m2 = sum((v - mean) ** 2 for v in values)
    return (Decimal(m2.numerator) / Decimal(m2.denominator) / (n - 1)).sqrt()


def largest_in_size(changes):
    """(change, index) of the largest change in size; the first of equals."""
    best = 0
    for i, c in enumerate(changes):
        if abs(c) > abs(changes[best]):
            best = i
    return changes[best], best


def exact_robustness_rows(xs):
    """Order statistics and the robustness sheet's figures, exactly."""
    n = len(xs)
    dec = lambda f: Decimal(f.numerator) / Decimal(f.denominator)
    s = sorted(xs)
    q1, q2, q3 = (exact_quantile(s, p) for p in (Fraction(1, 4), Fraction(1, 2), Fraction(3, 4)))
    iqr = q3 - q1
    median = exact_median(xs)
    mean = sum(xs) / n
    sd = sample_sd(xs)
    yield "exact_iqr_hf7", float(iqr)
    yield "exact_bowley", float((q3 + q1 - 2 * q2) / iqr)
    mad = exact_median([abs(v - median) for v in xs])
    yield "exact_mad", float(mad)
    yield "exact_modified_z", [float(Fraction(6745, 10000) * (v - median) / mad) for v in xs]
    for k in (Fraction(3, 2), Fraction(3)):
        yield f"exact_fence_low_{float(k)}", float(q1 - k * iqr)
        yield f"exact_fence_high_{float(k)}", float(q3 + k * iqr)
    yield "exact_gap_sd", float(dec(mean - median) / sd)
    yield "exact_gap_iqr", float((mean - median) / iqr)
    # Without the values strictly beyond the 1.5 IQR fences.
    kept = [v for v in xs if q1 - Fraction(3, 2) * iqr <= v <= q3 + Fraction(3, 2) * iqr]
    yield "exact_mean_change_without_outliers", float(sum(kept) / len(kept) - mean)
    # Leave one out: every value in turn, by the definition.
    rest = [xs[:i] + xs[i + 1:] for i in range(n)]
    mean_change, mean_row = largest_in_size([sum(r) / (n - 1) - mean for r in rest])
    sd_change, sd_row = largest_in_size([sample_sd(r) - sd for r in rest])
    yield "exact_leave_one_out_mean_change", float(mean_change)
    yield "exact_leave_one_out_mean_index", mean_row
    yield "exact_leave_one_out_sd_change", float(sd_change)
    yield "exact_leave_one_out_sd_index", sd_row


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
        if enumerated_only(path):
            figures = [("exact_variance_of_variance", exact_variance_of_variance(x))]
        elif exact_only(path):
            figures = [*exact_rows(x)]
        else:
            figures = [*rows(x), *exact_rows(x)]
        lines += [f"{path.stem}\t{name}\t{text(value)}" for name, value in figures]
    out.write_text("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
