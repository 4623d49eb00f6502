"""Bad arguments raise clear exceptions (the library's words, Python's keyword names); the
package never writes to stderr unless asked and never ends the process."""
import threading
import time
import warnings

import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from slowscan import SlowscanError


@pytest.fixture
def nile():
    # statsmodels' bundled Nile river flow (Cobb 1978), annual 1871-1970
    d = sm.datasets.nile.load_pandas().data
    return d["volume"].to_numpy(), d["year"].to_numpy()


@pytest.mark.parametrize("call,error,words", [
    (lambda x, t: slowscan.screen(x, time=t, windw="40%"), TypeError,
     "unexpected keyword argument 'windw'"),
    (lambda x, t: slowscan.detrend(x, time=t, surrogates=10), TypeError,
     "unexpected keyword argument 'surrogates'"),
    (lambda x, t: slowscan.screen(x, time=t, surrogates="many"), TypeError,
     "surrogates=: a whole number"),
    (lambda x, t: slowscan.screen(x, time=t, seed=1.5), TypeError, "seed=: a whole number"),
    (lambda x, t: slowscan.screen(x, time=t, window=[3]), TypeError, "window=: a number"),
    (lambda x, t: slowscan.screen(x, time=t, window=500), SlowscanError,
     "window= 500 is longer than the span 99"),
    (lambda x, t: slowscan.screen(x, time=t, window="120%"), SlowscanError,
     "not a length"),
    (lambda x, t: slowscan.screen(x, time=t, window=1), SlowscanError, "window="),
    (lambda x, t: slowscan.screen(x[:6], time=t[:6]), SlowscanError,
     "6 samples in the analysed span; at least 8 are needed"),
    (lambda x, t: slowscan.screen(x, time=np.where(t == 1900, np.nan, t)), SlowscanError,
     r"time\[29\]: the time is missing"),
    (lambda x, t: slowscan.screen(x, time=t[::-1]), SlowscanError, "is not greater than"),
    (lambda x, t: slowscan.screen(x, time=t, calendar="martian"), SlowscanError,
     "not a calendar"),
    (lambda x, t: slowscan.screen(x, time=t, null="shuffle"), SlowscanError,
     "not a null model"),
    (lambda x, t: slowscan.screen(x, time=t, indicators="variance,slope"), SlowscanError,
     "unknown indicator 'slope'"),
    (lambda x, t: slowscan.screen(x, time=t, detrend="spline"), SlowscanError,
     "not a method"),
    (lambda x, t: slowscan.screen(x, time=t, deseason=60), SlowscanError,
     "deseason= 60 must be at least 2 time steps"),
    (lambda x, t: slowscan.screen(x, time=t, fdr=2), SlowscanError, "fdr=2"),
    (lambda x, t: slowscan.screen(x, time=t + 0.5 * (t > 1900)), SlowscanError,
     "resample=STEP"),
    (lambda x, t: slowscan.screen(x, time=t, window="10y"), SlowscanError,
     "window= 10y is in years"),
    (lambda x, t: slowscan.screen(x, time=t.astype(str)), TypeError, "time: numbers"),
    (lambda x, t: slowscan.screen(x.astype(str), time=t), TypeError, "numbers are needed"),
    (lambda x, t: slowscan.screen(np.where(t == 1900, np.inf, x), time=t), SlowscanError,
     "sample 29: an infinite value"),
    (lambda x, t: slowscan.screen(x, time=t, start="1900-01-01"), SlowscanError,
     "start='1900-01-01': not a time of the input"),
])
def test_refusals(nile, call, error, words):
    x, t = nile
    with pytest.raises(error, match=words):
        call(x, t)


def test_refusal_is_value_error_with_status(nile):
    x, t = nile
    with pytest.raises(ValueError) as e:
        slowscan.screen(x, time=t, window=500)
    assert isinstance(e.value, SlowscanError) and e.value.status is not None


def test_warnings_not_stderr(nile, capfd):
    x, t = nile
    x = x.astype(float)
    with pytest.warns(slowscan.SlowscanWarning, match="fewer than 19 surrogates"):
        slowscan.screen(x, time=t, surrogates=5)
    with pytest.warns(slowscan.SlowscanWarning, match="-9999"):
        slowscan.detrend(np.where(t % 17 == 0, -9999.0, x), time=t)
    with pytest.warns(slowscan.SlowscanWarning, match="insufficient|fewer than"):
        slowscan.screen(np.r_[x[:30], np.full(70, np.nan)], time=t, surrogates=0)
    out, err = capfd.readouterr()
    assert out == "" and err == ""


def test_missing_codes(nile):
    x, t = nile
    coded = np.where(t % 17 == 0, -9999.0, x)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no suspect-code warning once it is named
        with pytest.warns(slowscan.SlowscanWarning, match="given by missing= read as missing"):
            got = slowscan.detrend(coded, time=t, missing=-9999)
    assert got["value"].isna().sum() == (t % 17 == 0).sum()


def test_calls_release_python_lock():
    # while screen works on another thread, this one keeps running Python code
    df = pd.read_csv(slowscan_data("stations.csv"), index_col=0)
    worker = threading.Thread(target=slowscan.screen, args=(df,),
                              kwargs=dict(surrogates=199, threads=1))
    ticks = 0
    started = time.perf_counter()
    worker.start()
    while worker.is_alive():
        ticks += 1
    elapsed = time.perf_counter() - started
    assert elapsed > 0.2 and ticks > 1000 * elapsed, (ticks, elapsed)


def slowscan_data(name):
    from conftest import DATA
    return DATA + "/" + name
