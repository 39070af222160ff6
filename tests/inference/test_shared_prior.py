"""Empirical Bayes across series: the learned prior scales follow the panel's true scales."""

import math

import numpy as np
import pytest

from bayesgrowth.data.periods import PeriodAxis
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.shared_prior import learn_shared_prior


def _panel(level_sd, drift_sd, n_series=8, n=28, seed=0):
    # invented series simulated from the local trend itself (random-walk growth)
    rng = np.random.default_rng(seed)
    axis = PeriodAxis(style="quarter", step=1, origin=2015 * 4)
    out = []
    for i in range(n_series):
        level, growth = math.log(1000.0), 0.03
        y = np.empty(n)
        for j in range(n):
            if j:
                growth += drift_sd * rng.standard_normal()
                level += growth + level_sd * rng.standard_normal()
            y[j] = level + 0.01 * rng.standard_normal()
        out.append(GrowthSeries(values=np.exp(y), t=np.arange(n), axis=axis, name=f"s{i}"))
    return out


@pytest.mark.slow
def test_learned_level_scale_follows_the_truth():
    # default per-quarter level-shock mean is 5%; the panels' true sds are 1.25% and 20%
    quiet = learn_shared_prior(_panel(0.0125, 0.002), factors=(0.25, 1.0, 4.0),
                               drift="random-walk", seasonal=False)
    loud = learn_shared_prior(_panel(0.20, 0.002, seed=1), factors=(0.25, 1.0, 4.0),
                              drift="random-walk", seasonal=False)
    assert quiet.level_factor < loud.level_factor
    assert loud.level_factor == 4.0 and quiet.level_factor == 0.25
    assert len(quiet.table) == 9


def test_panel_must_share_a_calendar_and_be_large_enough():
    panel = _panel(0.05, 0.005, n_series=3)
    with pytest.raises(ValueError, match="at least 5 series"):
        learn_shared_prior(panel)
    yearly = GrowthSeries(values=np.exp(np.arange(10) * 0.1), t=np.arange(10),
                          axis=PeriodAxis(style="year", step=1, origin=2000))
    with pytest.raises(ValueError, match="one calendar"):
        learn_shared_prior(_panel(0.05, 0.005, n_series=5) + [yearly])
