#!/usr/bin/python3
"""Reference least-squares polynomial trend: numpy.polyfit on the finite samples, evaluated by
numpy.polyval at every time (missing ones included).

usage: polyfit.py FILE DEGREE
FILE: columns "t x" (see series_file.py). Prints one value a line."""
import sys

import numpy as np

sys.dont_write_bytecode = True  # importing the helper must not leave __pycache__ in the tree
import series_file  # noqa: E402


def main():
    path, degree = sys.argv[1], int(sys.argv[2])
    t, x = series_file.load(path)
    ok = np.isfinite(x)
    coef = np.polyfit(t[ok], x[ok], degree)
    series_file.emit(np.polyval(coef, t))


if __name__ == "__main__":
    main()
