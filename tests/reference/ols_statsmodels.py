#!/usr/bin/python3
"""OLS of x[t+1] on (x[t], s_t x[t], 1), s_t = t/(n-1) - 1/2, by statsmodels.api.OLS
(Debian python3-statsmodels). Prints a0 a1 c, their standard errors, and their HC3 standard errors (cov_type="HC3").
Usage: ols_statsmodels.py FILE (one value per line)"""
import sys
import numpy as np
import statsmodels.api as sm

x = np.loadtxt(sys.argv[1])
n = len(x)
s = np.arange(n - 1) / (n - 1) - 0.5
X = np.column_stack([x[:-1], s * x[:-1], np.ones(n - 1)])
r = sm.OLS(x[1:], X).fit()
h = sm.OLS(x[1:], X).fit(cov_type="HC3")
print(" ".join("%.17g" % v for v in list(r.params) + list(r.bse) + list(h.bse)))
