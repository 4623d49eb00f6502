"""slowscan.indicators and slowscan.surrogates: the rolling indicators of every series and
the null model's replicates (the `indicators` and `surrogates` commands), series by series
through the library (slowscan_screen_indicators, slowscan_screen_replicate)."""
import numpy as np
import pandas as pd

from ._errors import SlowscanError, refusal, status_text, warn, words
from ._library import ffi, lib
from ._series import Leakage, output_times, prepared, setup

INDICATOR_COLUMNS = ["series", "time", "indicator", "value"]
SURROGATE_COLUMNS = ["series", "replicate", "time", "value"]


def _frame(parts, columns):
    if not parts:
        return pd.DataFrame(columns=columns)
    return pd.concat([pd.DataFrame(p, columns=columns) for p in parts], ignore_index=True)


def _paths(ws, cfg, ps, ctx):
    """The rolling paths of a prepared series (nindicators x n), warnings said."""
    n, m = ps.n, cfg.nindicators
    values = np.empty((max(m, 1), n), dtype=np.float64)
    rows = ffi.new("double *[]", [ffi.cast("double *", values[j].ctypes.data)
                                  for j in range(m)] or [ffi.NULL])
    warning = ffi.new("screen_warning *")
    warned = ffi.new("int *")
    detail = ffi.new("screen_detail *")
    st = lib.slowscan_screen_indicators(ws, cfg, ps, rows, warning, warned, detail)
    if st != 0:
        raise refusal(st, detail, ctx)
    if warned[0]:
        warn(words(lib.slowscan_message_warning, warning, ctx.c))
    return values


def indicators(data, **options):
    """Rolling indicators of every series, as `slowscan indicators` writes them.

    Options, with the command's defaults: detrend="gaussian-linear", bandwidth="10%",
    deseason=None, deseason_window=None, harmonics=0, window="50%",
    indicators="variance,lag1", min_coverage=0.8, recovery="log", step=None (each
    indicator's own), band=None; for the input: time=, names=, calendar=, time_units=,
    missing=, start=, end=, log=False.
    Returns a DataFrame with columns series, time, indicator, value: one row per evaluated
    window (stamped with its last time), indicator after indicator.
    """
    table, cfg, ctx, keep = setup("indicators", data, options)
    ws = ffi.gc(lib.slowscan_screen_workspace_alloc(1), lib.slowscan_screen_workspace_free)
    if ws == ffi.NULL:
        raise MemoryError("slowscan: out of memory")
    parts, leakage = [], Leakage(ctx)
    for k, name in enumerate(table.names):
        with prepared(cfg, table, k, ctx, table.source) as ps:
            leakage.add(name, ps.leakage, ps.leakage_tested)
            values = _paths(ws, cfg, ps, ctx)
            spec = ffi.new("rolling_spec *", lib.slowscan_screen_rolling_spec(cfg, ps))
            times, n, w = output_times(table, ps), ps.n, ps.window
            for j in range(cfg.nindicators):
                kind = cfg.indicators[j]
                step = lib.slowscan_rolling_step(spec, kind, n)
                rows = np.arange(w - 1, n)
                rows = rows[(n - 1 - rows) % step == 0]  # the windows evaluated (rolling_evaluated)
                label = ffi.string(lib.slowscan_indicator_name(kind)).decode()
                parts.append({"series": name, "time": times[rows], "indicator": label,
                              "value": values[j][rows]})
    leakage.report()
    return _frame(parts, INDICATOR_COLUMNS)


def surrogates(data, **options):
    """Null-model replicates of every series' residual, as `slowscan surrogates` writes them:
    the very series screen tests against (the same random streams).

    Options, with the command's defaults: surrogates=10, null="phase", iaaft_tol,
    iaaft_iterations, block_length, seed=1, detrend="gaussian-linear", bandwidth="10%",
    deseason=None, deseason_window=None, harmonics=0; for the input as detrend().
    Returns a DataFrame with columns series, replicate (from 1), time, value. A series that
    cannot give replicates (constant, too few samples) is left out with a warning.
    """
    table, cfg, ctx, keep = setup("surrogates", data, options)
    parts, leakage = [], Leakage(ctx)
    for k, name in enumerate(table.names):
        with prepared(cfg, table, k, ctx, table.source) as ps:
            leakage.add(name, ps.leakage, ps.leakage_tested)
            parts.extend(_replicates(cfg, ps, ctx, name, output_times(table, ps)))
    leakage.report()
    return _frame(parts, SURROGATE_COLUMNS)


def _replicates(cfg, ps, ctx, name, times):
    reps = ffi.new("screen_replicates **")
    detail = ffi.new("screen_detail *")
    st = lib.slowscan_screen_replicates_alloc(cfg, ps, reps, detail)
    if detail.rule == lib.SCREEN_RULE_NULL_TOO_LITTLE:
        warn(words(lib.slowscan_message_refusal, detail, ctx.c))
        return []
    if st != 0:
        raise refusal(st, detail, ctx)
    try:
        out = np.empty(ps.n, dtype=np.float64)
        buf = ffi.cast("double *", out.ctypes.data)
        parts = []
        for j in range(cfg.surrogates):
            st = lib.slowscan_screen_replicate(reps[0], j, buf)
            if st != 0:
                raise SlowscanError("%s: column '%s': surrogates failed: %s"
                                    % (ctx.source_name, name, status_text(st)), st)
            parts.append({"series": name, "replicate": j + 1, "time": times,
                          "value": out.copy()})
        return parts
    finally:
        lib.slowscan_screen_replicates_free(reps[0])
