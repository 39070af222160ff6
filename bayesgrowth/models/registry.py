"""The model registry: every model family declares itself here, and nothing else names one.

A family is one module under :mod:`bayesgrowth.models` holding a
:class:`ModelFamily`: its parameters and their priors in plain words, its mean
function (written once, for NumPy and for ``pytensor.tensor``), the engines that
can fit it and a few flags. The command line, ``describe`` texts, compile keys,
the sensitivity grid, the exact-engine check, model comparison, batches,
backtests and reports read those declarations, so a new model is one new module
(plus its tests) that calls :func:`register`.

The errors, noise, seasonal factors and drift of
:class:`~bayesgrowth.models.spec.ModelSpec` stay options on top of the family.

Examples
--------
>>> from bayesgrowth.models import registry
>>> registry.get_family("logistic").ceiling
True
>>> "exponential" in registry.names()
True
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

__all__ = [
    "ENGINES",
    "EXACT_CONDITIONS",
    "ModelFamily",
    "Parameter",
    "families",
    "get_family",
    "exact_coverage",
    "names",
    "register",
    "register_model",
    "unregister",
]

#: Engines a family can name: the exact state-space engine (Kalman filter over a
#: grid of scales), the exact Gaussian engine (quadrature over the noise scale, and
#: the persistence of AR(1) errors, of a linear model) and PyMC's NUTS.
ENGINES = ("state-space", "gaussian", "nuts")

#: What each exact engine needs of a model besides its family (checked by
#: :class:`~bayesgrowth.models.spec.ModelSpec`: ``is_state_space``, ``is_gaussian_curve``).
EXACT_CONDITIONS = {
    "state-space": "normal noise, independent errors",
    "gaussian": "normal noise, independent or AR(1) errors, with or without seasonal factors",
}

#: How a family's PyMC model integrates its linear coefficients while sampling
#: (see :mod:`bayesgrowth.models.linear`): ``"growth"`` (level, growth and
#: long-run growth, with the family's ``design``), ``"ceiling"`` (the level given
#: ``log K - log a``, with the family's ``ceiling_offset``) or ``None`` (every
#: parameter sampled).
LINEAR_SCHEMES = ("growth", "ceiling", None)


@dataclass(frozen=True)
class Parameter:
    """A scalar parameter of a family, as it appears in the posterior.

    Parameters
    ----------
    name : str
        Name in the posterior (e.g. ``"log_k"``).
    meaning : str
        What it is, in plain words.
    sample : callable, optional
        ``sample(priors)`` creates the PyMC variable inside a model context and
        returns it (the models that sample every parameter call it); ``None`` for
        parameters only the family's own PyMC code creates.
    """

    name: str
    meaning: str
    sample: Callable | None = None


@dataclass(frozen=True)
class ModelFamily:
    """One model family: its parameters, mean function, engines and flags.

    Parameters
    ----------
    name : str
        The name users type (``--model NAME``), lowercase with dashes.
    summary : str
        One line in plain words, shown in help texts and descriptions.
    parameters : tuple of Parameter
        The family's scalar parameters besides the level ``log_a`` and the noise
        scale ``sigma`` that every model has, in the order they are sampled.
    log_mean : callable, optional
        ``log_mean(p, dt, xp)``: the log of the mean curve at offsets ``dt`` from
        the reference period, with ``xp`` NumPy or ``pytensor.tensor`` and ``p``
        the parameters by name (NumPy draws shaped ``(n_draws, 1)``). ``None`` for
        a family with random states (see ``states``).
    prior_lines : callable
        ``prior_lines(resolved, spec)``: the family's priors in plain words, one
        line each (the level, growth and noise lines are shared and come first).
    engines : tuple of str
        From :data:`ENGINES`; NUTS fits every family.
    bends : bool
        Whether the growth rate changes over time (otherwise it is ``log1p_g``).
    ceiling : bool
        Whether the curve saturates at a ceiling ``K`` (parameter ``log_k``).
    states : bool
        Whether the mean path has random states, integrated out in closed form
        (the local trend): no single fitted curve, the level is anchored at the
        first observation, and only normal noise is allowed.
    leastsq_curve : str, optional
        The matching least-squares curve of :mod:`bayesgrowth.leastsq.curves`.
    linear : {"growth", "ceiling", None}
        How the PyMC model integrates linear coefficients (see :data:`LINEAR_SCHEMES`).
    design : callable, optional
        ``design(dt, half_life, xp)`` for the ``"growth"`` scheme.
    ceiling_offset : callable, optional
        ``ceiling_offset(kappa, decay, xp)`` for the ``"ceiling"`` scheme: the log
        curve less ``log a`` given ``kappa = log K - log a`` and ``exp(-lambda dt)``.
    spec_parameters : callable, optional
        ``spec_parameters(spec)``: the parameter names when they depend on the
        model options (the local trend's drift); default the names of ``parameters``.
    drifts : bool
        Whether the ``drift`` option applies (the local trend).
    named_options : dict
        Model options the family's name stands for in a backtest's model list.
    auto_seasonal : bool
        Whether ``seasonal="auto"`` may switch seasonal factors on.
    compare_by_default : bool
        Whether model comparison includes the family unless models are named
        (false for families whose NUTS fit is slow).
    target_accept : float
        NUTS step-size target for series longer than a few points.
    """

    name: str
    summary: str
    parameters: tuple[Parameter, ...]
    log_mean: Callable | None
    prior_lines: Callable = field(default=lambda resolved, spec: [])
    engines: tuple[str, ...] = ("nuts",)
    bends: bool = False
    ceiling: bool = False
    states: bool = False
    leastsq_curve: str | None = None
    linear: str | None = None
    design: Callable | None = None
    ceiling_offset: Callable | None = None
    spec_parameters: Callable | None = None
    drifts: bool = False
    named_options: dict = field(default_factory=dict)
    auto_seasonal: bool = False
    compare_by_default: bool = True
    target_accept: float = 0.9

    def __post_init__(self) -> None:
        if self.name != self.name.lower() or " " in self.name or not self.name:
            raise ValueError(f"a model name is lowercase without blanks, got {self.name!r}")
        unknown = [e for e in self.engines if e not in ENGINES]
        if unknown or "nuts" not in self.engines:
            raise ValueError(f"{self.name}: engines come from {', '.join(ENGINES)} and "
                             f"include nuts, got {self.engines}")
        if self.linear not in LINEAR_SCHEMES:
            raise ValueError(f"{self.name}: linear must be one of {LINEAR_SCHEMES}")
        if (self.log_mean is None) != self.states:
            raise ValueError(f"{self.name}: give a log_mean unless the model has states")

    def parameter_names(self, spec=None) -> tuple[str, ...]:
        """Names of the family's own parameters for ``spec`` (without ``log_a`` and ``sigma``)."""
        if self.spec_parameters is not None and spec is not None:
            return tuple(self.spec_parameters(spec))
        return tuple(p.name for p in self.parameters)

    @property
    def exact_engine(self) -> str | None:
        """The exact engine that can fit the family, if any."""
        return next((e for e in self.engines if e != "nuts"), None)


_FAMILIES: dict[str, ModelFamily] = {}


def register(family: ModelFamily) -> ModelFamily:
    """Add ``family`` to the registry and return it.

    Raises
    ------
    ValueError
        If another family already has the name.

    Examples
    --------
    >>> import copy
    >>> from bayesgrowth.models import registry
    >>> curve = next(f for f in registry.families() if f.name == "exponential")
    >>> registry.register(curve) is curve  # the same family again changes nothing
    True
    >>> registry.register(copy.copy(curve))
    Traceback (most recent call last):
    ...
    ValueError: a model called 'exponential' is already registered
    """
    if family.name in _FAMILIES and _FAMILIES[family.name] is not family:
        raise ValueError(f"a model called {family.name!r} is already registered")
    _FAMILIES[family.name] = family
    return family


#: :func:`register` under the name the package exports (``bayesgrowth.register_model``).
register_model = register


def unregister(name: str) -> None:
    """Remove the family called ``name`` (for tests that register a model of their own)."""
    _FAMILIES.pop(name, None)


def names() -> tuple[str, ...]:
    """Names of the registered families, in registration order."""
    return tuple(_FAMILIES)


def families() -> tuple[ModelFamily, ...]:
    """The registered families, in registration order."""
    return tuple(_FAMILIES.values())


def exact_coverage() -> str:
    """The models the exact engines fit, in words (for refusals), from the declarations."""
    return " and ".join(f"the {f.name} model ({EXACT_CONDITIONS[f.exact_engine]})"
                        for f in _FAMILIES.values() if f.exact_engine is not None)


def get_family(name: str) -> ModelFamily:
    """The family called ``name``.

    Raises
    ------
    ValueError
        Naming the registered families.
    """
    try:
        return _FAMILIES[name]
    except KeyError:
        raise ValueError(f"model must be one of {', '.join(_FAMILIES)}, got {name!r}") from None
