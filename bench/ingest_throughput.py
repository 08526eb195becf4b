#!/usr/bin/python3
"""Ingestion throughput (MB/s) and peak memory of `loupe ingest` on a generated
corpus of at least 100 MB (scripts/make_bench_corpus.py). A benchmark, not a test.

    /usr/bin/python3 bench/ingest_throughput.py [--loupe build/apps/loupe] [--megabytes 100]
"""
import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time

here = os.path.dirname(os.path.abspath(__file__))
root = os.path.dirname(here)


def folder_bytes(path):
    total = 0
    for folder, _, files in os.walk(path):
        for name in files:
            if name.endswith(".txt"):
                total += os.path.getsize(os.path.join(folder, name))
    return total


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--loupe", default=os.path.join(root, "build", "apps", "loupe"))
    parser.add_argument("--megabytes", type=int, default=100)
    parser.add_argument("--data", default=os.path.join(root, "bench", "data"))
    parser.add_argument("--repeat", type=int, default=3)
    args = parser.parse_args()

    corpus = os.path.join(args.data, "ingest-%dmb" % args.megabytes)
    if not os.path.isdir(corpus):
        os.makedirs(args.data, exist_ok=True)
        subprocess.run([sys.executable, os.path.join(root, "scripts", "make_bench_corpus.py"),
                        "--out", corpus, "--megabytes", str(args.megabytes)], check=True)
    size = folder_bytes(corpus)
    print("corpus: %s, %.1f MB of text" % (corpus, size / 1e6))
    with tempfile.TemporaryDirectory() as out:
        for source, label in ((corpus, "folder"), (os.path.join(corpus, "manifest.csv"), "csv manifest")):
            best = None
            for _ in range(args.repeat):
                before = resource.getrusage(resource.RUSAGE_CHILDREN)
                start = time.perf_counter()
                # One core: ingestion is single-threaded; taskset pins it.
                subprocess.run(["taskset", "-c", "0", args.loupe, "ingest", source, "-o",
                                os.path.join(out, "bench.corpus"), "--quiet"], check=True)
                wall = time.perf_counter() - start
                best = wall if best is None else min(best, wall)
                del before
            peak = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024.0
            print("%-13s best of %d: %.2f s, %.1f MB/s on one core, peak memory (largest run) %.0f MiB"
                  % (label, args.repeat, best, size / 1e6 / best, peak))


if __name__ == "__main__":
    main()
