# Outside reference for loupe's exact k nearest neighbours: brute force with
# SciPy's cdist (Debian python3-scipy) on square-root profiles, whose Euclidean
# distance divided by sqrt 2 is the Hellinger distance.
# Usage: python3 knn_cdist.py THETA.csv K OUT
#   OUT line d: the k nearest documents (self excluded, nearest first), "|",
#   the k-th distance and the (k+1)-th distance (to tell ties).
import sys

import numpy as np
from scipy.spatial.distance import cdist

theta = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
k = int(sys.argv[2])
root = np.sqrt(theta)
with open(sys.argv[3], "w") as out:
    for start in range(0, root.shape[0], 256):
        block = cdist(root[start:start + 256], root) / np.sqrt(2.0)
        for r in range(block.shape[0]):
            d = start + r
            row = block[r].copy()
            row[d] = np.inf
            order = np.argsort(row, kind="stable")
            kth, following = row[order[k - 1]], row[order[k]] if k < len(order) - 1 else np.inf
            out.write(" ".join(str(j) for j in order[:k]) + " | %.17g %.17g\n" % (kth, following))
