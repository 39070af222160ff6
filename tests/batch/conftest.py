"""Shared inputs of the batch tests: a small invented panel with a few bad series."""

from __future__ import annotations

import pandas as pd
import pytest

from bayesgrowth.data.panel import invented_panel

#: Three series with one problem each, appended after the good ones.
BAD_ROWS = [
    ("zero", "2020Q1", "10"), ("zero", "2020Q2", "0"), ("zero", "2020Q3", "12"),
    ("dup", "2020Q1", "5"), ("dup", "2020Q2", "6"), ("dup", "2020Q2", "7"),
    ("dup", "2020Q3", "8"),
    ("short", "2020Q1", "3"), ("short", "2020Q2", "4"),
]


@pytest.fixture
def panel_csv(tmp_path):
    """12 good invented series (12-20 quarters) and 3 bad ones; returns the path."""
    good = invented_panel(12, min_periods=12, max_periods=20, seed=5)
    bad = pd.DataFrame(BAD_ROWS, columns=["series", "period", "value"])
    path = tmp_path / "panel.csv"
    pd.concat([good.astype(str), bad], ignore_index=True).to_csv(path, index=False)
    return path


@pytest.fixture
def good_csv(tmp_path):
    path = tmp_path / "good.csv"
    invented_panel(6, min_periods=8, max_periods=14, seed=9).to_csv(path, index=False)
    return path
