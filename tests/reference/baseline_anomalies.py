"""Anomalies of a forced run's column against a baseline (control) run, with numpy (Debian
python3-numpy): the baseline's samples over the run's period (its times shifted by OFFSET)
give a mean (MODE mean) or a least-squares line (MODE drift, numpy.polyfit of degree 1),
subtracted from the run at its own times plus OFFSET.

usage: baseline_anomalies.py RUN.csv BASE.csv COLUMN MODE OFFSET [OUT.csv]
       prints the anomalies, one a value; with OUT.csv also writes them as a CSV with the
       run's time column and COLUMN (%.12g)."""
import sys

import numpy as np


def read(path, column):
    d = np.genfromtxt(path, delimiter=",", names=True)
    return d[d.dtype.names[0]], d[column], d.dtype.names[0]


def main():
    run, base, column, mode, offset = sys.argv[1:6]
    offset = float(offset)
    t, y, tname = read(run, column)
    bt, by, _ = read(base, column)
    lo, hi = t[0] + offset, t[-1] + offset
    keep = np.isfinite(by) & (bt >= lo - 1e-9 * (abs(lo) + abs(hi) + 1)) & \
        (bt <= hi + 1e-9 * (abs(lo) + abs(hi) + 1))
    if mode == "mean":
        line = np.full_like(t, by[keep].mean())
    else:
        slope, intercept = np.polyfit(bt[keep], by[keep], 1)
        line = intercept + slope * (t + offset)
    anomalies = y - line
    if len(sys.argv) > 6:
        with open(sys.argv[6], "w") as f:
            f.write("%s,%s\n" % (tname, column))
            for ti, a in zip(t, anomalies):
                f.write("%.10g,%.12g\n" % (ti, a))
    print(" ".join("%.17g" % v for v in anomalies))


if __name__ == "__main__":
    main()
