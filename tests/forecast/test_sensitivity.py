"""Prior sensitivity rows against the closed-form posterior predictive of the exponential model.

Reference (Bayesian linear regression, e.g. Gelman et al., *Bayesian Data
Analysis*, 3rd ed., section 14.2): given sigma the coefficients
``(log a, log(1+g))`` have a normal posterior ``N(m, V)``, ``V = (S0^-1 + X'X /
sigma^2)^-1``, ``m = V (S0^-1 mu0 + X'y / sigma^2)``, and ``p(sigma | y)`` is
proportional to the half-normal prior times ``N(y; X mu0, X S0 X' + sigma^2 I)``.
The log value at the horizon is then ``N(x'm, x'Vx + sigma^2)`` mixed over
``p(sigma | y)``; scipy.stats and scipy.integrate.quad evaluate it here.
"""

import numpy as np
import pytest
from scipy import integrate, stats

from bayesgrowth.forecast.sensitivity import _grid, prior_sensitivity
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.plots.models import plot_sensitivity
from bayesgrowth.priors import CeilingPrior, Priors
from bayesgrowth.select import registered_models


def closed_form_cdf(series, priors, horizon):
    """CDF of the posterior predictive log value ``horizon`` periods after the last one."""
    r = priors.resolve(series)
    dt = (series.t - r.t_ref).astype(float)
    y = series.log_values
    dt_h = series.t_last + horizon - r.t_ref
    if r.fixed_initial:
        X, y, mu0, s0 = dt[:, None], y - r.log_a_mu, np.array([r.log1p_g_mu]), np.diag(
            [r.log1p_g_sd**2])
        x_h, shift = np.array([dt_h]), r.log_a_mu
    else:
        X = np.column_stack([np.ones_like(dt), dt])
        mu0, s0 = np.array([r.log_a_mu, r.log1p_g_mu]), np.diag([r.log_a_sd**2, r.log1p_g_sd**2])
        x_h, shift = np.array([1.0, dt_h]), 0.0

    def log_post(s):
        return stats.halfnorm.logpdf(s, scale=r.sigma_scale) + stats.multivariate_normal.logpdf(
            y, X @ mu0, X @ s0 @ X.T + s**2 * np.eye(y.size))

    grid = np.geomspace(2e-3, 3.0, 400)
    lp = np.array([log_post(s) for s in grid])
    top, keep = lp.max(), grid[lp > lp.max() - 40]
    lo, hi, peak = keep.min(), keep.max(), grid[np.argmax(lp)]

    def predictive(s):
        v = np.linalg.inv(np.linalg.inv(s0) + X.T @ X / s**2)
        m = v @ (np.linalg.solve(s0, mu0) + X.T @ y / s**2)
        return x_h @ m + shift, np.sqrt(x_h @ v @ x_h + s**2)

    norm, _ = integrate.quad(lambda s: np.exp(log_post(s) - top), lo, hi, points=[peak])

    def cdf(z):
        z = np.asarray(z, dtype=float)

        def f(s):
            mean, sd = predictive(s)
            return np.exp(log_post(s) - top) * stats.norm.cdf(z, mean, sd)
        return integrate.quad_vec(f, lo, hi, points=[peak], epsabs=1e-9)[0] / norm

    return cdf


def test_exact_rows_equal_the_closed_form_predictive(demo):
    # Six quarters, where the priors matter: a growth prior of 3 points moves the
    # median two years out by about 10% (a wrong prior fails this check clearly).
    short = demo.head(6)
    horizon = 6
    res = prior_sensitivity(short, horizon, model="exponential", anchors=(0, 200),
                            growth_centres=(10,), growth_spreads=(3,), seed=2)
    tab = res.table
    assert set(tab["engine"]) == {"exact"}
    n = 4000  # the exact engine's default 4 x 1000 independent draws
    grid = _grid(Priors(), ModelSpec(), (0, 200), (10,), (3,), ())
    assert len(grid) == len(tab)
    assert tab["median"].max() / tab["median"].min() > 1.1
    for (_, _, _, priors), row in zip(grid, tab.itertuples(), strict=True):
        cdf = closed_form_cdf(short, priors, horizon)
        qs = np.array([0.5, 0.1, 0.9])
        got = cdf(np.log([row.median, row.lower_80, row.upper_80]))
        # The closed-form CDF at each reported quantile is q within 4 binomial sd.
        assert np.all(np.abs(got - qs) < 4 * np.sqrt(qs * (1 - qs) / n)), (row.setting, got)


