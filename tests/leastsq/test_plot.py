"""The comparison plot draws what it promises."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402
from matplotlib.axes import Axes  # noqa: E402

from bayesgrowth.leastsq import fit_variants  # noqa: E402
from bayesgrowth.plots.compare import plot_comparison  # noqa: E402

T = np.arange(7.0)
Y = 80.0 * 1.08**T * np.exp(np.random.default_rng(41).normal(0.0, 0.05, T.size))  # invented


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    plt.close("all")


def _band() -> pd.DataFrame:
    t = np.arange(6.0, 11.0)
    med = Y[-1] * 1.08 ** (t - 6)
    return pd.DataFrame(
        {
            "t": t,
            "median": med,
            "lower_80": med * 0.85,
            "upper_80": med * 1.15,
            "lower_50": med * 0.93,
            "upper_50": med * 1.07,
        }
    )


def test_plot_draws_data_every_fit_and_band():
    fits = fit_variants(T, Y)
    fig, ax = plt.subplots()
    out = plot_comparison(T, Y, fits, 4, band=_band(), ax=ax)
    assert out is ax
    labels = [line.get_label() for line in ax.get_lines()]
    # Band median, one line per fit, the data, the last-observation marker.
    assert len(labels) == len(fits) + 3
    assert labels[1 : 1 + len(fits)] == [f.variant for f in fits]
    assert labels[0] == "Bayesian median" and "Observed" in labels
    assert ax.get_ylabel() == "Value"
    legend_text = [txt.get_text() for txt in ax.get_legend().get_texts()]
    assert "Bayesian 80% band" in legend_text and "Bayesian 50% band" in legend_text
    assert "Range of least-squares curves" in legend_text
    # The fit curves reach the horizon.
    x_end = ax.get_lines()[1].get_xdata()[-1]
    assert x_end == pytest.approx(T[-1] + 4)


def test_plot_without_band_makes_its_own_axes_and_labels_periods():
    fits = fit_variants(T, Y)[:2]
    labels = [f"P{i}" for i in range(T.size)]
    ax = plot_comparison(T, Y, fits, 2, period_labels=labels)
    assert isinstance(ax, Axes)
    assert len(ax.get_lines()) == 2 + 2
    assert [tick.get_text() for tick in ax.get_xticklabels()] == labels


def test_band_by_step_is_placed_after_the_last_observation():
    band = _band()
    band = band.assign(step=band["t"] - T[-1] + 1).drop(columns="t")
    ax = plot_comparison(T, Y, fit_variants(T, Y)[:1], 5, band=band)
    median = ax.get_lines()[0]
    assert median.get_label() == "Bayesian median"
    np.testing.assert_array_equal(median.get_xdata(), T[-1] + band["step"].to_numpy())


def test_plot_rejects_incomplete_band():
    with pytest.raises(ValueError, match="median"):
        plot_comparison(T, Y, fit_variants(T, Y), 2, band=_band().drop(columns="median"))
