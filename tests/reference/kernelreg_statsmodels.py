#!/usr/bin/python3
"""Reference Gaussian kernel regression trend from statsmodels' KernelReg (Debian
python3-statsmodels): statsmodels.nonparametric.kernel_regression.KernelReg with one
continuous regressor (var_type='c'), the Gaussian kernel, the bandwidth fixed (bw=[s], no
cross-validation), reg_type 'll' (local linear) and/or 'lc' (local constant, Nadaraya-Watson).

Only the finite samples are passed as data, and the fit is evaluated at every t_i, missing
ones included -- the way slowscan gives NaN samples weight 0 and still defines the trend there.
KernelReg's kernel is untruncated; slowscan cuts it beyond 8 s (weights < 1.3e-14).

usage: kernelreg_statsmodels.py FILE BANDWIDTH TYPES
TYPES: ll, lc, or a comma-separated list such as ll,lc (one python start for both fits).
FILE: columns "t x" (see series_file.py). Prints one value a line, fit after fit."""
import sys

import numpy as np
from statsmodels.nonparametric.kernel_regression import KernelReg

sys.dont_write_bytecode = True  # importing the helper must not leave __pycache__ in the tree
import series_file  # noqa: E402


def main():
    path, bandwidth, types = sys.argv[1], float(sys.argv[2]), sys.argv[3].split(",")
    if any(reg_type not in ("ll", "lc") for reg_type in types):
        sys.exit("TYPES must be ll, lc or a list of them")
    t, x = series_file.load(path)
    ok = np.isfinite(x)
    for reg_type in types:
        model = KernelReg(endog=x[ok], exog=t[ok], var_type="c", reg_type=reg_type,
                          bw=[bandwidth])
        mean, _ = model.fit(data_predict=t)
        series_file.emit(mean)


if __name__ == "__main__":
    main()
