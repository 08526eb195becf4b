# Outside reference for loupe's group tests: scikit-bio's permanova, anosim and
# permdisp(test="centroid") on a distance matrix that the C++ test wrote.
# Usage: python3 skbio_group_tests.py DIR PERMUTATIONS SEED
#   DIR/dist.csv (N x N, no header), DIR/groups.txt (one label per line)
# Prints key=value lines.
import sys

import numpy as np
from skbio import DistanceMatrix
from skbio.stats.distance import anosim, permanova, permdisp

folder, permutations, seed = sys.argv[1], int(sys.argv[2]), int(sys.argv[3])
matrix = np.loadtxt(folder + "/dist.csv", delimiter=",")
groups = [line.strip() for line in open(folder + "/groups.txt") if line.strip()]
dm = DistanceMatrix((matrix + matrix.T) / 2.0)


def out(key, value):
    print("%s=%.17g" % (key, float(value)))


np.random.seed(seed)
result = permanova(dm, groups, permutations=permutations)
out("permanova_f", result["test statistic"])
out("permanova_p", result["p-value"])
out("permanova_n", result["sample size"])
out("permanova_groups", result["number of groups"])

np.random.seed(seed)
result = anosim(dm, groups, permutations=permutations)
out("anosim_r", result["test statistic"])
out("anosim_p", result["p-value"])

np.random.seed(seed)
result = permdisp(dm, groups, test="centroid", permutations=permutations)
out("permdisp_f", result["test statistic"])
out("permdisp_p", result["p-value"])
