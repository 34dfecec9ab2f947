#!/usr/bin/env bash
# Benchmarks (not timed tests): sheaf's panel + robustness per group against
# (a) the plain numpy/scipy/openpyxl script bench/baseline.py doing the same
# job and (b) sheaf reading the file and counting one column (the floor).
# Prints wall time and peak memory of each, and the ratios.
set -euo pipefail
cd "$(dirname "$0")/.."
python3 -m pip install --quiet --disable-pip-version-check numpy scipy openpyxl
cargo build --release --quiet
[ -f bench/data/deliveries-1m.csv ] || cargo run --release --quiet --example bench_data -- bench/data
measure() { # label, command...
    local label=$1; shift
    /usr/bin/time -f "%e %M" -o /tmp/sheaf-bench-time "$@" > /dev/null 2>/tmp/sheaf-bench-err || { cat /tmp/sheaf-bench-err; exit 1; }
    read -r seconds kilobytes < /tmp/sheaf-bench-time
    echo "$label $seconds $kilobytes"
}
for data in deliveries-1m.csv deliveries-200k.xlsx; do
    echo "== $data (seconds, peak KB)"
    s=$(measure sheaf ./target/release/sheaf run bench/panel.sheaf --data "bench/data/$data" --out /tmp/sheaf-bench.xlsx --force)
    f=$(measure floor ./target/release/sheaf run bench/floor.sheaf --data "bench/data/$data" --out /tmp/sheaf-floor.xlsx --force)
    p=$(measure script python3 bench/baseline.py "bench/data/$data" /tmp/sheaf-script.xlsx)
    printf '%s\n%s\n%s\n' "$s" "$f" "$p"
    ./target/release/sheaf run bench/panel.sheaf --data "bench/data/$data" --out /tmp/sheaf-bench.xlsx --force --timings 2>&1 | grep timings
    awk -v s="$s" -v f="$f" -v p="$p" 'BEGIN { split(s, a, " "); split(f, b, " "); split(p, c, " ");
        printf "script / sheaf = %.1fx faster; sheaf / floor = %.2f\n", c[2] / a[2], a[2] / b[2] }'
done
