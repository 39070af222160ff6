"""Small input helpers shared by the scoring modules."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray


def as_float(x: ArrayLike) -> NDArray[np.float64]:
    """Return ``x`` as a float64 array (no copy when already float64)."""
    return np.asarray(x, dtype=np.float64)


def as_draws(draws: ArrayLike) -> NDArray[np.float64]:
    """Return predictive draws as a float64 array with the draws on the last axis.

    Raises
    ------
    ValueError
        If ``draws`` is a scalar or has an empty last axis.
    """
    d = as_float(draws)
    if d.ndim == 0:
        raise ValueError("draws must have at least one axis (the draws go on the last axis)")
    if d.shape[-1] == 0:
        raise ValueError("draws has no members on its last axis")
    return d


def check_scale(scale: NDArray[np.float64], name: str = "scale") -> None:
    """Raise ``ValueError`` if any entry of ``scale`` is negative.

    Raises
    ------
    ValueError
        If any entry is negative.
    """
    if np.any(scale < 0):
        raise ValueError(f"{name} must be non-negative")


def check_df(df: NDArray[np.float64]) -> None:
    """Raise ``ValueError`` if any degrees-of-freedom entry is not positive.

    Raises
    ------
    ValueError
        If any entry is zero, negative or NaN.
    """
    if not np.all(df > 0):
        raise ValueError("df (degrees of freedom) must be positive; use np.inf for a normal")
