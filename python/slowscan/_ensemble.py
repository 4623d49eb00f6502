"""ensemble=True of feedback and timescales, as the commands' --ensemble (cli/forced_ensemble.c):
columns NAME.MEMBER grouped by the library (slowscan_ensemble_group, members=), the response's
members paired with the flux's by suffix, the split warning on the response's members
(slowscan_ensemble_split_test), then each member as a run of its own and the members' mean
(slowscan_ensemble_mean), its columns named as response= and flux= so that a baseline run
finds its columns of those names."""
import numpy as np

from ._errors import MessageContext, SlowscanError, warn, words
from ._forced import Run, ptr, table_time
from ._library import ffi, lib


def _member_list(members):
    if members is None:
        return []
    items = members.split(",") if isinstance(members, str) else [str(m) for m in members]
    if any(not m for m in items):
        raise SlowscanError("members=%r: an empty member" % (members,))
    return items


def _groups(table, members):
    """The library's grouping of the table's columns: {name: [column indices]}."""
    listed = _member_list(members)
    keep = [ffi.new("char[]", m.encode()) for m in listed]
    names = [ffi.new("char[]", n.encode()) for n in table.names]
    how = ffi.new("ensemble_grouping *", lib.slowscan_ensemble_grouping_default())
    if listed:
        how.members = ffi.new("const char *[]", keep)
        how.nmembers = len(listed)
        keep.append(how.members)
    name_ptrs = ffi.new("const char *[]", names)
    out = ffi.new("ensemble_set *")
    detail = ffi.new("ensemble_detail *")
    st = lib.slowscan_ensemble_group(name_ptrs, ffi.NULL, len(names), how, out, detail)
    try:
        if st == lib.SLOWSCAN_ENOMEM:
            raise MemoryError("slowscan: out of memory")
        if st != 0:
            ctx = MessageContext(source=table.source)
            raise SlowscanError(words(lib.slowscan_message_ensemble_refusal, detail, name_ptrs,
                                      b"members=" if listed else b"ensemble=True", ctx.c), st)
        return {ffi.string(g.name).decode(): [g.members[m] for m in range(g.nmembers)]
                for g in out.groups[0:out.ngroups]}
    finally:
        lib.slowscan_ensemble_set_free(out)


def _find(table, groups, option, name, members):
    if name not in groups:
        raise SlowscanError("%s=: %s has no ensemble of columns %s.MEMBER%s" % (
            option, table.source, name, " with the listed members=" if members else ""))
    return groups[name]


def _suffix(table, name, k):
    return table.names[k][len(name) + 1:]


def _pair(table, response, rcols, flux, fcols):
    """The flux column of each response member (by suffix), or a refusal."""
    by_suffix = {_suffix(table, flux, k): k for k in fcols}
    paired = []
    for k in rcols:
        s = _suffix(table, response, k)
        if s not in by_suffix:
            raise SlowscanError("ensemble=True: %s has %s but no %s.%s (the flux of that "
                                "member)" % (table.source, table.names[k], flux, s))
        paired.append(by_suffix[s])
    if len(fcols) != len(rcols):
        raise SlowscanError("ensemble=True: %s has %d members of %s and %d of %s"
                            % (table.source, len(fcols), flux, len(rcols), response))
    return paired


def _split_warning(table, response, values):
    rows = ffi.new("const double *[]", [ptr(v) for v in values])
    options = ffi.new("ensemble_split_options *", lib.slowscan_ensemble_split_options_default())
    split = ffi.new("ensemble_split *")
    lib.slowscan_ensemble_split_test(rows, len(values), table.c.n, options, split)
    if split.flags:
        warn(words(lib.slowscan_message_ensemble_split, response.encode(), split, options,
                   MessageContext(source=table.source).c))


def member_runs(table, response, flux, members, annual, what):
    """(member suffix or "mean", column name, Run) of each member of the response= ensemble
    (with its flux when flux= is given), then of their mean."""
    groups = _groups(table, members)
    rcols = _find(table, groups, "response", response, members)
    fcols = None
    if flux is not None:
        fcols = _pair(table, response, rcols, flux, _find(table, groups, "flux", flux, members))
    labels = [response] if flux is None else [response, flux]
    column = [np.frombuffer(ffi.buffer(table.c.values[k], table.c.n * 8), np.float64).copy()
              for k in range(table.c.nseries)]
    _split_warning(table, response, [column[k] for k in rcols])
    axis, time = table.c.axis, table_time(table)
    for m, k in enumerate(rcols):
        cols = [k] if fcols is None else [k, fcols[m]]
        yield _suffix(table, response, k), table.names[k], Run(
            table.source, ffi.new("time_axis *", axis)[0], time.copy(), labels,
            [column[j].copy() for j in cols], what, annual)
    means = [_mean([column[k] for k in rcols])]
    if fcols is not None:
        means.append(_mean([column[k] for k in fcols]))
    yield "mean", response + "[mean]", Run(table.source, ffi.new("time_axis *", axis)[0],
                                           time.copy(), labels, means, what, annual)


def _mean(values):
    """The members' mean (missing where any member is: slowscan_ensemble_mean)."""
    out = np.empty(len(values[0]))
    rows = ffi.new("const double *[]", [ptr(v) for v in values])
    if lib.slowscan_ensemble_mean(rows, len(values), len(out), ptr(out)) != 0:
        raise MemoryError("slowscan: out of memory")
    return out
