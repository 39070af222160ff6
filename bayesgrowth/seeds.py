"""The one seeding scheme: every seed and random stream derives from the user's seed.

A derived seed or stream is :class:`numpy.random.SeedSequence` over the user's seed
followed by a key: a series name (hashed with SHA-256, stable across processes and
machines, unlike Python's salted ``hash``), an origin's position, or the tag of a
purpose (:data:`STREAMS`). So a result depends on the seed and on what it is, never
on which worker computes it, in what order, or what else runs beside it: every
batch executor gives identical results, a resumed run matches an uninterrupted
one, and a change of a backtest's stride keeps the fits at the origins both share.

Each purpose has its own tag, so no two of them draw the same numbers from one seed.
"""

from __future__ import annotations

import hashlib

import numpy as np

__all__ = ["STREAMS", "origin_seed", "series_seed", "stream"]

#: The tag of each purpose that draws random numbers from a fit's or forecast's seed.
#: The numbers are part of the results: changing one changes that purpose's draws.
STREAMS = {
    "forecast": 1,  # predictive paths of a forecast
    "latest_growth": 2,  # the latest growth state of a local trend, given the data
    "prior_parameters": 3,  # parameter draws from the prior without PyMC
    "prior_paths": 4,  # paths of the prior predictive
    "prior_completion": 5,  # integrated-out coefficients drawn from their prior
    "model_average": 6,  # which model's draws make up a model average
    "posterior_completion": 7,  # integrated-out coefficients drawn given the data
    "theta_cells": 8,  # exact-engine theta spread over its grid cells, for reported intervals
}


def _entropy(seed: int, key: int | str) -> list[int]:
    if int(seed) < 0:
        raise ValueError(f"seed must be >= 0, got {seed}")
    if isinstance(key, str):
        words = np.frombuffer(hashlib.sha256(key.encode("utf-8")).digest(), dtype="<u4")
        return [int(seed), *words.tolist()]
    return [int(seed), int(key)]


def _derived_seed(seed: int, key: int | str) -> int:
    sequence = np.random.SeedSequence(_entropy(seed, key))
    return int(sequence.generate_state(1, dtype=np.uint32)[0])


def series_seed(seed: int, name: str) -> int:
    """The seed of series ``name`` in a run over many series with global seed ``seed``.

    Parameters
    ----------
    seed : int
        The run's global seed, >= 0.
    name : str
        The series name.

    Returns
    -------
    int
        A 32-bit seed.

    Examples
    --------
    >>> series_seed(1, "north") == series_seed(1, "north")
    True
    >>> series_seed(1, "north") != series_seed(2, "north")
    True
    """
    return _derived_seed(seed, str(name))


def origin_seed(seed: int, origin: int) -> int:
    """Seed of the fits at one backtest origin, from the run's seed and the origin's position.

    It depends on the origin, not on how many origins come before it, so a
    change of ``stride`` keeps the fits at the origins both runs share.

    Parameters
    ----------
    seed : int
        The backtest's seed, >= 0.
    origin : int
        Position of the origin (its number of the first test point).

    Returns
    -------
    int
        A 32-bit seed.

    Examples
    --------
    >>> origin_seed(5, 13) != origin_seed(5, 14)
    True
    """
    return _derived_seed(seed, int(origin))


def stream(seed: int, purpose: str) -> np.random.Generator:
    """The random stream of one purpose (a key of :data:`STREAMS`) under ``seed``.

    Parameters
    ----------
    seed : int
        The fit's or forecast's seed, >= 0.
    purpose : str
        What the numbers are for.

    Returns
    -------
    numpy.random.Generator

    Examples
    --------
    >>> a = stream(3, "forecast").normal(size=2)
    >>> bool((a == stream(3, "forecast").normal(size=2)).all())
    True
    >>> bool((a == stream(3, "model_average").normal(size=2)).any())
    False
    """
    if purpose not in STREAMS:
        raise ValueError(f"unknown random stream {purpose!r}; one of {', '.join(STREAMS)}")
    return np.random.default_rng(_entropy(seed, STREAMS[purpose]))
