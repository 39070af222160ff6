"""One home for defaults shared across layers, validated where they are read."""

from __future__ import annotations

__all__ = ["DEFAULT_LEVELS", "check_levels", "DEFAULT_DRAWS", "DEFAULT_CHAINS"]

#: Central band levels, in percent.
DEFAULT_LEVELS: tuple[int, ...] = (50, 80, 95)
#: Posterior draws per chain and number of chains.
DEFAULT_DRAWS = 1000
DEFAULT_CHAINS = 4


def check_levels(levels) -> tuple[int, ...]:
    """Validate band levels: whole percentages strictly between 0 and 100, sorted, unique."""
    out = []
    for level in levels:
        value = float(level)
        if not (0 < value < 100) or value != int(value):
            raise ValueError(f"band levels must be whole percentages between 1 and 99, got {level}")
        out.append(int(value))
    if not out:
        raise ValueError("give at least one band level")
    return tuple(sorted(set(out)))
