"""The model-averaged forecast is the weighted mixture of the models' predictive draws.

Reference: Yao, Vehtari, Simpson & Gelman (2018), section 2: the stacked
predictive distribution is sum_k w_k p(y | M_k), a mixture; its quantiles solve
sum_k w_k F_k(x) = q, which differ from weighted averages of quantiles.
"""

import numpy as np
import pytest

from bayesgrowth.forecast import forecast
from bayesgrowth.inference import fit_series
from bayesgrowth.priors import GrowthPrior, Priors
from bayesgrowth.select import average_forecasts, fit_models, model_average, registered_models


@pytest.fixture(scope="module")
def two_forecasts(demo):
    # Two exponential models that disagree about growth: the data's own (about
    # 7% a quarter) and one held near 2% a quarter by a tight prior.
    free = fit_series(demo, engine="exact", seed=5, model="exponential")
    slow = fit_series(demo, engine="exact", seed=5, priors=Priors(growth=GrowthPrior(2, 0.3)),
                      model="exponential")
    return {"free": forecast(free, 8, seed=5), "slow": forecast(slow, 8, seed=5)}


def test_mixture_proportions_follow_the_weights(two_forecasts):
    w = {"free": 0.3, "slow": 0.7}
    n = 20_000
    avg = average_forecasts(two_forecasts, w, n_draws=n, seed=1)
    assert avg.draws.shape == (n, 8)
    for name, share in avg.shares.items():
        # Multinomial counts: within 4 binomial standard deviations of the weight.
        sd = np.sqrt(w[name] * (1 - w[name]) / n)
        assert abs(share - w[name]) < 4 * sd
    # Every averaged row is a whole row (a path) of the model it is attributed to,
    # with the curve draws of that same row.
    for k, name in enumerate(avg.models):
        fc = two_forecasts[name]
        index = {tuple(r): i for i, r in enumerate(fc.draws)}
        picked = avg.draws[avg.source == k]
        rows = [index[tuple(r)] for r in picked]  # KeyError if a row is not the model's
        np.testing.assert_array_equal(avg.curve_draws[avg.source == k], fc.curve_draws[rows])


def test_bands_are_mixture_quantiles_not_averaged_bands(two_forecasts):
    w = {"free": 0.5, "slow": 0.5}
    avg = average_forecasts(two_forecasts, w, n_draws=40_000, seed=2)
    last = {k: fc.draws[:, -1] for k, fc in two_forecasts.items()}

    def mixture_cdf(x):
        return sum(w[k] * np.mean(v <= x) for k, v in last.items())

    tab = avg.table.iloc[-1]
    n = avg.draws.shape[0]
    for q, col in [(0.1, "lower_80"), (0.5, "median"), (0.9, "upper_80")]:
        # The band edge sits at the q-quantile of the mixture: the mixture's CDF
        # there is q within 4 binomial standard deviations of n resampled draws.
        assert abs(mixture_cdf(tab[col]) - q) < 4 * np.sqrt(q * (1 - q) / n)
    # The models disagree, so the mixture band is much wider than the average of bands.
    tabs = {k: fc.table.iloc[-1] for k, fc in two_forecasts.items()}
    avg_width = np.mean([t["upper_80"] - t["lower_80"] for t in tabs.values()])
    assert tab["upper_80"] - tab["lower_80"] > 1.5 * avg_width
    assert tabs["slow"]["upper_80"] < tabs["free"]["lower_80"]  # really disagreeing


def test_same_seed_same_mixture_and_columns_match_a_forecast(two_forecasts):
    a = average_forecasts(two_forecasts, {"free": 0.4, "slow": 0.6}, seed=3)
    b = average_forecasts(two_forecasts, {"free": 0.4, "slow": 0.6}, seed=3)
    np.testing.assert_array_equal(a.draws, b.draws)
    assert list(a.table.columns) == list(two_forecasts["free"].table.columns)
    assert a.draws.shape[0] == two_forecasts["free"].draws.shape[0]
    one = average_forecasts(two_forecasts, {"free": 1.0}, seed=3)
    assert set(one.source.tolist()) == {0}


def test_the_fan_chart_draws_an_averaged_forecast(two_forecasts):
    from bayesgrowth.plots.fan import plot_fan

    avg = average_forecasts(two_forecasts, {"free": 0.5, "slow": 0.5}, seed=3)
    ax = plot_fan(avg)
    assert "average of 2 models" in ax.get_title()


@pytest.mark.parametrize("weights, match", [
    ({"free": 0.5, "slow": 0.6}, "sum to 1"),
    ({"free": -0.5, "slow": 1.5}, ">= 0"),
    ({"free": 0.5, "other": 0.5}, "without a forecast"),
])
def test_bad_weights_are_refused(two_forecasts, weights, match):
    with pytest.raises(ValueError, match=match):
        average_forecasts(two_forecasts, weights)


def test_forecasts_of_different_series_are_refused(demo, two_forecasts):
    short = forecast(fit_series(demo.head(10), engine="exact", seed=1, model="exponential"), 8)
    with pytest.raises(ValueError, match="same series"):
        average_forecasts({"a": two_forecasts["free"], "b": short}, {"a": 0.5, "b": 0.5})


def test_model_average_uses_stacking_weights(demo):
    fits = {
        "free": fit_series(demo, engine="exact", seed=4, model="exponential"),
        "slow": fit_series(demo, engine="exact", seed=4,
                           priors=Priors(growth=GrowthPrior(2, 0.3)), model="exponential"),
    }
    ma = model_average(fits, 4, seed=4)
    assert ma.averaged.weights == pytest.approx(ma.comparison.weights)
    assert ma.comparison.weights["free"] > 0.9  # the pinned-growth model fits far worse
    assert set(ma.forecasts) == {"free", "slow"}


def test_fit_models_checks_names(demo):
    assert registered_models()[0] == "exponential"
    with pytest.raises(ValueError, match="unknown model"):
        fit_models(demo, ["exponential", "cubic"])
    with pytest.raises(ValueError, match="only once"):
        fit_models(demo, ["exponential", "exponential"])
    fits = fit_models(demo, ["exponential"], seed=2)
    assert fits["exponential"].engine == "exact"
