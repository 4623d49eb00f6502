"""xarray grids: slowscan.screen on a DataArray gives the maps `slowscan screen FILE.nc
--maps` writes; a dask-backed array is read block by block."""
import numpy as np
import pytest
import xarray as xr

import slowscan
from conftest import DATA, run_cli

SHELF = DATA + "/shelf.nc"  # the demo grid (invented for the demo, data/README.md)


def unpacked(path, name):
    """The variable as the library unpacks it (raw * scale + offset in double precision, the
    fill value missing), with xarray's time decoding (cftime, noleap)."""
    raw = xr.open_dataset(path, mask_and_scale=False)[name]
    values = raw.values.astype(np.float64)
    values = values * raw.attrs.get("scale_factor", 1.0) + raw.attrs.get("add_offset", 0.0)
    values[raw.values == raw.attrs["_FillValue"]] = np.nan
    out = raw.copy(data=values)
    out.attrs, out.encoding = {}, {}  # unpacked: written back as plain doubles
    return out


@pytest.fixture(scope="module")
def cli_maps(tmp_path_factory):
    out = tmp_path_factory.mktemp("maps") / "maps.nc"
    run_cli("screen", "--deseason", 12, "--surrogates", 99, "--seed", 5, "--maps", out,
            "-o", out.with_suffix(".csv"), SHELF)
    return xr.open_dataset(out, mask_and_scale=False)


def assert_same_maps(mine, theirs):
    assert sorted(mine.data_vars) == sorted(theirs.data_vars)
    for name in theirs.data_vars:
        a, b = theirs[name], mine[name]
        assert a.dims == b.dims
        if name.endswith("_flag"):
            assert np.array_equal(a.values, b.values), name
        else:
            fill = a.attrs["_FillValue"]
            expect = np.where(a.values == fill, np.nan, a.values)
            assert np.array_equal(expect, b.values, equal_nan=True), name
    for c in theirs.coords:
        assert np.array_equal(theirs[c].values, mine[c].values)


def test_grid_equals_cli_maps(cli_maps):
    secchi = unpacked(SHELF, "secchi")
    with pytest.warns(slowscan.SlowscanWarning, match="4 cells hold no value"):
        mine = slowscan.screen(secchi, deseason=12, surrogates=99, seed=5)
    assert_same_maps(mine, cli_maps)


class Watched:
    """An array that records every slice read from it (the dask graph's source)."""

    def __init__(self, values):
        self.values, self.reads = values, []
        self.shape, self.dtype, self.ndim = values.shape, values.dtype, values.ndim

    def __getitem__(self, key):
        self.reads.append(key)
        return self.values[key]


def test_dask_block_by_block(cli_maps):
    da = pytest.importorskip("dask.array")
    secchi = unpacked(SHELF, "secchi")
    watched = Watched(secchi.values)
    lazy = secchi.copy(data=da.from_array(watched, chunks=(200, 4, 5), asarray=True))
    with pytest.warns(slowscan.SlowscanWarning, match="4 cells hold no value"):
        mine = slowscan.screen(lazy, deseason=12, surrogates=99, seed=5, threads=2)
    assert_same_maps(mine, cli_maps)
    nt = secchi.sizes["time"]
    cells = [np.prod([len(range(*k.indices(n))) for k, n in zip(key[1:], secchi.shape[1:])])
             for key in watched.reads]
    assert len(watched.reads) > 1 and max(cells) <= 20  # never more than one block's cells
    assert max(len(range(*key[0].indices(nt))) for key in watched.reads) <= nt


def test_grid_summary_names_as_cli():
    secchi = unpacked(SHELF, "secchi").isel(lat=slice(0, 2), lon=slice(0, 3))
    summary = slowscan.screen(secchi, deseason=12, surrogates=0, maps=False)
    assert summary["series"].iloc[0] == "secchi[lat=-33,lon=151]"


def test_dataset_of_two_variables_equals_cli(tmp_path):
    # two variables of the demo grid in one file: one run, q-values over both (as the command)
    secchi = unpacked(SHELF, "secchi").isel(lat=slice(2, 6))
    ds = xr.Dataset({"clarity": secchi, "turbid": 30.0 - 0.5 * secchi})
    path = tmp_path / "two.nc"
    ds.to_netcdf(path, format="NETCDF3_64BIT")
    out = tmp_path / "maps.nc"
    run_cli("screen", "--deseason", 12, "--surrogates", 49, "--maps", out, "-o",
            tmp_path / "summary.csv", path)
    with pytest.warns(slowscan.SlowscanWarning):
        mine = slowscan.screen(ds, deseason=12, surrogates=49)
    assert_same_maps(mine, xr.open_dataset(out, mask_and_scale=False))
