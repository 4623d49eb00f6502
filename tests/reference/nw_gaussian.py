#!/usr/bin/python3
"""Reference Nadaraya-Watson Gaussian trend, computed directly with numpy (no FFT, no kernel
truncation): trend_i = sum_j w_ij x_j / sum_j w_ij, w_ij = exp(-0.5 ((t_j - t_i)/s)^2), over the
finite samples only (DESIGN.md §3). NaN where no weight is positive.

usage: nw_gaussian.py FILE BANDWIDTH
FILE: columns "t x" (see series_file.py). Prints one value a line."""
import sys

import numpy as np

sys.dont_write_bytecode = True  # importing the helper must not leave __pycache__ in the tree
import series_file  # noqa: E402


def main():
    path, bandwidth = sys.argv[1], float(sys.argv[2])
    t, x = series_file.load(path)
    ok = np.isfinite(x)
    tf, xf = t[ok], x[ok]
    out = np.empty_like(x)
    block = 256  # rows of the weight matrix at a time, to bound memory
    for start in range(0, len(t), block):
        rows = t[start:start + block]
        w = np.exp(-0.5 * ((tf[None, :] - rows[:, None]) / bandwidth) ** 2)
        den = w.sum(axis=1)
        num = w @ xf
        with np.errstate(invalid="ignore", divide="ignore"):
            out[start:start + block] = np.where(den > 0, num / den, np.nan)
    series_file.emit(out)


if __name__ == "__main__":
    main()
