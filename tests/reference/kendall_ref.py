"""Reference for tests/test_kendall.c: Kendall tau-b from Debian's python3-scipy
(scipy.stats.kendalltau, variant 'b', the default).

Usage: kendall_ref.py FILE, FILE holding two whitespace-separated columns x y (finite values).
Prints tau-b at full precision."""
import sys

import numpy as np
from scipy.stats import kendalltau

data = np.loadtxt(sys.argv[1], ndmin=2)
res = kendalltau(data[:, 0], data[:, 1], variant="b")
print(repr(float(res.statistic if hasattr(res, "statistic") else res[0])))
