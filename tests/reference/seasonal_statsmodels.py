#!/usr/bin/python3
"""Seasonal component of statsmodels.tsa.seasonal.seasonal_decompose (additive, centred moving
average; Debian python3-statsmodels). Usage: seasonal_statsmodels.py FILE PERIOD"""
import sys
import numpy as np
from statsmodels.tsa.seasonal import seasonal_decompose

x = np.loadtxt(sys.argv[1])
res = seasonal_decompose(x, model="additive", period=int(sys.argv[2]))
print(" ".join("%.17g" % v for v in res.seasonal))
