"""The public API documents itself: examples that run, and a reference built from docstrings."""

from __future__ import annotations

import doctest
import inspect
import re

import pytest

import bayesgrowth as bg


def _public_functions():
    return [name for name in bg.__all__ if inspect.isfunction(getattr(bg, name))]


@pytest.mark.parametrize("name", _public_functions())
def test_every_public_function_has_an_example_that_runs(name):
    # tests/test_doctests.py runs the examples; here: there is one that is not skipped
    examples = doctest.DocTestParser().get_examples(inspect.getdoc(getattr(bg, name)) or "")
    running = [e for e in examples if not e.options.get(doctest.OPTIONFLAGS_BY_NAME["SKIP"])]
    assert running, f"{name}: add an Examples section whose lines run (exact engine, no sampling)"


def test_api_reference_builds_and_names_every_public_name(tmp_path):
    pytest.importorskip("pdoc")
    from pdoc import pdoc as build
    from pdoc import render

    render.configure(docformat="numpy", show_source=False, search=False)
    build("bayesgrowth", output_directory=tmp_path)
    page = (tmp_path / "bayesgrowth.html").read_text(encoding="utf-8")
    anchors = set(re.findall(r'id="([^"]+)"', page))
    assert [name for name in bg.__all__ if name not in anchors] == []
    assert "not investment advice" in page  # the forecast caution is in the reference too
