"""slowscan.recovery and slowscan.robustness: the drifting-AR(1) recovery-rate path of every
series (the `recovery` command, slowscan_recovery_series) and the trend tests over a grid of
detrending methods x windows x bandwidths (the `robustness` command,
slowscan_robustness_series). The numbers are the library's; this file only translates."""
import math

import numpy as np
import pandas as pd

from . import _config, _control
from ._errors import MessageContext, SlowscanError, refusal, status_text, warn, words
from ._forced import time_text
from ._library import ffi, lib
from ._series import Leakage, output_times, prepared, series_input, setup

# the options of the two commands (as the command line accepts them); registered beside
# the other commands' so that make_config refuses anything else
_TESTING = _config.NULL + ("alternative", "noise_trend", "threads")
_config.OPTIONS.setdefault("recovery", _config.SERIES + _TESTING)
_config.OPTIONS.setdefault("robustness", _config.ROLLING + _TESTING)

PATH_COLUMNS = ["series", "time", "lambda", "lambda_lo", "lambda_hi"]
FIT_COLUMNS = ["series", "a0", "a1", "c", "se_a0", "se_a1", "t_a1", "se_a1_model_based",
               "t_a1_model_based", "p_value", "pairs"]
PROJECTION_COLUMNS = ["series", "status", "crossing_time", "crossing_lo", "crossing_hi",
                      "interval", "share_crossing", "draws", "basis"]
GRID_COLUMNS = ["series", "indicator", "detrend", "window", "bandwidth", "tau", "statistic",
                "p_value"]
FRACTION_COLUMNS = ["series", "indicator", "detrend", "cells", "share_statistic_positive",
                    "share_p_at_most_0.05"]

# every projection carries its basis, so that no reader takes a crossing for a forecast
# the window index of recovery_trend cells (ROBUSTNESS_NO_WINDOW)
_NO_WINDOW = int(ffi.cast("size_t", -1))
_BASIS = "extrapolated_linear_trend_in_recovery_rate"
_PROJECTION_STATUS = ("ahead", "within_record", "none_within_2x_record")


def tested_setup(command, data, options):
    """setup() with the defaults these commands differ in from screen: no surrogates unless
    asked, and recovery_trend only when indicators= names it."""
    given = dict(options)
    table, cfg, ctx, keep = setup(command, data, given)
    if given.get("surrogates") is None:
        cfg.surrogates = 0
    if given.get("indicators") is None:
        cfg.drift_test = 0
    return table, cfg, ctx, keep


