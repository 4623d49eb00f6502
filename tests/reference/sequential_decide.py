#!/usr/bin/python3
"""Decisions of one round of the sequential Monte Carlo procedure, computed directly:
Clopper-Pearson limits by scipy.stats.beta.ppf (Debian python3-scipy) at two-sided level
ALPHA, Benjamini-Hochberg by statsmodels.stats.multitest.multipletests(method='fdr_bh') on
the upper and on the lower limits. Usage: sequential_decide.py FILE ALPHA FDR, FILE holding
"hits drawn" per line (one line per test, all tested). Prints, per test, lo hi decision
(1 rejected, 2 accepted, 0 open)."""
import sys
import numpy as np
from scipy.stats import beta
from statsmodels.stats.multitest import multipletests

counts = np.loadtxt(sys.argv[1], ndmin=2)
alpha, fdr = float(sys.argv[2]), float(sys.argv[3])
hits, drawn = counts[:, 0], counts[:, 1]
lo = np.where(hits == 0, 0.0, beta.ppf(alpha / 2, hits, drawn - hits + 1))
hi = np.where(hits >= drawn, 1.0, beta.ppf(1 - alpha / 2, hits + 1, drawn - hits))
sure = multipletests(hi, alpha=fdr, method="fdr_bh")[0]
may = multipletests(lo, alpha=fdr, method="fdr_bh")[0]
out = []
for k in range(len(hits)):
    out += ["%.17g" % lo[k], "%.17g" % hi[k], "1" if sure[k] else ("2" if not may[k] else "0")]
print(" ".join(out))
