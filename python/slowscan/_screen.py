"""slowscan.screen: the main job (the `screen` command), through the library's batch
driver (threads over series, results in input order) into its store, whose decision gives
the Benjamini-Hochberg q-values over every test of the run."""
import collections

import numpy as np
import pandas as pd

from . import _control
from ._errors import SlowscanError, _python_words, refusal, warn, words
from ._library import ffi, lib
from ._series import Leakage, setup

COLUMNS = ["series", "indicator", "n", "window", "bandwidth", "tau", "statistic", "p_value",
           "q_value", "null", "surrogates", "flag"]
# surrogates="auto" adds the 95% interval of each Monte Carlo p, as the command does
AUTO_COLUMNS = COLUMNS + ["p_low", "p_high"]
# surrogates="auto"'s own options and their defaults (the command's)
SEQUENTIAL = {"budget": None, "max_per_series": 100000, "risk": 1e-2, "risk_joint": False}

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
        self.sequential = None  # surrogates="auto": the library's rounds, after add
        self.control = None  # control=: the control run's Table (_control.attach)
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

    def add(self, table, source, sequential=None, series=None, order=None):
        """Screens every series of table into the store (cfg.threads threads); with a
        sequential_config (surrogates="auto") the table is the whole run, its rounds first.
        series (instead of table): a screen_source, walked again for each round (a grid's
        blocks); order: its series in the inputs' order (slowscan_screen_sequential_order)."""
        src = ffi.new("char[]", source.encode())
        run = ffi.new("screen_memory_run *", lib.slowscan_screen_memory_default())
        run.source, run.store = src, self.store
        if series is None:
            run.table = table.c
        else:
            run.series = series
        if self.control is not None:
            run.control, run.control_source = self.control.c, self.ctx.c.control_source
        if sequential is not None:
            count = table.c.nseries if series is None else series.count
            state = lib.slowscan_screen_sequential_alloc(sequential, self.cfg, count)
            if state == ffi.NULL:
                raise MemoryError("slowscan: out of memory")
            self.sequential = run.sequential = ffi.gc(state, lib.slowscan_screen_sequential_free)
            if order is not None and lib.slowscan_screen_sequential_order(
                    state, ffi.new("size_t[]", list(order) or [0])) != 0:
                raise SlowscanError("slowscan: the grid's series order is not a permutation")
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


def _null_label(cfg, auto=False):
    return ffi.string(cfg.null_name).decode() if cfg.surrogates > 0 or auto else "none"


def summary_rows(run):
    """The summary's rows, as the command writes them: one per series x test (with
    surrogates="auto": each test's surrogates, its decision as flag, p_low and p_high)."""
    cfg, seq = run.cfg, run.sequential
    null, m = _null_label(cfg, seq is not None), int(cfg.surrogates)
    columns = COLUMNS if seq is None else AUTO_COLUMNS
    tail = cfg.tail.method != lib.TAIL_OFF
    columns = columns + ["p_source"] if tail else columns  # where each p came from
    cols = {c: [] for c in columns}
    lo, hi = ffi.new("double *"), ffi.new("double *")
    for k, (name, s) in enumerate(run.series()):
        res = s.result
        for j in range(res.ntests):
            t = res.tests[j]
            flag = s.flag[j]
            if seq is not None:
                flag = lib.slowscan_screen_sequential_flag(seq, k, j, ffi.addressof(res.tests, j),
                                                           flag)
                lib.slowscan_screen_sequential_interval(seq, k, j, lo, hi)
                cols["p_low"].append(lo[0])
                cols["p_high"].append(hi[0])
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
            cols["surrogates"].append(m if seq is None else int(t.surrogates))
            cols["flag"].append(ffi.string(lib.slowscan_screen_flag_name(flag)).decode())
            if tail:
                cols["p_source"].append(_p_source(t))
    frame = pd.DataFrame(cols, columns=columns)
    return frame.astype({"n": np.int64, "surrogates": np.int64})


def _whole_at_least(option, value, low, high=None):
    """A whole number, refused in the command's words with the keyword's name."""
    if not isinstance(value, (int, np.integer)) or isinstance(value, bool):
        raise TypeError("%s=: a whole number is needed, not %s" % (option,
                                                                   type(value).__name__))
    if value < low or (high is not None and value > high):
        raise SlowscanError("%s=: %d is not a whole number %s" % (
            option, value, ">= %d" % low if high is None else "from %d to %d" % (low, high)))
    return int(value)


def sequential_config(options):
    """Pops surrogates="auto" and its options from options: a sequential_config, or None
    for a fixed number of surrogates (its options then refused, as the command refuses
    them). options["surrogates"] becomes 0: the rounds give each series its own range."""
    auto = isinstance(options.get("surrogates"), str) and options["surrogates"] == "auto"
    given = {k: options.pop(k, d) for k, d in SEQUENTIAL.items()}
    budget, risk = given["budget"], given["risk"]
    if budget is not None:
        budget = _whole_at_least("budget", budget, 1)
    cap = _whole_at_least("max_per_series", given["max_per_series"], 64, 1000000)
    if isinstance(risk, bool) or not isinstance(risk, (int, float, np.floating, np.integer)):
        raise TypeError("risk=: a number is needed, not %s" % type(risk).__name__)
    if not 0 < risk < 0.5:
        raise SlowscanError("risk=: %g is outside (0, 0.5)" % risk)
    if not auto:
        named = ("budget" if budget is not None else "max_per_series" if cap != 100000
                 else "risk_joint" if given["risk_joint"] else "risk" if risk != 1e-2 else None)
        if named:
            raise SlowscanError("%s=: only with surrogates='auto'" % named)
        return None
    options["surrogates"] = 0
    cfg = ffi.new("sequential_config *", lib.slowscan_sequential_config_default())
    cfg.max_per_series, cfg.epsilon = cap, float(risk)
    cfg.joint, cfg.budget = int(bool(given["risk_joint"])), budget or 0
    return cfg


