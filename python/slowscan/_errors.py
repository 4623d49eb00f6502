"""The library's refusals as exceptions and its warnings as Python warnings, in the
library's own words (the slowscan_message_* writers), with the settings named as Python
callers write them ("window=") instead of the command line's ("--window")."""
import re
import warnings

from ._library import ffi, lib


class SlowscanError(ValueError):
    """A refusal of the library: bad input or options, with the library's message."""

    def __init__(self, message, status=None):
        super().__init__(message)
        self.status = status


class SlowscanWarning(UserWarning):
    """A warning of the library (a series left untested, a leaking trend, ...)."""


def python_option_name(cli_name):
    """'--deseason-window' -> 'deseason_window='."""
    if not cli_name:
        return ""
    return cli_name.lstrip("-").replace("-", "_") + "="


def _option_names():
    names = [python_option_name(ffi.string(lib.slowscan_message_option_name(i)).decode())
             for i in range(lib.SCREEN_OPTION_COUNT)]
    keep = [ffi.new("char[]", n.encode()) for n in names]
    array = ffi.new("const char *[]", keep)
    return array, keep


_OPTION_NAMES, _OPTION_KEEP = _option_names()


class MessageContext:
    """A message_context that keeps its strings alive as long as it lives."""

    def __init__(self, source=None, series=None, config=None):
        self._keep = []
        self.source_name = source
        self.c = ffi.new("message_context *", lib.slowscan_message_context_default())
        self.c.source = self._text(source)
        self.c.series = self._text(series)
        if config is not None:
            self.c.config = config
        self.c.option_names = _OPTION_NAMES

    def _text(self, s):
        if s is None:
            return ffi.NULL
        b = ffi.new("char[]", s.encode())
        self._keep.append(b)
        return b

    def series(self, name):
        self.c.series = self._text(name)
        return self


def words(writer, *args):
    """Calls a slowscan_message_* writer (snprintf-like) and returns its text."""
    size = 512
    while True:
        buf = ffi.new("char[]", size)
        need = writer(buf, size, *args)
        if need < size:
            return ffi.string(buf).decode(errors="replace")
        size = need + 1


def status_text(status):
    return {lib.SLOWSCAN_EINVAL: "invalid argument", lib.SLOWSCAN_ENOMEM: "out of memory",
            lib.SLOWSCAN_ESHORT: "too few finite samples",
            lib.SLOWSCAN_ECONST: "no variation in the data",
            lib.SLOWSCAN_ENUMERIC: "numerical failure",
            lib.SLOWSCAN_EIO: "input/output failure"}.get(status, "unknown status")


def refusal(status, detail, ctx):
    """The exception for a status and the screen_detail the library filled."""
    if status == lib.SLOWSCAN_ENOMEM:
        return MemoryError("slowscan: out of memory")
    return SlowscanError(words(lib.slowscan_message_refusal, detail, ctx.c), status)


# io/'s messages name the command's options; a Python caller gives these keywords
_IO_OPTIONS = {"--from": "start=", "--until": "end=", "--log": "log=True",
               "--resample STEP": "resample=STEP", "--vars": "names="}


def _keyword(option):
    return _IO_OPTIONS.get(option, python_option_name(option))


def _python_words(text):
    """'--from 3' -> 'start=3', '--missing' -> 'missing=' (io/ words the command's options)."""
    text = text.replace("--resample STEP", _IO_OPTIONS["--resample STEP"])
    text = re.sub(r"(--[a-z][a-z-]*) ([-+]?[0-9][^ ,;)]*)",
                  lambda m: _keyword(m.group(1)) + m.group(2), text)
    return re.sub(r"--[a-z][a-z-]*", lambda m: _keyword(m.group(0)), text)


def io_refusal(status, err):
    """The exception for a status of io/ and the message it wrote."""
    if status == lib.SLOWSCAN_ENOMEM:
        return MemoryError("slowscan: out of memory")
    text = ffi.string(err.message).decode(errors="replace") or status_text(status)
    return SlowscanError(_python_words(text), status)


def warn(text):
    warnings.warn(text, SlowscanWarning, stacklevel=3)
