"""One home for defaults shared across layers, validated where they are read."""

from __future__ import annotations

__all__ = [
    "DEFAULT_CHAINS",
    "DEFAULT_DRAWS",
    "DEFAULT_ENGINE",
    "DEFAULT_LEVELS",
    "DEFAULT_MODEL",
    "DEFAULT_TUNE",
    "PREDICTIVE_DRAWS",
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
    """Validate band levels: whole percentages strictly between 0 and 100, sorted, unique."""
    out = []
    for level in levels:
        value = float(level)
        if not (0 < value < 100) or value != int(value):
            raise ValueError("band levels must be whole percentages between 1 and 99, got "
                             f"{value:.15g}")
        out.append(int(value))
    if not out:
        raise ValueError("give at least one band level")
    return tuple(sorted(set(out)))
