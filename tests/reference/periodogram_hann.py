#!/usr/bin/python3
"""Periodogram of one window by numpy.fft.rfft (Debian python3-numpy): the window minus its
mean, times scipy's periodic Hann taper (scipy.signal.get_window("hann", W), Debian
python3-scipy), then |rfft|^2 for k = 0 .. W//2.
Usage: periodogram_hann.py FILE (one value a line)"""
import sys

import numpy as np
from scipy.signal import get_window

x = np.loadtxt(sys.argv[1])
tapered = (x - x.mean()) * get_window("hann", len(x))
power = np.abs(np.fft.rfft(tapered)) ** 2
sys.stdout.write("".join("%.17g\n" % v for v in power))
