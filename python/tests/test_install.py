"""make install puts the package where Debian's /usr/bin/python3 looks and records the
library's path, so an installed package needs no SLOWSCAN_LIBRARY."""
import os
import subprocess
import sys

from conftest import ROOT


def make(*args):
    env = {k: v for k, v in os.environ.items() if not k.startswith("MAKE")}
    subprocess.run(["make", "-s", "-C", ROOT] + list(args), check=True, capture_output=True,
                   env=env)


def test_destdir_usr(tmp_path):
    make("install", "DESTDIR=%s" % tmp_path, "PREFIX=/usr")
    pkg = tmp_path / "usr/lib/python3/dist-packages/slowscan"
    assert (pkg / "__init__.py").is_file() and (pkg / "_cdef/40_screen.h").is_file()
    assert 'LIBRARY = "/usr/lib/libslowscan.so.3"' in (pkg / "_installed.py").read_text()
    assert (tmp_path / "usr/lib/libslowscan.so.3").exists()


def test_installed_package_runs(tmp_path):
    prefix = tmp_path / "prefix"
    make("install", "PREFIX=%s" % prefix)
    version = "python%d.%d" % sys.version_info[:2]
    pydir = prefix / "lib" / version / "dist-packages"
    assert (pydir / "slowscan/_installed.py").is_file()
    env = {k: v for k, v in os.environ.items() if k not in ("SLOWSCAN_LIBRARY", "PYTHONPATH")}
    env["PYTHONPATH"] = str(pydir)
    code = ("import slowscan, numpy as np; print(slowscan.library_path); "
            "print(len(slowscan.detrend(np.sin(np.arange(20.0)))))")
    out = subprocess.run(["/usr/bin/python3", "-c", code], cwd=tmp_path, env=env,
                         capture_output=True, text=True, check=True).stdout.split()
    assert out == [str(prefix / "lib/libslowscan.so.3"), "20"]
