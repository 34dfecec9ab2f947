#!/usr/bin/env bash
# Benchmarks (not timed tests). In one run, sheaf's panel + robustness per
# depot (bench/panel.sheaf) against
#   (a) bench/baseline.py: the same job with Python's csv module / openpyxl,
#       numpy and scipy,
#   (b) bench/peer.py polars and (c) bench/peer.py duckdb: the same job and
#       the same numpy figures, reading with polars or duckdb,
#   (d) the bare parse floor: bench/floor.rs, the csv crate on one thread
#       parsing every field as a double;
# then sheaf's read alone (bench/floor.sheaf) against the peers' reads, and
# a scaling table over rows, groups and threads.
# Every comparison is paired and alternating (bench/timing.py): medians,
# lowest-highest, and the ratio pair by pair. The peers' figures are checked
# against sheaf's first (bench/check.py).
#
# Usage: bash bench/run.sh [--quick] [--runs N]
#   --quick   small files (100,000-row CSV, the 200,000-row xlsx, scaling to
#             10^5 rows): a check that everything works, in a few minutes.
set -euo pipefail
cd "$(dirname "$0")/.."
quick=false
runs=5
while [ $# -gt 0 ]; do
    case $1 in
        --quick) quick=true; runs=3 ;;
        --runs) runs=$2; shift ;;
        *) echo "usage: bash bench/run.sh [--quick] [--runs N]" >&2; exit 2 ;;
    esac
    shift
done

echo "== setup"
cargo build --release --quiet --bin sheaf --example bench_floor --example bench_data
sheaf=./target/release/sheaf
floor=./target/release/examples/bench_floor
[ -x bench/.venv/bin/python ] || python3 -m venv bench/.venv
bench/.venv/bin/pip install --quiet --disable-pip-version-check numpy scipy openpyxl polars duckdb fastexcel
py=bench/.venv/bin/python
data=bench/data
[ -f $data/deliveries-1m.csv ] || ./target/release/examples/bench_data $data
make_data() { # rows groups -> path
    local path=$data/deliveries-$1r-$2g.csv
    [ -f "$path" ] || ./target/release/examples/bench_data $data "$1" "$2"
    echo "$path"
}
one_cpu() { taskset -c 0 "$@"; }
out=$(mktemp -d)
trap 'rm -rf "$out"' EXIT
panel() { echo "$sheaf run bench/panel.sheaf --data $1 --out $out/sheaf.xlsx --force"; }
read_only() { echo "$sheaf run bench/floor.sheaf --data $1 --out $out/floor.xlsx --force"; }
pair() { python3 bench/timing.py "$runs" "$@"; }
# duckdb reads xlsx only through an extension it downloads at run time, so
# the xlsx comparison is with polars (reading through fastexcel) alone.
engines() { case $1 in *.csv) echo polars duckdb ;; *) echo polars ;; esac; }

if $quick; then
    csv_files=$(make_data 100000 5)
    big_csv=$csv_files
else
    csv_files="$data/deliveries-1m.csv $(make_data 10000000 5)"
    big_csv=$data/deliveries-10000000r-5g.csv
fi
xlsx=$data/deliveries-200k.xlsx

echo "== the peers' figures against sheaf's"
for file in $(echo "$csv_files" | cut -d' ' -f1) $xlsx; do
    $sheaf run bench/panel.sheaf --data "$file" --out "$out/check.xlsx" --force --json --quiet > "$out/sheaf.json"
    for engine in $(engines "$file"); do
        $py bench/peer.py $engine "$file" --figures "$out/$engine.json"
        $py bench/check.py "$out/sheaf.json" "$out/$engine.json" "$engine on $file"
    done
done

echo "== end to end: sheaf / peer, same job (wall time; lower is better for sheaf)"
for file in $csv_files $xlsx; do
    echo "-- $file"
    for engine in $(engines "$file"); do
        pair sheaf "$(panel "$file")" "$engine" "$py bench/peer.py $engine $file $out/$engine.xlsx"
    done
    if [ "$file" != "$big_csv" ] || $quick; then
        python3 bench/timing.py 1 sheaf "$(panel "$file")" numpy-script "$py bench/baseline.py $file $out/numpy.xlsx"
    fi
done

echo "== reading: sheaf's read (bench/floor.sheaf) / the bare csv-crate parse, and / the peers' reads"
for file in $csv_files; do
    echo "-- $file, one CPU"
    pair sheaf-read "taskset -c 0 $(read_only "$file")" bare-parse "taskset -c 0 $floor $file"
    echo "-- $file, two CPUs"
    pair sheaf-read "$(read_only "$file")" bare-parse "$floor $file"
    for engine in polars duckdb; do
        pair sheaf-read "$(read_only "$file")" "$engine-read" "$py bench/peer.py $engine $file --read-only"
    done
    pair sheaf-panel "$(panel "$file")" sheaf-read "$(read_only "$file")"
    $sheaf run bench/panel.sheaf --data "$file" --out "$out/t.xlsx" --force --timings 2>&1 | grep -i timings || true
done

echo "== scaling: sheaf's panel, one CPU / two CPUs"
if $quick; then
    bash bench/scaling.sh --quick --runs "$runs"
else
    bash bench/scaling.sh --runs "$runs"
fi
