"""PSIS-LOO and the comparison table against ArviZ, exact LOO and the Pareto-k thresholds.

References: Vehtari, Gelman & Gabry (2017), "Practical Bayesian model evaluation
using leave-one-out cross-validation and WAIC", Statistics and Computing 27
(elpd_loo as the sum of log p(y_i | y_-i); Pareto-k thresholds 0.5 and 0.7; the
standard error of a difference, eq. 24); ArviZ ``az.loo``/``az.compare`` as the
reference implementation.
"""

import warnings

import numpy as np
import pandas as pd
import pytest
from scipy.special import logsumexp

from bayesgrowth.data import read_series
from bayesgrowth.inference import fit_series
from bayesgrowth.inference.exact import fit_exact
from bayesgrowth.models import exponential
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, Priors
from bayesgrowth.select import compare_models, loo
from bayesgrowth.select.loo import LooResult


def _quarterly(values, start_year=2020):
    labels = [f"{start_year + i // 4}Q{i % 4 + 1}" for i in range(len(values))]
    return read_series(pd.DataFrame({"period": labels, "value": values}))


@pytest.fixture(scope="module")
def three_exact_fits(demo):
    # Three exponential models of the demo series that differ by their priors:
    # the default, a fixed initial value, and a growth prior pinned near zero.
    return {
        "default": fit_series(demo, engine="exact", seed=3, model="exponential"),
        "fixed start": fit_series(demo, engine="exact", seed=3,
                                  priors=Priors(initial=InitialValuePrior(0)), model="exponential"),
        "no growth": fit_series(demo, engine="exact", seed=3,
                                priors=Priors(growth=GrowthPrior(0, 0.5)), model="exponential"),
    }


def test_loo_equals_arviz_on_the_same_inference_data(demo_exact_fit):
    import arviz as az

    res = loo(demo_exact_fit)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = az.loo(demo_exact_fit.to_inference_data(), pointwise=True)
    assert res.elpd_loo == pytest.approx(float(ref["elpd_loo"]), abs=1e-10)
    assert res.se == pytest.approx(float(ref["se"]), abs=1e-10)
    assert res.p_loo == pytest.approx(float(ref["p_loo"]), abs=1e-10)
    np.testing.assert_allclose(res.pointwise, ref["loo_i"].values, atol=1e-10)
    np.testing.assert_allclose(res.pareto_k, ref["pareto_k"].values, atol=1e-10)
    assert res.periods == demo_exact_fit.series.labels
    assert res.n_draws == demo_exact_fit.n_draws


def test_psis_loo_agrees_with_brute_force_leave_one_out(demo):
    # elpd_loo = sum_i log p(y_i | y_-i) (Vehtari, Gelman & Gabry 2017, eq. 4),
    # here by refitting without each observation (the exact engine, same priors:
    # the resolved priors of the full series, so every fold has the same prior).
    # Folds use 40,000 draws so that their Monte Carlo error is negligible; over
    # twelve seeds of a 16,000-draw fit the PSIS total differed from it with a
    # standard deviation of 0.021 when measured (0.09 with 4,000 draws), hence
    # 16,000 draws and the 0.1 tolerance (about 5 sd). The in-sample log
    # predictive density lies about p_loo (2.5) above it, which this tells apart.
    priors = Priors().resolve(demo)
    fit = fit_exact(demo, priors, seed=11, draws=4000)
    res = loo(fit)
    exact = []
    for i in range(demo.n):
        fold = fit_exact(demo.take(np.delete(np.arange(demo.n), i)), priors, seed=100 + i,
                         draws=10_000)
        ll = exponential.log_likelihood(fold.flat(), demo.t[i:i + 1], demo.values[i:i + 1],
                                        priors.t_ref)[:, 0]
        exact.append(logsumexp(ll) - np.log(ll.size))
    exact = np.array(exact)
    assert res.elpd_loo == pytest.approx(exact.sum(), abs=0.1)
    np.testing.assert_allclose(res.pointwise, exact, atol=0.05)
    ll_full = fit.log_likelihood().reshape(fit.n_draws, -1)
    lpd = float(np.sum(logsumexp(ll_full, axis=0) - np.log(fit.n_draws)))
    assert lpd - exact.sum() > 1.0  # in-sample fit is optimistic; LOO is not
    assert res.max_k < 0.7


def test_comparison_table_equals_arviz_compare(three_exact_fits):
    import arviz as az

    comp = compare_models(three_exact_fits)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = az.compare({k: f.to_inference_data() for k, f in three_exact_fits.items()},
                         method="stacking")
    tab = comp.table.set_index("model")
    assert list(tab.index) == list(ref.index)  # same ranking
    # Our ranks count from 1 (the best), ArviZ's from 0.
    np.testing.assert_array_equal(tab["rank"].to_numpy(), ref["rank"].to_numpy() + 1)
    for ours, theirs in [("elpd_loo", "elpd_loo"), ("se", "se"),
                         ("p_loo", "p_loo"), ("elpd_diff", "elpd_diff"), ("dse", "dse")]:
        np.testing.assert_allclose(tab[ours].to_numpy(dtype=float),
                                   ref[theirs].to_numpy(dtype=float), atol=1e-8, err_msg=ours)
    np.testing.assert_allclose(tab["weight"].to_numpy(), ref["weight"].to_numpy(), atol=1e-4)
    assert sum(comp.weights.values()) == pytest.approx(1.0)
    assert comp.best == ref.index[0]


