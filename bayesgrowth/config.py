"""One home for defaults shared across layers, validated where they are read."""

from __future__ import annotations

import math
import numbers

__all__ = [
    "DEFAULT_CHAINS",
    "DEFAULT_DRAWS",
    "DEFAULT_ENGINE",
    "DEFAULT_LEVELS",
    "DEFAULT_MODEL",
    "DEFAULT_TUNE",
    "PREDICTIVE_DRAWS",
    "check_count",
    "check_levels",
]

#: Central band levels, in percent.
DEFAULT_LEVELS: tuple[int, ...] = (50, 80, 95)
#: Posterior draws per chain and number of chains.
DEFAULT_DRAWS = 1000
DEFAULT_CHAINS = 4
#: NUTS tuning steps per chain.
DEFAULT_TUNE = 1000
#: Draws of a predictive distribution that is simulated rather than integrated (a
#: backtest's forecasts, a prior predictive): as many as the default posterior holds.
PREDICTIVE_DRAWS = DEFAULT_DRAWS * DEFAULT_CHAINS

#: The recommended model, used by the API and every command unless told otherwise:
#: a local trend on the log scale whose growth rate fades towards the long-run rate
#: with an uncertain half-life (a damped trend; half-lives of many years make it a
#: local trend whose growth barely fades), with seasonal factors when the calendar
#: has seasons and at least two full years are observed. Why: damping trends is what
#: held up in the large forecasting competitions, and on the real-data benchmark
#: (docs/benchmark.md) its bands held close to their stated coverage and scored
#: better than both the undamped local trend and an evidence-weighted average of the
#: two, where a fixed exponential curve with independent errors covered far less.
DEFAULT_MODEL: dict = {"model": "local-trend", "drift": "mean-reverting", "seasonal": "auto"}
#: The engine of the recommended model: exact integration (milliseconds, no chains).
DEFAULT_ENGINE = "exact"


def check_levels(levels) -> tuple[int, ...]:
    """Validate band levels: whole percentages strictly between 0 and 100, sorted, unique.

    One number is one level (``80``); a fraction such as ``0.8`` is refused with a
    message saying to write ``80``.

    Examples
    --------
    >>> check_levels([95, 80]), check_levels(80)
    ((80, 95), (80,))
    """
    if isinstance(levels, numbers.Real) and not isinstance(levels, bool):
        levels = (levels,)
    if isinstance(levels, str | bytes) or not hasattr(levels, "__iter__"):
        raise ValueError(f"levels must be whole percentages such as (50, 80, 95), got {levels!r}")
    out = []
    for level in levels:
        if isinstance(level, bool) or not isinstance(level, numbers.Real):
            raise ValueError(f"band levels must be numbers such as 80, got {level!r}")
        value = float(level)
        if not (0 < value < 100) or value != int(value):
            hint = f"; write levels in percent ({value * 100:.15g}, not {value:.15g})" \
                if 0 < value < 1 else ""
            raise ValueError("band levels must be whole percentages between 1 and 99, got "
                             f"{value:.15g}{hint}")
        out.append(int(value))
    if not out:
        raise ValueError("give at least one band level")
    return tuple(sorted(set(out)))


def check_count(value, name: str, least: int = 1) -> int:
    """Validate a count (draws, chains, a seed, a horizon): a whole number >= ``least``.

    A float that is whole (``4.0``) is taken; a bool, a string, ``nan`` or ``2.5`` is
    not.

    Raises
    ------
    ValueError
        Naming ``name`` and the value given.

    Examples
    --------
    >>> check_count(4.0, "draws")
    4
    """
    whole = (isinstance(value, numbers.Real) and not isinstance(value, bool)
             and math.isfinite(value) and int(value) == value)
    if not whole or value < least:
        raise ValueError(f"{name} must be a whole number of at least {least}, got {value!r}")
    return int(value)
