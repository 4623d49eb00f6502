"""Grids with surrogates="auto" and tail="gpd": slowscan.screen of a DataArray gives the maps
`slowscan screen --maps` writes for the same grid in a NetCDF file — every cell of every block
one run of the rounds (one BH family), the blocks of a dask array read again each round —
with the command's flags ('undecided' described in flag_values/flag_meanings) and its
long_names (the p map labelled as a possible tail estimate with tail="gpd")."""
import warnings

import numpy as np
import pytest
import xarray as xr

import slowscan
from conftest import assert_same_as_cli, run_cli
from test_grid import Watched, assert_same_maps

BLOCKS = (400, 2, 3)  # dask chunks of the grid below: 6 blocks of at most 6 cells


@pytest.fixture(scope="module")
def grid(tmp_path_factory):
    """A 4 x 5 grid of AR(1) series, 400 days, the lag-1 coefficient rising from 0.25 to 0.9
    in some cells (common practice, no source: the check is equality with the command, not a
    statistical claim), one cell without any value; (path, the DataArray as xarray reads it)."""
    rng = np.random.default_rng(7)
    n, ny, nx = 400, 4, 5
    x = np.zeros((n, ny, nx))
    for i in range(ny):
        for j in range(nx):
            rise, v = (0.65 if (i + j) % 3 == 0 else 0.0), 0.0
            for t in range(n):
                v = (0.25 + rise * t / n) * v + rng.standard_normal()
                x[t, i, j] = v
    x[:, 1, 2] = np.nan
    ds = xr.Dataset({"sst": (("time", "lat", "lon"), x)}, coords={
        "time": ("time", np.arange(n, dtype=float), {"units": "days since 2000-01-01"}),
        "lat": ("lat", 10.0 + 2 * np.arange(ny), {"units": "degrees_north"}),
        "lon": ("lon", 100.0 + 2 * np.arange(nx), {"units": "degrees_east"})})
    path = tmp_path_factory.mktemp("grid") / "grid.nc"
    ds.to_netcdf(path, format="NETCDF3_64BIT")
    with xr.open_dataset(path) as opened:
        return path, opened["sst"].load()


def command(path, tmp, *args):
    """The command's maps (the file as written), summary text and stderr for the grid."""
    maps, summary = tmp / "maps.nc", tmp / "summary.csv"
    cli = run_cli("screen", *args, "--maps", maps, "-o", summary, path, check=False)
    assert cli.returncode == 0, cli.stderr
    with xr.open_dataset(maps, mask_and_scale=False) as m:
        return m.load(), summary.read_text(), cli.stderr


def assert_same_attrs(mine, theirs):
    """Every map's attributes as the command's file has them (_FillValue aside: the encoding)."""
    for name in theirs.data_vars:
        want = {k: v for k, v in theirs[name].attrs.items() if k != "_FillValue"}
        assert sorted(mine[name].attrs) == sorted(want), name
        for k, v in want.items():
            assert np.array_equal(np.asarray(mine[name].attrs[k]), np.asarray(v)), (name, k)


def screened(da, **options):
    """slowscan.screen's result and its warnings' texts."""
    with warnings.catch_warnings(record=True) as said:
        warnings.simplefilter("always")
        out = slowscan.screen(da, **options)
    return out, [str(w.message) for w in said if issubclass(w.category, slowscan.SlowscanWarning)]


def lazy(da, watched=None):
    da_array = pytest.importorskip("dask.array")
    source = watched if watched is not None else da.values
    return da.copy(data=da_array.from_array(source, chunks=BLOCKS, asarray=True))


def test_auto_small_budget_equals_cli(grid, tmp_path):
    # a budget too small to settle every test: some cells end undecided, as the command's
    path, da = grid
    theirs, text, stderr = command(path, tmp_path, "--surrogates", "auto", "--budget", 1500)
    mine, said = screened(da, surrogates="auto", budget=1500)
    assert_same_maps(mine, theirs)
    assert_same_attrs(mine, theirs)
    flags = np.concatenate([mine[v].values.ravel() for v in mine.data_vars if v.endswith("flag")])
    assert (flags == 5).sum() > 0 and (flags == 1).sum() > 0  # undecided and none
    assert mine["sst_lag1_flag"].attrs["flag_meanings"].split()[5] == "undecided"
    undecided = [t for t in said if "undecided" in t]
    assert len(undecided) == 1 and undecided[0].split(": ", 1)[1].replace("budget=", "--budget") \
        in stderr
    summary, _ = screened(da, surrogates="auto", budget=1500, maps=False)
    assert_same_as_cli(summary, text)  # p_low, p_high and each test's surrogates too
    assert summary.attrs["sequential"]["undecided"] == (summary["flag"] == "undecided").sum()


