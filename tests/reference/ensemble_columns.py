"""One member of an ensemble CSV, or the ensemble mean, as the columns a single run would
have, with pandas and numpy (Debian python3-pandas, python3-numpy).

usage: ensemble_columns.py FILE OUT.csv NAME[,NAME...] MEMBER|mean
       writes OUT.csv with FILE's time column and one column per NAME: NAME.MEMBER, or the
       mean over every column NAME.* (numpy.mean across the members, %.12g); prints the
       number of members of the first NAME."""
import sys

import numpy as np
import pandas as pd


def main():
    path, out, names, member = sys.argv[1], sys.argv[2], sys.argv[3].split(","), sys.argv[4]
    d = pd.read_csv(path)
    time = d.columns[0]
    res = pd.DataFrame({time: d[time]})
    counts = []
    for name in names:
        cols = [c for c in d.columns if c.startswith(name + ".")]
        counts.append(len(cols))
        if member == "mean":
            res[name] = np.mean(d[cols].to_numpy(), axis=1)
        else:
            res[name] = d["%s.%s" % (name, member)]
    res.to_csv(out, index=False, float_format="%.12g")
    print(counts[0])


if __name__ == "__main__":
    main()
