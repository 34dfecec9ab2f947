#!/usr/bin/env bash
# The scaling table of README.md's Benchmarks: sheaf's panel + robustness
# (bench/panel.sheaf) over synthetic data (bench/make_data.rs, invented
# numbers) of a growing number of rows in 10 groups, then 1,000,000 rows in
# a growing number of groups; each size run on one CPU (taskset -c 0) and on
# two, paired and alternating (bench/timing.py). Prints one table row per
# size: median wall time (lowest-highest) on one and two CPUs, the ratio
# one / two pair by pair, and the median peak memory on two CPUs.
#
# Usage: bash bench/scaling.sh [--quick] [--runs N] [SIZE ...]
#   SIZE      ROWS:GROUPS (default: 10^4..10^7 rows in 10 groups, then
#             10^6 rows in 1, 10, 100, 1,000, 10,000 and 100,000 groups)
#   --quick   10^4 and 10^5 rows in 10 groups, 10^5 rows in 1,000 groups
#   --runs N  pairs per size (default 3)
set -euo pipefail
cd "$(dirname "$0")/.."
runs=3
sizes=""
quick=false
while [ $# -gt 0 ]; do
    case $1 in
        --quick) quick=true ;;
        --runs) runs=$2; shift ;;
        *:*) sizes="$sizes $1" ;;
        *) echo "usage: bash bench/scaling.sh [--quick] [--runs N] [ROWS:GROUPS ...]" >&2; exit 2 ;;
    esac
    shift
done
if [ -z "$sizes" ]; then
    if $quick; then
        sizes="10000:10 100000:10 100000:1000"
    else
        sizes="10000:10 100000:10 1000000:10 10000000:10 1000000:1 1000000:100 1000000:1000 1000000:10000 1000000:100000"
    fi
fi
cargo build --release --quiet --bin sheaf --example bench_data
sheaf=./target/release/sheaf
data=bench/data
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT

echo "| rows | groups | one CPU, s | two CPUs, s | one / two | peak memory (two CPUs) |"
echo "|---|---|---|---|---|---|"
for size in $sizes; do
    rows=${size%:*}
    groups=${size#*:}
    file=$data/deliveries-${rows}r-${groups}g.csv
    [ -f "$file" ] || ./target/release/examples/bench_data $data "$rows" "$groups" > /dev/null
    panel="$sheaf run bench/panel.sheaf --data $file --out $out/s.xlsx --force"
    report=$(python3 bench/timing.py "$runs" one "taskset -c 0 $panel" two "$panel")
    # timing.py's lines: "  one  T (LO-HI)  peak M MiB", the same for two,
    # then "  ratio one / two: R (LO-HI) over N pairs".
    one=$(echo "$report" | awk '$1 == "one" {print $2, $4}')
    two=$(echo "$report" | awk '$1 == "two" {print $2, $4}')
    peak=$(echo "$report" | awk '$1 == "two" {print $6, $7}')
    ratio=$(echo "$report" | awk '$1 == "ratio" {print $5, $6}')
    printf "| %s | %s | %s | %s | %s | %s |\n" "$rows" "$groups" "$one" "$two" "$ratio" "$peak"
done
