"""Checks of screen --ensemble's summary with pandas and statsmodels (Debian python3-pandas,
python3-statsmodels).

usage: ensemble_rows.py bh SUMMARY
       prints: the largest |q - BH(p)| within each family, BH by
               statsmodels.stats.multitest.multipletests(method='fdr_bh'): the members with
               the plain series, the ensemble means, the pooled rows; then the row counts of
               the three families.
       ensemble_rows.py anomalies IN OUT
       writes OUT: IN with every NAME.MEMBER column minus the mean of its ensemble's columns
               (pandas row mean), the columns NAME[mean] appended.
       ensemble_rows.py size SUMMARY ALPHA
       prints: per indicator in name order, the pooled rows with p <= ALPHA and all of them."""
import sys

import numpy as np
import pandas as pd
from statsmodels.stats.multitest import multipletests


def bh(summary):
    rows = pd.read_csv(summary)
    out, counts = [], []
    for roles in (("member", "series"), ("mean",), ("pooled",)):
        family = rows[rows["role"].isin(roles) & rows["p_value"].notna()]
        q = multipletests(family["p_value"].to_numpy(), method="fdr_bh")[1]
        out.append(float(np.max(np.abs(q - family["q_value"].to_numpy()))) if len(q) else 0.0)
        counts.append(len(family))
    print(" ".join("%.17g" % v for v in out + counts))


def anomalies(path_in, path_out):
    table = pd.read_csv(path_in)
    names = [c for c in table.columns[1:] if "." in c]
    for base in sorted({c.rsplit(".", 1)[0] for c in names}):
        members = [c for c in names if c.rsplit(".", 1)[0] == base]
        mean = table[members].to_numpy().mean(axis=1)
        for c in members:
            table[c] = table[c].to_numpy() - mean
    table.to_csv(path_out, index=False, float_format="%.17g")
    print(len(names))


def size(summary, alpha):
    rows = pd.read_csv(summary)
    pooled = rows[rows["role"] == "pooled"]
    out = []
    for name, group in sorted(pooled.groupby("indicator")):
        out += [int((group["p_value"] <= alpha).sum()), len(group)]
    print(" ".join(str(v) for v in out))


if __name__ == "__main__":
    if sys.argv[1] == "bh":
        bh(sys.argv[2])
    elif sys.argv[1] == "anomalies":
        anomalies(sys.argv[2], sys.argv[3])
    else:
        size(sys.argv[2], float(sys.argv[3]))
