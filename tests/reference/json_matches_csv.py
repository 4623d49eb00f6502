#!/usr/bin/python3
"""Reads a screen --json file with Python's json module (RFC 8259) and the CSV summary of the
same run; prints the number of rows, whether tau/p/q agree, and the seed recorded.
Usage: json_matches_csv.py JSON CSV"""
import json, sys
import numpy as np
import pandas as pd

d = json.load(open(sys.argv[1]))
c = pd.read_csv(sys.argv[2], na_values=["NA"], keep_default_na=False)
ok = len(d["results"]) == len(c)
for r, (_, row) in zip(d["results"], c.iterrows()):
    for key in ("tau", "p_value", "q_value"):
        a = np.nan if r[key] is None else r[key]
        ok &= (np.isnan(a) and np.isnan(row[key])) or abs(a - row[key]) <= 1e-9 * max(1, abs(a))
    q = r["null_quantiles"]
    ok &= q["0.05"] <= q["0.5"] <= q["0.95"]
print(len(d["results"]), int(ok), d["parameters"]["seed"], d["parameters"]["surrogates"])
