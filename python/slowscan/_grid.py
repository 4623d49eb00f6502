"""Grids: an xarray DataArray with a time dimension and others. Every cell (a point of the
other dimensions) is one series, named as the command names a NetCDF grid's cells
(slowscan_netcdf_series_name: VAR[lat=-33,lon=151]), so its random streams — and so its
numbers — are those of `slowscan screen FILE.nc`. A dask-backed array is read one block of
cells (all times) at a time; every block goes into one store, so the q-values are over the
whole grid. The result is a Dataset of maps, as --maps writes them."""
import numpy as np
import pandas as pd

from . import _config
from ._errors import MessageContext, SlowscanError, warn
from ._inputs import Table
from ._library import ffi, lib
from ._screen import COLUMNS, Run, summary_rows, warn_few_surrogates
from ._series import ready_options, split_options

FLAG_FILL = -127  # the maps' _FillValue of a flag (a cell without a result)
FLAG_MEANINGS = "untested none rising falling insufficient"


def is_grid(data):
    """A DataArray with dimensions besides time, or a Dataset (each variable with the time
    dimension screened, as the command screens every variable of a NetCDF file)."""
    if hasattr(data, "data_vars"):
        return True
    return hasattr(data, "dims") and hasattr(data, "coords") and hasattr(data, "transpose") \
        and len(data.dims) > 1


def _arrays(data, time_dim):
    """The DataArrays to screen and the time dimension they share."""
    if not hasattr(data, "data_vars"):
        return [data], _time_dim(data, time_dim)
    dim = _time_dim(data, time_dim)
    arrays = [data[v] for v in data.data_vars
              if dim in data[v].dims and data[v].dtype.kind in "iufb"]
    if not arrays:
        raise SlowscanError("no numeric variable of the Dataset has the dimension %r" % dim)
    return arrays, dim


def _time_dim(da, given):
    if given is not None:
        if given not in da.dims:
            raise SlowscanError("time_dim=%r: not a dimension of the array (%s)"
                                % (given, ", ".join(map(str, da.dims))))
        return given
    if "time" in da.dims:
        return "time"
    dated = [d for d in da.dims if d in da.coords and (
        da[d].dtype.kind == "M" or (da[d].dtype == object and da[d].size and
                                    hasattr(da[d].values[0], "calendar")))]
    if len(dated) == 1:
        return dated[0]
    raise SlowscanError("no time dimension among %s: name it with time_dim="
                        % (", ".join(map(str, da.dims)),))


class _Cells:
    """The other dimensions: their names, coordinate values (the index without a coordinate
    variable) and the series name of each cell."""

    def __init__(self, da, dims, variable):
        self.dims, self.variable = dims, variable
        self.shape = tuple(da.sizes[d] for d in dims)
        self.values = [np.asarray(da[d].values, dtype=np.float64) if d in da.coords and
                       da[d].dtype.kind in "iuf" else np.arange(da.sizes[d], dtype=np.float64)
                       for d in dims]
        self._names = [ffi.new("char[]", str(d).encode()) for d in dims]
        self._name_ptrs = ffi.new("const char *[]", self._names or [ffi.NULL])
        self._variable = ffi.new("char[]", variable.encode())

    def name(self, index):
        coords = ffi.new("double[]", [self.values[k][i] for k, i in enumerate(index)] or [0])
        buf = ffi.new("char[]", 1024)
        lib.slowscan_netcdf_series_name(buf, 1024, self._variable, self._name_ptrs, coords,
                                        len(self.dims))
        return ffi.string(buf).decode()


def _blocks(data, shape):
    """(offsets, numpy block of shape (time, ...)) over the array, block by block."""
    if hasattr(data, "dask") and hasattr(data, "chunks"):  # dask: spatial blocks, time whole
        if len(data.chunks[0]) > 1:
            data = data.rechunk({0: -1})
        starts = [np.concatenate([[0], np.cumsum(c)[:-1]]) for c in data.chunks[1:]]
        for idx in np.ndindex(*data.numblocks[1:]):
            block = data.blocks[(0,) + idx].compute()
            yield tuple(int(starts[k][i]) for k, i in enumerate(idx)), np.asarray(block)
        return
    yield (0,) * len(shape), np.asarray(data)


