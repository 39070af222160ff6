"""The shipped docs/example-report.html is what its documented command writes today."""

import importlib.util
import re
from pathlib import Path

import pytest

from bayesgrowth import __version__

DOCS = Path(__file__).resolve().parents[2] / "docs"


def _make_report():
    spec = importlib.util.spec_from_file_location("make_report", DOCS / "make_report.py")
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _headline(page: str) -> str:
    return re.search(r'<p class="headline">(.*?)</p>', page, re.S).group(1)


@pytest.mark.skipif(not (DOCS / "example-report.html").exists(), reason="docs/ not shipped")
def test_example_report_matches_its_command_and_the_current_wording():
    make_report = _make_report()
    shipped = (DOCS / "example-report.html").read_text(encoding="utf-8")
    fresh = make_report.example_page(with_backtest=False, with_models=False)
    # The headline is computed from the forecast alone: any change of model, numbers or
    # wording since the page was generated shows here (regenerate: python docs/make_report.py).
    assert _headline(shipped) == _headline(fresh)
    assert f"bayesgrowth {__version__}" in shipped
    assert make_report.COMMAND.split(" --out")[0].replace("'", "&#x27;") in shipped
    assert 'id="models"' in shipped and "Stacking weight (90% interval)" in shipped
