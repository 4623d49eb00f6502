"""Grids: an xarray DataArray with a time dimension and others. Every cell (a point of the
other dimensions) is one series, named as the command names a NetCDF grid's cells
(slowscan_netcdf_series_name: VAR[lat=-33,lon=151]), so its random streams — and so its
numbers — are those of `slowscan screen FILE.nc`. A dask-backed array is read one block of
cells (all times) at a time; every block goes into one store, so the q-values are over the
whole grid. With surrogates="auto" every cell of every block is one run of the library's
rounds (one BH family): the blocks are read again for each round, as the command re-reads a
NetCDF grid. The result is a Dataset of maps, as --maps writes them."""
import threading

import numpy as np
import pandas as pd

from . import _config
from ._errors import MessageContext, SlowscanError, warn
from ._inputs import Table
from ._library import ffi, lib
from ._screen import COLUMNS, Run, sequential_report, summary_rows, warn_few_surrogates
from ._series import ready_options, split_options

FLAG_FILL = -127  # the maps' _FillValue of a flag (a cell without a result)


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


def _long_name(var, kind, what, tail):
    """A map's long_name in the library's words (slowscan_netcdf_maps_long_name: the
    command's --maps)."""
    buf = ffi.new("char[512]")
    lib.slowscan_netcdf_maps_long_name(buf, 512, _MAP_KINDS[what], kind, var.encode(), tail)
    return ffi.string(buf).decode()


_MAP_KINDS = {"statistic": lib.NETCDF_MAP_STATISTIC, "p_value": lib.NETCDF_MAP_P_VALUE,
              "q_value": lib.NETCDF_MAP_Q_VALUE, "flag": lib.NETCDF_MAP_FLAG}


class _Maps:
    def __init__(self, cells, tests, seq=None, tail=False):  # tests: name -> kind
        self.cells, self.tests, self.seq, self.tail = cells, tests, seq, tail
        ncell = int(np.prod(cells.shape)) if cells.shape else 1
        self.stat = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.p = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.q = {t: np.full(ncell, np.nan, np.float32) for t in tests}
        self.flag = {t: np.full(ncell, FLAG_FILL, np.int8) for t in tests}

    def put(self, k, cell, stored):
        """Series k of the run (its rounds' flags with surrogates="auto") at cell."""
        res = stored.result
        for j in range(res.ntests):
            t = ffi.string(lib.slowscan_screen_test_name(res.tests[j].kind)).decode()
            self.stat[t][cell] = res.tests[j].statistic
            self.p[t][cell] = res.tests[j].p_value
            self.q[t][cell] = stored.q_value[j]
            self.flag[t][cell] = stored.flag[j] if self.seq is None else \
                lib.slowscan_screen_sequential_flag(self.seq, k, j, ffi.addressof(res.tests, j),
                                                    stored.flag[j])

    def _flags(self):
        """flag_values and flag_meanings as the command's maps give them: up to undecided
        with surrogates="auto"."""
        last = lib.SCREEN_FLAG_UNDECIDED if self.seq is not None else lib.SCREEN_FLAG_INSUFFICIENT
        names = [ffi.string(lib.slowscan_screen_flag_name(f)).decode() for f in range(last + 1)]
        return {"flag_values": np.arange(last + 1, dtype=np.int8), "flag_meanings": " ".join(names)}

    def dataset(self, da, time_dim):
        import xarray as xr
        var, dims, shape = self.cells.variable, self.cells.dims, self.cells.shape
        out = {}
        for t in self.tests:
            for what, values in (("statistic", self.stat), ("p_value", self.p),
                                 ("q_value", self.q), ("flag", self.flag)):
                attrs = {"long_name": _long_name(var, self.tests[t], what, self.tail)}
                attrs.update(self._flags() if what == "flag" else {"units": "1"})
                out["%s_%s_%s" % (var, t, what)] = (dims, values[t].reshape(shape), attrs)
        coords = {name: c for name, c in da.coords.items() if time_dim not in c.dims}
        ds = xr.Dataset(out, coords=coords)
        for name in ds.data_vars:
            if name.endswith("_flag"):
                ds[name].encoding["_FillValue"] = FLAG_FILL
        return ds


