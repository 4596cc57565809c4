#!/usr/bin/env bash
# Wall times of scale-out on this machine (not run in CI): one batch of
# copies of the demo night analysed as one run, as 2 and as 4 shards run at
# once (each -j 1) then merged, the overhead of a resumed run (killed at
# about half way, then resumed) against an uninterrupted one, and the
# latency of a watch (a file complete → the set updated).
# Usage: bash testdata/bench-scaleout.sh [copies of the night, default 20]
set -euo pipefail
cd "$(dirname "$0")/.."
copies=${1:-20}
T=$(mktemp -d /tmp/dlsbatch-scale.XXXXXX)
trap 'rm -rf "$T"' EXIT
go build -o "$T/dlsbatch" ./cmd/dlsbatch
B="$T/dlsbatch"
for k in $(seq 1 "$copies"); do
  mkdir -p "$T/in/night$k"
  for f in testdata/demo/*.csv; do
    sed "s/^# sample: /# sample: night $k /" "$f" > "$T/in/night$k/$(basename "$f")"
  done
done
n=$(find "$T/in" -name '*.csv' | wc -l)
now() { date +%s.%N; }
el() { python3 -c "print(f'{$2-$1:.2f}')"; }
ok() { local c=$?; [ $c -eq 0 ] || [ $c -eq 4 ] || [ $c -eq 5 ] || [ $c -eq 3 ]; }
echo "batch: $n files, $(nproc) cores"
t0=$(now); "$B" run "$T/in" --out "$T/whole" -q -j "$(nproc)" || ok; t1=$(now)
whole=$(el "$t0" "$t1")
echo "one run, -j $(nproc):               $whole s"
for shards in 2 4; do
  t0=$(now)
  for k in $(seq 0 $((shards-1))); do
    "$B" run "$T/in" --out "$T/s$shards-$k" -q -j 1 --shard "$k/$shards" & 
  done
  wait || true
  "$B" merge $(for k in $(seq 0 $((shards-1))); do echo "$T/s$shards-$k"; done) --out "$T/m$shards" -q || ok
  t1=$(now)
  cmp -s "$T/whole/results.json" "$T/m$shards/results.json" || echo "  (merged results.json differs!)"
  echo "$shards shards at once + merge:     $(el "$t0" "$t1") s"
done
half=$(python3 -c "print($whole/2)")
t0=$(now); "$B" run "$T/in" --out "$T/r" -q -j "$(nproc)" & p=$!
sleep "$half"; kill -9 $p 2>/dev/null || true; wait $p 2>/dev/null || true
"$B" run "$T/in" --out "$T/r" -q -j "$(nproc)" --resume 2> "$T/resume.log" || ok
t1=$(now)
cmp -s "$T/whole/results.json" "$T/r/results.json" || echo "  (resumed results.json differs!)"
echo "killed at half time, resumed:    $(el "$t0" "$t1") s in all ($(grep -o 'resumed: [0-9]* files' "$T/resume.log" || true))"
mkdir -p "$T/w"
"$B" watch "$T/w" --out "$T/wout" --settle 500ms --poll 200ms -q 2> "$T/watch.log" & wp=$!
sleep 1
cp testdata/demo/02_gold20-G2411-1.csv "$T/w/"
t0=$(now)
for i in $(seq 1 200); do
  grep -q "updated" "$T/watch.log" && break
  sleep 0.05
done
t1=$(now)
kill $wp; wait $wp 2>/dev/null || true
echo "watch latency (settle 0.5 s):    $(el "$t0" "$t1") s from the file written to the set updated"
