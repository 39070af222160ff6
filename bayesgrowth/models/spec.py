"""Which growth model to fit: the curve, the error structure, the noise and seasonality.

Every model has the form, on the log scale,

``log R_t = m_t + s_t + e_t``

* ``m_t`` the **curve**, one of the registered model families
  (:mod:`bayesgrowth.models.registry`): ``exponential`` (``log a + (t - t_ref)
  log(1+g)``), ``damped`` (growth fades geometrically toward a long-run rate),
  ``logistic`` and ``gompertz`` (growth toward a ceiling ``K``), ``local-trend`` (a
  level that follows a growth rate which itself drifts), and any family added later.
* ``s_t`` optional **seasonal factors** for quarterly or monthly data, one per
  season, summing to zero (so they are multiplicative factors around the curve).
* ``e_t`` the **errors**: ``independent``, or ``ar1`` (``e_t = phi e_{t-1} +
  eps_t``), so that a deviation from the curve persists into the next periods.
* ``eps_t`` the **noise**: ``normal`` or ``student-t`` (heavy tails that let one
  odd period pass without bending the curve).

The math is in :mod:`bayesgrowth.models.general`.
"""

from __future__ import annotations

from dataclasses import asdict, dataclass

import numpy as np

from bayesgrowth.models import registry

__all__ = [
    "DRIFTS", "ERRORS", "NOISES", "ModelSpec", "resolve_seasonal", "season_index",
]

#: Error structures.
ERRORS = ("independent", "ar1")
#: Noise distributions.
NOISES = ("normal", "student-t")
#: How the local trend's growth rate drifts.
DRIFTS = ("random-walk", "mean-reverting", "adaptive")

_ALIASES = {
    "student_t": "student-t",
    "studentt": "student-t",
    "t": "student-t",
    "random_walk": "random-walk",
    "mean_reverting": "mean-reverting",
    "ar(1)": "ar1",
}


def _choice(value: str, allowed: tuple[str, ...], what: str) -> str:
    v = _ALIASES.get(str(value).lower(), str(value).lower())
    if v not in allowed:
        raise ValueError(f"{what} must be one of {', '.join(allowed)}, got {value!r}")
    return v


def model_name(value: str) -> str:
    """The registered model called ``value`` (case and ``_`` for ``-`` ignored).

    Raises
    ------
    ValueError
        Naming the registered models.
    """
    return _choice(str(value).replace("_", "-"), registry.names(), "model")


