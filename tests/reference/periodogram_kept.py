#!/usr/bin/python3
"""Largest difference, relative to the largest amplitude, between |numpy.fft.rfft| of each
replicate in a slowscan surrogates CSV and of the original column (Debian python3-numpy).
Usage: periodogram_kept.py SURROGATES_CSV ORIGINAL_CSV COLUMN"""
import sys
import numpy as np
import pandas as pd

s = pd.read_csv(sys.argv[1])
x = pd.read_csv(sys.argv[2])[sys.argv[3]].to_numpy(float)
ref = np.abs(np.fft.rfft(x))
worst = 0.0
for _, g in s[s.series == sys.argv[3]].groupby("replicate"):
    worst = max(worst, np.max(np.abs(np.abs(np.fft.rfft(g.value.to_numpy(float))) - ref)) / ref.max())
print("%d %.17g" % (s[s.series == sys.argv[3]].replicate.nunique(), worst))
