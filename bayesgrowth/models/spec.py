"""Which growth model to fit: the curve, the error structure, the noise and seasonality.

Every model has the form, on the log scale,

``log R_t = m_t + s_t + e_t``

* ``m_t`` the **curve**: ``exponential`` (``log a + (t - t_ref) log(1+g)``),
  ``damped`` (growth fades geometrically toward a long-run rate), ``logistic`` and
  ``gompertz`` (growth toward a ceiling ``K``), or ``local-trend`` (a level that
  follows a growth rate which itself drifts).
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

__all__ = [
    "CURVES", "DRIFTS", "ERRORS", "NOISES", "ModelSpec", "resolve_seasonal", "season_index",
]

#: Curve names.
CURVES = ("exponential", "damped", "logistic", "gompertz", "local-trend")
#: Error structures.
ERRORS = ("independent", "ar1")
#: Noise distributions.
NOISES = ("normal", "student-t")
#: How the local trend's growth rate drifts.
DRIFTS = ("random-walk", "mean-reverting", "adaptive")

_ALIASES = {
    "local_trend": "local-trend",
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


@dataclass(frozen=True)
class ModelSpec:
    """The model choice: curve, errors, noise, seasonal factors, and local-trend drift.

    Parameters
    ----------
    model : str
        One of :data:`CURVES` (``local_trend`` is accepted for ``local-trend``).
    errors : {"independent", "ar1"}
    noise : {"normal", "student-t"}
    seasonal : bool
        Seasonal factors (quarterly or monthly data only).
    drift : {"random-walk", "mean-reverting", "adaptive"}
        For ``local-trend`` only: whether the growth rate wanders freely, reverts
        to a long-run rate (growth fades with a half-life), or either, weighted by
        the evidence (``adaptive``, exact engine only).
    """

    model: str = "exponential"
    errors: str = "independent"
    noise: str = "normal"
    seasonal: bool = False
    drift: str = "random-walk"

    def __post_init__(self) -> None:
        object.__setattr__(self, "model", _choice(self.model, CURVES, "model"))
        object.__setattr__(self, "errors", _choice(self.errors, ERRORS, "errors"))
        object.__setattr__(self, "noise", _choice(self.noise, NOISES, "noise"))
        object.__setattr__(self, "drift", _choice(self.drift, DRIFTS, "drift"))
        object.__setattr__(self, "seasonal", bool(self.seasonal))
        if self.model == "local-trend" and self.noise == "student-t":
            raise ValueError(
                "the local-trend model integrates its states in closed form and needs normal "
                "noise; use noise='normal' with it, or Student-t noise with another curve"
            )

    @property
    def is_plain_exponential(self) -> bool:
        """The linear-Gaussian case the exact engine integrates in closed form."""
        return (self.model, self.errors, self.noise, self.seasonal) == (
            "exponential", "independent", "normal", False
        )

    @property
    def mean_reverting(self) -> bool:
        """A local trend whose growth rate reverts to a long-run rate."""
        return self.model == "local-trend" and self.drift == "mean-reverting"

    @property
    def growth_fades(self) -> bool:
        """A local trend whose growth may revert to a long-run rate (fading or adaptive)."""
        return self.model == "local-trend" and self.drift in ("mean-reverting", "adaptive")

    @property
    def is_state_space(self) -> bool:
        """A linear-Gaussian state-space model the exact engine integrates (Kalman filter)."""
        return (self.model, self.errors, self.noise) == ("local-trend", "independent", "normal")

    def parameters(self) -> tuple[str, ...]:
        """Names of the scalar parameters in the posterior."""
        names = ["log_a"]
        if self.model in ("exponential", "damped", "local-trend"):
            names.append("log1p_g")
        if self.model in ("logistic", "gompertz"):
            names.append("log_k")
        if self.model in ("damped", "logistic", "gompertz"):
            names.append("half_life")
        if self.model == "damped" or self.growth_fades:
            names.append("long_run")
        if self.model == "local-trend":
            names += ["sigma_level", "sigma_growth"]
            if self.growth_fades:
                names += ["rho", "half_life"]
        names.append("sigma")
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
        parts = [self.model if self.model != "local-trend" or self.drift == "random-walk"
                 else f"local-trend ({self.drift})"]
        parts.append("AR(1) errors" if self.errors == "ar1" else "independent errors")
        parts.append("Student-t noise" if self.noise == "student-t" else "normal noise")
        if self.seasonal:
            parts.append("seasonal factors")
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


def resolve_seasonal(seasonal: bool | str, axis, t, model: str = "local-trend") -> bool:
    """Whether to fit seasonal factors; ``"auto"`` decides from the calendar.

    ``"auto"`` means seasonal factors for the local trend when the calendar has
    seasons and two full years are observed (the other curves add them only when
    asked).

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
        if seasonal.lower() != "auto":
            raise ValueError(f"seasonal must be true, false or 'auto', got {seasonal!r}")
        months = None if axis is None else axis.months_per_period
        if _choice(model, CURVES, "model") != "local-trend":
            return False
        if months not in (1, 3):
            return False
        span = int(np.max(t)) - int(np.min(t)) + 1
        return span >= 2 * (12 // months)
    return bool(seasonal)
