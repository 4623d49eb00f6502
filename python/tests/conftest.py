"""Shared helpers: the command line beside the package, and the comparison of a DataFrame
with the CSV the command writes (numbers compared as the command prints them, %.12g)."""
import csv
import io
import os
import subprocess

import numpy as np
import pytest

ROOT = os.path.abspath(os.path.join(os.path.dirname(__file__), "..", ".."))
BIN = os.environ.get("SLOWSCAN_BIN", os.path.join(ROOT, "build", "slowscan"))
DATA = os.path.join(ROOT, "data")


def run_cli(*args, check=True):
    """The command's stdout (its stderr must be empty unless check=False)."""
    p = subprocess.run([BIN] + [str(a) for a in args], capture_output=True, text=True,
                       env=dict(os.environ, LC_ALL="C"))
    if check and p.returncode != 0:
        raise AssertionError("slowscan %s: exit %d: %s" % (" ".join(map(str, args)),
                                                          p.returncode, p.stderr))
    return p


def printed(v):
    """A cell as the command prints it (cli_put_number: %.12g, NA, no -0)."""
    if isinstance(v, str):
        return v
    if isinstance(v, (int, np.integer)) and not isinstance(v, bool):
        return str(int(v))
    v = float(v)
    if v != v or np.isinf(v):
        return "NA"
    return "%.12g" % (0.0 if v == 0 else v)


def assert_same_as_cli(frame, text):
    """Every row and cell of frame equals the command's CSV text, header included."""
    rows = list(csv.reader(io.StringIO(text)))
    assert rows[0] == list(frame.columns)
    assert len(rows) - 1 == len(frame), (len(rows) - 1, len(frame))
    for i, (mine, theirs) in enumerate(zip(frame.itertuples(index=False), rows[1:])):
        got = [printed(v) for v in mine]
        assert got == theirs, "row %d: %s != %s" % (i + 1, got, theirs)


@pytest.fixture
def tmpcsv(tmp_path):
    def write(frame, name="input.csv"):
        path = tmp_path / name
        frame.to_csv(path)
        return str(path)
    return write
