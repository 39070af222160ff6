"""Arguments a notebook user gets wrong are refused with a message naming them."""

import math
import re

import pytest

import bayesgrowth as bg
from bayesgrowth.data import InputError


@pytest.fixture(scope="module")
def state_space_forecast(demo):
    return bg.GrowthModel(seed=1).fit(demo).forecast(4)


@pytest.fixture(scope="module", params=["mixture", "draws"])
def any_forecast(request, demo_exact_fit, state_space_forecast):
    # the local trend's bands come from its mixture, the exponential curve's from draws
    return state_space_forecast if request.param == "mixture" else bg.forecast(demo_exact_fit, 4)


@pytest.mark.parametrize("horizon", [0, -1, 2.5, "4", None, math.nan, math.inf, True])
def test_a_horizon_that_is_no_whole_number_of_periods_is_refused(demo_exact_fit, horizon):
    with pytest.raises(ValueError, match=r"^horizon must be a whole number of periods >= 1, "
                                         rf"got {repr(horizon).replace('.', '[.]')}$"):
        bg.forecast(demo_exact_fit, horizon)


def test_a_whole_float_horizon_is_taken(demo_exact_fit):
    assert bg.forecast(demo_exact_fit, 3.0).horizon == 3


def test_a_horizon_past_the_calendar_is_refused_naming_the_argument(state_space_forecast):
    with pytest.raises(InputError, match=r"^horizon=1000000: demo_revenue\.csv ends in 2025Q4, "
                                         r"and the forecast would run past the year 9999; "
                                         r"forecast at most 31896 period"):
        bg.forecast(state_space_forecast.fit, 10**6)


def test_levels_as_fractions_say_to_write_percent(demo_exact_fit):
    with pytest.raises(ValueError, match=r"got 0\.5; write levels in percent \(50, not 0\.5\)$"):
        bg.forecast(demo_exact_fit, 2, levels=[0.5, 0.8])
    with pytest.raises(ValueError, match=r"^levels must be whole percentages such as "
                                         r"\(50, 80, 95\), got '80'$"):
        bg.forecast(demo_exact_fit, 2, levels="80")


def test_one_level_as_a_number_is_one_band(demo_exact_fit):
    fc = bg.forecast(demo_exact_fit, 2, levels=80)
    assert fc.levels == (80,)
    assert [c for c in fc.table.columns if c.startswith("lower_")] == ["lower_80"]


@pytest.mark.parametrize("target", [-5, 0, math.nan, math.inf, "9000", None, [9000]])
def test_a_target_that_is_no_positive_value_is_refused(any_forecast, target):
    message = r"^target must be a finite value above 0, in the series' units, got "
    for ask in (any_forecast.prob_exceeds, any_forecast.first_period_reaching,
                any_forecast.time_to_target):
        with pytest.raises(ValueError, match=message):
            ask(target)


@pytest.mark.parametrize(("setting", "value", "least"), [
    ("draws", 0, 1), ("draws", 2.5, 1), ("draws", -5, 1), ("chains", 0, 1),
    ("seed", -1, 0), ("seed", 1.5, 0), ("seed", "abc", 0),
])
def test_counts_and_seeds_must_be_whole_numbers(demo, setting, value, least):
    with pytest.raises(ValueError, match=rf"^{setting} must be a whole number of at least "
                                         rf"{least}, got {value!r}$"):
        bg.GrowthModel(**{setting: value}).fit(demo)


def test_priors_must_be_a_priors_object(demo):
    with pytest.raises(TypeError, match=r"^priors must be a bayesgrowth\.Priors, not dict"):
        bg.GrowthModel(priors={"growth": 5}).fit(demo)


def test_models_named_in_one_string_are_each_fitted(demo):
    fits = bg.fit_models(demo, "exponential, local-trend", seed=1)
    assert list(fits) == ["exponential", "local-trend"]


@pytest.mark.parametrize(("given", "message"), [
    ({"growth": 5}, r"^Priors growth must be a GrowthPrior, not int; write "
                    r"Priors\(growth=GrowthPrior\(\.\.\.\)\), by keyword$"),
    ({"initial": bg.GrowthPrior(center_pct=5, give_or_take_pts=10)},
     r"^Priors initial must be an InitialValuePrior, not GrowthPrior"),
    ({"reference_period": 2024}, r"^Priors reference_period must be a period label"),
])
def test_priors_of_the_wrong_kind_are_refused_naming_the_field(given, message):
    with pytest.raises(TypeError, match=message):
        bg.Priors(**given)
    stated = bg.GrowthPrior(center_pct=5, give_or_take_pts=10)
    assert bg.Priors(growth=stated).growth is stated


@pytest.mark.parametrize("call", ["compare_models", "model_average"])
def test_fits_given_as_a_list_are_refused_asking_for_names(demo_exact_fit, call):
    args = (4,) if call == "model_average" else ()
    with pytest.raises(TypeError, match=r"^fits must be a mapping of model names to fits, "
                                        r"such as \{'default': fit_a, .*got list$"):
        getattr(bg, call)([demo_exact_fit, demo_exact_fit], *args)


def test_growth_model_names_its_own_noise_keyword(demo):
    # the library's messages say noise=; GrowthModel's keyword is noise_dist=
    with pytest.raises(ValueError, match=r"use noise_dist='normal' with it"):
        bg.GrowthModel(noise_dist="student-t").fit(demo)
    with pytest.raises(ValueError, match=r"^noise_dist must be one of normal, student-t, "
                                         r"got 'cauchy'$"):
        bg.GrowthModel(noise_dist="cauchy", model="exponential").fit(demo)


def test_a_period_is_a_label_or_a_step(state_space_forecast):
    fc = state_space_forecast
    assert (fc.value_draws(2.0) == fc.value_draws(2)).all()
    assert (fc.value_draws(fc.periods[1]) == fc.value_draws(2)).all()
    for given in (2.5, True, "2030Q1"):
        with pytest.raises(ValueError, match=rf"^period {re.escape(repr(given))} is not in the "
                                             r"forecast: give a label from '2026Q1' to '2026Q4' "
                                             r"or a step from 1 to 4$"):
            fc.value_draws(given)
