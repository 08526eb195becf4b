# Side-by-side timing of exact k nearest neighbours on square-root topic
# profiles: loupe (bench/graph_knn_bench, BM_NearestNeighbours) against
# scikit-learn's brute-force NearestNeighbors (Debian python3-sklearn), on the
# same machine, in the same run, on the same profiles (Dirichlet(0.1) rows,
# N x K, written to bench/data/ as raw float64 and read by both).
# Usage: python3 bench/graph_knn_vs_sklearn.py [--build build] [--n 100000] [--k 100] [--neighbours 10] [--threads 2]
# Target: loupe under 60 s for N = 100,000, K = 100, k = 10 on 2 cores, and at least as fast as scikit-learn.
import argparse
import json
import os
import subprocess
import sys
import time

import numpy as np
import sklearn
from sklearn.neighbors import NearestNeighbors
from threadpoolctl import threadpool_limits

parser = argparse.ArgumentParser()
parser.add_argument("--build", default="build")
parser.add_argument("--n", type=int, default=100000)
parser.add_argument("--k", type=int, default=100)
parser.add_argument("--neighbours", type=int, default=10)
parser.add_argument("--threads", type=int, default=2)
args = parser.parse_args()

root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
data = os.path.join(root, "bench", "data")
os.makedirs(data, exist_ok=True)
path = os.path.join(data, "graph-theta-%dx%d.f64" % (args.n, args.k))
theta = np.random.default_rng(20240601).dirichlet(np.full(args.k, 0.1), size=args.n)
theta.astype("<f8").tofile(path)

# loupe: the Google Benchmark program on the same file.
program = os.path.join(args.build, "bench", "graph_knn_bench")
env = dict(os.environ, LOUPE_GRAPH_THETA="%s:%d:%d" % (path, args.n, args.k))
filter_ = "BM_NearestNeighbours/%d/%d/%d/%d" % (args.n, args.k, args.neighbours, args.threads)
out = subprocess.run([program, "--benchmark_filter=^" + filter_ + "(/|$)", "--benchmark_format=json"],
                     env=env, check=True, capture_output=True, text=True).stdout
runs = json.loads(out)["benchmarks"]
if not runs:
    sys.exit("graph_knn_bench has no benchmark %s; add its Args to bench/graph_knn_bench.cc" % filter_)
loupe_seconds = runs[0]["real_time"] * {"s": 1, "ms": 1e-3, "us": 1e-6, "ns": 1e-9}[runs[0]["time_unit"]]

# scikit-learn: brute force on the square-root profiles (Euclidean there is
# sqrt 2 times Hellinger, so the neighbours are the same), self included, so k + 1.
root_profiles = np.sqrt(theta)
with threadpool_limits(limits=args.threads):
    start = time.perf_counter()
    model = NearestNeighbors(n_neighbors=args.neighbours + 1, algorithm="brute", n_jobs=args.threads)
    model.fit(root_profiles)
    distances, indices = model.kneighbors(root_profiles)
    sklearn_seconds = time.perf_counter() - start

print("exact %d nearest neighbours, N = %d, K = %d, %d threads" % (args.neighbours, args.n, args.k, args.threads))
print("  loupe (graph_knn_bench)                        %8.1f s" % loupe_seconds)
print("  scikit-learn %-8s NearestNeighbors(brute)   %8.1f s" % (sklearn.__version__, sklearn_seconds))
print("  loupe is %.1fx as fast" % (sklearn_seconds / loupe_seconds))
