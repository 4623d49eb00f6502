"""Reference for tests/test_indicators.c: the yearly sunspot numbers shipped with Debian's
python3-statsmodels (statsmodels.api.datasets.sunspots, column SUNACTIVITY) and their lag-1
autocorrelation from statsmodels.tsa.stattools.acf.

Prints: n, the n values, acf(x, nlags=1)[1], numpy.var(x, ddof=1) (whitespace separated,
full precision)."""
import numpy as np
import statsmodels.api as sm
from statsmodels.tsa.stattools import acf

x = np.asarray(sm.datasets.sunspots.load_pandas().data["SUNACTIVITY"], dtype=float)
out = [str(len(x))] + [repr(float(v)) for v in x]
out.append(repr(float(acf(x, nlags=1)[1])))
out.append(repr(float(np.var(x, ddof=1))))
print("\n".join(out))
