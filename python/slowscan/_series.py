"""What every per-series function shares: options to a config and a table, one series
prepared (deseasoned, detrended) by the library, the leakage warnings of a run, and the
times of the output as the command prints them."""
import contextlib

from . import _config
from ._errors import MessageContext, refusal, warn, words
from ._inputs import Table
from ._library import ffi, lib

# how many leaking series a run names one by one before it sums up (as the command)
LEAKAGE_NAMED = 3

INPUT_OPTIONS = ("time", "names", "calendar", "time_units", "missing", "start", "end", "log",
                 "resample", "max_gap")


def ready_options(inputs):
    """The options of Table.ready among a call's input options."""
    return {k: inputs[k] for k in ("start", "end", "log", "resample", "max_gap") if k in inputs}


def split_options(options):
    inputs = {k: options.pop(k) for k in INPUT_OPTIONS if k in options}
    return inputs, options


def setup(command, data, options, source="input"):
    """(table, config, message context, keep-alive list) of one call."""
    inputs, rest = split_options(dict(options))
    keep = []
    cfg = _config.make_config(command, rest, keep)
    table = Table(data, inputs.get("time"), inputs.get("names"), inputs.get("calendar"),
                  inputs.get("time_units"), inputs.get("missing"), source=source)
    table.ready(**ready_options(inputs))
    return table, cfg, MessageContext(source=source, config=cfg), keep


def series_input(table, k, source):
    t = table.c
    return ffi.new("screen_input *", {
        "name": t.names[k], "source": source, "time_name": t.time_name, "time": t.time,
        "values": t.values[k], "n": t.n, "control": ffi.NULL, "axis": t.axis})


@contextlib.contextmanager
def prepared(cfg, table, k, ctx, source):
    """Series k deseasoned and detrended (slowscan_screen_prepare); refusals raise."""
    src = ffi.new("char[]", source.encode())
    inp = series_input(table, k, src)
    ps = ffi.new("screen_prepared *")
    detail = ffi.new("screen_detail *")
    st = lib.slowscan_screen_prepare(cfg, inp, ps, detail)
    try:
        ctx.series(table.names[k])
        if st != 0:
            raise refusal(st, detail, ctx)
        yield ps
    finally:
        lib.slowscan_screen_prepared_free(ps)


class Leakage:
    """The trend-leakage tally of a run, reported as the command reports it."""

    def __init__(self, ctx):
        self.ctx, self.tested, self.leaks = ctx, 0, []

    def add(self, name, leakage, tested):
        self.tested += bool(tested)
        if tested and leakage.leaking:
            copy = ffi.new("detrend_leakage *", leakage)
            self.leaks.append((name, copy))

    def report(self):
        if len(self.leaks) <= LEAKAGE_NAMED:
            for name, leakage in self.leaks:
                warn(words(lib.slowscan_message_leakage, leakage, self.ctx.series(name).c))
            return
        first = [ffi.new("char[]", n.encode()) for n, _ in self.leaks[:LEAKAGE_NAMED]]
        ctx = self.ctx.series(None)
        warn(words(lib.slowscan_message_leakage_summary, len(self.leaks), self.tested,
                   ffi.new("const char *[]", first), LEAKAGE_NAMED, ctx.c))


def array(pointer, n):
    """A copy of n doubles at a library pointer."""
    import numpy as np
    return np.frombuffer(ffi.buffer(pointer, n * 8), dtype=np.float64).copy()


def output_times(table, ps):
    """The times of a prepared series as the command prints them: numbers on a number axis,
    the dates' text (1950-01 on a month index) on a dated one."""
    import numpy as np
    if table.c.axis.unit != lib.TIME_AXIS_NUMBER:
        return np.array(table.time_text(), dtype=object)
    return array(ps.time, ps.n)
