#!/usr/bin/python3
"""Side by side, in one run: how long loupe's sampler takes to reach the best
held-out perplexity that scikit-learn's batch variational LDA reaches, against
scikit-learn's own time to reach it. Both are scored by loupe's
document-completion estimator (Wallach et al. 2009) on the same held-out
documents, with the same priors; timings exclude the scoring.

  /usr/bin/python3 bench/model_vs_sklearn.py --build build-model --out bench/data/race \
      --tokens 4000000 --topics 100 --max-iter 60

Writes OUT/result.json and prints a summary. scikit-learn is an outside
reference here (Debian python3-sklearn), never part of loupe.
"""
import argparse
import json
import os
import subprocess
import sys
import time

import numpy as np
from scipy.sparse import csr_matrix
from sklearn.decomposition import LatentDirichletAllocation
from sklearn.utils.parallel import Parallel


def read_counts(path):
    with open(path) as source:
        n_docs, n_words = (int(x) for x in source.readline().split())
        rows, cols, values = [], [], []
        for d, line in enumerate(source):
            for pair in line.split():
                w, c = pair.split(":")
                rows.append(d)
                cols.append(int(w))
                values.append(int(c))
    return csr_matrix((values, (rows, cols)), shape=(n_docs, n_words), dtype=np.float64)


def main():
    parser = argparse.ArgumentParser(description=__doc__, formatter_class=argparse.RawDescriptionHelpFormatter)
    parser.add_argument("--build", default="build-model")
    parser.add_argument("--out", default="bench/data/race")
    parser.add_argument("--tokens", type=int, default=4000000)
    parser.add_argument("--vocabulary", type=int, default=20000)
    parser.add_argument("--true-topics", type=int, default=100)
    parser.add_argument("--topics", type=int, default=100)
    parser.add_argument("--alpha", type=float, default=0.1)
    parser.add_argument("--beta", type=float, default=0.01)
    parser.add_argument("--max-iter", type=int, default=60)
    parser.add_argument("--sklearn-jobs", type=int, default=1)
    parser.add_argument("--threads", type=int, default=1, help="loupe threads")
    parser.add_argument("--sampler", default="auto")
    parser.add_argument("--mh-steps", type=int, default=2)
    parser.add_argument("--evaluate-every", type=int, default=5)
    args = parser.parse_args()

    tool = os.path.join(args.build, "bench", "model_race_bench")
    os.makedirs(args.out, exist_ok=True)
    print(subprocess.run([tool, "draw", args.out, str(args.tokens), str(args.vocabulary), str(args.true_topics)],
                         check=True, capture_output=True, text=True).stdout.strip())

    X = read_counts(os.path.join(args.out, "train-counts.txt"))
    lda = LatentDirichletAllocation(n_components=args.topics, doc_topic_prior=args.alpha,
                                    topic_word_prior=args.beta, learning_method="batch",
                                    max_iter=args.max_iter, random_state=0, n_jobs=args.sklearn_jobs)
    # The loop of LatentDirichletAllocation.fit (scikit-learn 1.2), timed per
    # iteration, with a snapshot of E[phi] after each.
    lda._init_latent_vars(X.shape[1], dtype=X.dtype)
    elapsed = 0.0
    snapshots = []
    with Parallel(n_jobs=args.sklearn_jobs) as parallel:
        for i in range(args.max_iter):
            start = time.perf_counter()
            lda._em_step(X, total_samples=X.shape[0], batch_update=True, parallel=parallel)
            elapsed += time.perf_counter() - start
            phi = (lda.components_ / lda.components_.sum(axis=1, keepdims=True)).astype(np.float32)
            path = os.path.join(args.out, "sklearn-phi-%03d.f32" % (i + 1))
            phi.tofile(path)
            snapshots.append((i + 1, elapsed, path))
            print("scikit-learn iteration %d: %.1f s" % (i + 1, elapsed), flush=True)

    scored = subprocess.run([tool, "score", args.out, str(args.topics), str(args.alpha)] + [p for _, _, p in snapshots],
                            check=True, capture_output=True, text=True).stdout.split()
    perplexity = {line.rsplit(",", 1)[0]: float(line.rsplit(",", 1)[1]) for line in scored}
    sklearn_curve = [(i, t, perplexity[p]) for i, t, p in snapshots]
    best_iter, best_time, best = min(sklearn_curve, key=lambda row: row[2])
    for _, _, p in snapshots:
        os.remove(p)

    race = subprocess.run([tool, "race", args.out, str(args.topics), str(args.alpha), str(args.beta), str(args.threads),
                           str(args.evaluate_every), str(max(60.0, 3 * best_time)), str(best), args.sampler,
                           str(args.mh_steps)], check=True, capture_output=True, text=True).stdout.split()
    loupe_curve = [tuple(float(x) for x in line.split(",")) for line in race[1:]]
    reached = [row for row in loupe_curve if row[2] <= best]
    result = {
        "tokens": args.tokens, "vocabulary": args.vocabulary, "topics": args.topics,
        "alpha": args.alpha, "beta": args.beta,
        "sklearn": {"version": __import__("sklearn").__version__, "jobs": args.sklearn_jobs,
                    "best_perplexity": best, "best_iteration": best_iter, "seconds_to_best": best_time,
                    "curve": sklearn_curve},
        "loupe": {"threads": args.threads, "sampler": args.sampler, "mh_steps": args.mh_steps,
                  "seconds_to_sklearn_best": reached[0][1] if reached else None,
                  "sweeps_to_sklearn_best": int(reached[0][0]) if reached else None,
                  "curve": loupe_curve},
    }
    if reached:
        result["speedup"] = best_time / reached[0][1]
    with open(os.path.join(args.out, "result.json"), "w") as out:
        json.dump(result, out, indent=2)
    print("scikit-learn batch VB: best held-out perplexity %.2f at iteration %d after %.1f s" % (best, best_iter, best_time))
    if reached:
        print("loupe: reached %.2f after %d sweeps, %.2f s of sampling: %.1fx sooner"
              % (reached[0][2], reached[0][0], reached[0][1], result["speedup"]))
    else:
        print("loupe: did not reach %.2f within the time allowed (best %.2f)" % (best, min(r[2] for r in loupe_curve)))
    return 0


if __name__ == "__main__":
    sys.exit(main())