def test_grid_holds_the_base_setting_once_per_factor(demo):
    base = Priors()
    res = prior_sensitivity(demo, 4, anchors=(10,), growth_centres=(5,), growth_spreads=(10,))
    tab = res.table
    assert list(dict.fromkeys(tab["factor"])) == ["initial-value anchor", "growth centre",
                                                   "growth spread"]
    assert tab.groupby("factor")["is_base"].sum().tolist() == [1, 1, 1]
    assert tab.loc[tab["is_base"], "value"].tolist() == [
        base.initial.give_or_take_pct, base.growth.center_pct, base.growth.give_or_take_pts]
    # The base fit is reused, so the base rows are identical.
    assert tab.loc[tab["is_base"], "median"].nunique() == 1
    assert tab["period"].unique().tolist() == [demo.future_labels(4)[-1]]
    spread = res.spread()
    assert (spread["ratio"] >= 1).all()
    assert tab.loc[tab["setting"] == "fixed"].empty  # 0 was not asked for


def test_ceiling_factor_only_for_curves_with_a_ceiling():
    base = Priors()
    plain = _grid(base, ModelSpec(), (), (), (), (2.0, 5.0))
    assert {row[0] for row in plain} == {"initial-value anchor", "growth centre",
                                         "growth spread"}
    for curve in ("logistic", "gompertz"):
        rows = [r for r in _grid(base, ModelSpec(model=curve), (), (), (), (2.0, 5.0))
                if r[0] == "ceiling"]
        assert [r[2] for r in rows] == [2.0, 3.0, 5.0]
        assert rows[1][3] == base
    stated = Priors(ceiling=CeilingPrior(value=9000.0))
    rows = [r for r in _grid(stated, ModelSpec(model="logistic"), (), (), (), (2.0,))
            if r[0] == "ceiling"]
    assert rows[0][3] == stated and rows[1][3].ceiling.multiple == 2.0


def test_sensitivity_plot(demo):
    res = prior_sensitivity(demo, 4, anchors=(0, 200), growth_centres=(10,),
                            growth_spreads=(3,))
    axes = plot_sensitivity(res)
    assert len(axes) == 3
    assert [ax.get_title() for ax in axes] == ["initial-value anchor", "growth centre",
                                              "growth spread"]


def test_bad_arguments(demo):
    with pytest.raises(ValueError, match="horizon"):
        prior_sensitivity(demo, 0)
    with pytest.raises(ValueError, match="engine"):
        prior_sensitivity(demo, 2, engine="fast")
    with pytest.raises(ValueError, match="level"):
        prior_sensitivity(demo, 2, level=100)


@pytest.mark.slow
def test_a_higher_ceiling_prior_raises_the_logistic_forecast(demo):
    # On the demo series, still growing about 7% a quarter, the data say little
    # about the ceiling: centring its prior at 10 times the latest value instead
    # of 1.5 times must raise the forecast two years out.
    if "logistic" not in registered_models():
        pytest.skip("the logistic curve is not registered yet")
    res = prior_sensitivity(demo, 8, model="logistic", anchors=(), growth_centres=(),
                            growth_spreads=(), ceilings=(1.5, 10.0), seed=3,
                            draws=300, tune=300, chains=2)
    tab = res.table
    assert set(tab["engine"]) == {"nuts"}
    ceil = tab[tab["factor"] == "ceiling"].set_index("value")
    assert list(ceil.index) == [1.5, 3.0, 10.0]
    assert ceil.loc[1.5, "median"] < ceil.loc[3.0, "median"] < ceil.loc[10.0, "median"]
