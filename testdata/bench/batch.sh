#!/usr/bin/env bash
# Batch throughput: simulate a campaign of 200 short logs of the example car
# (100 one-minute rig runs and 100 drops, listed in a manifest with a test
# column), then time `ridemodes batch` over it with 1 and with 2 workers,
# each into a fresh output folder and SQLite store, and report logs per
# second and the ratio. Each worker count is run REPEATS times (default 3),
# alternating, and the fastest run counts, so that a moment of load from
# other work on the machine weighs less. With GNU time (/usr/bin/time, Debian
# package "time") each run also reports its CPU seconds, which do not depend
# on other load: the same for 1 and 2 workers when nothing is contended.
# Usage, from the repository root:
#   bash testdata/bench/batch.sh [REPEATS]
set -euo pipefail
repeats=${1:-3}
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/ridemodes" ./cmd/ridemodes
setup=testdata/example/hatchback.toml
cp "$setup" "$work/car.toml"
mkdir "$work/logs"
echo "log,setup,car,run,test" > "$work/campaign.csv"
for i in $(seq 1 100); do
  "$work/ridemodes" simulate --setup "$setup" --test rig --duration 60 --noise 0.02 --seed "$i" \
    --out "$work/logs/rig-$i.csv" > /dev/null
  "$work/ridemodes" simulate --setup "$setup" --test drop --noise 0.02 --seed "$i" \
    --out "$work/logs/drop-$i.csv" > /dev/null
  echo "logs/rig-$i.csv,car.toml,bench,rig-$i,rig" >> "$work/campaign.csv"
  echo "logs/drop-$i.csv,car.toml,bench,drop-$i,drop" >> "$work/campaign.csv"
done
du -sh "$work/logs" | awk '{print "200 logs: " $1}'
echo "cores: $(nproc); load before: $(cut -d' ' -f1-3 /proc/loadavg)"
timer=()
if [ -x /usr/bin/time ]; then timer=(/usr/bin/time -o "$work/cpu" -f "%U %S"); fi
best1=""; best2=""
for r in $(seq 1 "$repeats"); do
  for w in 1 2; do
    rm -rf "$work/out"
    start=$(date +%s.%N)
    # Exit codes 1, 3 and 4 are verdicts on the logs (a log the fit refuses,
    # a failed check): the campaign ran all the same.
    code=0
    "${timer[@]}" "$work/ridemodes" batch --manifest "$work/campaign.csv" --workers "$w" --out "$work/out" \
      > "$work/stdout" 2> "$work/stderr" || code=$?
    end=$(date +%s.%N)
    case $code in 0|1|3|4) ;; *) cat "$work/stderr"; exit "$code" ;; esac
    s=$(echo "$end - $start" | bc -l)
    cpu=""
    if [ -s "$work/cpu" ]; then cpu=$(tail -n 1 "$work/cpu" | awk '{printf ", %.2f s CPU", $1 + $2}'); fi
    printf "run %d, %d worker(s): %.2f s, %.1f logs/s%s (load %s)\n" "$r" "$w" "$s" "$(echo "200 / $s" | bc -l)" \
      "$cpu" "$(cut -d' ' -f1 /proc/loadavg)"
    if [ "$w" = 1 ]; then
      if [ -z "$best1" ] || (( $(echo "$s < $best1" | bc -l) )); then best1=$s; fi
    else
      if [ -z "$best2" ] || (( $(echo "$s < $best2" | bc -l) )); then best2=$s; fi
    fi
  done
done
sed -n 1p "$work/stdout"
printf "fastest: 1 worker %.2f s, 2 workers %.2f s: 2 workers give %.2f x the throughput of 1\n" \
  "$best1" "$best2" "$(echo "$best1 / $best2" | bc -l)"
