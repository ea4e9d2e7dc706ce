#!/usr/bin/env bash
# Whole-run benchmark on a long log: simulate an hour-long four-post rig log
# at 1 kHz over 8 channels (about 0.4 GB of CSV), then time `ridemodes analyze`
# on it and report its peak memory. Usage, from the repository root:
#   bash testdata/bench/whole_run.sh [DURATION_S] [RATE_HZ]
# Needs GNU time (/usr/bin/time, Debian package "time") for the peak memory.
set -euo pipefail
duration=${1:-3600}
rate=${2:-1000}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/ridemodes" ./cmd/ridemodes
setup=testdata/example/fourpost.toml
echo "simulating ${duration} s at ${rate} Hz ..."
"$work/ridemodes" simulate --setup "$setup" --test rig --out "$work/long.csv" \
  --duration "$duration" --rate "$rate" --noise 0.05 --units mixed --seed 9
ls -l "$work/long.csv" | awk '{printf "log: %.0f MB\n", $5/1e6}'
timer=()
if [ -x /usr/bin/time ]; then timer=(/usr/bin/time -f "analyze: %e s wall, %U s user, peak RSS %M kB"); fi
"${timer[@]}" "$work/ridemodes" analyze "$work/long.csv" --setup "$setup" --json "$work/result.json" > "$work/summary.txt"
sed -n '1,8p' "$work/summary.txt"
