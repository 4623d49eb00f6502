"""Shared by the detrend reference scripts: the series file the C tests write and the way
values go back to them (check_python parses whitespace-separated numbers)."""
import sys

import numpy as np


def load(path):
    """Columns "t x" separated by whitespace, "nan" for a missing x; returns (t, x)."""
    data = np.loadtxt(path, ndmin=2)
    return data[:, 0], data[:, 1]


def emit(values):
    """One value a line at full precision."""
    sys.stdout.write("".join("%.17g\n" % v for v in values))