def recovery(data, project=False, project_draws=1000, **options):
    """The recovery-rate path of every series, as `slowscan recovery` writes it.

    Fits x[t+1] = (a0 + a1 s_t) x[t] + c + e_t to each residual (s_t the time rescaled to
    [-1/2, 1/2]); lambda = ln(a0 + a1 s_t)/dt with a pointwise 95% band.

    Options, with the command's defaults: detrend="gaussian-linear", bandwidth="10%",
    deseason=None, deseason_window=None, harmonics=0, noise_trend=False, surrogates=0 (M > 0:
    the surrogate p-value of t(a1)), null="phase" (or "control" with control= and
    control_time=, as screen()'s: phase surrogates of the control run's same-named series),
    iaaft_tol, iaaft_iterations, block_length, seed=1, alternative=None, threads=None (every
    core); project=False (True: the projected crossing of lambda = 0, as --project),
    project_draws=1000 (at least 500);
    for the input: time=, names=, calendar=, time_units=, missing=, start=, end=, log=False,
    resample=, max_gap=.

    Returns a DataFrame series, time, lambda, lambda_lo, lambda_hi. Its attrs hold "fits"
    (what --json writes per series: a0, a1, c, HC3 errors, t_a1, the model-based error and
    t, p_value, pairs) and with project=True "projection" (the --project CSV's columns). A
    projected crossing extrapolates a straight-line trend; it is not a forecast.
    """
    if not isinstance(project_draws, int) or isinstance(project_draws, bool) or \
            not 500 <= project_draws <= 10**8:
        raise SlowscanError("project_draws=%r: a whole number >= 500 is needed"
                            % (project_draws,))
    options = dict(options)
    control = _control.pop_control(options)
    table, cfg, ctx, keep = tested_setup("recovery", data, options)
    if control is not None:
        control = _control.use(cfg, ctx, control, data, options)
    rcfg = ffi.new("recovery_config *", lib.slowscan_recovery_config_default())
    if project:
        rcfg.projection_draws = project_draws
    ws = ffi.gc(lib.slowscan_recovery_workspace_alloc(cfg.threads),
                lib.slowscan_recovery_workspace_free)
    if ws == ffi.NULL:
        raise MemoryError("slowscan: out of memory")
    paths, fits, projections, leakage = [], [], [], Leakage(ctx)
    for k, name in enumerate(table.names):
        with prepared(cfg, table, k, ctx, table.source) as ps:
            leakage.add(name, ps.leakage, ps.leakage_tested)
            if control is not None:  # as the command: after the leakage is counted
                _control.attach_series(cfg, ps, control, table.c.names[k], ctx)
            r, path = _one_series(ws, cfg, rcfg, ps, ctx)
            if r.fit_status != 0:
                warn("%s: column '%s': no drifting AR(1) fit (%s); no rows written for it"
                     % (table.source, name, status_text(r.fit_status)))
                continue
            paths.append({"series": name, "time": output_times(table, ps), "lambda": path[0],
                          "lambda_lo": path[1], "lambda_hi": path[2]})
            fits.append(_fit_row(name, r))
            if project:
                projections.append(_projection_row(table, name, r))
    leakage.report()
    frame = _frame(paths, PATH_COLUMNS)
    frame.attrs["fits"] = pd.DataFrame(fits, columns=FIT_COLUMNS)
    if project:
        frame.attrs["projection"] = pd.DataFrame(projections, columns=PROJECTION_COLUMNS)
        warn("the crossing times extrapolate a linear trend in the recovery rate beyond what "
             "was observed; they are not forecasts")
    return frame


def _one_series(ws, cfg, rcfg, ps, ctx):
    """The library's analysis of one prepared series: (recovery_result, path[3][n])."""
    n = ps.n
    path = np.empty((3, n), dtype=np.float64)
    ptr = [ffi.cast("double *", path[c].ctypes.data) for c in range(3)]
    r = ffi.new("recovery_result *")
    detail = ffi.new("screen_detail *")
    st = lib.slowscan_recovery_series(ws, cfg, rcfg, ps, ptr[0], ptr[1], ptr[2], r, detail)
    for w in range(r.nwarnings):
        warn(words(lib.slowscan_message_warning, ffi.addressof(r.warnings, w), ctx.c))
    if st != 0:
        raise refusal(st, detail, ctx)
    return r, path


def _fit_row(name, r):
    f = r.fit
    return [name, f.a0, f.a1, f.c, f.se_a0, f.se_a1, f.t_a1, f.se_a1_model, f.t_a1_model,
            r.p_value, int(f.pairs)]


def _projection_row(table, name, r):
    pr = r.projection
    if r.projection_status != 0:
        warn("%s: column '%s': no projected crossing (%s)"
             % (table.source, name, status_text(r.projection_status)))
    axis = table.c.axis
    status = "not_computed" if pr.draws == 0 else _PROJECTION_STATUS[pr.kind]
    interval = "NA" if pr.draws == 0 else "open_above" if math.isinf(pr.index_hi) else "closed"
    return [name, status, time_text(axis, r.crossing_time), time_text(axis, r.crossing_lo),
            time_text(axis, r.crossing_hi), interval, pr.share_crossing,
            int(pr.draws), _BASIS]


def _frame(parts, columns):
    if not parts:
        return pd.DataFrame(columns=columns)
    return pd.concat([pd.DataFrame(p, columns=columns) for p in parts], ignore_index=True)


