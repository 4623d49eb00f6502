#!/usr/bin/python3
"""Sum of K exponential relaxation modes y = sum_k a_k (1 - exp(-t / tau_k)) fitted by
scipy.optimize.curve_fit (Debian python3-scipy; Levenberg-Marquardt), started from the best
of a log-spaced grid of timescales with amplitudes by numpy.linalg.lstsq.
Prints a_1..a_K, tau_1..tau_K (by increasing tau), then their standard errors
(sqrt of the diagonal of pcov, scaled by the residual variance: absolute_sigma=False).
Usage: timescales_curve_fit.py FILE K   (FILE: two numbers per line, t and y)"""
import itertools
import sys

import numpy as np
from scipy.optimize import curve_fit

data = np.loadtxt(sys.argv[1])
t, y = data[:, 0], data[:, 1]
K = int(sys.argv[2])


def model(t, *p):
    a, tau = np.array(p[:K]), np.array(p[K:])
    return np.sum(a[None, :] * (1.0 - np.exp(-t[:, None] / tau[None, :])), axis=1)


lo = 0.5 * (t[-1] - t[0]) / (len(t) - 1)
grid = lo * (3.0 * t[-1] / lo) ** (np.arange(12) / 11.0)
best = None
for taus in itertools.combinations(grid, K):
    X = 1.0 - np.exp(-t[:, None] / np.array(taus)[None, :])
    a, *_ = np.linalg.lstsq(X, y, rcond=None)
    rss = np.sum((X @ a - y) ** 2)
    if best is None or rss < best[0]:
        best = (rss, list(a) + list(taus))
p, pcov = curve_fit(model, t, y, p0=best[1], maxfev=200000, xtol=1e-14, ftol=1e-14, gtol=1e-14)
se = np.sqrt(np.diag(pcov))
order = np.argsort(p[K:])
vals = [p[k] for k in order] + [p[K + k] for k in order]
vals += [se[k] for k in order] + [se[K + k] for k in order]
print(" ".join("%.17g" % v for v in vals))
