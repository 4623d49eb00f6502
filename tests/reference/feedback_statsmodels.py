#!/usr/bin/python3
"""Sliding-window OLS of N on (1, T) by statsmodels.api.OLS (Debian python3-statsmodels).
Usage: feedback_statsmodels.py FILE W STEP
FILE: 2n numbers one per line, T[0..n) then N[0..n). Windows start at 0, STEP, 2 STEP, ...
and hold W samples. Prints per window: F, lambda, se(F), se(lambda), R^2."""
import sys
import numpy as np
import statsmodels.api as sm

v = np.loadtxt(sys.argv[1])
W, step = int(sys.argv[2]), int(sys.argv[3])
n = len(v) // 2
T, N = v[:n], v[n:]
out = []
for s in range(0, n - W + 1, step):
    r = sm.OLS(N[s:s + W], sm.add_constant(T[s:s + W])).fit()
    out += list(r.params) + list(r.bse) + [r.rsquared]
print(" ".join("%.17g" % x for x in out))
