"""Growth models: one module per model family, each declared in the registry.

:mod:`bayesgrowth.models.registry` holds the declarations
(:class:`~bayesgrowth.models.registry.ModelFamily`): every family module
(:mod:`~bayesgrowth.models.exponential`, :mod:`~bayesgrowth.models.damped`,
:mod:`~bayesgrowth.models.logistic`, :mod:`~bayesgrowth.models.gompertz`,
:mod:`~bayesgrowth.models.local_trend`) registers itself when imported here.
:class:`~bayesgrowth.models.spec.ModelSpec` names a model (family, errors, noise,
seasonal factors, drift); :mod:`bayesgrowth.models.general` holds the math every
family shares (errors, noise, seasons) in NumPy and PyMC.
"""

from importlib import import_module

from bayesgrowth.models import registry

# Each family registers itself on import; this order is the order of every listing.
FAMILY_MODULES = ("exponential", "damped", "logistic", "gompertz", "local_trend")
for _module in FAMILY_MODULES:
    import_module(f"bayesgrowth.models.{_module}")

from bayesgrowth.models import (  # noqa: E402 - after the families registered
    damped,
    exponential,
    general,
    gompertz,
    local_trend,
    logistic,
)
from bayesgrowth.models.registry import ModelFamily, Parameter, get_family, register  # noqa: E402
from bayesgrowth.models.spec import (  # noqa: E402
    DRIFTS,
    ERRORS,
    NOISES,
    ModelSpec,
    season_index,
)

__all__ = [
    "DRIFTS",
    "ERRORS",
    "FAMILY_MODULES",
    "ModelFamily",
    "ModelSpec",
    "NOISES",
    "Parameter",
    "damped",
    "exponential",
    "general",
    "get_family",
    "gompertz",
    "local_trend",
    "logistic",
    "model_names",
    "register",
    "registry",
    "season_index",
]

#: Names of the registered model families, in registration order.
model_names = registry.names
