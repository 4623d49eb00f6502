"""Quantiles of a sample with numpy (numpy.quantile, its default 'linear' method: Hyndman and
Fan 1996 definition 7, the one gsl_stats_quantile_from_sorted_data documents).

usage: quantiles_numpy.py FILE LEVEL...   (FILE: one value a line; nan lines are dropped)
prints: the quantile at each level, in order."""
import sys

import numpy as np


def main():
    x = np.loadtxt(sys.argv[1], ndmin=1)
    x = x[np.isfinite(x)]
    levels = [float(a) for a in sys.argv[2:]]
    print(" ".join("%.17g" % q for q in np.quantile(x, levels)))


if __name__ == "__main__":
    main()
