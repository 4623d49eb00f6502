"""Ensemble mean, member anomalies and the sample bimodality coefficient, with numpy and scipy
(Debian python3-numpy, python3-scipy).

usage: ensemble_numpy.py FILE mean M   (FILE: M members of equal length, member after member,
                                        one value a line, "nan" for missing)
       prints: the mean (NaN where any member is missing), then every member's anomaly
               (member minus the mean), member after member.
       ensemble_numpy.py FILE pooled K  (FILE: K members' statistics, then their nulls of M
                                        values each, member after member)
       prints: the mean statistic, then p = (1 + #{pooled_j >= it}) / (M + 1) with pooled_j
               the members' mean of replicate j.
       ensemble_numpy.py FILE bc        (FILE: one value a line)
       prints: the bimodality coefficient (Pfister et al. 2013, Front. Psychol. 4:700) from
               scipy.stats.skew and scipy.stats.kurtosis with bias=False."""
import sys

import numpy as np
from scipy import stats


def main():
    x = np.loadtxt(sys.argv[1], ndmin=1)
    if sys.argv[2] == "mean":
        m = int(sys.argv[3])
        members = x.reshape(m, -1)
        mean = members.mean(axis=0)  # NaN wherever one member is NaN
        out = np.concatenate([mean, (members - mean).ravel()])
    elif sys.argv[2] == "pooled":
        k = int(sys.argv[3])
        stat = x[:k].mean()
        pooled = x[k:].reshape(k, -1).mean(axis=0)
        out = [stat, (1 + np.sum(pooled >= stat)) / (len(pooled) + 1)]
    else:
        n = len(x)
        g = stats.skew(x, bias=False)
        k = stats.kurtosis(x, fisher=True, bias=False)
        out = [(g * g + 1) / (k + 3.0 * (n - 1) ** 2 / ((n - 2) * (n - 3)))]
    print(" ".join("%.17g" % v for v in out))


if __name__ == "__main__":
    main()
