"""A model average leaves out fits whose sampling diagnostics failed, and names them."""

import dataclasses

import pytest

import bayesgrowth as bg
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.run import fit_series
from bayesgrowth.select.averaging import model_average


def test_failed_fit_is_left_out_and_named():
    s = bg.load_demo()
    good = fit_series(s, engine="exact", model="local-trend", drift="mean-reverting", seed=1,
                      seasonal=False)
    other = fit_series(s, engine="exact", model="exponential", seed=1)
    # a fit whose checks failed (as a NUTS fit with divergent transitions would report)
    bad_diag = Diagnostics.from_values(1.2, 50, 40, 7, method="nuts")
    assert not bad_diag.ok
    bad = dataclasses.replace(other, diagnostics=bad_diag)
    ma = model_average({"local-trend": good, "exponential": bad}, 4)
    assert list(ma.excluded) == ["exponential"]
    assert "divergent" in ma.excluded["exponential"]
    assert list(ma.forecasts) == ["local-trend"]
    assert dict(ma.comparison.weights) == pytest.approx({"local-trend": 1.0})


def test_when_all_failed_all_are_kept_and_flagged():
    s = bg.load_demo()
    fit = fit_series(s, engine="exact", model="exponential", seed=1)
    bad = dataclasses.replace(fit, diagnostics=Diagnostics.from_values(1.3, 10, 10, 3, "nuts"))
    ma = model_average({"exponential": bad}, 4)
    assert ma.excluded == {}
    assert not bool(ma.comparison.table["diagnostics_ok"].iloc[0])
