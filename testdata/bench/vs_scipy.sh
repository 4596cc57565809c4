#!/usr/bin/env bash
# Times a default 'dlsbatch run' at -j 1 (report included) against the plain
# scipy pipeline of scipy_pipeline.py on the same simulated correlograms,
# and prints both times and their ratio. Not part of CI: it takes minutes
# and its figures depend on the machine and on what else runs on it.
#
#   bash testdata/bench/vs_scipy.sh [-n FILES] [--keep DIR]
#
# Needs Go and Debian's python3-scipy (/usr/bin/python3). The files are
# made by 'dlsbatch simulate' from a generated plan: log-normal populations
# of 20–500 nm (PDI about 0.01), water at 25 °C, 173°, 632.8 nm, 200 kcps,
# 100 s, no σ column, one run per file, fixed seeds. Both sides run on one
# core: dlsbatch with -j 1 and GOMAXPROCS=1, scipy with one BLAS thread.
# Wall and CPU (user + system) times are printed; on a machine shared with
# other work the CPU times are the steadier figure.
set -euo pipefail
cd "$(dirname "$0")/../.."

n=1000
keep=""
while [ $# -gt 0 ]; do
  case "$1" in
    -n) n="$2"; shift 2 ;;
    --keep) keep="$2"; shift 2 ;;
    *) echo "usage: $0 [-n FILES] [--keep DIR]" >&2; exit 2 ;;
  esac
done
if ! /usr/bin/python3 -c 'import scipy, numpy' 2>/dev/null; then
  echo "needs python3-scipy at /usr/bin/python3 (apt-get install python3-scipy)" >&2
  exit 1
fi

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
go build -o "$work/dlsbatch" ./cmd/dlsbatch

plan="$work/plan.csv"
echo "file,sample,population,solvent,temperature_c,wavelength_nm,angle_deg,count_rate_kcps,duration_s,beta,seed,sigma" >"$plan"
/usr/bin/python3 - "$n" >>"$plan" <<'PY'
import sys
n = int(sys.argv[1])
for i in range(n):
    d = 20 * 25 ** ((i % 50) / 49)
    print(f'm{i:05d}.csv,s{i % 50:03d},"lognormal({d:.2f}nm,0.1,number)",water,25,632.8,173,200,100,0.9,{i + 1},no')
PY
if ! "$work/dlsbatch" simulate --plan "$plan" --out "$work/in" >"$work/simulate.log" 2>&1; then
  cat "$work/simulate.log" >&2
  exit 1
fi
rm -f "$work/in/truth.json"
# The simulated files are flushed to disk first, so that neither side is
# timed while the kernel writes them back.
sync

# cputime CMD...: runs CMD, prints "wall cpu" in seconds (children's rusage).
cputime() {
  /usr/bin/python3 - "$@" <<'PY'
import os, resource, subprocess, sys, time
t = time.perf_counter()
subprocess.run(sys.argv[1:], check=True, stdout=subprocess.DEVNULL)
wall = time.perf_counter() - t
ru = resource.getrusage(resource.RUSAGE_CHILDREN)
print(f"{wall:.3f} {ru.ru_utime + ru.ru_stime:.3f}")
PY
}

read -r gw gc < <(GOMAXPROCS=1 cputime "$work/dlsbatch" run "$work/in" --out "$work/out" -j 1 -q)
files=("$work"/in/*.csv)
sync
read -r pw pc < <(OPENBLAS_NUM_THREADS=1 OMP_NUM_THREADS=1 cputime /usr/bin/python3 testdata/bench/scipy_pipeline.py "$work/scipy.csv" "${files[@]}")
if [ -n "$keep" ]; then
  mkdir -p "$keep"
  cp -r "$work/in" "$work/out" "$work/scipy.csv" "$keep/"
fi

/usr/bin/python3 - "$n" "$gw" "$gc" "$pw" "$pc" <<'PY'
import platform, sys
import numpy, scipy
n, gw, gc, pw, pc = int(sys.argv[1]), *map(float, sys.argv[2:])
print(f"{n} correlograms; Python {platform.python_version()}, numpy {numpy.__version__}, scipy {scipy.__version__}")
print(f"dlsbatch run -j 1 (all outputs, report included): {gw:8.2f} s wall  {gc:8.2f} s CPU  ({1e3 * gc / n:.2f} ms CPU per file)")
print(f"scipy pipeline (one BLAS thread):                 {pw:8.2f} s wall  {pc:8.2f} s CPU  ({1e3 * pc / n:.2f} ms CPU per file)")
print(f"ratio scipy / dlsbatch: {pw / gw:.1f} (wall), {pc / gc:.1f} (CPU)")
PY
