#!/usr/bin/python3
"""Kendall tau-b of one indicator path, from a slowscan rolling CSV, by scipy.stats.kendalltau
(Debian python3-scipy) against time. Usage: kendall_of_rolling.py FILE SERIES INDICATOR"""
import sys
import numpy as np
import pandas as pd
from scipy import stats

d = pd.read_csv(sys.argv[1], na_values=["NA"], keep_default_na=False)
d = d[(d.series.astype(str) == sys.argv[2]) & (d.indicator == sys.argv[3])]
ok = np.isfinite(d.value.to_numpy())
print("%.17g" % stats.kendalltau(d.time.to_numpy()[ok], d.value.to_numpy()[ok]).correlation)
