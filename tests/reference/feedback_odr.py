#!/usr/bin/python3
"""Sliding-window straight-line orthogonal distance regression of N on T by scipy.odr
(Debian python3-scipy, ODRPACK), with sx = 1 and sy = sqrt(RATIO), so that the ratio of
the noise variances var(N) / var(T) is RATIO.
Usage: feedback_odr.py FILE W STEP RATIO
FILE: 2n numbers one per line, T[0..n) then N[0..n). Prints per window: F, lambda,
sd(F), sd(lambda) (scipy's sd_beta)."""
import sys
import numpy as np
from scipy import odr

v = np.loadtxt(sys.argv[1])
W, step, ratio = int(sys.argv[2]), int(sys.argv[3]), float(sys.argv[4])
n = len(v) // 2
T, N = v[:n], v[n:]
out = []
for s in range(0, n - W + 1, step):
    x, y = T[s:s + W], N[s:s + W]
    b = np.polyfit(x, y, 1)
    data = odr.RealData(x, y, sx=np.ones(W), sy=np.full(W, np.sqrt(ratio)))
    fit = odr.ODR(data, odr.unilinear, beta0=[b[0], b[1]], maxit=1000,
                  sstol=1e-15, partol=1e-15).run()
    out += [fit.beta[1], fit.beta[0], fit.sd_beta[1], fit.sd_beta[0]]
print(" ".join("%.17g" % x for x in out))
