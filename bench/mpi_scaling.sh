#!/usr/bin/env bash
# Tokens a second of `loupe fit` spread over 1, 2 and 4 MPI processes on this
# machine (oversubscribed where it has fewer cores), one thread a process, on a
# corpus drawn from the LDA generative process (JMLR, 2003) with Zipf word
# frequencies; then the time of one all-reduce of the topic-word table at the
# three table sizes (bench/mpi_allreduce_time.c). Not a test. The figures go to docs/scaling.md.
#
#   bench/mpi_scaling.sh [BUILD_DIR] [TOKENS] [SWEEPS]      e.g. bench/mpi_scaling.sh build 2000000 40
#
# Needs a build with MPI (LOUPE_MPI) and Google Benchmark (for model_race_bench,
# which draws the corpus into bench/data/mpi-scaling/).
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
tokens=${2:-2000000}
sweeps=${3:-40}
loupe="$build/apps/loupe"
data=bench/data/mpi-scaling
mkdir -p "$data"
if [ ! -f "$data/train-$tokens.corpus" ]; then
  "$build/bench/model_race_bench" draw "$data" "$tokens" 20000 100 >/dev/null
  mv "$data/train.corpus" "$data/train-$tokens.corpus"
  rm -f "$data/heldout.corpus" "$data/train-counts.txt"
fi
corpus="$data/train-$tokens.corpus"
launcher=(mpirun --oversubscribe)
if [ "$(id -u)" -eq 0 ]; then launcher+=(--allow-run-as-root); fi

echo "cores: $(nproc); corpus: $corpus; $sweeps sweeps; one thread a process"
echo "kernel,topics,processes,tokens_per_second,seconds,summed_per_sweep"
for setting in "exact 20" "mh 100" "mh 1000"; do
  set -- $setting
  kernel=$1
  topics=$2
  common=(fit "$corpus" -o "$data/model" --topics "$topics" --chains 1 --sampler "$kernel" --sweeps "$sweeps"
          --burn-in $((sweeps / 2)) --samples 2 --sample-lag 5 --log-likelihood-every "$sweeps" --threads 1)
  alone=$("$loupe" "${common[@]}")
  rate=$(sed -n 's/.* sweeps in \([0-9.]*\) s, \([0-9.]*\)M tokens\/s.*/\2,\1/p' <<<"$alone")
  echo "$kernel,$topics,alone,${rate%,*}M,${rate#*,},-"
  for processes in 1 2 4; do
    out=$("${launcher[@]}" -np "$processes" "$loupe" "${common[@]}")
    rate=$(sed -n 's/.* sweeps in \([0-9.]*\) s, \([0-9.]*\)M tokens\/s.*/\2,\1/p' <<<"$out")
    summed=$(sed -n 's/.*each sweep sums \(.*\) of counts.*/\1/p' <<<"$out")
    echo "$kernel,$topics,$processes,${rate%,*}M,${rate#*,},$summed"
  done
done
rm -f "$data/model"
mpicc -O2 bench/mpi_allreduce_time.c -o "$data/mpi_allreduce_time"
echo "operation,processes,table,seconds"
for processes in 2 4; do
  "${launcher[@]}" -np "$processes" "$data/mpi_allreduce_time"
done
