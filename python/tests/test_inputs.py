"""Every input kind is the same table: a DataFrame, its columns as numpy arrays with time=,
a pandas Series, a one-dimensional DataArray (common practice, no source: the package
against itself; each kind against the command is in the other tests)."""
import numpy as np
import pandas as pd
import pytest
import statsmodels.api as sm
import xarray as xr

import slowscan


@pytest.fixture(scope="module")
def spots():
    # statsmodels' bundled yearly sunspot numbers (1700-2008)
    return sm.datasets.sunspots.load_pandas().data.set_index("YEAR")


def test_kinds_agree(spots):
    frame = slowscan.screen(spots, surrogates=19, threads=1)
    arrays = slowscan.screen(spots.to_numpy(), time=spots.index.to_numpy(),
                             names=["SUNACTIVITY"], surrogates=19, threads=1)
    series = slowscan.screen(spots["SUNACTIVITY"], surrogates=19, threads=1)
    da = xr.DataArray(spots["SUNACTIVITY"].to_numpy(), dims="year",
                      coords={"year": spots.index.to_numpy()}, name="SUNACTIVITY")
    array = slowscan.screen(da, surrogates=19, threads=1)
    for other in (arrays, series, array):
        pd.testing.assert_frame_equal(frame, other)


def test_default_names_and_shapes(spots):
    x = np.column_stack([spots["SUNACTIVITY"], np.sqrt(spots["SUNACTIVITY"])])
    got = slowscan.detrend(x, time=spots.index.to_numpy())
    assert list(got["series"].unique()) == ["series0", "series1"]
    with pytest.raises(ValueError, match="3 names for 2 series"):
        slowscan.detrend(x, time=spots.index.to_numpy(), names=["a", "b", "c"])
    with pytest.raises(ValueError, match="308 times for 309 samples"):
        slowscan.detrend(x, time=spots.index.to_numpy()[1:])
    with pytest.raises(TypeError, match="carries its times"):
        slowscan.detrend(spots, time=spots.index.to_numpy())


def test_gaps_filled_as_missing(spots):
    # rows left out of a regular grid come back as missing samples (and a warning)
    holed = spots.drop(index=spots.index[100:105])
    with pytest.warns(slowscan.SlowscanWarning, match="5 rows missing from the regular grid"):
        got = slowscan.detrend(holed)
    assert len(got) == len(spots) and got["value"].isna().sum() == 5
