# Outside reference for loupe's topic coherence: document co-occurrence counts
# computed directly with NumPy (a binary document x word matrix X, D = X^T X),
# then per topic the mean NPMI over pairs (Bouma 2009) and the mean UMass term
# log((D(w_m, w_l) + 1) / D(w_l)) over pairs l < m (Mimno et al. 2011).
# Usage: python3 coherence_reference.py CORPUS TOPICS
#   CORPUS: one line per document, "UNIT w1 w2 ..."; lines sharing UNIT (the
#           segments of one source document) form one document.
#   TOPICS: one line per topic, its word ids most probable first.
# Prints npmi_I=... and umass_I=... for topic I (0-based).
import sys

import numpy as np

units = {}
rows = []
with open(sys.argv[1]) as f:
    for line in f:
        fields = line.split()
        if not fields:
            continue
        unit = units.setdefault(fields[0], len(units))
        rows.append((unit, [int(w) for w in fields[1:]]))
topics = []
with open(sys.argv[2]) as f:
    for line in f:
        if line.strip():
            topics.append([int(w) for w in line.split()])

vocabulary = 1 + max([w for _, words in rows for w in words] + [w for t in topics for w in t])
x = np.zeros((len(units), vocabulary), dtype=np.int64)
for unit, words in rows:
    if words:
        x[unit, words] = 1
d = x.T @ x  # d[i, j]: documents holding both i and j; d[i, i]: documents holding i
n = float(len(units))

for t, words in enumerate(topics):
    npmi, umass = [], []
    for j in range(len(words)):
        for i in range(j):
            a, b = words[i], words[j]
            joint = d[a, b]
            if joint == 0:
                npmi.append(-1.0)
            elif joint == n:
                npmi.append(1.0)
            else:
                p_ab, p_a, p_b = joint / n, d[a, a] / n, d[b, b] / n
                npmi.append(np.log(p_ab / (p_a * p_b)) / -np.log(p_ab))
            # UMass: w_m = b is the later word, w_l = a the earlier one.
            umass.append(np.log((joint + 1.0) / d[a, a]))
    print("npmi_%d=%.17g" % (t, np.mean(npmi)))
    print("umass_%d=%.17g" % (t, np.mean(umass)))
