"""slowscan.detrend: trend and residual of every series (the `detrend` command)."""
import pandas as pd

from ._errors import warn, words
from ._series import Leakage, array, output_times, prepared, setup
from ._library import lib

COLUMNS = ["series", "time", "value", "trend", "residual"]


def detrend(data, **options):
    """Trend and residual of every series, as `slowscan detrend` writes them.

    data: a DataFrame (index = time, one column per series), a Series, a one-dimensional
    DataArray, or an array of values (time first) with time= (numbers, datetime64 or cftime
    dates) and names=. Options (the command's, with its defaults): detrend="gaussian-linear",
    bandwidth="10%", deseason=None, deseason_window=None, harmonics=0; and for the input:
    calendar=, time_units=, missing=, start=, end=, log=False.
    Returns a DataFrame with columns series, time, value, trend, residual (value is the
    series as detrended: after log= and deseasoning). Times on a dated axis are the ISO
    text the command prints.
    """
    table, cfg, ctx, keep = setup("detrend", data, options)
    frames = []
    leakage = Leakage(ctx)
    for k, name in enumerate(table.names):
        with prepared(cfg, table, k, ctx, table.source) as ps:
            leakage.add(name, ps.leakage, ps.leakage_tested)
            text = words(lib.slowscan_message_detrended, ps, ctx.c)
            if text:
                warn(text)
            n = ps.n
            frames.append(pd.DataFrame({
                "series": [name] * n, "time": output_times(table, ps),
                "value": array(ps.value, n), "trend": array(ps.trend, n),
                "residual": array(ps.residual, n)}, columns=COLUMNS))
    leakage.report()
    if not frames:
        return pd.DataFrame(columns=COLUMNS)
    return pd.concat(frames, ignore_index=True)