def screen_grid(data, progress, maps, options, seq=None, tail=None):
    """slowscan.screen of a grid; seq (a sequential_config: surrogates="auto") and tail (a
    tail_options: tail="gpd") as screen made them from the keywords."""
    inputs, rest = split_options(dict(options))
    time_dim = rest.pop("time_dim", None)
    for bad in ("time", "names"):
        if bad in inputs:
            raise TypeError("%s=: a DataArray carries its own %s" % (bad, bad))
    keep = []
    cfg = _config.make_config("screen", rest, keep)
    if tail is not None:
        cfg.tail = tail[0]
    if seq is not None:
        seq.fdr = cfg.fdr  # the decisions' BH level is the run's
    arrays, time_dim = _arrays(data, time_dim)
    grids = [_grid_of(da, time_dim) for da in arrays]
    warn_few_surrogates(cfg)
    run = Run(cfg, MessageContext(config=cfg), progress,
              total=sum(int(np.prod(a.shape)) // a.sizes[time_dim] for a in arrays))
    if seq is None:  # block by block into the store
        placed = [_place(g, time_dim, inputs, lambda t, v=g[1].variable: run.add(t, v))
                  for g in grids]
    else:  # every block read first (its notices said, its cells placed), then the rounds
        placed = [_place(g, time_dim, inputs, lambda t: None) for g in grids]
        # every cell is a series of the run, those without a value too, as the command counts
        # a grid's cells before reading them; a cell that draws nothing costs the budget
        # nothing (the library's rounds), so the rounds and numbers are the command's
        source = _Source(run, grids, time_dim, inputs, run.total)
        run.add(None, grids[0][1].variable, seq, series=source.c,
                order=_input_order(placed, run.total))
    run.decide()
    if not maps:
        frame = summary_rows(run) if any(placed) else pd.DataFrame(columns=COLUMNS)
        if seq is not None:
            frame.attrs["sequential"] = sequential_report(run)
        return frame
    kinds = [lib.slowscan_screen_test_of(cfg, j)
             for j in range(lib.slowscan_screen_test_count(cfg))]
    tests = {ffi.string(lib.slowscan_screen_test_name(kind)).decode(): kind for kind in kinds}
    state = run.sequential
    out = [_Maps(cells, tests, state, tail is not None) for _, cells in grids]
    owner = [(g, cell) for g, positions in zip(out, placed) for cell in positions]
    for k, ((grid, cell), (name, stored)) in enumerate(zip(owner, run.series())):
        grid.put(k, cell, stored)
    if seq is not None:
        sequential_report(run)  # the run's warnings (the maps carry no run-level numbers)
    import xarray as xr
    return xr.merge([g.dataset(da, time_dim) for g, (da, _) in zip(out, grids)],
                    combine_attrs="drop_conflicts")


def _grid_of(da, time_dim):
    """(the DataArray with time first, its _Cells)."""
    variable = str(da.name) if da.name is not None else "series"
    others = [d for d in da.dims if d != time_dim]
    da = da.transpose(time_dim, *others)
    return da, _Cells(da, others, variable)


def _block_tables(da, cells, time_dim, inputs, notices=True):
    """Each block of the grid as (a Table of its cells with a value, or None when it has none;
    their flat positions; the count of cells without any value)."""
    times = da[time_dim].values
    for offset, block in _blocks(da.data, cells.shape):
        values = block.reshape(block.shape[0], -1)
        index = [tuple(o + i for o, i in zip(offset, ix)) for ix in np.ndindex(*block.shape[1:])]
        present = [k for k in range(values.shape[1]) if not np.all(np.isnan(values[:, k]))]
        empty = values.shape[1] - len(present)
        if not present:
            yield None, [], empty
            continue
        table = Table(values[:, present], time=times, names=[cells.name(index[k]) for k in present],
                      calendar=inputs.get("calendar"), time_units=inputs.get("time_units"),
                      missing=inputs.get("missing"), source=cells.variable, notices=notices)
        table.ready(**ready_options(inputs))
        yield table, [np.ravel_multi_index(index[k], cells.shape) if cells.shape else 0
                      for k in present], empty


def _input_order(placed, total):
    """The walk's series in the command's order (variable by variable, cells in the array's
    order; the cells without a value, which the walk never gives, last): what is left of a
    short budget goes to the series in that order, so a chunked grid gets the command's
    rounds (slowscan_screen_sequential_order)."""
    keys = [(g, position) for g, positions in enumerate(placed) for position in positions]
    return sorted(range(len(keys)), key=keys.__getitem__) + list(range(len(keys), total))


def _place(grid, time_dim, inputs, add):
    """Every block of one grid with a value handed to add(table), its notices said: the flat
    positions of the cells with a value, in the order they went in."""
    da, cells = grid
    positions, empty = [], 0
    for table, where, none in _block_tables(da, cells, time_dim, inputs):
        empty += none
        if table is not None:
            add(table)
            positions.extend(where)
    if empty:
        warn("%s: %d cell%s no value at all (every time missing) and %s not analysed"
             % (cells.variable, empty, "s hold" if empty != 1 else " holds",
                "are" if empty != 1 else "is"))
    return positions


class _Source:
    """The cells of the grids as the library's screen_source (screen_memory_run.series): the
    library asks for series 0 again at each round of surrogates="auto" and for the ordinary
    pass, and each walk reads the blocks again; a block's table lives until the library has
    released each of its series. Called from the library's threads, one next at a time."""

    def __init__(self, run, grids, time_dim, inputs, count):
        self.run, self.grids, self.time_dim, self.inputs = run, grids, time_dim, inputs
        self.lock = threading.Lock()
        self._next = ffi.callback("int(void *, size_t, screen_input *, screen_detail *)",
                                  self.next_series)
        self._release = ffi.callback("void(void *, size_t)", self.release)
        self.c = ffi.new("screen_source *")
        self.c.next, self.c.release, self.c.count = self._next, self._release, count
        self.walk, self.table, self.k, self.live, self.owner = iter(()), None, 0, {}, {}
        self.block = 0  # the index at which the walk's current table began

    def _tables(self):
        for da, cells in self.grids:
            for table, _, _ in _block_tables(da, cells, self.time_dim, self.inputs, False):
                if table is not None:
                    yield table

    def next_series(self, state, index, series, detail):
        try:
            with self.lock:
                if index == 0:  # a new walk: a round, or the ordinary pass
                    self.walk, self.table, self.k, self.live, self.owner = \
                        self._tables(), None, 0, {}, {}
                while self.table is None or self.k == self.table.c.nseries:
                    self.table, self.k = next(self.walk, None), 0
                    if self.table is None:
                        return lib.SCREEN_BATCH_END
                    self.live[index] = [self.table, self.table.c.nseries]
                    self.block = index
                t, k = self.table.c, self.k
                fresh = ffi.new("screen_input *")
                fresh.name, fresh.source, fresh.time_name = t.names[k], t.source, t.time_name
                fresh.time, fresh.values, fresh.n, fresh.axis = t.time, t.values[k], t.n, t.axis
                series[0] = fresh[0]
                self.owner[index], self.k = self.block, k + 1
                return lib.SLOWSCAN_OK
        except Exception as exc:  # said once the library returns, as Run's callbacks are
            if self.run.error is None:
                self.run.error = exc
            detail.rule = lib.SCREEN_RULE_NONE
            return lib.SLOWSCAN_EIO

    def release(self, state, index):
        with self.lock:
            block = self.owner.pop(index, None)
            if block is not None:
                self.live[block][1] -= 1
                if self.live[block][1] == 0:
                    del self.live[block]
