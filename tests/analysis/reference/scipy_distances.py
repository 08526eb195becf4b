# Outside reference for loupe's profile distances: SciPy's Jensen-Shannon
# distance (base 2) and the Hellinger distance computed with NumPy as
# ||sqrt p - sqrt q|| / sqrt 2, for consecutive pairs of rows of a CSV.
# Usage: python3 scipy_distances.py FILE  -> js_I=..., hellinger_I=... for rows (2I, 2I+1)
import sys

import numpy as np
from scipy.spatial.distance import jensenshannon

rows = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
for i in range(rows.shape[0] // 2):
    p, q = rows[2 * i], rows[2 * i + 1]
    print("js_%d=%.17g" % (i, jensenshannon(p, q, base=2)))
    print("hellinger_%d=%.17g" % (i, np.linalg.norm(np.sqrt(p) - np.sqrt(q)) / np.sqrt(2)))