def test_difference_se_is_eq_24_of_vehtari_gelman_gabry(three_exact_fits):
    comp = compare_models(three_exact_fits)
    best, other = comp.table["model"].iloc[0], comp.table["model"].iloc[-1]
    d = comp.results[best].pointwise - comp.results[other].pointwise
    row = comp.table.set_index("model").loc[other]
    assert row["elpd_diff"] == pytest.approx(d.sum())
    assert row["dse"] == pytest.approx(np.sqrt(d.size * np.var(d)))
    # The pinned growth prior contradicts 6-7% growth per quarter: clearly worse.
    assert other == "no growth" and row["elpd_diff"] > 4 * row["dse"]
    assert "no growth" in " ".join(comp.reading()) and "clearly worse" in " ".join(comp.reading())


def _result(k):
    k = np.asarray(k, dtype=float)
    return LooResult(name="logistic", description="", elpd_loo=0.0, se=0.0, p_loo=0.0,
                     pointwise=np.zeros(k.size), pareto_k=k,
                     periods=[f"2024Q{i + 1}" for i in range(k.size)], n_draws=4000)


def test_pareto_k_words_follow_the_0_5_and_0_7_thresholds():
    # Vehtari, Gelman & Gabry (2017), section 2.1: k < 0.5 good, 0.5-0.7 ok, > 0.7 bad.
    assert _result([0.1, 0.49, 0.5]).messages() == []
    msgs = _result([0.2, 0.6, 0.75, 1.3]).messages()
    text = " | ".join(msgs)
    assert ("the LOO estimate for period 2024Q3 is unreliable (Pareto k 0.75, above 0.7): "
            "that observation is very influential") in text
    assert "period 2024Q4 is unreliable (Pareto k 1.30, above 1)" in text
    assert "2024Q2 is usable but less precise" in text
    assert "2024Q1" not in text
    assert _result([0.2, 0.6, 0.75, 1.3]).n_unreliable == 2


def test_an_outlying_period_is_named_as_influential():
    rng = np.random.default_rng(1)
    values = 100 * 1.06 ** np.arange(16) * np.exp(rng.normal(0, 0.02, 16))
    values[10] *= 2.0  # one period doubled, as by a one-off deal
    series = _quarterly(values)
    res = loo(fit_series(series, engine="exact", seed=2, model="exponential"))
    assert int(np.argmax(res.pareto_k)) == 10 and res.max_k > 0.7
    assert np.sum(res.pareto_k > 0.7) == 1
    assert any("period 2022Q3 is unreliable" in m for m in res.messages())


def test_fits_to_different_series_are_refused(demo, demo_exact_fit):
    other = fit_series(demo.head(12), engine="exact", seed=1, model="exponential")
    with pytest.raises(ValueError, match="same observations"):
        compare_models({"a": demo_exact_fit, "b": other})
    with pytest.raises(ValueError, match="at least one"):
        compare_models({})


def test_reading_of_differences():
    # Rules of thumb from common practice: differences under 4 are small; above
    # that, 2 and 4 standard errors separate the verdicts.
    table = pd.DataFrame({
        "model": ["best", "a", "b", "c", "d"],
        "elpd_diff": [0.0, 3.0, 10.0, 10.0, 30.0],
        "dse": [0.0, 0.5, 4.0, 6.0, 5.0],
        "diagnostics_ok": [True] * 5,
    })
    from bayesgrowth.select.loo import ModelComparison

    lines = ModelComparison(table=table, results={}, weights={}).reading()
    assert lines[0].endswith("a small difference: not distinguishable from it")
    assert lines[1].endswith("probably worse")
    assert lines[2].endswith(": not distinguishable from it") and "small" not in lines[2]
    assert lines[3].endswith("clearly worse")


def test_identical_models_are_called_indistinguishable_and_ranked_from_one(demo_exact_fit):
    comp = compare_models({"first": demo_exact_fit, "copy": demo_exact_fit})
    assert comp.table["rank"].tolist() == [1, 2]
    assert comp.indistinguishable() == ["first", "copy"]
    text = comp.weights_reading()
    assert "indistinguishable" in text
    # Equal pointwise elpd: every bootstrap replicate keeps the weights at one half.
    assert comp.table["weight_lower_90"].tolist() == pytest.approx([0.5, 0.5])
    assert comp.table["weight_upper_90"].tolist() == pytest.approx([0.5, 0.5])


def test_a_clearly_worse_model_is_not_indistinguishable(three_exact_fits):
    comp = compare_models(three_exact_fits)
    assert "no growth" not in comp.indistinguishable()