@dataclass(frozen=True)
class ModelSpec:
    """The model choice: curve, errors, noise, seasonal factors, and local-trend drift.

    Parameters
    ----------
    model : str
        A registered model family (:func:`bayesgrowth.models.registry.names`);
        ``local_trend`` is accepted for ``local-trend``.
    errors : {"independent", "ar1"}
    noise : {"normal", "student-t"}
    seasonal : bool or "drifting"
        Seasonal factors (quarterly or monthly data only); ``"drifting"`` is short for
        ``seasonal=True, season_drift=True``.
    drift : {"random-walk", "mean-reverting", "adaptive"}
        For ``local-trend`` only (other curves record ``"random-walk"``): whether the
        growth rate wanders freely, reverts to a long-run rate (growth fades with a
        half-life), or either, weighted by the evidence (``adaptive``, exact engine
        only).
    season_drift : bool
        For ``local-trend`` with seasonal factors only: the factors drift slowly, a
        seasonal random walk around them (Harvey 1989; Durbin & Koopman 2012, sec.
        3.2), with its own scale ``sigma_season``.
    """

    model: str = "exponential"
    errors: str = "independent"
    noise: str = "normal"
    seasonal: bool = False
    drift: str = "random-walk"
    season_drift: bool = False

    def __post_init__(self) -> None:
        object.__setattr__(self, "model", model_name(self.model))
        object.__setattr__(self, "errors", _choice(self.errors, ERRORS, "errors"))
        object.__setattr__(self, "noise", _choice(self.noise, NOISES, "noise"))
        object.__setattr__(self, "drift", _choice(self.drift, DRIFTS, "drift"))
        if not self.family.drifts:  # a curve has no drifting growth: one spelling of it
            object.__setattr__(self, "drift", "random-walk")
        if isinstance(self.seasonal, str) and self.seasonal.lower() == "drifting":
            object.__setattr__(self, "season_drift", True)  # the option's one-word form
        object.__setattr__(self, "seasonal", bool(self.seasonal))
        object.__setattr__(self, "season_drift", bool(self.season_drift))
        if self.season_drift and not (self.seasonal and self.family.states):
            raise ValueError(
                "drifting seasonal factors need the local-trend model with seasonal factors "
                f"(they live in its states), not {self.model}"
                + ("" if self.seasonal else " without seasons"))
        if self.family.states and self.noise == "student-t":
            raise ValueError(
                f"the {self.model} model integrates its states in closed form and needs normal "
                "noise; use noise='normal' with it, or Student-t noise with another curve"
            )

    @property
    def family(self) -> registry.ModelFamily:
        """The model family's declaration in the registry."""
        return registry.get_family(self.model)

    @property
    def is_plain_exponential(self) -> bool:
        """The linear-Gaussian case the exact Gaussian engine integrates in closed form."""
        return "gaussian" in self.family.engines and (self.errors, self.noise, self.seasonal) == (
            "independent", "normal", False
        )

    @property
    def is_gaussian_curve(self) -> bool:
        """A curve the exact Gaussian engines integrate: normal noise, any errors and seasons.

        Given the noise scale (and the persistence of AR(1) errors) the log values are
        Gaussian and linear in the curve's coefficients and seasonal coordinates, whose
        priors are normal (:mod:`bayesgrowth.inference.exact`,
        :mod:`bayesgrowth.inference.ar1_grid`).
        """
        return "gaussian" in self.family.engines and self.noise == "normal"

    @property
    def is_gaussian_ar1(self) -> bool:
        """That curve with AR(1) errors, which the exact engine integrates over ``(sigma, phi)``.

        With or without seasonal factors (:mod:`bayesgrowth.inference.ar1_grid`).
        """
        return self.is_gaussian_curve and self.errors == "ar1"

    @property
    def is_state_space(self) -> bool:
        """A linear-Gaussian state-space model the exact engine integrates (Kalman filter)."""
        return "state-space" in self.family.engines and (self.errors, self.noise) == (
            "independent", "normal"
        )

    @property
    def exact_fits(self) -> bool:
        """Whether an exact engine (state-space or Gaussian) can fit this model."""
        return self.is_gaussian_curve or self.is_state_space

    @property
    def adaptive(self) -> bool:
        """Drift weighted by its exact evidence, which only the exact engine computes."""
        return self.family.drifts and self.drift == "adaptive"

    @property
    def mean_reverting(self) -> bool:
        """A local trend whose growth rate reverts to a long-run rate."""
        return self.family.drifts and self.drift == "mean-reverting"

    @property
    def growth_fades(self) -> bool:
        """A local trend whose growth may revert to a long-run rate (fading or adaptive)."""
        return self.family.drifts and self.drift in ("mean-reverting", "adaptive")

    def parameters(self) -> tuple[str, ...]:
        """Names of the scalar parameters in the posterior."""
        names = ["log_a", *self.family.parameter_names(self), "sigma"]
        if self.errors == "ar1":
            names.append("phi")
        if self.noise == "student-t":
            names.append("nu")
        return tuple(names)

    def vector_parameters(self) -> tuple[str, ...]:
        """Names of the vector-valued posterior quantities (the seasonal factors)."""
        return ("season",) if self.seasonal else ()

    def label(self) -> str:
        """A short description, e.g. ``"logistic, AR(1) errors, Student-t noise"``."""
        parts = [self.model if not self.family.drifts or self.drift == "random-walk"
                 else f"{self.model} ({self.drift})"]
        parts.append("AR(1) errors" if self.errors == "ar1" else "independent errors")
        parts.append("Student-t noise" if self.noise == "student-t" else "normal noise")
        if self.seasonal:
            parts.append("drifting seasonal factors" if self.season_drift else
                         "seasonal factors")
        return ", ".join(parts)

    def to_dict(self) -> dict:
        """JSON-ready form."""
        return asdict(self)


def season_index(axis, t: np.ndarray) -> tuple[int, np.ndarray]:
    """Number of seasons and the season (0-based) of each time index ``t``.

    Raises
    ------
    ValueError
        If the calendar is not quarterly or monthly.
    """
    months = None if axis is None else axis.months_per_period
    if months not in (1, 3):
        raise ValueError(
            "seasonal factors need quarterly or monthly periods; "
            "fit this series with seasonal=False"
        )
    ordinal = axis.origin + np.asarray(t, dtype=int) * axis.step
    if axis.style == "quarter":
        return 4, ordinal % 4
    if axis.style == "month":
        return 12, ordinal % 12
    return 12 // months, (ordinal % 12) // months


def resolve_seasonal(seasonal: bool | str, axis, t, model: str = "local-trend") -> bool | str:
    """Whether to fit seasonal factors; ``"auto"`` decides from the calendar.

    ``"drifting"`` (drifting seasonal factors, see :class:`ModelSpec`) is returned as
    it is: seasonal factors, which drift.

    ``"auto"`` means seasonal factors for the families that allow it (the local
    trend) when the calendar has seasons and two full years are observed (the
    other curves add them only when asked).

    Parameters
    ----------
    seasonal : bool or "auto"
    axis : PeriodAxis or None
    t : numpy.ndarray
        Time indices of the observations.
    model : str
        The curve.
    """
    if isinstance(seasonal, str):
        if seasonal.lower() == "drifting":
            return "drifting"
        if seasonal.lower() != "auto":
            raise ValueError(
                f"seasonal must be true, false, 'auto' or 'drifting', got {seasonal!r}")
        months = None if axis is None else axis.months_per_period
        if not registry.get_family(model_name(model)).auto_seasonal:
            return False
        if months not in (1, 3):
            return False
        span = int(np.max(t)) - int(np.min(t)) + 1
        return span >= 2 * (12 // months)
    return bool(seasonal)
