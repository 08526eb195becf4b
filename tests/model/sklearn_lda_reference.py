#!/usr/bin/python3
"""Fits scikit-learn's LatentDirichletAllocation (batch variational Bayes) to a
document-word count file and writes its topic-word distributions, for the
side-by-side check in sklearn_reference_test.cc. Outside reference only.

Input  (argv[1]): first line "D V K ALPHA BETA MAX_ITER SEED", then one line per
                  document of "word:count" pairs separated by spaces.
Output (argv[2]): K lines of V probabilities (each line sums to 1).
"""
import sys

import numpy as np
from scipy.sparse import csr_matrix
from sklearn.decomposition import LatentDirichletAllocation


def main():
    with open(sys.argv[1]) as source:
        header = source.readline().split()
        n_docs, n_words, n_topics = int(header[0]), int(header[1]), int(header[2])
        alpha, beta = float(header[3]), float(header[4])
        max_iter, seed = int(header[5]), int(header[6])
        rows, cols, values = [], [], []
        for d, line in enumerate(source):
            for pair in line.split():
                w, c = pair.split(":")
                rows.append(d)
                cols.append(int(w))
                values.append(int(c))
    counts = csr_matrix((values, (rows, cols)), shape=(n_docs, n_words), dtype=np.float64)
    lda = LatentDirichletAllocation(n_components=n_topics, doc_topic_prior=alpha, topic_word_prior=beta,
                                    learning_method="batch", max_iter=max_iter, random_state=seed)
    lda.fit(counts)
    # E[phi] under the variational posterior: lambda normalised per topic.
    phi = lda.components_ / lda.components_.sum(axis=1, keepdims=True)
    np.savetxt(sys.argv[2], phi, fmt="%.10g")
    print("scikit-learn", __import__("sklearn").__version__, "iterations", lda.n_iter_)


if __name__ == "__main__":
    main()
