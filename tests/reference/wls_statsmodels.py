#!/usr/bin/python3
"""The noise-trend fit by statsmodels (Debian python3-statsmodels): OLS of x[t+1] on
(x[t], s_t x[t], 1), a straight line through the squared residuals over s_t (floored at 1% of
their mean) as the variance, then statsmodels.api.WLS with weights 1/variance.
Prints a0 a1 c, their standard errors, and their HC3 standard errors (cov_type="HC3"). Usage: wls_statsmodels.py FILE"""
import sys
import numpy as np
import statsmodels.api as sm

x = np.loadtxt(sys.argv[1])
n = len(x)
s = np.arange(n - 1) / (n - 1) - 0.5
X = np.column_stack([x[:-1], s * x[:-1], np.ones(n - 1)])
r2 = sm.OLS(x[1:], X).fit().resid ** 2
line = np.polyfit(s, r2, 1)
v = np.maximum(np.polyval(line, s), 0.01 * r2.mean())
w = sm.WLS(x[1:], X, weights=1.0 / v).fit()
h = sm.WLS(x[1:], X, weights=1.0 / v).fit(cov_type="HC3")
print(" ".join("%.17g" % q for q in list(w.params) + list(w.bse) + list(h.bse)))
