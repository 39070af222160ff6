"""The group total of a pooled forecast adds the series period by period on one calendar.

The pooled posteriors are written down directly (no sampling), so these tests run in
milliseconds; the NUTS fit itself is tested in tests/models/test_hierarchical.py.
"""

from __future__ import annotations

import numpy as np
import pytest
from written_pooled import quarters, series_of, written_pooled_fit

from bayesgrowth.forecast.pooled import forecast_pooled


@pytest.fixture
def early_panel():
    # 'late' reports to 2025Q4; 'early' stops three quarters sooner, in 2025Q1
    return {"late": series_of("late", quarters(2022, 16), 100.0),
            "early": series_of("early", quarters(2022, 13), 400.0)}


def test_total_adds_every_series_in_the_same_calendar_periods(early_panel):
    pf = forecast_pooled(written_pooled_fit(early_panel), 3, levels=(80,), seed=2)
    assert pf.total["period"].tolist() == ["2026Q1", "2026Q2", "2026Q3"]
    for name, fc in pf.forecasts.items():
        table = fc.table.set_index("period")
        # every series has a forecast, in its own table, for every period of the total
        assert set(pf.total["period"]) <= set(table.index), name
        # and the total is made of exactly those forecasts, period by period
        own = fc.draws[:, [fc.periods.index(p) for p in pf.total["period"]]]
        np.testing.assert_array_equal(pf.aligned[name], own)
    np.testing.assert_array_equal(pf.total_draws, sum(pf.aligned.values()))
    # the series that ends sooner starts its forecast right after its own last period
    assert pf.forecasts["early"].periods[0] == "2025Q2"
    assert pf.forecasts["late"].periods[0] == "2026Q1"


def test_a_series_that_ends_sooner_is_named_with_its_last_period(early_panel):
    pf = forecast_pooled(written_pooled_fit(early_panel), 3, levels=(80,), seed=2)
    assert "'early' ends in 2025Q1, 3 period(s) before the latest series (2025Q4)" \
        in pf.ends_note
    assert "2026Q1 to 2026Q3" in pf.ends_note
    together = {n: series_of(n, quarters(2022, 12), 50.0) for n in ("a", "b")}
    assert forecast_pooled(written_pooled_fit(together), 2, levels=(80,)).ends_note is None


def test_periods_in_different_months_are_not_added_up():
    # quarterly dates taken in Jan/Apr/Jul/Oct and in Feb/May/Aug/Nov: one step, no shared period
    jan = [f"{2023 + i // 4}-{3 * (i % 4) + 1:02d}-01" for i in range(8)]
    feb = [f"{2023 + i // 4}-{3 * (i % 4) + 2:02d}-01" for i in range(8)]
    panel = {"jan": series_of("jan", jan, 100.0), "feb": series_of("feb", feb, 100.0)}
    assert {s.axis.step for s in panel.values()} == {3}
    pf = forecast_pooled(written_pooled_fit(panel), 2, levels=(80,))
    assert pf.total is None and pf.total_draws is None
    assert "fall in different months" in pf.note and "'jan' (last 2024-10-01)" in pf.note


def test_the_table_of_every_series_can_be_read_twice(early_panel):
    pf = forecast_pooled(written_pooled_fit(early_panel), 2, levels=(80,))
    assert pf.table.equals(pf.table)
    assert "series" not in pf.forecasts["late"].table.columns
