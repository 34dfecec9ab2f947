#!/usr/bin/env python3
"""Checks that a peer script computed the same figures as sheaf before the
two are timed against each other (bench/run.sh).

Usage: python3 bench/check.py SHEAF.json PEER.json LABEL
  SHEAF.json: `sheaf run bench/panel.sheaf ... --json`
  PEER.json:  `python3 bench/peer.py ENGINE DATA --figures PEER.json`

Every (depot, column) must be present in both, with counts equal and every
other figure equal to a relative 1e-9 (the two sum in different orders; a
real difference is far larger). Outlier counts may differ by the values
lying exactly on a fence (see peer.py's at_fences), and by no more; the
mean and sd without outliers are then not compared for that column. The bootstrap bounds are not compared: the
scripts resample at random, sheaf uses the exact distributions.
"""
import json
import math
import sys

# sheaf's figure name -> the peer's.
SAME = {
    "n": "n", "mean": "mean", "sd": "sd", "min": "min", "q1": "q1", "median": "median",
    "q3": "q3", "max": "max", "range": "range", "iqr": "iqr", "skewness_g1": "skewness",
    "kurtosis_b2": "kurtosis", "bowley_skewness": "bowley", "low_outliers": "low outliers",
    "high_outliers": "high outliers",
}
ROBUSTNESS = {"mean_without_outliers": "mean without", "sd_without_outliers": "sd without"}
TOLERANCE = 1e-9


def sheaf_figures(path):
    with open(path) as f:
        report = json.loads(f.readline())
    found = {}
    for block in report["blocks"]:
        for entry in block["entries"]:
            key = (str(entry["group"][0]), entry["column"])
            figures = {ours: entry["figures"].get(theirs) for theirs, ours in SAME.items()}
            for theirs, ours in ROBUSTNESS.items():
                figures[ours] = entry["robustness"].get(theirs)
            found[key] = figures
    return found


def main():
    sheaf = sheaf_figures(sys.argv[1])
    with open(sys.argv[2]) as f:
        peer = {(row["depot"], row["column"]): row for row in json.load(f)}
    label = sys.argv[3]
    if set(sheaf) != set(peer):
        sys.exit(f"{label}: different (depot, column) pairs: {sorted(set(sheaf) ^ set(peer))[:5]}")
    worst = 0.0
    ties = set()
    for key, figures in sheaf.items():
        fence_tie = False
        for name, ours in figures.items():
            theirs = peer[key][name]
            if fence_tie and name.endswith(" without"):
                continue  # left out of different outlier sets
            if not isinstance(ours, (int, float)) or theirs is None:
                if ours is None and theirs is None:
                    continue
                sys.exit(f"{label}: {key} {name}: sheaf {ours!r}, peer {theirs!r}")
            on_fence = {"low outliers": "on low fence", "high outliers": "on high fence"}.get(name)
            if on_fence and ours != theirs and abs(ours - theirs) <= peer[key][on_fence]:
                fence_tie = True
                ties.add(key)
                continue
            off = abs(ours - theirs) / max(abs(ours), abs(theirs), 1e-300)
            if ours != theirs and not off <= TOLERANCE:
                sys.exit(f"{label}: {key} {name}: sheaf {ours!r}, peer {theirs!r}")
            worst = max(worst, 0.0 if ours == theirs else off)
    count = len(sheaf) * len(next(iter(sheaf.values())))
    print(
        f"  {label}: {count} figures equal (largest relative difference {worst:.1e})"
        + (f"; {len(ties)} column(s) with values on a fence: {sorted(ties)}" if ties else "")
    )


if __name__ == "__main__":
    main()
