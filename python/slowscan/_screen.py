"""slowscan.screen: the main job (the `screen` command), through the library's batch
driver (threads over series, results in input order) into its store, whose decision gives
the Benjamini-Hochberg q-values over every test of the run."""
import collections

import numpy as np
import pandas as pd

from ._errors import SlowscanError, refusal, warn, words
from ._library import ffi, lib
from ._series import Leakage, setup

COLUMNS = ["series", "indicator", "n", "window", "bandwidth", "tau", "statistic", "p_value",
           "q_value", "null", "surrogates", "flag"]

Progress = collections.namedtuple(
    "Progress", "series_done series_total series surrogates_done surrogates_total")


class Run:
    """One screening run: a store that series (from one table or several blocks) go into,
    then one decision over all of them."""

    def __init__(self, cfg, ctx, progress=None, total=0):
        self.cfg, self.ctx = cfg, ctx
        store = lib.slowscan_screen_store_alloc(lib.SCREEN_STORE_SPILL_AFTER, ffi.NULL)
        if store == ffi.NULL:
            raise MemoryError("slowscan: out of memory")
        self.store = ffi.gc(store, lib.slowscan_screen_store_free)
        self.done, self.total, self.offset = 0, total, 0
        self.user_progress, self.error = progress, None
        self.callback = None
        if progress is not None:
            self.callback = ffi.callback("void(void *, const screen_progress *)",
                                         self._progress, onerror=self._callback_error)

    def _progress(self, context, p):
        name = ffi.string(p.series).decode(errors="replace") if p.series != ffi.NULL else ""
        if p.total == 0:  # a series is in the store
            self.done += 1
            self.user_progress(Progress(self.done, self.total, name, 0, 0))
        else:
            self.user_progress(Progress(self.done, self.total, name, p.done, p.total))

    def _callback_error(self, exc_type, exc_value, tb):
        if self.error is None:  # the first one is raised once the library returns
            self.error = exc_value

    def add(self, table, source):
        """Screens every series of table into the store (cfg.threads threads)."""
        src = ffi.new("char[]", source.encode())
        run = ffi.new("screen_memory_run *", lib.slowscan_screen_memory_default())
        run.table, run.source, run.store = table.c, src, self.store
        if self.callback is not None:
            run.progress = self.callback
        failure = ffi.new("screen_batch_failure *")
        st = lib.slowscan_screen_memory_run(self.cfg, run, failure)  # the GIL is released
        if self.error is not None:
            raise self.error
        if st == 0:
            return
        if failure.detail.rule == lib.SCREEN_RULE_NONE and run.error.message[0] != b"\0":
            raise SlowscanError(ffi.string(run.error.message).decode(errors="replace"), st)
        name = ffi.string(failure.input.name).decode() if failure.input.name != ffi.NULL else ""
        ctx = self.ctx.series(name)
        for w in range(failure.result.nwarnings):
            warn(words(lib.slowscan_message_warning, ffi.addressof(failure.result.warnings, w),
                       ctx.c))
        raise refusal(st, ffi.addressof(failure.detail), ctx)

    def decide(self):
        if lib.slowscan_screen_store_decide(self.store, self.cfg.fdr) != 0:
            raise MemoryError("slowscan: out of memory")

    def series(self):
        """Each stored series in order: (name, screen_stored), with its warnings said."""
        stored = ffi.new("screen_stored *")
        err = ffi.new("io_error *")
        leakage = Leakage(self.ctx)
        for k in range(lib.slowscan_screen_store_count(self.store)):
            st = lib.slowscan_screen_store_read(self.store, k, stored, err)
            if st != 0:
                raise SlowscanError(ffi.string(err.message).decode(errors="replace"), st)
            name = ffi.string(stored.name).decode(errors="replace")
            self._say(name, stored.result)
            leakage.add(name, stored.result.leakage, stored.result.leakage_tested)
            yield name, stored
        leakage.report()

    def _say(self, name, res):
        ctx = self.ctx.series(name)
        for w in range(res.nwarnings):
            warn(words(lib.slowscan_message_warning, ffi.addressof(res.warnings, w), ctx.c))
        for j in range(res.ntests):
            t = ffi.addressof(res.tests, j)
            if t.statistic != t.statistic and res.variation == lib.SCREEN_VARIES:
                warn(words(lib.slowscan_message_insufficient, t, ctx.c))


