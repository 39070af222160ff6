"""Data-window variants equal fits of the shortened series."""

from __future__ import annotations

import numpy as np
import pytest

from bayesgrowth.leastsq import (
    drop_first_fits,
    drop_last_fits,
    fit_log_linear,
    leave_one_out_fits,
)
from bayesgrowth.leastsq.windows import default_max_drop

T = np.array([0.0, 1.0, 2.0, 3.0, 5.0, 6.0, 7.0, 8.0])  # gap at 4
Y = 500.0 * 1.03**T * np.exp(np.random.default_rng(21).normal(0.0, 0.05, T.size))  # invented


def _same_curve(a, b):
    assert a.n_points == b.n_points
    assert a.t_used == b.t_used
    np.testing.assert_allclose(a.initial_value, b.initial_value, rtol=1e-13)
    np.testing.assert_allclose(a.growth_per_period, b.growth_per_period, rtol=1e-13)
    np.testing.assert_allclose(a.r_squared, b.r_squared, rtol=1e-13)
    np.testing.assert_allclose(a.rmse, b.rmse, rtol=1e-13)


def test_drop_last_equals_fit_of_truncated_series():
    fits = drop_last_fits(T, Y)
    assert [f.variant for f in fits] == [f"log-linear, drop last {k}" for k in (1, 2, 3)]
    for k, fit in enumerate(fits, start=1):
        direct = fit_log_linear(T[:-k], Y[:-k])
        _same_curve(fit, direct)
        # Forecasts refer to the full series' last period.
        assert fit.t_last == T[-1]
        np.testing.assert_allclose(fit.forecast(4), direct.value_at(T[-1] + 4), rtol=1e-13)


def test_drop_first_equals_fit_of_truncated_series_with_shared_reference():
    fits = drop_first_fits(T, Y, max_drop=2)
    assert [f.variant for f in fits] == ["log-linear, drop first 1", "log-linear, drop first 2"]
    for k, fit in enumerate(fits, start=1):
        direct = fit_log_linear(T[k:], Y[k:], t_ref=T[0])
        _same_curve(fit, direct)
        assert fit.t_ref == T[0]
        np.testing.assert_allclose(fit.forecast(2), direct.forecast(2), rtol=1e-13)


def test_leave_one_out_equals_fit_without_that_point():
    fits = leave_one_out_fits(T, Y)
    assert len(fits) == T.size
    assert fits[4].variant == "log-linear, leave out t=5"
    for i, fit in enumerate(fits):
        keep = np.arange(T.size) != i
        _same_curve(fit, fit_log_linear(T[keep], Y[keep], t_ref=T[0]))
        assert T[i] not in fit.t_used


def test_window_defaults_keep_three_points():
    # Default K = min(3, n - 3).
    assert [default_max_drop(n) for n in (3, 4, 5, 6, 7, 20)] == [0, 1, 2, 3, 3, 3]
    short_t, short_y = T[:5], Y[:5]
    assert len(drop_last_fits(short_t, short_y)) == 2
    assert min(f.n_points for f in drop_first_fits(short_t, short_y)) == 3
    assert leave_one_out_fits(T[:3], Y[:3]) == []
    with pytest.raises(ValueError, match="fewer than 3"):
        drop_last_fits(short_t, short_y, max_drop=3)
    assert drop_first_fits(T, Y, max_drop=0) == []
