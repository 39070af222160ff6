"""Inference layer: the NUTS engine (PyMC, imported lazily) and the exact engine."""

from bayesgrowth.inference.diagnostics import Diagnostics, SamplingWarning
from bayesgrowth.inference.exact import exact_posterior, fit_exact
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.gaussian_grid import SigmaGridPosterior, linear_gaussian_posterior
from bayesgrowth.inference.run import ENGINES, fit_series

__all__ = [
    "ENGINES",
    "Diagnostics",
    "Fit",
    "SamplingWarning",
    "SigmaGridPosterior",
    "exact_posterior",
    "fit_exact",
    "fit_series",
    "linear_gaussian_posterior",
]
