# Outside reference for loupe's near-duplicate search: exact Jaccard similarity
# of EVERY pair of documents over the same word shingles, by brute force
# (sparse document x shingle matrix, products in blocks; NumPy and SciPy,
# Debian python3-numpy / python3-scipy). No MinHash, no banding.
# Input: one line per document, its word ids separated by spaces (the corpus
# tokens). A shingle is a tuple of W consecutive ids; a document shorter than
# W (but not empty) has one shingle, all of its ids.
# Usage: python3 jaccard_bruteforce.py TOKENS W THRESHOLD OUT
#   OUT: "i j shared union" for every pair i < j with Jaccard >= THRESHOLD.
import sys

import numpy as np
import scipy.sparse as sp

tokens_path, width, threshold, out_path = sys.argv[1], int(sys.argv[2]), float(sys.argv[3]), sys.argv[4]
index = {}
rows, cols = [], []
documents = 0
with open(tokens_path) as f:
    for d, line in enumerate(f):
        ids = tuple(int(x) for x in line.split())
        documents += 1
        if not ids:
            continue
        shingles = {ids} if len(ids) < width else {ids[i:i + width] for i in range(len(ids) - width + 1)}
        for s in shingles:
            rows.append(d)
            cols.append(index.setdefault(s, len(index)))
matrix = sp.csr_matrix((np.ones(len(rows), dtype=np.float64), (rows, cols)), shape=(documents, len(index)))
sizes = np.asarray(matrix.sum(axis=1)).ravel()
transposed = matrix.T.tocsr()
found = 0
with open(out_path, "w") as out:
    for start in range(0, documents, 512):
        shared = (matrix[start:start + 512] @ transposed).toarray()
        union = sizes[start:start + 512, None] + sizes[None, :] - shared
        with np.errstate(divide="ignore", invalid="ignore"):
            jaccard = np.where(union > 0, shared / union, 0.0)
        for r, j in zip(*np.nonzero(jaccard >= threshold)):
            i = start + r
            if i < j:
                out.write("%d %d %d %d\n" % (i, j, shared[r, j], union[r, j]))
                found += 1
print("documents=%d shingles=%d pairs=%d" % (documents, len(index), found))
