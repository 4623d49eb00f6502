#!/usr/bin/python3
"""T_eq = -F/lambda of the OLS fit N = F + lambda T by statsmodels.api.OLS (Debian
python3-statsmodels) and its delta-method standard error from statsmodels' cov_params()
and a central-difference gradient (numpy), independent of slowscan's closed form.
Usage: feedback_teq.py FILE (2n numbers one per line: T then N). Prints T_eq and its se."""
import sys
import numpy as np
import statsmodels.api as sm

v = np.loadtxt(sys.argv[1])
n = len(v) // 2
r = sm.OLS(v[n:], sm.add_constant(v[:n])).fit()
b, cov = np.asarray(r.params), np.asarray(r.cov_params())


def teq(p):
    return -p[0] / p[1]


g = np.zeros(2)
for k in range(2):
    h = 1e-6 * max(abs(b[k]), 1e-3)
    up, dn = b.copy(), b.copy()
    up[k] += h
    dn[k] -= h
    g[k] = (teq(up) - teq(dn)) / (2 * h)
print("%.17g %.17g" % (teq(b), np.sqrt(g @ cov @ g)))
