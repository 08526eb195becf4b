#!/usr/bin/env bash
# Runs every benchmark: the Google Benchmark programs built from bench/*_bench.cc
# and the peer-comparison scripts. Usage: bench/run-benchmarks.sh [BUILD_DIR]
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
for program in "$build"/bench/*_bench; do
  [ -x "$program" ] || continue
  echo "== $program"
  "$program" --benchmark_min_time=0.5
done
echo "== bench/ingest_throughput.py"
/usr/bin/python3 bench/ingest_throughput.py --loupe "$build/apps/loupe"
for script in bench/model_*.sh bench/model_*.py; do
  [ -f "$script" ] || continue
  echo "== $script"
  case "$script" in
    *.py) /usr/bin/python3 "$script" --build "$build" ;;
    *.sh) bash "$script" "$build" ;;
  esac
done
