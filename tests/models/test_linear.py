"""Linear coefficients integrated out: densities against scipy, conditionals against formulas."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from bayesgrowth.data.series import read_series
from bayesgrowth.models import general, linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import LongRunGrowthPrior, Priors


def _series(values, drop=()):
    labels = [f"{2016 + i // 4}Q{i % 4 + 1}" for i in range(len(values))]
    keep = [i for i in range(len(values)) if i not in drop]
    frame = pd.DataFrame({"period": [labels[i] for i in keep],
                          "value": np.asarray(values)[keep]})
    with pytest.warns(UserWarning) if drop else _nothing():
        return read_series(frame, name="simulated")


class _nothing:
    def __enter__(self):
        return self

    def __exit__(self, *exc):
        return False


def _dense_parts(spec, pr, s, sigma, phi=None, half_life=None):
    """Prior mean, error covariance ``K`` and design of log a, b (and c), dense."""
    mu0, var0 = linear.linear_prior(spec, pr, seasons=False)
    dt = (s.t - pr.t_ref).astype(float)
    hl = None if half_life is None else np.array([half_life])
    x = linear.curve_design(spec, dt, hl)
    x = x[0] if x.ndim == 3 else x
    gap = np.abs(s.t[:, None] - s.t[None, :]).astype(float)
    k = sigma**2 * np.eye(s.n) if phi is None else sigma**2 / (1 - phi**2) * phi**gap
    return mu0, var0, x, k


SEASON = np.array([0.05, -0.02, -0.06, 0.03])  # sums to zero


CASES = [
    # (spec, point of the sampled parameters, dropped rows)
    (ModelSpec(errors="ar1", seasonal=True), {"sigma": 0.03, "phi": 0.8}, (5, 6)),
    (ModelSpec(model="damped"), {"sigma": 0.05, "half_life": 5.0}, ()),
    (ModelSpec(model="damped", errors="ar1"), {"sigma": 0.04, "phi": 0.6, "half_life": 3.0}, ()),
]


@pytest.mark.parametrize(("spec", "point", "drop"), CASES)
def test_marginal_density_matches_scipy_multivariate_normal(spec, point, drop):
    # Source: scipy.stats.multivariate_normal: with beta ~ N(mu0, V) integrated out, the log
    # values are N(X mu0, K + X V X'), K the independent or stationary AR(1) covariance
    # sigma^2 / (1 - phi^2) phi^|t_i - t_j| (Box & Jenkins); dropped rows test the gaps. The
    # PyMC model's potential (the O(n p^2) Woodbury form) must equal that density.
    rng = np.random.default_rng(4)
    n = 16
    y = np.exp(5 + 0.04 * np.arange(n) + 0.05 * rng.standard_normal(n))
    s = _series(y, drop)
    # the damped case also estimates its long-run growth (prior sd > 0)
    stated = Priors(long_run=LongRunGrowthPrior(center_pct=1.0, give_or_take_pts=2.0))
    pr = stated.resolve(s)
    model = general.build_pymc_model(spec, pr, s.t, s.log_values, axis=s.axis)
    values = {"sigma_log__": math.log(point["sigma"])}
    if "phi" in point:
        values["phi_logodds__"] = math.log(point["phi"] / (1 - point["phi"]))
    if "half_life" in point:
        values["log_half_life"] = math.log(point["half_life"])
    y = s.log_values
    if spec.seasonal:  # sampled: its zero-sum coordinates are the value of "season"
        values["season_zerosum__"] = SEASON[:-1]
        (season,) = model.replace_rvs_by_values([model["season"]])
        coords = {"season_zerosum__": values["season_zerosum__"]}
        y = y - np.asarray(model.compile_fn(season)(coords))[s.t % 4]
    (pot,) = model.replace_rvs_by_values([model.potentials[0]])
    ours = float(model.compile_fn(pot)(values))
    mu0, var0, x, k = _dense_parts(spec, pr, s, point["sigma"], point.get("phi"),
                                   point.get("half_life"))
    ref = stats.multivariate_normal(x @ mu0, k + (x * var0) @ x.T).logpdf(y)
    assert ours == pytest.approx(ref, rel=1e-9)


@pytest.mark.parametrize(("spec", "point", "drop"), CASES[:2])
def test_coefficient_draws_follow_the_normal_conditional(spec, point, drop):
    # Textbook conditional of a normal prior and normal data (e.g. Gelman et al., Bayesian
    # Data Analysis, 3rd ed., section 14.8, from memory): beta | y ~ N(mu0 + V X' S^-1 r,
    # V - V X' S^-1 X V), S = K + X V X', r = y - X mu0. Monte Carlo: 5 standard errors.
    rng = np.random.default_rng(8)
    n, draws = 14, 40_000
    y = np.exp(3 + 0.06 * np.arange(n) + 0.04 * rng.standard_normal(n))
    s = _series(y, drop)
    pr = Priors().resolve(s)
    flat = {k: np.full(draws, v) for k, v in point.items()}
    y = s.log_values
    if spec.seasonal:  # sampled seasonal factors are taken off first
        flat["season"] = np.broadcast_to(SEASON, (draws, 4))
        y = y - SEASON[s.t % 4]
    done = general.complete_draws(spec, pr, flat, s.t, s.log_values, s.axis,
                                  np.random.default_rng(2))
    mu0, var0, x, k = _dense_parts(spec, pr, s, point["sigma"], point.get("phi"),
                                   point.get("half_life"))
    big_s = k + (x * var0) @ x.T
    vx = x * var0
    mean = mu0 + vx.T @ np.linalg.solve(big_s, y - x @ mu0)
    cov = np.diag(var0) - vx.T @ np.linalg.solve(big_s, vx)
    for i, name in enumerate(("log_a", "log1p_g")):
        got = done[name]
        assert abs(got.mean() - mean[i]) <= 5 * math.sqrt(cov[i, i] / draws), name
        assert got.var() == pytest.approx(cov[i, i], rel=5 * math.sqrt(2 / draws)), name
    if spec.seasonal:
        np.testing.assert_array_equal(done["season"], flat["season"])


def test_which_models_integrate_their_coefficients():
    assert linear.integrates_linear(ModelSpec(model="local-trend"))
    assert linear.integrates_linear(ModelSpec(errors="ar1"))
    assert linear.integrates_linear(ModelSpec(model="damped"))
    assert not linear.integrates_linear(ModelSpec())  # sampled at the centre instead
    assert not linear.integrates_linear(ModelSpec(errors="ar1", noise="student-t"))
    assert linear.integrates_linear(ModelSpec(model="logistic", errors="ar1"))


def _potential(model, values):
    (pot,) = model.replace_rvs_by_values([model.potentials[0]])
    return float(model.compile_fn(pot)(values))


@pytest.mark.parametrize("spec", [ModelSpec(errors="ar1", seasonal=True),
                                  ModelSpec(model="damped", errors="ar1"),
                                  ModelSpec(model="local-trend")])
def test_switched_off_rows_drop_out_exactly(spec):
    # A refit compiled on the whole series with 0/1 row weights must give the same log density
    # as the model built on the training rows alone (identity check, no outside reference).
    rng = np.random.default_rng(6)
    y = np.exp(4 + 0.05 * np.arange(14) + 0.04 * rng.standard_normal(14))
    full = _series(y)
    train = full.take(np.arange(10))
    pr = Priors().resolve(train)
    weight = (np.arange(14) < 10).astype(float)
    values = {"sigma_log__": math.log(0.04)}
    if spec.errors == "ar1":
        values["phi_logodds__"] = math.log(0.7 / 0.3)
    if spec.model == "damped":
        values["log_half_life"] = math.log(4.0)
    if spec.model == "local-trend":
        values["sigma_growth_log__"] = math.log(0.01)
        values["sigma_level_log__"] = math.log(0.02)
    if spec.seasonal:
        values["season_zerosum__"] = SEASON[:-1]
    on_full = general.build_pymc_model(spec, pr, full.t, full.log_values, weight, axis=full.axis)
    alone = general.build_pymc_model(spec, pr, train.t, train.log_values, axis=train.axis)
    assert _potential(on_full, values) == pytest.approx(_potential(alone, values), rel=1e-10)


@pytest.mark.parametrize("spec", [ModelSpec(model="logistic", errors="ar1"),
                                  ModelSpec(model="gompertz")])
def test_ceiling_curves_integrate_the_level_exactly(spec):
    # The logistic and Gompertz curves sample kappa = log K - log a and integrate log a out.
    # Reference: scipy.integrate.quad of the original model, log a ~ N(mu_a, s_a) and log K ~
    # N(mu_k, s_k) independent, over log a with log K = log a + kappa (Jacobian 1):
    #   p(kappa) p(y | kappa, ...) = int p(y | log a, log a + kappa, ...) p(log a) p(log K) dlog a.
    from scipy import integrate

    rng = np.random.default_rng(9)
    n = 12
    t = np.arange(n)
    y = np.exp(np.log(100 * 8 / (1 + 7 * np.exp(-0.3 * t))) + 0.03 * rng.standard_normal(n))
    s = _series(y)
    pr = Priors().resolve(s)
    kappa, half_life, sigma, phi = 2.2, 3.0, 0.03, 0.5
    model = general.build_pymc_model(spec, pr, s.t, s.log_values, axis=s.axis)
    values = {"log_ceiling_ratio": kappa, "log_half_life": math.log(half_life),
              "sigma_log__": math.log(sigma)}
    if spec.errors == "ar1":
        values["phi_logodds__"] = math.log(phi / (1 - phi))
    mean_k, sd_k = linear.ceiling_ratio_prior(pr)
    ours = _potential(model, values) + stats.norm(mean_k, sd_k).logpdf(kappa)

    def integrand(log_a):
        d = {"log_a": np.array([log_a]), "log_k": np.array([log_a + kappa]),
             "half_life": np.array([half_life]), "sigma": np.array([sigma]),
             "phi": np.array([phi])}
        ll = general.log_likelihood(spec, d, s.t, s.values, pr.t_ref).sum() + s.log_values.sum()
        prior = (stats.norm(pr.log_a_mu, pr.log_a_sd).logpdf(log_a)
                 + stats.norm(pr.log_k_mu, pr.log_k_sd).logpdf(log_a + kappa))
        return math.exp(ll + prior - ours)  # scaled by the expected answer: close to 1

    centre = pr.log_a_mu
    ref, _ = integrate.quad(integrand, centre - 1.0, centre + 1.0, points=[centre],
                            epsabs=1e-12, epsrel=1e-10, limit=200)
    assert math.log(ref) == pytest.approx(0.0, abs=1e-7)
