#!/usr/bin/python3
"""Generalised Pareto maximum-likelihood fit (location 0) by scipy.stats.genpareto.fit
(Debian python3-scipy), and the Anderson-Darling A^2 by its formula with scipy's cdf.
Prints: xi sigma (scipy's default fit), xi sigma (the same likelihood minimised by
scipy.optimize.fmin to tight tolerances), A^2 at the given XI SIGMA,
1 - cdf(X) at the given XI SIGMA for each further X.
Usage: gpd_scipy.py FILE XI SIGMA [X ...]   (FILE: the exceedances, one per line)"""
import sys
import numpy as np
from scipy import optimize, stats

z = np.sort(np.loadtxt(sys.argv[1]))
xi, sigma = float(sys.argv[2]), float(sys.argv[3])
c0, _, s0 = stats.genpareto.fit(z, floc=0)


def tight(func, x0, args=(), disp=0):
    return optimize.fmin(func, x0, args=args, xtol=1e-12, ftol=1e-14, maxiter=20000,
                         maxfun=40000, disp=0)


c1, _, s1 = stats.genpareto.fit(z, c0, floc=0, scale=s0, optimizer=tight)
# Anderson & Darling 1954: A^2 = -n - (1/n) sum (2i-1) [ln u_(i) + ln(1 - u_(n+1-i))]
n = len(z)
u = stats.genpareto.cdf(z, xi, loc=0, scale=sigma)
i = np.arange(1, n + 1)
a2 = -n - np.sum((2 * i - 1) * (np.log(u) + np.log1p(-u[::-1]))) / n
sf = [stats.genpareto.sf(float(x), xi, loc=0, scale=sigma) for x in sys.argv[4:]]
print(" ".join("%.17g" % v for v in [c0, s0, c1, s1, a2] + sf))
