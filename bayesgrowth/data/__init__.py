"""Data layer: read and validate series, period calendars, the bundled demo series."""

from bayesgrowth.data.demo import demo_path, load_demo
from bayesgrowth.data.periods import PeriodAxis, parse_periods
from bayesgrowth.data.series import MIN_OBSERVATIONS, GrowthSeries, InputError, read_series

__all__ = [
    "GrowthSeries",
    "InputError",
    "MIN_OBSERVATIONS",
    "PeriodAxis",
    "demo_path",
    "load_demo",
    "parse_periods",
    "read_series",
]
