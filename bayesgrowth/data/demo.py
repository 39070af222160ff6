"""Access to the bundled demo series (an invented company; see ``make_demo``)."""

from __future__ import annotations

from pathlib import Path

from bayesgrowth.data.series import GrowthSeries, read_series

__all__ = ["demo_path", "load_demo"]


def demo_path() -> Path:
    """Path of the bundled demo CSV (quarterly revenue of a fictional company)."""
    return Path(__file__).with_name("demo_revenue.csv")


def load_demo() -> GrowthSeries:
    """Load the demo series: 20 quarters of revenue of the invented *Larkspur Instruments*.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> series = bg.load_demo()
    >>> series.n, series.labels[0], series.labels[-1]
    (20, '2021Q1', '2025Q4')
    """
    return read_series(demo_path(), name="Larkspur Instruments revenue (demo)")
