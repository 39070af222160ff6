"""Growth curves. Each model module gives the curve's math and builds its PyMC model.

A model module provides ``PARAMETERS``, ``log_mean(draws, t, t_ref)``,
``simulate_log(draws, t, t_ref, rng)``, ``log_likelihood(draws, t, values, t_ref)``
and ``build_pymc_model(priors, t, log_y, weights=None)``; :func:`get_model` finds
one by name.
"""

from types import ModuleType

from bayesgrowth.models import exponential

__all__ = ["MODELS", "exponential", "get_model"]

MODELS: dict[str, ModuleType] = {"exponential": exponential}


def get_model(name: str) -> ModuleType:
    """The model module called ``name`` (e.g. ``"exponential"``)."""
    try:
        return MODELS[name]
    except KeyError:
        raise ValueError(f"model must be one of {', '.join(MODELS)}, got {name!r}") from None