def _grid_lengths(option, value, default):
    """A list of lengths: 'A:B:STEP' (A, A+STEP, ... up to B), 'A,B,C', or a sequence of
    lengths as window= takes them; as the command's --windows/--bandwidths read them."""
    value = default if value is None else value
    if isinstance(value, str) and ":" in value:
        parts = value.split(":")
        if len(parts) != 3:
            raise SlowscanError("%s=%r: not 'A:B:STEP'" % (option, value))
        (lo, lp, lu), (hi, hp, hu), (step, sp, su) = (_config._length(option, p) for p in parts)
        if lp != hp or lp != sp or lu != hu or lu != su or hi < lo:
            raise SlowscanError("%s=%r: mixes units or runs backwards" % (option, value))
        items, a = [], lo
        while a <= hi * (1 + 1e-9):
            items.append((a, lp, lu))
            a = lo + len(items) * step
    else:
        texts = value.split(",") if isinstance(value, str) else list(value)
        items = [_config._length(option, t) for t in texts]
    if not items or len(items) > 64:
        raise SlowscanError("%s=%r: between 1 and 64 lengths are needed" % (option, value))
    return items


def _methods(detrends, base):
    """(label, detrend_spec) of each method of the grid: detrends=, or the one detrend=."""
    labels = [base] if detrends is None else (
        detrends.split(",") if isinstance(detrends, str) else list(detrends))
    if not 1 <= len(labels) <= 8:
        raise SlowscanError("detrends=%r: between 1 and 8 methods are needed" % (detrends,))
    methods = []
    for label in labels:
        spec = ffi.new("detrend_spec *")
        if not isinstance(label, str) or lib.slowscan_detrend_parse_method(
                label.strip().encode(), spec) != 0:
            raise SlowscanError("detrends=: unknown method %r (the methods detrend= takes)"
                                % (label,))
        if any(s.method == spec.method and s.degree == spec.degree for _, s in methods):
            raise SlowscanError("detrends=: method '%s' is listed twice" % label.strip())
        methods.append((label.strip(), spec[0]))
    return methods


def robustness(data, windows=None, bandwidths=None, detrends=None, **options):
    """The trend tests over a grid of detrending methods x windows x bandwidths, as
    `slowscan robustness` writes them.

    windows= (default "30%:70%:10%") and bandwidths= (default "5%,7%,10%,14%,20%"): 'A:B:STEP',
    'A,B,C' or a sequence of lengths; detrends=: methods, comma-separated or a sequence
    (default: the one detrend=). Other options as screen()'s, with this command's defaults:
    indicators="variance,lag1" (recovery_trend only when named), surrogates=0 (tau only;
    M > 0 gives p-values), seed=1, threads=None (every core); null="control" with control=
    (and control_time=) as screen()'s: each bandwidth's surrogates from the control run's
    same-named series.

    Returns a DataFrame series, indicator, detrend, window, bandwidth, tau, statistic,
    p_value (window and bandwidth in time units; recovery_trend has no window). Its
    attrs["fractions"] holds what --fractions writes: per series, indicator and method the
    cells and the shares with statistic > 0 and with p <= 0.05 (with several methods also a
    row "all").
    """
    given = dict(options)
    control = _control.pop_control(given)
    table, cfg, ctx, keep = tested_setup("robustness", data, given)
    if control is not None:
        control = _control.use(cfg, ctx, control, data, given)
    base = given.get("detrend") or ffi.string(
        lib.slowscan_detrend_method_name(cfg.detrend.method)).decode()
    methods = _methods(detrends, base)
    grid = ffi.new("robustness_grid *", lib.slowscan_robustness_grid_default())
    wins = _grid_lengths("windows", windows, "30%:70%:10%")
    bands = _grid_lengths("bandwidths", bandwidths, "5%,7%,10%,14%,20%")
    for field, items in (("windows", wins), ("bandwidths", bands)):
        for j, (amount, percent, unit) in enumerate(items):
            cell = getattr(grid, field)[j]
            cell.amount, cell.percent, cell.unit = amount, percent, unit
    grid.nwindows, grid.nbandwidths, grid.nmethods = len(wins), len(bands), len(methods)
    for i, (_, spec) in enumerate(methods):
        grid.methods[i] = spec
    ws = ffi.gc(lib.slowscan_robustness_workspace_alloc(cfg.threads),
                lib.slowscan_robustness_workspace_free)
    if ws == ffi.NULL:
        raise MemoryError("slowscan: out of memory")
    rows, fractions = [], []
    for k, name in enumerate(table.names):
        counts = _grid_series(ws, grid, cfg, table, k, ctx, methods, rows, control)
        fractions.extend(_fraction_rows(cfg, name, methods, counts))
    frame = pd.DataFrame(rows, columns=GRID_COLUMNS)
    frame.attrs["fractions"] = pd.DataFrame(fractions, columns=FRACTION_COLUMNS).astype(
        {"cells": np.int64})
    return frame


