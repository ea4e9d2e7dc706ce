#!/usr/bin/env bash
# Whole-run benchmark: the wall time and peak memory of `ridemodes analyze`
# on simulated rig logs of a two-pan, two-sensor car (4 channels at 512 Hz),
# and, on the hour-long log, the ratio of its wall time to the named
# baseline h1_baseline.py (pandas.read_csv of the whole log, then
# scipy.signal welch/csd two-input H1 FRFs at the segment length and window
# ridemodes chose). Usage, from the repository root:
#   bash testdata/bench/whole_run.sh [-r REPEATS] [DURATION_S ...]
# Defaults: 3 repeats (medians are reported), durations 600 3600 14400
# (10 min, 1 h, 4 h: about 20, 117 and 470 MB of CSV, written to a temporary
# folder under ${TMPDIR:-/tmp} and deleted at the end).
# Needs GNU time (/usr/bin/time, Debian package "time") for the peak memory
# and, for the ratio, Debian's python3 with pandas and scipy:
#   apt-get install -y time python3-pandas python3-scipy
# Each baseline run is paired with a ridemodes run next to it (alternating
# which goes first), so both see about the same machine load; the ratio
# reported is the median of the pairs' ratios. On a shared machine, run it
# when it is otherwise idle: another busy process takes a core from the
# two-core ridemodes run and not from the one-core baseline.
set -euo pipefail
export LC_ALL=C # a decimal point in $EPOCHREALTIME and for awk and sort
repeats=3
if [ "${1:-}" = "-r" ]; then repeats=$2; shift 2; fi
durations=("$@")
[ ${#durations[@]} -gt 0 ] || durations=(600 3600 14400)
rate=512
setup=testdata/example/hatchback.toml
baseline=testdata/bench/h1_baseline.py
python=/usr/bin/python3
[ -x /usr/bin/time ] || { echo "needs /usr/bin/time: apt-get install -y time" >&2; exit 2; }
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/ridemodes" ./cmd/ridemodes

median() { sort -g | awk '{v[NR]=$1} END {print (NR%2) ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2}'; }
# timed LABEL CMD...: runs CMD, appends "wall_s rss_kB" to $work/LABEL. The
# wall time is bash's clock around the run (microseconds; GNU time's %e has
# only 10 ms, 5 % of ridemodes' run), GNU time gives the peak RSS.
timed() {
  local label=$1; shift
  local t0=$EPOCHREALTIME
  /usr/bin/time -o "$work/time.txt" -f "%M" "$@" > /dev/null
  local t1=$EPOCHREALTIME
  echo "$(awk -v a="$t0" -v b="$t1" 'BEGIN {printf "%.4f", b - a}') $(cat "$work/time.txt")" >> "$work/$label"
}

echo "machine: $(nproc) cores, $(grep -m1 'model name' /proc/cpuinfo | cut -d: -f2 | sed 's/^ //'), $(go version | cut -d' ' -f3)"
echo "commit: $(git describe --always --dirty 2>/dev/null || echo unknown); load before: $(cut -d' ' -f1-3 /proc/loadavg)"
have_baseline=1
"$python" -c 'import pandas, scipy' 2>/dev/null || {
  have_baseline=0
  echo "no baseline: $python lacks pandas or scipy (apt-get install -y python3-pandas python3-scipy)"
}
for d in "${durations[@]}"; do
  log="$work/rig-$d.csv"
  "$work/ridemodes" simulate --setup "$setup" --test rig --out "$log" \
    --duration "$d" --rate "$rate" --noise 0.05 --seed 9 > /dev/null
  mb=$(awk -v b="$(stat -c %s "$log")" 'BEGIN {printf "%.0f", b/1e6}')
  "$work/ridemodes" analyze "$log" --setup "$setup" --json "$work/result.json" > /dev/null
  if [ "$d" = 3600 ] && [ $have_baseline = 1 ]; then
    # The baseline's segment: ridemodes' segment length times its
    # decimation factor, i.e. the same duration and frequency resolution.
    n=$(grep -o 'chose N=[0-9]*' "$work/result.json" | head -1 | cut -d= -f2)
    q=$(grep -o 'decimated by [0-9]*' "$work/result.json" | head -1 | cut -d' ' -f3)
    nperseg=$((n * ${q:-1}))
    for i in $(seq "$repeats"); do
      if [ $((i % 2)) = 1 ]; then
        timed base "$python" "$baseline" "$log" "$setup" "$nperseg"
        timed "rm-$d" "$work/ridemodes" analyze "$log" --setup "$setup"
      else
        timed "rm-$d" "$work/ridemodes" analyze "$log" --setup "$setup"
        timed base "$python" "$baseline" "$log" "$setup" "$nperseg"
      fi
      paste -d' ' <(tail -1 "$work/rm-$d") <(tail -1 "$work/base") | awk '{print $1/$3}' >> "$work/ratio"
    done
    echo "baseline on the ${d} s log: nperseg $nperseg (N=$n x q=${q:-1}), wall $(cut -d' ' -f1 "$work/base" | median) s, peak RSS $(cut -d' ' -f2 "$work/base" | median) kB"
  else
    for _ in $(seq "$repeats"); do timed "rm-$d" "$work/ridemodes" analyze "$log" --setup "$setup"; done
  fi
  echo "ridemodes analyze, ${d} s log (${mb} MB): wall $(cut -d' ' -f1 "$work/rm-$d" | median) s, peak RSS $(cut -d' ' -f2 "$work/rm-$d" | median) kB (runs: $(cut -d' ' -f2 "$work/rm-$d" | tr '\n' ' ')kB)"
  rm -f "$log"
done
if [ -s "$work/ratio" ]; then
  echo "ratio ridemodes/baseline on the 1 h log: median $(median < "$work/ratio") (pairs: $(tr '\n' ' ' < "$work/ratio"))"
fi
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)"
