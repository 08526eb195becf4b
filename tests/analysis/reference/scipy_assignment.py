# Outside reference for loupe's assignment solver: SciPy's
# scipy.optimize.linear_sum_assignment (Debian python3-scipy) on each cost
# matrix CSV named on the command line. Prints cost_I=<least total cost>.
import sys

import numpy as np
from scipy.optimize import linear_sum_assignment

for i, path in enumerate(sys.argv[1:]):
    cost = np.loadtxt(path, delimiter=",", ndmin=2)
    rows, cols = linear_sum_assignment(cost)
    print("cost_%d=%.17g" % (i, cost[rows, cols].sum()))
