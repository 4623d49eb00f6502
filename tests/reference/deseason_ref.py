#!/usr/bin/python3
"""Independent reference for slowscan's deseasoning (detrend.h), written from its definition
with numpy (Debian python3-numpy) and, for the harmonic fit, numpy.linalg.lstsq or
statsmodels OLS (Debian python3-statsmodels) on the same design.

usage: deseason_ref.py FILE STEPS K W [lstsq|ols]
FILE: one sample a line (nan for missing). STEPS: period in samples. K: harmonics (0: mean
cycle, STEPS whole). W: window in samples (n: the whole record). Prints x minus the cycle."""
import sys

import numpy as np


def moving_average(x, m):
    """Centred average over m samples (2 x m for even m), nan if incomplete or gappy."""
    h = m // 2
    w = np.full(2 * h + 1, 1.0)
    if m % 2 == 0:
        w[0] = w[-1] = 0.5
    w /= m
    ma = np.full(len(x), np.nan)
    for i in range(h, len(x) - h):
        ma[i] = np.dot(w, x[i - h:i + h + 1])  # nan propagates from any missing sample
    return ma, w


def mean_cycle(d, steps, lo, hi, i):
    p = int(round(steps))
    idx = np.arange(lo, hi)
    means = np.array([np.nanmean(d[idx[idx % p == k]]) for k in range(p)])
    return means[i % p] - means.mean()


def harmonic_coef(d, steps, k, lo, hi, gain, method):
    j = np.arange(lo, hi)
    ok = np.isfinite(d[lo:hi])
    cols = [np.ones(len(j))]
    for q in range(1, k + 1):
        cols += [np.cos(2 * np.pi * q * j / steps), np.sin(2 * np.pi * q * j / steps)]
    X = np.column_stack(cols)[ok]
    y = d[lo:hi][ok]
    if method == "ols":
        import statsmodels.api as sm
        c = sm.OLS(y, X).fit().params
    else:
        c = np.linalg.lstsq(X, y, rcond=None)[0]
    return c[1:] / np.repeat(gain, 2)


def main():
    x = np.loadtxt(sys.argv[1])
    steps, k, w = float(sys.argv[2]), int(sys.argv[3]), int(sys.argv[4])
    method = sys.argv[5] if len(sys.argv) > 5 else "lstsq"
    n = len(x)
    m = int(round(steps))
    ma, taps = moving_average(x, m)
    d = x - ma
    t = np.arange(len(taps)) - len(taps) // 2
    gain = np.array([1 - np.dot(taps, np.cos(2 * np.pi * q * t / steps)) for q in range(1, k + 1)])
    out = np.full(n, np.nan)
    cache = {}
    for i in range(n):
        lo = min(max(i - (w - 1) // 2, 0), n - w)
        if k == 0:
            cyc = mean_cycle(d, steps, lo, lo + w, i)
        else:
            if lo not in cache:
                cache[lo] = harmonic_coef(d, steps, k, lo, lo + w, gain, method)
            c = cache[lo]
            cyc = sum(c[2 * q - 2] * np.cos(2 * np.pi * q * i / steps) +
                      c[2 * q - 1] * np.sin(2 * np.pi * q * i / steps) for q in range(1, k + 1))
        out[i] = x[i] - cyc
    print(" ".join("%.17g" % v for v in out))


if __name__ == "__main__":
    main()
