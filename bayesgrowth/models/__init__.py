"""Growth curves. Each model gives the curve's math and builds its PyMC model.

:class:`~bayesgrowth.models.spec.ModelSpec` names a model (curve, errors, noise,
seasonal factors); :mod:`bayesgrowth.models.general` holds the math of every
model in NumPy and PyMC. The exponential module keeps its own functions
(``PARAMETERS``, ``log_mean``, ``simulate_log``, ``log_likelihood``,
``build_pymc_model``), which the exact engine builds on; :func:`get_model` finds
it by name.
"""

from types import ModuleType

from bayesgrowth.models import exponential, general
from bayesgrowth.models.spec import CURVES, DRIFTS, ERRORS, NOISES, ModelSpec, season_index

__all__ = [
    "CURVES",
    "DRIFTS",
    "ERRORS",
    "MODELS",
    "NOISES",
    "ModelSpec",
    "exponential",
    "general",
    "get_model",
    "season_index",
]

MODELS: dict[str, ModuleType] = {"exponential": exponential}


def get_model(name: str) -> ModuleType:
    """The model module called ``name`` (e.g. ``"exponential"``)."""
    try:
        return MODELS[name]
    except KeyError:
        raise ValueError(f"model must be one of {', '.join(MODELS)}, got {name!r}") from None
