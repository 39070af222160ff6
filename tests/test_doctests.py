"""The docstring examples of every module of the package run, and give what they show.

Run here with the standard library's ``doctest`` (one test per module) rather than with
pytest's ``--doctest-modules``, which would also import the suite's ``conftest.py`` files
as modules of one name. Examples use the exact engine; lines that would sample with NUTS
are marked ``# doctest: +SKIP``.
"""

from __future__ import annotations

import doctest
import importlib
import pkgutil

import pytest

import bayesgrowth

#: Module -> the import its examples need, from an optional extra (skipped without it).
NEEDS_EXTRA = {
    "bayesgrowth.batch.executors": "distributed",  # extra "dask"
    "bayesgrowth.data.excel": "openpyxl",  # extra "excel"
}


def _modules() -> list[str]:
    found = pkgutil.walk_packages(bayesgrowth.__path__, "bayesgrowth.")
    return ["bayesgrowth", *sorted(m.name for m in found if not m.name.endswith("__main__"))]


@pytest.mark.parametrize("name", _modules())
def test_docstring_examples_run(name):
    if name in NEEDS_EXTRA:
        pytest.importorskip(NEEDS_EXTRA[name])
    module = importlib.import_module(name)
    result = doctest.testmod(module, optionflags=doctest.ELLIPSIS, report=True)
    assert result.failed == 0, f"{result.failed} of {result.attempted} examples of {name} failed"
