#!/usr/bin/python3
"""Joint fit of a response T and a flux N with shared timescales,
T = sum_k a_k (1 - exp(-t/tau_k)), N = sum_k c_k exp(-t/tau_k), by scipy.optimize.curve_fit
(Debian python3-scipy) on the stacked residuals weighted by WY and WF, started from the best of
a log-spaced grid of timescales with amplitudes by numpy.linalg.lstsq.
Prints a_1..a_K, tau_1..tau_K, c_1..c_K (by increasing tau).
Usage: timescales_joint_curve_fit.py FILE K WY WF   (FILE: t T N per line)"""
import itertools
import sys

import numpy as np
from scipy.optimize import curve_fit

data = np.loadtxt(sys.argv[1])
t, T, N = data[:, 0], data[:, 1], data[:, 2]
K, wy, wf = int(sys.argv[2]), float(sys.argv[3]), float(sys.argv[4])
n = len(t)


def model(_, *p):
    a, tau, c = np.array(p[:K]), np.array(p[K:2 * K]), np.array(p[2 * K:])
    e = np.exp(-t[:, None] / tau[None, :])
    return np.concatenate([wy * np.sum(a * (1 - e), axis=1), wf * np.sum(c * e, axis=1)])


lo = 0.5 * (t[-1] - t[0]) / (n - 1)
grid = lo * (3.0 * t[-1] / lo) ** (np.arange(12) / 11.0)
best = None
for taus in itertools.combinations(grid, K):
    e = np.exp(-t[:, None] / np.array(taus)[None, :])
    a, *_ = np.linalg.lstsq(1 - e, T, rcond=None)
    c, *_ = np.linalg.lstsq(e, N, rcond=None)
    rss = wy ** 2 * np.sum(((1 - e) @ a - T) ** 2) + wf ** 2 * np.sum((e @ c - N) ** 2)
    if best is None or rss < best[0]:
        best = (rss, list(a) + list(taus) + list(c))
target = np.concatenate([wy * T, wf * N])
p, _ = curve_fit(model, np.zeros(2 * n), target, p0=best[1], maxfev=200000, xtol=1e-14,
                 ftol=1e-14, gtol=1e-14)
order = np.argsort(p[K:2 * K])
print(" ".join("%.17g" % v for v in [p[k] for k in order] + [p[K + k] for k in order]
               + [p[2 * K + k] for k in order]))
