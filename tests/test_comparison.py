"""Least-squares variants beside the Bayesian band, including bending curves."""

import dataclasses

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.comparison import compare_to_forecast, curve_variant
from bayesgrowth.data import read_series
from bayesgrowth.forecast import forecast
from bayesgrowth.inference import fit_series
from bayesgrowth.leastsq.curves import fit_curve
from bayesgrowth.models.spec import ModelSpec


@pytest.fixture(scope="module")
def saturating():
    # Invented logistic series (ceiling 5,000), for this test only.
    rng = np.random.default_rng(4)
    t = np.arange(24)
    curve = 5000 / (1 + (5000 - 300) / 300 * np.exp(-0.3 * t))
    values = curve * np.exp(rng.normal(0, 0.03, t.size))
    labels = [f"{2019 + i // 4}Q{i % 4 + 1}" for i in t]
    return read_series(pd.DataFrame({"period": labels, "value": values}))


def test_curve_variant_is_the_least_squares_curve(saturating):
    s = saturating
    row = curve_variant("logistic", s.t, s.values, 0)
    direct = fit_curve("logistic", s.t, s.values, t_ref=0)
    np.testing.assert_allclose(row.value_at(s.t), direct.value_at(s.t))
    fitted = direct.value_at(s.t)
    # R^2 = 1 - RSS/TSS on the revenue scale (textbook definition).
    tss = np.sum((s.values - s.values.mean()) ** 2)
    assert row.r_squared == pytest.approx(1 - np.sum((s.values - fitted) ** 2) / tss)
    last = direct.value_at(np.array([22.0, 23.0]))
    assert row.growth_per_period == pytest.approx(last[1] / last[0] - 1)
    assert direct.params["K"] == pytest.approx(5000, rel=0.1)


def test_bending_model_adds_its_curve_to_the_table(saturating):
    fc = forecast(fit_series(saturating, engine="exact", seed=1, model="exponential"), 6)
    plain = compare_to_forecast(fc)
    assert not any("logistic" in v for v in plain.table["variant"])
    # Only the model's name matters to the comparison: relabel the exact fit rather than
    # pay for a NUTS logistic fit here.
    relabelled = dataclasses.replace(fc.fit, spec=ModelSpec(model="logistic"))
    as_logistic = dataclasses.replace(fc, fit=relabelled)
    table = compare_to_forecast(as_logistic).table
    row = table[table["variant"] == "logistic (revenue scale)"].iloc[0]
    # On saturating data the logistic point forecast sits far below the exponential one.
    exp_row = table[table["variant"] == "log-linear"].iloc[0]
    assert row["value_at_horizon"] < 0.7 * exp_row["value_at_horizon"]
    assert 0 <= row["prob_at_least"] <= 1


def test_leave_one_out_variants_are_named_by_the_period_left_out(demo):
    from bayesgrowth.leastsq import leave_one_out_fits

    fc = forecast(fit_series(demo, engine="exact", seed=1, model="exponential"), 2)
    comp = compare_to_forecast(fc)
    named = [f.variant for f in comp.fits if f.variant.startswith("log-linear, leave out")]
    assert named == [f"log-linear, leave out {p}" for p in demo.labels]
    # Same fits as the numeric ones, only renamed: fit i leaves out observation i.
    raw = leave_one_out_fits(demo.t, demo.values, t_ref=fc.fit.priors.t_ref)
    loo = [f for f in comp.fits if f.variant.startswith("log-linear, leave out")]
    for a, b in zip(loo, raw, strict=True):
        assert a.forecast(2) == pytest.approx(b.forecast(2))


def test_a_comparison_draws_on_the_users_axes(demo):
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    import bayesgrowth as bg

    comparison = bg.compare_to_forecast(bg.GrowthModel(seed=1).fit(demo).forecast(4))
    fig, ax = plt.subplots()
    assert bg.plot_compared(comparison, ax=ax, unit="Revenue") is ax
    # a line per least-squares variant, the Bayesian median, the data, the forecast start
    assert len(ax.get_lines()) >= len(comparison.fits) + 3
    assert ax.get_xlabel() == "Period (quarterly)" and ax.get_ylabel() == "Revenue"
    plt.close(fig)
