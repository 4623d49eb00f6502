"""The declarations of slowscan/_cdef (cffi computes struct layouts from them) against the
real headers: a C program built from include/ prints every struct's size and field offsets
and every enumerator's value, which must be cffi's (common practice, no source)."""
import os
import shutil
import subprocess

import pytest

from slowscan._library import ffi
from conftest import ROOT


def _types():
    typedefs, structs, unions = ffi.list_types()
    records, enums = [], []
    for name in typedefs:
        t = ffi.typeof(name)
        if t.kind == "struct" and t.fields is not None:  # opaque workspaces have none
            records.append(name)
        elif t.kind == "enum":
            enums.append(name)
    return records, enums


def test_layout_matches_headers(tmp_path):
    cc = shutil.which("cc") or shutil.which("gcc")
    if cc is None:
        pytest.skip("no C compiler to read the headers with")
    records, enums = _types()
    lines = ['#include "slowscan.h"', '#include "slowscan/screen_memory.h"',
             "#include <stddef.h>", "#include <stdio.h>", "int main(void) {"]
    expect = []
    for name in records:
        lines.append('printf("%%zu\\n", sizeof(%s));' % name)
        expect.append(ffi.sizeof(name))
        for field, f in ffi.typeof(name).fields:
            lines.append('printf("%%zu\\n", offsetof(%s, %s));' % (name, field))
            expect.append(f.offset)
    for name in enums:
        for value, label in sorted(ffi.typeof(name).elements.items()):
            lines.append('printf("%%ld\\n", (long)%s);' % label)
            expect.append(value)
    lines.append("return 0; }")
    src, exe = tmp_path / "layout.c", tmp_path / "layout"
    src.write_text("\n".join(lines))
    subprocess.run([cc, "-std=c11", "-I", os.path.join(ROOT, "include"), "-o", str(exe),
                    str(src)], check=True, capture_output=True)
    got = [int(v) for v in subprocess.run([str(exe)], capture_output=True, text=True,
                                           check=True).stdout.split()]
    assert len(records) > 15 and len(enums) > 15
    assert got == expect
