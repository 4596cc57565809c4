#!/usr/bin/env bash
# Measures how far a default 'dlsbatch run' at -j 2 gains on -j 1, beside
# the ceiling the machine itself sets: two independent -j 1 runs at once,
# each with GOMAXPROCS=1 and its own output folder, sharing nothing but
# the disk and the memory. Not part of CI: the figures depend on the
# machine, its file system and what else runs on it.
#
#   bash testdata/bench/parallel.sh INPUT_DIR [ROUNDS] [OUTPUT_BASE]
#
# INPUT_DIR is a folder of correlograms (for example the inputs kept by
# 'vs_scipy.sh --keep DIR', in DIR/in); OUTPUT_BASE (default: a temporary
# folder under $TMPDIR) is where the output folders go: put it on
# another file system (/dev/shm, say) to see what the disk costs. Prints
# the medians of ROUNDS (default 8) rounds of each.
set -euo pipefail
cd "$(dirname "$0")/../.."
if [ $# -lt 1 ]; then
  echo "usage: $0 INPUT_DIR [ROUNDS] [OUTPUT_BASE]" >&2
  exit 2
fi
in=$(cd "$1" && pwd)
rounds=${2:-8}
work=$(mktemp -d)
base=${3:-$work}
trap 'rm -rf "$work" "$base/par-a" "$base/par-b"' EXIT
go build -o "$work/dlsbatch" ./cmd/dlsbatch
sync
python3 - "$work/dlsbatch" "$in" "$rounds" "$base" <<'PY'
import os, resource, shutil, statistics, subprocess, sys, time
exe, inp, rounds, base = sys.argv[1], sys.argv[2], int(sys.argv[3]), sys.argv[4]

def start(out, j, env=None):
    shutil.rmtree(out, ignore_errors=True)
    return subprocess.Popen([exe, 'run', inp, '--out', out, '-j', str(j), '-q'],
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                            env=dict(os.environ, **(env or {})))

def cpu():
    r = resource.getrusage(resource.RUSAGE_CHILDREN)
    return r.ru_utime + r.ru_stime

def timed(*procs):
    c, t = cpu(), time.perf_counter()
    ps = [p() for p in procs]
    for p in ps:
        if p.wait() != 0 and p.returncode not in (3, 4, 5):
            sys.exit(f'dlsbatch run exited with {p.returncode}')
    return time.perf_counter() - t, (cpu() - c) / len(ps)

a, b = os.path.join(base, 'par-a'), os.path.join(base, 'par-b')
one = {'GOMAXPROCS': '1'}
j1, j2, alone, both = [], [], [], []
for _ in range(rounds):
    j1.append(timed(lambda: start(a, 1)))
    j2.append(timed(lambda: start(a, 2)))
    alone.append(timed(lambda: start(a, 1, one)))
    both.append(timed(lambda: start(a, 1, one), lambda: start(b, 1, one)))
m = statistics.median
def row(name, xs):
    print(f'{name:44s} {m(x[0] for x in xs):7.3f} s wall {m(x[1] for x in xs):7.3f} s CPU per run')
print(f'{rounds} rounds, {len(os.listdir(inp))} inputs, outputs under {base}')
row('one run -j 1', j1)
row('one run -j 2', j2)
row('one run -j 1, GOMAXPROCS=1', alone)
row('two such runs at once', both)
ratios = [x[0] / y[0] for x, y in zip(j1, j2)]
print(f'-j 2 against -j 1: median {m(ratios):.3f} ({min(ratios):.3f}–{max(ratios):.3f})')
print(f'ceiling, two independent runs against one: {2 * m(x[0] for x in alone) / m(x[0] for x in both):.3f}')
PY
