"""Times: cftime dates on the model calendars and numpy datetime64 map onto the library's
calendars as the command reads the same dates written as text (--calendar)."""
import cftime
import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm

import slowscan
from conftest import assert_same_as_cli, run_cli


def elnino_monthly():
    """statsmodels' bundled El Nino sea surface temperatures, 1950-2010, as one monthly
    series (12 columns per year laid end to end)."""
    d = sm.datasets.elnino.load_pandas().data.set_index("YEAR")
    return d.to_numpy().ravel()


@pytest.mark.parametrize("calendar,day", [("noleap", 15), ("360_day", 30), ("all_leap", 15),
                                          ("julian", 1), ("proleptic_gregorian", 28),
                                          ("standard", 10)])
def test_cftime_monthly_as_cli(tmp_path, calendar, day):
    sst = elnino_monthly()
    dates = [cftime.datetime(1950 + m // 12, m % 12 + 1, day, calendar=calendar)
             for m in range(len(sst))]
    path = tmp_path / "sst.csv"
    pd.DataFrame({"date": [d.strftime("%Y-%m-%d") for d in dates], "sst": sst}).to_csv(
        path, index=False)
    got = slowscan.screen(sst, time=np.array(dates, dtype=object), names="sst",
                          surrogates=19, deseason=12)
    cli = run_cli("screen", "--calendar", calendar, "--surrogates", 19, "--deseason", 12, path)
    assert_same_as_cli(got, cli.stdout)
    det = slowscan.detrend(sst[:40], time=np.array(dates[:40], dtype=object), names="sst")
    assert det["time"].iloc[0] == "1950-01"  # a monthly record is on its month index
    cli = run_cli("detrend", "--calendar", calendar, "--until", "1953-04", path)
    assert_same_as_cli(det, cli.stdout)


def test_noleap_daily_as_cli(tmp_path):
    # daily dates across February of noleap years: no 29th, a regular grid
    sst = np.repeat(elnino_monthly()[:12], 30)
    dates = [cftime.DatetimeNoLeap(2001, 1, 1) + pd.Timedelta(days=i).to_pytimedelta()
             for i in range(len(sst))]
    assert not any(d.month == 2 and d.day == 29 for d in dates)
    frame = pd.DataFrame({"sst": sst + np.sin(np.arange(len(sst)))},
                         index=pd.Index([d.isoformat()[:10] for d in dates], name="date"))
    path = tmp_path / "daily.csv"
    frame.to_csv(path)
    got = slowscan.detrend(frame["sst"].to_numpy(), time=np.array(dates, dtype=object),
                           names="sst", bandwidth=20)
    assert_same_as_cli(got, run_cli("detrend", "--calendar", "noleap", "--bandwidth", 20,
                                    path).stdout)


def test_datetime64_index_as_cli(tmp_path):
    # statsmodels' bundled Mauna Loa CO2: a weekly DatetimeIndex, with its missing weeks
    co2 = sm.datasets.co2.load_pandas().data.iloc[:400]
    co2.index.name = "date"
    path = tmp_path / "co2.csv"
    co2.to_csv(path)
    got = slowscan.indicators(co2)
    assert_same_as_cli(got, run_cli("indicators", path).stdout)


def test_mixed_or_unknown_calendars_refused():
    t = np.array([cftime.datetime(2000, 1, 1 + i, calendar="noleap") for i in range(10)] +
                 [cftime.datetime(2000, 1, 11, calendar="360_day")], dtype=object)
    with pytest.raises(slowscan.SlowscanError, match="calendars"):
        slowscan.detrend(np.arange(11.0), time=t)
    with pytest.raises(slowscan.SlowscanError, match="not a calendar"):
        slowscan.detrend(np.arange(11.0), time=np.arange(11), calendar="martian")
    with pytest.raises(slowscan.SlowscanError, match="noleap calendar"):
        slowscan.detrend(np.arange(10.0), time=t[:10], calendar="360_day")