def _null_label(cfg):
    return ffi.string(cfg.null_name).decode() if cfg.surrogates > 0 else "none"


def summary_rows(run):
    """The summary's rows, as the command writes them: one per series x test."""
    cfg = run.cfg
    null, m = _null_label(cfg), int(cfg.surrogates)
    cols = {c: [] for c in COLUMNS}
    for name, s in run.series():
        res = s.result
        for j in range(res.ntests):
            t = res.tests[j]
            rolling = lib.slowscan_screen_test_rolling(t.kind)
            cols["series"].append(name)
            cols["indicator"].append(ffi.string(lib.slowscan_screen_test_name(t.kind)).decode())
            cols["n"].append(int(res.n))
            cols["window"].append(res.window if rolling else np.nan)
            cols["bandwidth"].append(res.bandwidth)
            cols["tau"].append(t.tau)
            cols["statistic"].append(t.statistic)
            cols["p_value"].append(t.p_value)
            cols["q_value"].append(s.q_value[j])
            cols["null"].append(null)
            cols["surrogates"].append(m)
            cols["flag"].append(ffi.string(lib.slowscan_screen_flag_name(s.flag[j])).decode())
    frame = pd.DataFrame(cols, columns=COLUMNS)
    return frame.astype({"n": np.int64, "surrogates": np.int64})


def warn_few_surrogates(cfg):
    if 0 < cfg.surrogates < 19:
        warn("surrogates=%d: with fewer than 19 surrogates no p-value can reach 0.05 (the "
             "smallest is 1/(M+1))" % cfg.surrogates)


def screen(data, progress=None, maps=True, **options):
    """Screens every series for critical slowing down, as `slowscan screen` does.

    data: a DataFrame (index = time, one column per series), a Series, numpy values (time
    first) with time= and names=, an xarray DataArray, or an xarray Dataset. A DataArray with
    dimensions besides time is a grid, and a Dataset screens each variable with the time
    dimension (time_dim= names it when it is not "time" or the one dated coordinate): every
    cell is screened (a dask-backed array block by block, all times of a block at once), the
    q-values are over every cell, and the result is an xarray Dataset of maps, as `--maps`
    writes them (maps=False: the summary DataFrame instead).

    Options, with the command's defaults: detrend="gaussian-linear", bandwidth="10%",
    deseason=None, deseason_window=None, harmonics=0, window="50%",
    indicators="variance,lag1,recovery_trend", min_coverage=0.8, recovery="log", step=None,
    band=None, surrogates=1000, null="phase", iaaft_tol, iaaft_iterations, block_length,
    seed=1, fdr=0.05, alternative=None (each test's direction), noise_trend=False,
    threads=None (every core); for the input: time=, names=, calendar=, time_units=,
    missing=, start=, end=, log=False. progress: called with a Progress tuple after each block
    of surrogates and each finished series (from the library's worker threads).

    Returns the summary DataFrame: series, indicator, n, window, bandwidth, tau, statistic,
    p_value, q_value, null, surrogates, flag — one row per series and test.
    """
    from . import _grid
    if _grid.is_grid(data):
        return _grid.screen_grid(data, progress, maps, options)
    table, cfg, ctx, keep = setup("screen", data, options)
    warn_few_surrogates(cfg)
    run = Run(cfg, ctx, progress, total=table.c.nseries)
    run.add(table, table.source)
    run.decide()
    return summary_rows(run)
