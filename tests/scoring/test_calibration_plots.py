import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402
from scipy import stats  # noqa: E402

from bayesgrowth.plots.calibration import plot_coverage, plot_pit_histogram  # noqa: E402


def _scores():
    return pd.DataFrame(
        {
            "method": ["a", "a", "b"],
            "step": [1, "all", "all"],
            "n": [10, 30, 30],
            "coverage_50": [0.5, 0.4, 0.6],
            "coverage_50_low": [0.2, 0.25, 0.4],
            "coverage_50_high": [0.8, 0.6, 0.8],
            "coverage_80": [0.8, 0.7, 0.9],
            "coverage_80_low": [0.5, 0.5, 0.7],
            "coverage_80_high": [0.95, 0.85, 0.98],
        }
    )


def test_plot_coverage_points_and_diagonal():
    fig, ax = plt.subplots()
    out = plot_coverage(_scores(), levels=(50, 80), ax=ax)
    assert out is ax
    # errorbar containers, one per method on the "all" rows
    assert len(ax.containers) == 2
    y_a = ax.containers[0].lines[0].get_ydata()
    np.testing.assert_allclose(y_a, [40.0, 70.0])
    diagonal = [ln for ln in ax.lines if ln.get_linestyle() == "--"]
    assert len(diagonal) == 1
    np.testing.assert_allclose(diagonal[0].get_xdata(), diagonal[0].get_ydata())
    with pytest.raises(ValueError, match="step"):
        plot_coverage(_scores(), step=7)
    plt.close(fig)


def test_plot_pit_histogram_reference_and_band():
    rng = np.random.default_rng(0)
    values = rng.uniform(size=500)
    fig, ax = plt.subplots()
    plot_pit_histogram(values, ax=ax, bins=10, label="a")
    heights = [bar.get_height() for bar in ax.containers[0]]
    assert len(heights) == 10 and sum(heights) == 500
    np.testing.assert_array_equal(heights, np.histogram(values, bins=10, range=(0, 1))[0])
    ref = [ln for ln in ax.lines if ln.get_linestyle() == "--"][0]
    assert ref.get_ydata()[0] == pytest.approx(50.0)
    # band = central 95% of Binomial(500, 0.1), from scipy.stats.binom
    lo, hi = stats.binom.ppf([0.025, 0.975], 500, 0.1)
    band = [p for p in ax.patches if p.get_label() == "95% range if calibrated"][0]
    assert band.get_y() == pytest.approx(lo)
    assert band.get_y() + band.get_height() == pytest.approx(hi)
    assert "a" in ax.get_title()
    plt.close(fig)
