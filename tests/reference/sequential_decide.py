#!/usr/bin/python3
"""Decisions of one round of the sequential Monte Carlo procedure, computed directly:
Clopper-Pearson limits by scipy.stats.beta.ppf (Debian python3-scipy) at two-sided level
ALPHA, Benjamini-Hochberg by statsmodels.stats.multitest.multipletests(method='fdr_bh') on
the upper and on the lower limits. Usage: sequential_decide.py FILE ALPHA FDR [finish], FILE
holding "hits drawn" per line (one line per test, all tested); ALPHA 'per-test': each line's
third number is its test's level ("hits drawn alpha"). Prints, per test, lo hi decision
(1 rejected, 2 accepted, 0 open). With `finish`, the open tests are then settled against
t = FDR max(k, 1) / m, k the rejections of BH on the reported p (1 + hits) / (1 + drawn):
rejected when hi <= t, accepted when lo > t, open otherwise. With `cap=K` last, a test with
K or more draws has become the fixed-K Monte Carlo test: its limits are both its reported p
(Besag & Clifford 1991, Biometrika 78:301: run to its largest size, the sequential test is
the fixed-size one)."""
import sys
import numpy as np
from scipy.stats import beta
from statsmodels.stats.multitest import multipletests

counts = np.loadtxt(sys.argv[1], ndmin=2)
alpha = None if sys.argv[2] == "per-test" else float(sys.argv[2])
fdr = float(sys.argv[3])
hits, drawn = counts[:, 0], counts[:, 1]
if sys.argv[2] == "per-test":
    alpha = counts[:, 2]
lo = np.where(hits == 0, 0.0, beta.ppf(alpha / 2, hits, drawn - hits + 1))
hi = np.where(hits >= drawn, 1.0, beta.ppf(1 - alpha / 2, hits + 1, drawn - hits))
cap = [float(a[4:]) for a in sys.argv[4:] if a.startswith("cap=")]
if cap:
    lo = np.where(drawn >= cap[0], (1 + hits) / (1 + drawn), lo)
    hi = np.where(drawn >= cap[0], (1 + hits) / (1 + drawn), hi)
sure = multipletests(hi, alpha=fdr, method="fdr_bh")[0]
may = multipletests(lo, alpha=fdr, method="fdr_bh")[0]
decision = np.where(sure, 1, np.where(~may, 2, 0))
if "finish" in sys.argv[4:]:
    k = multipletests((1 + hits) / (1 + drawn), alpha=fdr, method="fdr_bh")[0].sum()
    t = fdr * max(k, 1) / len(hits)
    decision = np.where(decision != 0, decision, np.where(hi <= t, 1, np.where(lo > t, 2, 0)))
out = []
for k in range(len(hits)):
    out += ["%.17g" % lo[k], "%.17g" % hi[k], "%d" % decision[k]]
print(" ".join(out))
