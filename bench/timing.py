#!/usr/bin/env python3
"""Paired, alternating timing of two commands for bench/run.sh.

Usage: python3 bench/timing.py RUNS LABEL_A 'COMMAND A' LABEL_B 'COMMAND B'

Runs A and B in turn RUNS times each, swapping which goes first in every
pair, after one untimed warm-up of each. Each run is timed by /usr/bin/time
(wall seconds and peak resident memory); a command's standard output and
error are thrown away, but a failing run stops the benchmark with its
message. Prints, for each command, the median wall time with the lowest and
highest, the median peak memory, and the ratio A/B pair by pair (median,
lowest, highest): on a busy machine the ratio of neighbouring runs is more
stable than either time.
"""
import shlex
import statistics
import subprocess
import sys
import tempfile


def timed(command):
    with tempfile.NamedTemporaryFile("r") as report:
        done = subprocess.run(
            ["/usr/bin/time", "-f", "%e %M", "-o", report.name, *shlex.split(command)],
            stdout=subprocess.DEVNULL,
            stderr=subprocess.PIPE,
            text=True,
        )
        if done.returncode != 0:
            sys.exit(f"failed ({done.returncode}): {command}\n{done.stderr}")
        seconds, kilobytes = report.read().split()[-2:]
    return float(seconds), int(kilobytes) / 1024


def spread(values, unit):
    return f"{statistics.median(values):.3g}{unit} ({min(values):.3g}-{max(values):.3g})"


def main():
    runs = int(sys.argv[1])
    (label_a, a), (label_b, b) = zip(sys.argv[2::2], sys.argv[3::2])
    timed(a)
    timed(b)
    times = {label_a: [], label_b: []}
    memory = {label_a: [], label_b: []}
    ratios = []
    for i in range(runs):
        order = [(label_a, a), (label_b, b)] if i % 2 == 0 else [(label_b, b), (label_a, a)]
        for label, command in order:
            seconds, mib = timed(command)
            times[label].append(seconds)
            memory[label].append(mib)
        ratios.append(times[label_a][-1] / max(times[label_b][-1], 1e-3))
    for label in (label_a, label_b):
        print(
            f"  {label:<28} {spread(times[label], ' s'):<26} peak {statistics.median(memory[label]):.0f} MiB"
        )
    print(f"  ratio {label_a} / {label_b}: {spread(ratios, '')} over {runs} pairs")


if __name__ == "__main__":
    main()