class _Maps:
    def __init__(self, cells, tests):
        self.cells, self.tests = cells, tests
        ncell = int(np.prod(cells.shape)) if cells.shape else 1
        self.stat = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.p = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.q = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.flag = {t: np.full(ncell, FLAG_FILL, np.int8) for t in tests}

    def put(self, cell, stored):
        res = stored.result
        for j in range(res.ntests):
            t = ffi.string(lib.slowscan_screen_test_name(res.tests[j].kind)).decode()
            self.stat[t][cell] = res.tests[j].statistic
            self.p[t][cell] = res.tests[j].p_value
            self.q[t][cell] = stored.q_value[j]
            self.flag[t][cell] = stored.flag[j]

    def dataset(self, da, time_dim):
        import xarray as xr
        var, dims, shape = self.cells.variable, self.cells.dims, self.cells.shape
        out = {}
        for t in self.tests:
            out["%s_%s_statistic" % (var, t)] = (dims, self.stat[t].reshape(shape), {"units": "1"})
            out["%s_%s_p_value" % (var, t)] = (dims, self.p[t].reshape(shape), {"units": "1"})
            out["%s_%s_q_value" % (var, t)] = (dims, self.q[t].reshape(shape), {"units": "1"})
            out["%s_%s_flag" % (var, t)] = (dims, self.flag[t].reshape(shape), {
                "flag_values": np.arange(5, dtype=np.int8), "flag_meanings": FLAG_MEANINGS})
        coords = {name: c for name, c in da.coords.items() if time_dim not in c.dims}
        ds = xr.Dataset(out, coords=coords)
        for name in ds.data_vars:
            if name.endswith("_flag"):
                ds[name].encoding["_FillValue"] = FLAG_FILL
        return ds


def screen_grid(data, progress, maps, options):
    inputs, rest = split_options(dict(options))
    time_dim = rest.pop("time_dim", None)
    for bad in ("time", "names"):
        if bad in inputs:
            raise TypeError("%s=: a DataArray carries its own %s" % (bad, bad))
    keep = []
    cfg = _config.make_config("screen", rest, keep)
    arrays, time_dim = _arrays(data, time_dim)
    warn_few_surrogates(cfg)
    run = Run(cfg, MessageContext(config=cfg), progress,
              total=sum(int(np.prod(a.shape)) // a.sizes[time_dim] for a in arrays))
    placed = [_screen_array(run, da, time_dim, inputs) for da in arrays]
    run.decide()
    if not maps:
        return summary_rows(run) if any(p[1] for p in placed) else pd.DataFrame(columns=COLUMNS)
    tests = [ffi.string(lib.slowscan_screen_test_name(lib.slowscan_screen_test_of(cfg, j))).decode()
             for j in range(lib.slowscan_screen_test_count(cfg))]
    grids = [_Maps(cells, tests) for cells, _ in placed]
    owner = [(g, cell) for g, (_, positions) in zip(grids, placed) for cell in positions]
    for (grid, cell), (name, stored) in zip(owner, run.series()):
        grid.put(cell, stored)
    import xarray as xr
    return xr.merge([g.dataset(da.transpose(time_dim, ...), time_dim)
                     for g, da in zip(grids, arrays)], combine_attrs="drop")


def _screen_array(run, da, time_dim, inputs):
    """Every cell of one DataArray into the run, block by block: (cells, flat positions of
    the cells screened, in the order they went in)."""
    variable = str(da.name) if da.name is not None else "series"
    others = [d for d in da.dims if d != time_dim]
    da = da.transpose(time_dim, *others)
    cells = _Cells(da, others, variable)
    times = da[time_dim].values
    positions, empty = [], 0
    for offset, block in _blocks(da.data, cells.shape):
        values = block.reshape(block.shape[0], -1)
        index = [tuple(o + i for o, i in zip(offset, ix)) for ix in np.ndindex(*block.shape[1:])]
        present = [k for k in range(values.shape[1]) if not np.all(np.isnan(values[:, k]))]
        empty += values.shape[1] - len(present)
        if not present:
            continue
        table = Table(values[:, present], time=times, names=[cells.name(index[k]) for k in present],
                      calendar=inputs.get("calendar"), time_units=inputs.get("time_units"),
                      missing=inputs.get("missing"), source=variable)
        table.ready(**ready_options(inputs))
        run.add(table, variable)
        positions.extend(np.ravel_multi_index(index[k], cells.shape) if cells.shape else 0
                         for k in present)
    if empty:
        warn("%s: %d cell%s no value at all (every time missing) and %s not analysed"
             % (variable, empty, "s hold" if empty != 1 else " holds",
                "are" if empty != 1 else "is"))
    return cells, positions