def _grid_series(ws, grid, cfg, table, k, ctx, methods, rows, control=None):
    """One series through the grid: its rows appended, its counts ([method][test]) returned.
    control: the control run's Table; the library attaches its same-named series to each
    bandwidth's residual (screen_input.control)."""
    name = table.names[k]
    counts = ffi.new("robustness_counts[]", len(methods) * 12)
    errors = []

    def take(context, cell):
        try:
            for w in range(cell.nwarnings):
                warn(words(lib.slowscan_message_warning, ffi.addressof(cell.warnings, w),
                           ctx.series(name).c))
            for i in range(cell.nrecords):
                r = cell.records[i]
                rows.append([name, ffi.string(lib.slowscan_screen_test_name(r.kind)).decode(),
                             methods[r.method][0], r.window, r.bandwidth, r.tau, r.statistic,
                             r.p_value])
            lib.slowscan_robustness_tally(counts, 12, cell.records, cell.nrecords)
            return 0
        except BaseException as e:  # raised once the library returns
            errors.append(e)
            return 1

    sink = ffi.callback("int(void *, const robustness_cell *)", take)
    src = ffi.new("char[]", table.source.encode())
    inp = series_input(table, k, src)
    if control is not None:
        ctl = _control.series_input(control, inp.name, ctx)  # alive through the call
        inp.control = ctl
    detail = ffi.new("screen_detail *")
    where = ffi.new("robustness_position *")
    st = lib.slowscan_robustness_series(ws, grid, cfg, inp, sink, ffi.NULL, detail, where)
    if errors:
        raise errors[0]
    if st != 0:
        raise refusal(st, detail, _cell_context(cfg, grid, where, table.source, name, ctx))
    return counts


def _cell_context(cfg, grid, where, source, name, run):
    """The message context of a refusal: the options of the cell it met in force (and the
    control run named as run's context names it)."""
    cell = ffi.new("screen_config *", cfg[0])
    cell.detrend = grid.methods[where.method]
    if where.window_index != _NO_WINDOW:
        cell.window = grid.windows[where.window_index]
    if lib.slowscan_detrend_uses_bandwidth(cell.detrend.method):
        cell.bandwidth = grid.bandwidths[where.bandwidth_index]
    ctx = MessageContext(source=source, series=name, config=cell)
    ctx.c.control_source = run.c.control_source
    ctx._keep.extend((cell, run))
    return ctx


def _fraction_rows(cfg, name, methods, counts):
    positive, significant = ffi.new("double *"), ffi.new("double *")

    def row(test, label, c):
        lib.slowscan_robustness_shares(ffi.addressof(c), positive, significant)
        return [name, test, label, int(c.cells), positive[0], significant[0]]

    out = []
    for j in range(lib.slowscan_screen_test_count(cfg)):
        test = ffi.string(lib.slowscan_screen_test_name(
            lib.slowscan_screen_test_of(cfg, j))).decode()
        for i, (label, _) in enumerate(methods):
            out.append(row(test, label, counts[i * 12 + j]))
        if len(methods) > 1:
            total = lib.slowscan_robustness_total(counts, len(methods), 12, j)
            out.append(row(test, "all", total))
    return out
