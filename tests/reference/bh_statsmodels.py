#!/usr/bin/python3
"""Benjamini-Hochberg q-values by statsmodels.stats.multitest.multipletests(method='fdr_bh')
(Debian python3-statsmodels). Usage: bh_statsmodels.py FILE (one p-value per line)."""
import sys
import numpy as np
from statsmodels.stats.multitest import multipletests

p = np.loadtxt(sys.argv[1])
print(" ".join("%.17g" % q for q in multipletests(p, method="fdr_bh")[1]))
