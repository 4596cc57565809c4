#!/usr/bin/env bash
# Compares one benchmark of a package between an earlier commit and the
# work tree, as the Speed section of DEVELOPERS.md asks on a shared
# machine: both test binaries are built first (go test -c), then run in
# turn, ROUNDS times each, and benchstat compares them. Not part of CI.
#
#   bash testdata/bench/ab.sh COMMIT PACKAGE BENCH [ROUNDS] [BENCHTIME]
#   bash testdata/bench/ab.sh 533b3c0 ./cmd/dlsbatch '^BenchmarkAnalyze$' 10 3s
#
# The earlier commit is exported with git archive into a temporary folder
# (the repository is not touched). benchstat comes from the Go module
# proxy (go run golang.org/x/perf/cmd/benchstat@latest) unless it is on
# PATH. The load average after each round is printed with the results.
set -euo pipefail
cd "$(dirname "$0")/../.."

if [ $# -lt 3 ]; then
  echo "usage: $0 COMMIT PACKAGE BENCH [ROUNDS] [BENCHTIME]" >&2
  exit 2
fi
commit=$1 pkg=$2 bench=$3 rounds=${4:-6} benchtime=${5:-2s}

work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
mkdir "$work/old"
git archive "$commit" | tar -x -C "$work/old"
(cd "$work/old" && go test -c -o "$work/old.test" "$pkg")
go test -c -o "$work/new.test" "$pkg"

# Benchmarks run in the package's folder, as go test runs them (some read
# testdata relative to it).
dir=${pkg#./}
for r in $(seq "$rounds"); do
  (cd "$work/old/$dir" && "$work/old.test" -test.run XX -test.bench "$bench" -test.benchtime "$benchtime" -test.benchmem) | grep '^Benchmark' >>"$work/old.txt"
  (cd "$dir" && "$work/new.test" -test.run XX -test.bench "$bench" -test.benchtime "$benchtime" -test.benchmem) | grep '^Benchmark' >>"$work/new.txt"
  echo "round $r: load $(cut -d' ' -f1-3 /proc/loadavg)"
done
if command -v benchstat >/dev/null; then
  benchstat "$work/old.txt" "$work/new.txt"
else
  go run golang.org/x/perf/cmd/benchstat@latest "$work/old.txt" "$work/new.txt"
fi