def test_auto_dask_blocks_any_threads(grid, tmp_path):
    # six blocks, each read again for every round, and one or two threads: the same maps
    path, da = grid
    whole, _ = screened(da, surrogates="auto", budget=1500, threads=1)
    watched = Watched(da.values)
    blocks, _ = screened(lazy(da, watched), surrogates="auto", budget=1500, threads=2)
    xr.testing.assert_identical(whole, blocks)
    cells = [np.prod([len(range(*k.indices(n))) for k, n in zip(key[1:], da.shape[1:])])
             for key in watched.reads]
    assert max(cells) <= 6  # never more than one block's cells
    # the first block read by the first walk (its notices, the cells placed), every round
    # and the ordinary pass
    rounds = screened(da, surrogates="auto", budget=1500, maps=False)[0].attrs["sequential"]
    first = [k for k in watched.reads if k[1:] == (slice(0, 2), slice(0, 3))]
    assert rounds["rounds"] >= 2 and len(first) == rounds["rounds"] + 2


def test_auto_enough_budget_equals_cli(grid, tmp_path):
    # a budget that settles every test: none undecided, the rising cells found
    path, da = grid
    theirs, _, _ = command(path, tmp_path, "--surrogates", "auto", "--budget", 50000)
    mine, _ = screened(lazy(da), surrogates="auto", budget=50000)
    assert_same_maps(mine, theirs)
    flags = np.concatenate([mine[v].values.ravel() for v in mine.data_vars if v.endswith("flag")])
    assert (flags == 5).sum() == 0 and (flags == 2).sum() > 0


def test_tail_gpd_grid_equals_cli(grid, tmp_path):
    # 1000 surrogates: where a statistic lies beyond every one, p is the GPD estimate (below
    # 1/1001), in the maps as in the command's, whose p maps say it may be an estimate
    path, da = grid
    theirs, text, _ = command(path, tmp_path, "--surrogates", 1000, "--tail", "gpd")
    assert "tail_estimate" in text
    mine, _ = screened(lazy(da), surrogates=1000, tail="gpd", threads=2)
    assert_same_maps(mine, theirs)
    assert_same_attrs(mine, theirs)
    p = np.concatenate([mine[v].values.ravel() for v in mine.data_vars if v.endswith("p_value")])
    assert np.nanmin(p) < 1 / 1001
    assert "generalised Pareto" in mine["sst_lag1_p_value"].attrs["long_name"]
    summary, _ = screened(da, surrogates=1000, tail="gpd", maps=False)
    assert_same_as_cli(summary, text)
    assert (summary["p_source"] == "tail_estimate").sum() == text.count("tail_estimate")


def test_auto_dataset_of_two_variables_one_run(grid, tmp_path):
    # two variables of one file: the rounds go over both (one BH family), as the command's
    path, da = grid
    ds = xr.Dataset({"sst": da, "sss": da.copy(data=2.0 * da.values[::-1])})
    both = tmp_path / "two.nc"
    ds.to_netcdf(both, format="NETCDF3_64BIT")
    theirs, _, _ = command(both, tmp_path, "--surrogates", "auto", "--budget", 3000)
    mine, _ = screened(ds, surrogates="auto", budget=3000)
    assert_same_maps(mine, theirs)
    assert_same_attrs(mine, theirs)


class FailsLater(Watched):
    """A source whose blocks cannot be read after the first walk (a file gone, say)."""

    def __getitem__(self, key):
        if len(self.reads) > 7:
            raise OSError("block unreadable")
        return super().__getitem__(key)


def test_auto_block_unreadable_in_a_round_is_raised(grid):
    # a read failing inside a round (from the library's threads) is raised once the library
    # returns, as it was raised; nothing is returned
    _, da = grid
    with pytest.raises(OSError, match="block unreadable"):
        screened(lazy(da, FailsLater(da.values)), surrogates="auto", budget=1500, threads=2)
