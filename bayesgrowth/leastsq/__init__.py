"""Least-squares growth fits for comparison with the Bayesian forecasts.

Practitioners often fit an exponential curve by least squares and read a single
forecast off it. This subpackage reproduces those point-estimate fits, shows how
far their forecasts spread with small choices of method and data window, and
sets them beside a Bayesian predictive distribution.
"""

from bayesgrowth.leastsq.compare import compare_fits, fit_table, fit_variants, forecast_spread
from bayesgrowth.leastsq.curves import CurveFit, fit_curve
from bayesgrowth.leastsq.fits import (
    GrowthFit,
    LineFit,
    LogScaleStats,
    fit_line,
    fit_log_linear,
    fit_log_linear_anchored,
)
from bayesgrowth.leastsq.intervals import log_linear_intervals, log_linear_predictive
from bayesgrowth.leastsq.nls import LeastSquaresError, NonlinearFit, fit_nonlinear
from bayesgrowth.leastsq.revenue import fit_revenue_scale, fit_revenue_scale_anchored
from bayesgrowth.leastsq.windows import drop_first_fits, drop_last_fits, leave_one_out_fits

__all__ = [
    "CurveFit",
    "fit_curve",
    "GrowthFit",
    "LeastSquaresError",
    "LineFit",
    "LogScaleStats",
    "NonlinearFit",
    "compare_fits",
    "drop_first_fits",
    "drop_last_fits",
    "fit_line",
    "fit_log_linear",
    "fit_log_linear_anchored",
    "fit_nonlinear",
    "fit_revenue_scale",
    "fit_revenue_scale_anchored",
    "fit_table",
    "fit_variants",
    "forecast_spread",
    "leave_one_out_fits",
    "log_linear_intervals",
    "log_linear_predictive",
]
