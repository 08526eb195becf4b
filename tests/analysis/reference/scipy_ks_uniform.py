# Outside reference for the calibration of loupe's conformal p-values: SciPy's
# one-sample Kolmogorov-Smirnov test (scipy.stats.kstest) of values read one a
# line against the uniform distribution on [0, 1].
# Usage: python3 scipy_ks_uniform.py FILE  -> n=..., statistic=..., pvalue=...
import sys

from scipy import stats

values = [float(line) for line in open(sys.argv[1]) if line.strip()]
result = stats.kstest(values, "uniform")
print("n=%d" % len(values))
print("statistic=%.17g" % result.statistic)
print("pvalue=%.17g" % result.pvalue)
