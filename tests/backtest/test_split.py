import numpy as np
import pandas as pd
import pytest

from bayesgrowth.backtest.split import RollingOrigin


def _as_lists(splitter, n):
    return [(tr.tolist(), te.tolist()) for tr, te in splitter.split(n)]


def test_expanding_with_truncated_tail():
    # hand-enumerated: n = 8, min_train = 5, horizon = 3
    assert _as_lists(RollingOrigin(horizon=3, min_train=5), 8) == [
        ([0, 1, 2, 3, 4], [5, 6, 7]),
        ([0, 1, 2, 3, 4, 5], [6, 7]),
        ([0, 1, 2, 3, 4, 5, 6], [7]),
    ]
    assert RollingOrigin(horizon=3, min_train=5).n_splits(8) == 3


def test_stride_and_window():
    splitter = RollingOrigin(horizon=2, min_train=4, stride=3, window=3)
    assert _as_lists(splitter, 12) == [
        ([1, 2, 3], [4, 5]),
        ([4, 5, 6], [7, 8]),
        ([7, 8, 9], [10, 11]),
    ]
    assert splitter.origins(12).tolist() == [4, 7, 10]
    # stride that jumps past the end: origins 4 and 9 only (14 would leave no test point)
    assert RollingOrigin(horizon=5, min_train=4, stride=5).origins(10).tolist() == [4, 9]


def test_horizon_longer_than_data_left():
    assert _as_lists(RollingOrigin(horizon=10, min_train=3), 5) == [
        ([0, 1, 2], [3, 4]),
        ([0, 1, 2, 3], [4]),
    ]


@pytest.mark.parametrize("series", [7, np.arange(7.0), list(range(7)), pd.Series(range(7)),
                                    np.int64(7)])
def test_accepts_length_or_sized(series):
    splits = list(RollingOrigin(horizon=2, min_train=5).split(series))
    assert len(splits) == 2
    assert all(tr.dtype.kind == "i" and te.dtype.kind == "i" for tr, te in splits)


def test_brute_force_agreement():
    # Every combination against a direct enumeration of the definition.
    for n in range(2, 16):
        for h in (1, 2, 5):
            for m in range(1, n):
                for s in (1, 2, 3):
                    for w in (None, 1, m):
                        expect = []
                        origin = m
                        while origin < n:
                            start = 0 if w is None else origin - w
                            expect.append(
                                (list(range(start, origin)),
                                 list(range(origin, min(origin + h, n))))
                            )
                            origin += s
                        splitter = RollingOrigin(h, m, stride=s, window=w)
                        assert _as_lists(splitter, n) == expect
                        assert splitter.n_splits(n) == len(expect)


def test_too_short_series_message():
    splitter = RollingOrigin(horizon=2, min_train=5)
    with pytest.raises(ValueError, match=r"series has 5 points but min_train=5.*at least 6"):
        splitter.split(5)
    with pytest.raises(ValueError, match="min_train=5"):
        splitter.n_splits(np.arange(3))


@pytest.mark.parametrize(
    ("kwargs", "name"),
    [
        ({"horizon": 0, "min_train": 3}, "horizon"),
        ({"horizon": 2, "min_train": 0}, "min_train"),
        ({"horizon": 2, "min_train": 3, "stride": 0}, "stride"),
        ({"horizon": 2.0, "min_train": 3}, "horizon"),
        ({"horizon": True, "min_train": 3}, "horizon"),
        ({"horizon": 2, "min_train": 3, "window": 0}, "window"),
        ({"horizon": 2, "min_train": 3, "window": 4}, "window"),
    ],
)
def test_invalid_settings_named(kwargs, name):
    with pytest.raises(ValueError, match=name):
        RollingOrigin(**kwargs)


def test_split_rejects_non_length():
    with pytest.raises(ValueError, match="sized"):
        RollingOrigin(1, 2).split(3.5)
