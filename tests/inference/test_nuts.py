"""The NUTS engine against the exact engine on the same data and priors."""

import math

import numpy as np
import pytest

from bayesgrowth.forecast import forecast
from bayesgrowth.inference import SamplingWarning, exact_posterior, fit_series

pytestmark = pytest.mark.slow


@pytest.fixture(scope="module")
def nuts_fit(demo):
    return fit_series(demo, engine="nuts", seed=3, model="exponential")


def _ess(x):
    import arviz as az

    return float(az.ess(x[None, :] if x.ndim == 1 else x))


def test_diagnostics_pass_on_demo(nuts_fit):
    d = nuts_fit.diagnostics
    assert d.ok, d.problems
    assert d.divergences == 0
    assert d.max_rhat < 1.01


def test_nuts_matches_exact_posterior(demo, nuts_fit):
    # Reference: the exact posterior (linear-Gaussian update given sigma,
    # Bishop 2006 eq. 3.50-3.51, integrated over sigma by quadrature; itself
    # checked against the NIG closed forms of shared/reference and scipy).
    post = exact_posterior(demo, nuts_fit.priors)
    mean = post.beta_mean()
    sd = np.sqrt(np.diag(post.beta_cov()))
    exact = {
        "log_a": (mean[0], sd[0], lambda q: post.linear_quantile(np.array([1.0, 0.0]), q)),
        "log1p_g": (mean[1], sd[1], lambda q: post.linear_quantile(np.array([0.0, 1.0]), q)),
        "sigma": (post.sigma_moment(1),
                  math.sqrt(post.sigma_moment(2) - post.sigma_moment(1) ** 2),
                  post.sigma_quantile),
    }
    for name, (m, s, quantile) in exact.items():
        draws = nuts_fit.posterior[name]
        ess = _ess(draws)
        flat = draws.reshape(-1)
        # Monte Carlo standard errors: mean s/sqrt(ESS); sd about s/sqrt(2 ESS)
        # (normal approximation); a quantile sqrt(q(1-q)/ESS)/f(x_q). Allow 4 of each.
        assert abs(flat.mean() - m) < 4 * s / math.sqrt(ess), name
        assert abs(flat.std() / s - 1) < 4 / math.sqrt(2 * ess), name
        for q in (0.05, 0.5, 0.95):
            x_q = quantile(q)
            z = (x_q - m) / s
            dens = math.exp(-z * z / 2) / math.sqrt(2 * math.pi) / s
            assert abs(np.quantile(flat, q) - x_q) < 4 * math.sqrt(q * (1 - q) / ess) / dens, (
                name, q)


def test_four_step_predictive_matches_exact(demo, nuts_fit):
    post = exact_posterior(demo, nuts_fit.priors)
    fc = forecast(nuts_fit, 4)
    log_draws = np.log(fc.draws[:, -1])
    c = np.array([1.0, fc.t[-1] - nuts_fit.priors.t_ref])
    s = log_draws.std()
    # Predictive draws add independent noise, so their ESS is at least the
    # parameters' smallest ESS; use that as a conservative count.
    ess = min(_ess(nuts_fit.posterior[k]) for k in ("log_a", "log1p_g", "sigma"))
    for q in (0.05, 0.5, 0.95):
        x_q = post.linear_quantile(c, q, noise=True)
        z = abs(x_q - np.median(log_draws)) / s
        dens = math.exp(-z * z / 2) / math.sqrt(2 * math.pi) / s
        assert abs(np.quantile(log_draws, q) - x_q) < 4 * math.sqrt(q * (1 - q) / ess) / dens


def test_same_seed_reproduces_draws(demo, nuts_fit):
    again = fit_series(demo, engine="nuts", seed=3, model="exponential")
    np.testing.assert_array_equal(again.posterior["log1p_g"], nuts_fit.posterior["log1p_g"])


def test_failed_diagnostics_warn_loudly(demo):
    # 25 draws per chain cannot reach 400 effective draws: the fit must say so.
    with pytest.warns(SamplingWarning, match="diagnostics failed"):
        fit = fit_series(demo, engine="nuts", seed=1, draws=25, tune=200, model="exponential")
    assert not fit.diagnostics.ok
    assert any("ESS" in p for p in fit.diagnostics.problems)


def test_posterior_roundtrip_through_netcdf(tmp_path, nuts_fit):
    import arviz as az

    fc = forecast(nuts_fit, 3)
    path = nuts_fit.to_netcdf(tmp_path / "posterior.nc", fc.predictive_groups())
    idata = az.from_netcdf(path)
    assert set(idata.groups()) >= {"posterior", "posterior_predictive", "observed_data",
                                   "log_likelihood"}
    np.testing.assert_allclose(idata.posterior["log1p_g"].values, nuts_fit.posterior["log1p_g"])
    assert idata.posterior.attrs["engine"] == "nuts"
    assert idata.posterior.attrs["input_fingerprint"] == nuts_fit.series.fingerprint()
