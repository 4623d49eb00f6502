#!/usr/bin/python3
"""Reference loess trend by slowscan's stated definition (detrend/local.c), computed point by
point with numpy's least squares -- not statsmodels' lowess, which parametrises the span as a
fraction and adds robustness iterations.

For each sample i: the q = round(bandwidth/dt) + 1 grid samples nearest to t_i (at most n;
equal distances go to the earlier sample), tricube weights (1 - (d/dmax)^3)^3 with dmax the
largest distance among them times 1.000001, missing samples dropped; a weighted straight line
in (t - t_i) gives the trend as its intercept. One finite sample: its value; none: NaN.

usage: loess_local_linear.py FILE BANDWIDTH
FILE: columns "t x" on a regular grid (see series_file.py)."""
import sys

import numpy as np

sys.dont_write_bytecode = True  # importing the helper must not leave __pycache__ in the tree
import series_file  # noqa: E402


def local_value(k, x, i, q, dt):
    dist = np.abs(k - k[i])
    order = np.lexsort((np.arange(len(k)), dist))  # by distance, then by index
    nb = order[:q]
    dmax = dist[nb].max() * 1.000001
    w = (1.0 - (dist[nb] / dmax) ** 3) ** 3 if dmax > 0 else np.ones(q)
    ok = np.isfinite(x[nb])
    nb, w = nb[ok], w[ok]
    if len(nb) == 0:
        return np.nan
    if len(nb) == 1:
        return x[nb][0]
    design = np.column_stack([np.ones(len(nb)), (k[nb] - k[i]) * dt])
    root = np.sqrt(w)
    beta = np.linalg.lstsq(design * root[:, None], x[nb] * root, rcond=None)[0]
    return beta[0]


def main():
    path, bandwidth = sys.argv[1], float(sys.argv[2])
    t, x = series_file.load(path)
    dt = t[1] - t[0]
    k = np.rint((t - t[0]) / dt)  # grid index: exact distances, exact ties
    q = min(int(np.floor(bandwidth / dt + 0.5)) + 1, len(t))
    out = [local_value(k, x, i, q, dt) for i in range(len(t))]
    series_file.emit(out)


if __name__ == "__main__":
    main()
