"""The shared library and its declarations (cffi, ABI mode: no compiler needed).

The library is looked for, in order: the path in the environment variable
SLOWSCAN_LIBRARY; the path `make install` recorded in _installed.py; the name
libslowscan.so.3 through the loader's own search (LD_LIBRARY_PATH, ld.so.cache).
The declarations are the files of _cdef/, read in sorted order (see _cdef/README).
"""
import os

import cffi

SONAME = "libslowscan.so.3"
_CDEF_DIR = os.path.join(os.path.dirname(__file__), "_cdef")


def _declarations():
    names = sorted(n for n in os.listdir(_CDEF_DIR) if n.endswith(".h"))
    parts = []
    for name in names:
        with open(os.path.join(_CDEF_DIR, name), encoding="utf-8") as f:
            parts.append(f.read())
    return "\n".join(parts)


def _candidates():
    env = os.environ.get("SLOWSCAN_LIBRARY")
    if env:
        return [env]  # an explicit choice is not second-guessed
    found = []
    try:
        from . import _installed
        found.append(_installed.LIBRARY)
    except ImportError:
        pass
    found.append(SONAME)
    return found


def _open(ffi):
    tried = []
    for path in _candidates():
        try:
            return ffi.dlopen(path), path
        except OSError as e:
            tried.append("%s (%s)" % (path, e))
    raise ImportError("slowscan: cannot load the shared library; tried " + "; ".join(tried) +
                      ". Set SLOWSCAN_LIBRARY to the path of libslowscan.so.3.")


ffi = cffi.FFI()
ffi.cdef(_declarations())
lib, path = _open(ffi)


def _thread_safe_planning():
    """Calls release Python's lock, so two Python threads may plan FFTs at once; FFTW's
    planner is not thread-safe unless told (the command does this in main, the batch driver
    when it starts threads). libfftw3_threads is already loaded with the library."""
    threads = cffi.FFI()
    threads.cdef("void fftw_make_planner_thread_safe(void);")
    try:
        threads.dlopen("libfftw3_threads.so.3").fftw_make_planner_thread_safe()
    except (OSError, AttributeError):  # an FFTW without it: calls stay safe one at a time
        pass


_thread_safe_planning()
