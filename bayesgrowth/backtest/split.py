"""Rolling-origin splits of a time series for backtesting.

At each forecast origin ``N`` a method is fitted to points before ``N`` and
scored on the next ``horizon`` points. Origins start at ``min_train`` and
move forward by ``stride`` while at least one point is left to test. Near
the end of the data the test set is cut short, so the last ``horizon - 1``
origins (for ``stride = 1``) have fewer than ``horizon`` test points and the
far steps are scored on fewer origins than the near ones.
"""

from __future__ import annotations

from collections.abc import Iterator, Sized

import numpy as np
from numpy.typing import NDArray

__all__ = ["RollingOrigin"]


def _positive_int(value: object, name: str) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)):
        raise ValueError(f"{name} must be a whole number, got {value!r}")
    if value < 1:
        raise ValueError(f"{name} must be at least 1, got {value}")
    return int(value)


def _length(series: int | Sized) -> int:
    if isinstance(series, bool):
        raise ValueError("split needs a series length or a sized object, got a bool")
    if isinstance(series, (int, np.integer)):
        n = int(series)
    elif isinstance(series, Sized):
        n = len(series)
    else:
        raise ValueError(
            f"split needs a series length or a sized object, got {type(series).__name__}"
        )
    if n < 0:
        raise ValueError(f"series length must be non-negative, got {n}")
    return n


class RollingOrigin:
    """Rolling-origin (expanding or fixed-window) train/test splits.

    Parameters
    ----------
    horizon : int
        Test points per origin (the forecast horizon), at least 1.
    min_train : int
        Training points at the first origin, at least 1.
    stride : int, default 1
        Points between consecutive origins, at least 1.
    window : int, optional
        If given, train on only the last ``window`` points before each
        origin (fixed length); it may not exceed ``min_train``. By default
        the training set expands, always starting at 0.

    Raises
    ------
    ValueError
        If a setting is not a positive whole number, or ``window`` exceeds
        ``min_train``; the message names the setting.

    Examples
    --------
    >>> splitter = RollingOrigin(horizon=2, min_train=3)
    >>> [(tr.tolist(), te.tolist()) for tr, te in splitter.split(5)]
    [([0, 1, 2], [3, 4]), ([0, 1, 2, 3], [4])]
    """

    def __init__(
        self, horizon: int, min_train: int, stride: int = 1, window: int | None = None
    ) -> None:
        self.horizon = _positive_int(horizon, "horizon")
        self.min_train = _positive_int(min_train, "min_train")
        self.stride = _positive_int(stride, "stride")
        if window is not None:
            window = _positive_int(window, "window")
            if window > self.min_train:
                raise ValueError(
                    f"window ({window}) may not exceed min_train ({self.min_train}): "
                    "the first origin would have fewer than window training points"
                )
        self.window = window

    def __repr__(self) -> str:
        return (
            f"RollingOrigin(horizon={self.horizon}, min_train={self.min_train}, "
            f"stride={self.stride}, window={self.window})"
        )

    def origins(self, series: int | Sized) -> NDArray[np.int64]:
        """Forecast origins: the index of the first test point of each split.

        Parameters
        ----------
        series : int or sized
            Series length, or anything with a length (array, Series, list).

        Returns
        -------
        ndarray of int
            ``min_train, min_train + stride, ...`` up to the last index.

        Raises
        ------
        ValueError
            If the series is too short for even one origin.
        """
        n = _length(series)
        if n <= self.min_train:
            raise ValueError(
                f"series has {n} points but min_train={self.min_train}: at least "
                f"{self.min_train + 1} points are needed for one test point"
            )
        return np.arange(self.min_train, n, self.stride, dtype=np.int64)

    def n_splits(self, series: int | Sized) -> int:
        """Number of splits for a series.

        Parameters
        ----------
        series : int or sized
            Series length, or anything with a length.

        Returns
        -------
        int
            Number of origins.

        Raises
        ------
        ValueError
            If the series is too short for even one origin.
        """
        return int(self.origins(series).size)

    def split(
        self, series: int | Sized
    ) -> Iterator[tuple[NDArray[np.int64], NDArray[np.int64]]]:
        """Yield ``(train_idx, test_idx)`` index arrays, one pair per origin.

        For origin ``N`` the training indices are ``[0, N)`` (or
        ``[N - window, N)``) and the test indices ``[N, min(N + horizon,
        n))``.

        Parameters
        ----------
        series : int or sized
            Series length, or anything with a length.

        Yields
        ------
        train_idx, test_idx : ndarray of int
            Positional indices into the series.

        Raises
        ------
        ValueError
            If the series is too short for even one origin (raised by the
            call itself, before iteration).
        """
        n = _length(series)
        origins = self.origins(n)
        return self._pairs(origins, n)

    def _pairs(
        self, origins: NDArray[np.int64], n: int
    ) -> Iterator[tuple[NDArray[np.int64], NDArray[np.int64]]]:
        for origin in origins:
            start = 0 if self.window is None else int(origin) - self.window
            yield (
                np.arange(start, origin, dtype=np.int64),
                np.arange(origin, min(int(origin) + self.horizon, n), dtype=np.int64),
            )
