"""Values far out of line with their neighbours: a check that notes them, and never refuses.

A value keyed a hundred times too large, or without its thousands, goes straight into a
fit and bends every band. The reader names such values so the user can look at them; it
uses them as they are (a real collapse or boom is data, too).

The rule, on the log scale (a Hampel identifier, Hampel 1974; Pearson 2002):

1. **Neighbours.** The observations up to :data:`REACH` periods before and after (near
   an end, as many more on the other side), each carried to the value's period by the
   series' median change per period (so a growing series' first and last values are not
   judged against a level they have outgrown). The value's *deviation* is its log less
   the median of the carried logs.
2. **Scale.** :data:`MAD_TO_SD` times the median absolute deviation of the series' log
   changes from one period to the next (observations one period apart).
3. **Out of line** when the deviation exceeds :data:`THRESHOLD` scales and is at least
   :data:`LEAST_LOG` (a factor of about 3.16 either way; :data:`END_LOG`, a factor of 10,
   for the first and the last observation, judged from one side).
4. **Seasons.** For quarterly or monthly data with more than a year of year-on-year changes
   (at least nine quarters, 25 months), the same rule is applied with the same season in
   the neighbouring years (changes over a year for the scale), and a value is out of line
   when it is out of line there and also at least :data:`LEAST_LOG` from the level of its
   neighbouring periods (whose changes are mostly the seasons' swings, so their scale is
   not used): a strong fourth quarter is in line with earlier fourth quarters, a value
   keyed a hundred times too large is in line with nothing.

The check runs on series of :data:`MIN_LENGTH` observations or more.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["END_LOG", "LEAST_LOG", "MAD_TO_SD", "MIN_LENGTH", "REACH", "THRESHOLD",
           "unusual_values"]

#: Consistency constant of the median absolute deviation: 1.4826 MAD estimates the standard
#: deviation of normal data (1 / the normal's 75% quantile; Rousseeuw & Croux 1993, Journal
#: of the American Statistical Association 88:1273-1283).
MAD_TO_SD = 1.4826

#: Robust scales a value must be off by: 3, the common-practice threshold of the Hampel
#: identifier ("three-sigma edit rule"; Pearson 2002, IEEE Transactions on Control Systems
#: Technology 10:55-63).
THRESHOLD = 3.0

#: The least deviation noted, on the log scale: half a power of ten (a factor of
#: sqrt(10), about 3.16). Beyond it a value is nearer, on the log scale, to ten times (or a
#: tenth of) its neighbours' level than to that level itself, as a slip of a digit or of
#: the units makes it; a business's own swings (a strong season in a short series, a
#: calm series' one rough quarter) stay below it. Chosen here, not a published constant.
LEAST_LOG = 0.5 * math.log(10)

#: The least deviation noted for the first and the last observation: a power of ten. Their
#: neighbours lie on one side only, so the level they give is an extrapolation through
#: growth that changes: a young business's first quarters often grew several-fold (2, 15,
#: 40, 80, ... puts the first value at 1/8 of the level the later ones give). A slip of
#: the units (a hundred times, a thousandth) is still far beyond it. Chosen here, not a
#: published constant.
END_LOG = math.log(10)

#: Neighbours taken on each side.
REACH = 2

#: Fewest observations the check runs on (with fewer, one slip is half the changes).
MIN_LENGTH = 5


def _view(y: np.ndarray, t: np.ndarray, lag: int,
          least_pairs: int = 3) -> tuple[np.ndarray, float] | None:
    """Each value's deviation from its neighbours ``lag`` periods apart, and the scale.

    ``None`` when fewer than ``least_pairs`` pairs of observations are ``lag`` periods apart.
    """
    where = {int(ti): i for i, ti in enumerate(t)}
    pairs = [(where[int(ti) - lag], i) for i, ti in enumerate(t) if int(ti) - lag in where]
    if len(pairs) < least_pairs:
        return None
    changes = np.array([y[i] - y[j] for j, i in pairs])
    rate = float(np.median(changes))
    scale = MAD_TO_SD * float(np.median(np.abs(changes - rate)))
    deviation = np.zeros(y.size)
    for i, ti in enumerate(t):
        steps = sorted((m for m in range(-2 * REACH, 2 * REACH + 1)
                        if m and int(ti) + m * lag in where), key=abs)[:2 * REACH]
        near = [where[int(ti) + m * lag] for m in steps]
        if near:
            carried = [y[j] + (int(ti) - int(t[j])) / lag * rate for j in near]
            deviation[i] = y[i] - float(np.median(carried))
    return deviation, scale


def _floor(n: int) -> np.ndarray:
    """The least deviation noted at each of ``n`` positions: :data:`END_LOG` at the ends."""
    floor = np.full(n, LEAST_LOG)
    floor[[0, -1]] = END_LOG
    return floor


def _out_of_line(view: tuple[np.ndarray, float]) -> np.ndarray:
    deviation, scale = view
    return np.abs(deviation) > np.maximum(THRESHOLD * scale, _floor(deviation.size))


def unusual_values(values, t, season_length: int | None = None) -> list[tuple[int, float]]:
    """The values far out of line with their neighbours (see the module docstring).

    Parameters
    ----------
    values : array_like
        The values, above zero, sorted by period.
    t : array_like of int
        Their time indices (gaps keep their place).
    season_length : int, optional
        Periods in a year (4, 12) for quarterly or monthly data, to compare each value
        with the same season too.

    Returns
    -------
    list of (int, float)
        Position of each value out of line, and its ratio to the level its neighbours
        give (100 for a value a hundred times too large).

    Examples
    --------
    >>> values = [100, 105, 111, 11600, 122, 128, 135]
    >>> [(i, round(r, -1)) for i, r in unusual_values(values, range(7))]
    [(3, 100.0)]
    >>> unusual_values([100, 105, 111, 116, 122, 128, 135], range(7))
    []
    """
    y = np.log(np.asarray(values, dtype=float))
    t = np.asarray(t, dtype=int)
    if y.size < MIN_LENGTH:
        return []
    near = _view(y, t, 1)
    if near is None:
        return []
    flagged = _out_of_line(near)
    if season_length and season_length > 1:
        year = _view(y, t, season_length, least_pairs=season_length + 1)
        if year is not None:
            # the changes from one period to the next are mostly the seasons' swings,
            # so their scale says little there: the floor alone applies to them
            flagged = _out_of_line(year) & (np.abs(near[0]) >= _floor(y.size))
    return [(int(i), float(math.exp(near[0][i]))) for i in np.flatnonzero(flagged)]