def tail_options(options, seq):
    """Pops tail= from options: the library's tail_options for "gpd" (p beyond the
    surrogates from a generalised Pareto fit, as the command's --tail gpd), None for "none"
    or no tail; refused as the command refuses it, with keyword names."""
    method = options.pop("tail", None)
    if method is None or method == "none":
        return None
    if method != "gpd":
        raise SlowscanError("tail=%r: unknown method (gpd, or none)" % (method,))
    tail = ffi.new("tail_options *", lib.slowscan_tail_options_default())
    if seq is not None:
        raise SlowscanError("tail='gpd' needs a fixed number of surrogates (surrogates=M, M >= "
                            "1000); it cannot be combined with surrogates='auto'")
    need, m = lib.slowscan_tail_min_surrogates(tail), options.get("surrogates", 1000)
    if isinstance(m, (int, np.integer)) and not isinstance(m, bool) and m < need:
        raise SlowscanError("tail='gpd' needs surrogates=%d or more (the fit takes at least %d "
                            "exceedances, at most %.0f%% of the surrogates); got surrogates=%d"
                            % (need, tail.min_exceedances, 100 * tail.max_fraction, m))
    tail.method = lib.TAIL_GPD
    return tail


def _p_source(t):
    """Where a test's p came from, as the command's p_source column says."""
    if t.tail.used:
        return "tail_estimate"
    return "NA" if t.p_value != t.p_value else "surrogates"


def sequential_report(run):
    """The run's warnings of surrogates="auto" in the library's words (keywords for options),
    and its numbers for the frame's attrs (the command's JSON names)."""
    s = ffi.new("screen_sequential_summary *",
                lib.slowscan_screen_sequential_summary(run.sequential))
    for writer in (lib.slowscan_message_sequential_floor,
                   lib.slowscan_message_sequential_undecided):
        text = words(writer, s)
        if text:
            warn(_python_words(text.replace("option --surrogates auto",
                                            "surrogates='auto'")))
    return {"budget": s.budget, "max_per_series": s.config.max_per_series,
            "epsilon": s.config.epsilon, "risk": "joint" if s.config.joint else "per test",
            "rounds": s.rounds, "max_rounds": s.max_rounds, "surrogates_drawn": s.spent,
            "tests": s.tested, "undecided": s.undecided}


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
    writes them (maps=False: the summary DataFrame instead); with surrogates="auto" every cell
    is one run of the rounds, the blocks read again for each.

    Options, with the command's defaults: detrend="gaussian-linear", bandwidth="10%",
    deseason=None, deseason_window=None, harmonics=0, window="50%",
    indicators="variance,lag1,recovery_trend", min_coverage=0.8, recovery="log", step=None,
    band=None, surrogates=1000 (or "auto": rounds of surrogates until each test's side of
    the FDR threshold is settled, with budget=None (200 per test), max_per_series=100000,
    risk=0.01, risk_joint=False), null="phase" (or "control" with control=: phase surrogates
    of the control run's same-named series' residual, as the command's --null control; the
    control run a DataFrame, a Series or values with control_time=, read with the data's
    input options but not cut to start=/end=; not for grids), iaaft_tol, iaaft_iterations,
    block_length,
    seed=1, fdr=0.05, alternative=None (each test's direction), noise_trend=False,
    tail=None ("gpd": p below 1/(M+1) estimated from a generalised Pareto fit to the
    surrogates' upper tail, an upper bound, as the command's --tail gpd; surrogates >= 1000;
    adds the p_source column),
    threads=None (every core); for the input: time=, names=, calendar=, time_units=,
    missing=, start=, end=, log=False. progress: called with a Progress tuple after each block
    of surrogates and each finished series (from the library's worker threads).

    Returns the summary DataFrame: series, indicator, n, window, bandwidth, tau, statistic,
    p_value, q_value, null, surrogates, flag — one row per series and test; with
    surrogates="auto" also p_low, p_high (the 95% interval of the Monte Carlo p), each test's
    own surrogates, flag 'undecided' where the budget could not settle a test, and the run's
    numbers in attrs["sequential"].
    """
    from . import _grid
    options = dict(options)
    control = _control.pop_control(options)
    seq = sequential_config(options)
    tail = tail_options(options, seq)
    if _grid.is_grid(data):
        _control.refuse_grid(control)
        return _grid.screen_grid(data, progress, maps, options, seq, tail)
    table, cfg, ctx, keep = setup("screen", data, options)
    if tail is not None:
        cfg.tail = tail[0]
    warn_few_surrogates(cfg)
    if seq is not None:
        seq.fdr = cfg.fdr  # the decisions' BH level is the run's
    run = Run(cfg, ctx, progress, total=table.c.nseries)
    if control is not None:
        _control.attach(run, control, data, options)
    run.add(table, table.source, seq)
    run.decide()
    frame = summary_rows(run)
    if seq is not None:
        frame.attrs["sequential"] = sequential_report(run)
    return frame
