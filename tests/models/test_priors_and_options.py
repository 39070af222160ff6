"""Bad priors and unsupported combinations give clear one-line errors; priors in words."""

from __future__ import annotations

import pytest

from bayesgrowth.inference import fit_series
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import (
    CeilingPrior,
    HalfLifePrior,
    LocalTrendPrior,
    LongRunGrowthPrior,
    PersistencePrior,
    Priors,
    SeasonalPrior,
)


@pytest.mark.parametrize(
    ("make", "match"),
    [
        (lambda: CeilingPrior(value=-5), "ceiling must be > 0"),
        (lambda: CeilingPrior(multiple=0.5), "ceiling multiple must be above 1"),
        (lambda: CeilingPrior(give_or_take_pct=0), "ceiling give-or-take must be > 0"),
        (lambda: HalfLifePrior(periods=0), "half-life must be > 0 periods"),
        (lambda: HalfLifePrior(periods=-2), "half-life must be > 0 periods"),
        (lambda: HalfLifePrior(factor=1), "half-life factor must be above 1"),
        (lambda: LongRunGrowthPrior(center_pct=-120), "long-run growth must be above -100"),
        (lambda: PersistencePrior(mean=1.2), "persistence mean must be between 0 and 1"),
        (lambda: PersistencePrior(concentration=0), "persistence concentration must be > 0"),
        (lambda: LocalTrendPrior(growth_drift_pts=0), "growth drift must be > 0"),
        (lambda: SeasonalPrior(typical_pct=-1), "seasonal typical deviation must be > 0"),
    ],
)
def test_bad_prior_objects_are_refused_in_one_line(make, match):
    with pytest.raises(ValueError, match=match) as err:
        make()
    assert "\n" not in str(err.value)


def test_ceiling_below_the_data_is_refused(demo):
    with pytest.raises(ValueError, match="not above the largest observed value"):
        Priors(ceiling=CeilingPrior(value=float(demo.values.max()) * 0.9)).resolve(demo)


def test_exact_engine_refuses_other_models(demo):
    # the exponential curve is covered with normal noise only (any errors, seasons or not)
    with pytest.raises(ValueError, match="with or without seasonal factors.*use engine='nuts'"):
        fit_series(demo, engine="exact", errors="ar1", noise="student-t", seed=1,
                   model="exponential")
    with pytest.raises(ValueError, match="use engine='nuts'"):
        fit_series(demo, engine="exact", noise="student-t", seasonal=True, seed=1,
                   model="exponential")
    with pytest.raises(ValueError, match="use engine='nuts'"):
        fit_series(demo, engine="exact", model="local-trend", errors="ar1", seed=1,
                   drift="random-walk", seasonal=False)
    with pytest.raises(ValueError, match="use engine='nuts'"):
        fit_series(demo, engine="exact", model="logistic", seed=1)


def test_seasonal_needs_a_seasonal_calendar():
    import pandas as pd

    from bayesgrowth.data.series import read_series

    s = read_series(pd.DataFrame({"period": [2001, 2002, 2003, 2004], "value": [1, 2, 3, 4.0]}))
    with pytest.raises(ValueError, match="quarterly or monthly"):
        fit_series(s, seasonal=True, seed=1, engine="nuts", model="exponential")


def test_defaults_resolve_and_describe(demo):
    r = Priors(ceiling=CeilingPrior(value=20_000), half_life=HalfLifePrior(periods=6)).resolve(
        demo
    )
    lines = r.describe(ModelSpec(model="logistic", errors="ar1", noise="student-t"))
    text = "\n".join(lines)
    assert "ceiling: about 2e+04" in text
    assert "half-life of growth: about 6 periods" in text
    assert "AR(1)" in text and "Student-t" in text
    assert len(r.describe()) == 3  # the exponential model's three priors
    # the default half-life is two years of quarters
    assert Priors().resolve(demo).log_h_mu == pytest.approx(__import__("math").log(8))
