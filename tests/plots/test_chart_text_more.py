"""Titles, axis labels and legends of the charts beyond the fan and comparison charts.

Each chart is drawn from the bundled (invented) demo series with the exact engine and read
back from the returned Axes.
"""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import pytest  # noqa: E402

from bayesgrowth.plots.fan import plot_fan  # noqa: E402


@pytest.fixture(scope="module")
def demo_fc(demo):
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference import fit_series

    return forecast(fit_series(demo, engine="exact", seed=1, model="exponential"), 8)


def _legend_texts(ax) -> list[str]:
    ax.figure.canvas.draw()
    return [t.get_text() for t in ax.get_legend().get_texts() if t.get_text()]


def test_scenario_is_drawn_beside_the_base_case_and_labelled_last(demo_fc):
    from bayesgrowth.forecast.scenario import Scenario, apply_scenario
    from bayesgrowth.plots.scenario import SCENARIO_COLOR, draw_scenario

    sc = Scenario(growth_factor=0.5, growth_from="2026Q3")
    ax = plot_fan(demo_fc, unit="Revenue (EUR thousand)", target=9000)
    draw_scenario(ax, apply_scenario(demo_fc, sc), sc.describe(demo_fc.periods))
    texts = _legend_texts(ax)
    assert texts[:2] == ["Observed history", "Forecast (median)"]
    assert texts[-2:] == ["Scenario (growth x0.5 from 2026Q3): median", "Scenario: 80% band"]
    assert ax.get_ylabel() == "Revenue (EUR thousand)"
    assert any(ln.get_color() == SCENARIO_COLOR for ln in ax.get_lines())
    assert ax.get_ylim()[0] == 0


def test_prior_predictive_chart_text(demo):
    from bayesgrowth.forecast.prior import prior_predictive
    from bayesgrowth.plots.models import plot_prior_predictive

    prior = prior_predictive(demo, 4, draws=500, seed=1)
    ax = plot_prior_predictive(prior, unit="Revenue")
    title = ax.get_title()
    assert demo.name in title and "What the priors imply before fitting" in title
    assert prior.spec.label() in title.splitlines()[-1]
    assert ax.get_ylabel() == "Revenue (log scale)" and ax.get_xlabel() == "Period"
    texts = _legend_texts(ax)
    assert "Prior predictive median" in texts and "95% prior predictive band" in texts


def test_sensitivity_chart_text(demo):
    from bayesgrowth.forecast.sensitivity import prior_sensitivity
    from bayesgrowth.plots.models import plot_sensitivity

    result = prior_sensitivity(demo, 4, anchors=(0, 50), growth_centres=(0, 10),
                               growth_spreads=(10, 30), draws=300)
    axes = plot_sensitivity(result)
    assert [a.get_title() for a in axes] == ["initial-value anchor", "growth centre",
                                             "growth spread"]
    assert axes[0].get_ylabel() == f"Value in {result.period}: median and 80% band"
    suptitle = axes[0].figure.get_suptitle()
    assert demo.name in suptitle and result.model in suptitle
    assert _legend_texts(axes[0])[-2:] == ["base setting", "other settings"]


def test_models_chart_legend_gives_each_weight_with_its_interval(demo):
    from bayesgrowth.display import fmt_weight
    from bayesgrowth.inference import fit_series
    from bayesgrowth.plots.models import plot_model_bands
    from bayesgrowth.priors import InitialValuePrior, Priors
    from bayesgrowth.select import model_average

    fits = {"default": fit_series(demo, engine="exact", seed=2, model="exponential"),
            "fixed start": fit_series(demo, engine="exact", seed=2,
                                      priors=Priors(initial=InitialValuePrior(0)),
                                      model="exponential")}
    ma = model_average(fits, 4, seed=2)
    ax = plot_model_bands(ma.forecasts, ma.averaged, comparison=ma.comparison, unit="Revenue")
    texts = _legend_texts(ax)
    for row in ma.comparison.table.itertuples():
        assert (f"{row.model} (weight {fmt_weight(row.weight)}, 90% interval "
                f"{fmt_weight(row.weight_lower_90)} to {fmt_weight(row.weight_upper_90)}): "
                "median") in texts
    assert texts[0] == "Observed history" and "Model average: 80% band" in texts
    assert ax.get_ylabel() == "Revenue" and ax.get_xlabel() == "Period"
    assert "stacking average" in ax.get_title()
