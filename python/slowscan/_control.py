"""screen(), robustness() and recovery() with control=..., null="control": surrogates made
from a control run, as the commands' `--null control --control FILE`. The control run is a
table of its own (a DataFrame, a Series, or values with control_time=), read as the command
reads --control: the data's calendar=, time_units=, missing=, grid (resample=, max_gap=)
and log=, never cut by start=/end= (those choose the data's span). The library matches its
series to the data's by name (slowscan_screen_control_input: screen's through
screen_memory_run.control, robustness's as screen_input.control, recovery's attached to each
prepared series), attaches each one's residual and refuses a missing, short, flat one or one
on another step in its own words."""
from ._errors import SlowscanError, refusal
from ._inputs import Table
from ._library import ffi, lib
from ._series import ready_options, split_options

SOURCE = "control"  # how messages name the control run (as "input" names the data)


def pop_control(options):
    """Pops control=, control_time= and null="control" from options: (control, its time),
    or None when no control run is used. Refused as the command refuses --control without
    --null control and the other way round."""
    control, time = options.pop("control", None), options.pop("control_time", None)
    wanted = options.get("null") == "control"
    if wanted and control is None:
        raise SlowscanError("null='control' needs control= (the control run)")
    if control is None:
        if time is not None:
            raise SlowscanError("control_time= needs control= (the control run)")
        return None
    if not wanted:
        raise SlowscanError("control= needs null='control'")
    del options["null"]  # the library's control null is set on the config (attach)
    return control, time


def refuse_grid(control):
    """A grid is screened without a control run, as the command refuses --control for a
    NetCDF input."""
    if control is not None:
        raise SlowscanError("control=: the data is a grid; a control run is given for tables "
                            "(a DataFrame, a Series or values with time=) only")


def _table(control, data, inputs):
    """The control run as a readied Table (refused as the command refuses --control FILE)."""
    values, time = control
    if values is data:
        raise SlowscanError("control=: the data is also given as the control run; a control "
                            "run must be another run")
    if time is not None and hasattr(values, "index"):
        raise TypeError("control_time=: a DataFrame or Series carries its times in its index")
    t = Table(values, time, inputs.get("names"), inputs.get("calendar"),
              inputs.get("time_units"), inputs.get("missing"), source=SOURCE)
    ready = ready_options(inputs)
    ready.pop("start", None)
    ready.pop("end", None)
    return t.ready(**ready)


def use(cfg, ctx, control, data, options):
    """Reads the control run with the data's input options, sets the library's control null
    on cfg and names the control run in ctx's messages; returns its Table."""
    table = _table(control, data, split_options(dict(options))[0])
    lib.slowscan_screen_config_control(cfg)
    ctx.c.control_source = ctx._text(SOURCE)
    return table


def attach(run, control, data, options):
    """use() for a screening Run: Run.add hands the control run to the memory run
    (screen_memory_run.control)."""
    run.control = use(run.cfg, run.ctx, control, data, options)


def series_input(control, name, ctx):
    """The control run's series `name` (a char * of the data's table) as the
    screen_input.control of that series (slowscan_screen_control_input; its values NULL when
    the control run has none, which the library refuses)."""
    return ffi.new("screen_input *", lib.slowscan_screen_control_input(
        control.c, name, ctx.c.control_source))


def attach_series(cfg, ps, control, name, ctx):
    """The control run's series `name` attached to one prepared series (its surrogates made
    from the control's residual), as the command's recovery attaches it; refusals raise."""
    detail = ffi.new("screen_detail *")
    st = lib.slowscan_screen_attach_control(cfg, ps, series_input(control, name, ctx), detail)
    if st != 0:
        raise refusal(st, detail, ctx)
