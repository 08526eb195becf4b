# Side by side, one run: PERMANOVA on N = 2000 documents, K = 50 topics,
# 4 groups, 999 permutations, Hellinger distances: loupe (2 threads),
# scikit-bio's permanova and vegan's adonis2. Prints seconds, speed-ups and
# pseudo-F. Targets: loupe >= 50x scikit-bio and >= 1000x vegan, same pseudo-F.
# Usage: python3 bench/analysis_permanova_peers.py --build BUILD_DIR [--skip-vegan]
import argparse
import os
import subprocess
import sys
import tempfile
import time

import numpy as np
from scipy.spatial.distance import pdist, squareform
from skbio import DistanceMatrix
from skbio.stats.distance import permanova

parser = argparse.ArgumentParser()
parser.add_argument("--build", default="build")
parser.add_argument("--documents", type=int, default=2000)
parser.add_argument("--topics", type=int, default=50)
parser.add_argument("--permutations", type=int, default=999)
parser.add_argument("--skip-vegan", action="store_true")
args = parser.parse_args()
here = os.path.dirname(os.path.abspath(__file__))

rng = np.random.default_rng(7)
n, k = args.documents, args.topics
groups = np.arange(n) % 4
alpha = 0.5 * (1.0 + 0.05 * groups[:, None] * (np.arange(k)[None, :] % 3))
theta = np.array([rng.dirichlet(a) for a in alpha])

with tempfile.TemporaryDirectory() as folder:
    np.savetxt(os.path.join(folder, "theta.csv"), theta, delimiter=",", fmt="%.17g")
    np.savetxt(os.path.join(folder, "groups.txt"), groups, fmt="%d")

    # loupe: the median of 5 runs (each well under a second; the machine is shared).
    env = dict(os.environ, LOUPE_PERMANOVA_INPUT=folder, LOUPE_PERMANOVA_PERMUTATIONS=str(args.permutations))
    runs = []
    for _ in range(5):
        out = subprocess.run([os.path.join(args.build, "bench", "analysis_permanova_bench")], env=env,
                             capture_output=True, text=True, check=True).stdout
        runs.append(dict(line.split("=", 1) for line in out.split()))
    runs.sort(key=lambda r: float(r["seconds"]))
    loupe = runs[len(runs) // 2]
    loupe_f, loupe_s = float(loupe["pseudo_f"]), float(loupe["seconds"])
    loupe_fastest = float(runs[0]["seconds"])

    # Hellinger distances ||sqrt p - sqrt q|| / sqrt 2 for scikit-bio (not timed).
    dm = DistanceMatrix(squareform(pdist(np.sqrt(theta)) / np.sqrt(2.0)))
    labels = [str(g) for g in groups]
    start = time.perf_counter()
    result = permanova(dm, labels, permutations=args.permutations)
    skbio_s = time.perf_counter() - start
    skbio_f = float(result["test statistic"])

    vegan_s = vegan_f = float("nan")
    if not args.skip_vegan:
        out = subprocess.run(["Rscript", "--vanilla", os.path.join(here, "analysis_permanova_vegan.R"), folder,
                              str(args.permutations)], capture_output=True, text=True, check=True).stdout
        vegan = dict(line.split("=", 1) for line in out.split() if "=" in line)
        vegan_f, vegan_s = float(vegan["pseudo_f"]), float(vegan["seconds"])

print(f"PERMANOVA, N = {n}, K = {k}, 4 groups, {args.permutations} permutations")
print(f"  loupe (2 threads) {loupe_s:10.4f} s   pseudo-F {loupe_f:.12g}   p {loupe['p']}"
      f"   (median of 5 runs; fastest {loupe_fastest:.4f} s)")
print(f"  scikit-bio        {skbio_s:10.4f} s   pseudo-F {skbio_f:.12g}   p {float(result['p-value']):.4g}"
      f"   loupe is {skbio_s / loupe_s:8.1f}x faster")
if not args.skip_vegan:
    print(f"  vegan adonis2     {vegan_s:10.4f} s   pseudo-F {vegan_f:.12g}   loupe is {vegan_s / loupe_s:8.1f}x faster")
worst = max(abs(loupe_f - skbio_f), 0 if args.skip_vegan else abs(loupe_f - vegan_f)) / abs(loupe_f)
print(f"  largest relative difference in pseudo-F: {worst:.2e}")
ok = skbio_s / loupe_s >= 50 and (args.skip_vegan or vegan_s / loupe_s >= 1000) and worst < 1e-9
print("  targets (>= 50x scikit-bio, >= 1000x vegan, same pseudo-F):", "met" if ok else "NOT met")
sys.exit(0 if ok else 1)
