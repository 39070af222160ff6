"""Dataclass fields computed when first read: draws that most results never need.

The exact engine's bands, probabilities and tables come from its grid posterior, so the
posterior draws of a fit and the predictive paths of a forecast are made only when some
consumer reads them. Such a field holds a :class:`Deferred` until then; the field's
:class:`LazyField` descriptor computes it on first access, and every later read, copy,
``dataclasses.replace`` or pickle sees the plain value. The numbers are the same as if
they had been computed at once: each deferred computation owns its random stream.
"""

from __future__ import annotations

import threading
from collections.abc import Callable, Mapping

__all__ = ["Deferred", "DeferredMapping", "LazyField"]


class Deferred:
    """A computation run once, on first use, returning a tuple of field values.

    Thread-safe: a second thread waits for the first one's result.
    """

    def __init__(self, make: Callable[[], tuple]) -> None:
        self._make, self._out = make, None
        self._lock = threading.Lock()

    def get(self, index: int):
        """Item ``index`` of the computation's result (computed now if not yet)."""
        if self._out is None:
            with self._lock:
                if self._out is None:
                    self._out = self._make()
                    self._make = None
        return self._out[index]

    def __getstate__(self) -> dict:  # pickled (to a worker, say) as the values themselves
        self.get(0)
        return {"_make": None, "_out": self._out}

    def __setstate__(self, state: dict) -> None:
        self.__dict__.update(state)
        self._lock = threading.Lock()


class LazyField:
    """Descriptor for a dataclass field that may hold a :class:`Deferred` until read.

    ``index`` picks this field's item of the deferred result. As a descriptor-typed
    field, it raises ``AttributeError`` on class access, which tells
    :func:`dataclasses.dataclass` that the field has no default.
    """

    def __init__(self, index: int = 0) -> None:
        self._index = index
        self._key = ""

    def __set_name__(self, owner, name: str) -> None:
        self._key = "_" + name

    def __get__(self, obj, objtype=None):
        if obj is None:
            raise AttributeError(self._key[1:])
        value = obj.__dict__[self._key]
        if isinstance(value, Deferred):
            value = obj.__dict__[self._key] = value.get(self._index)
        return value

    def __set__(self, obj, value) -> None:
        obj.__dict__[self._key] = value


class DeferredMapping(Mapping):
    """A read-only mapping that is item ``index`` of a :class:`Deferred`.

    For a field that needs a default, which a :class:`LazyField` cannot give.
    """

    def __init__(self, deferred: Deferred, index: int) -> None:
        self._deferred, self._index = deferred, index

    def _items(self) -> Mapping:
        return self._deferred.get(self._index)

    def __getitem__(self, key):
        return self._items()[key]

    def __iter__(self):
        return iter(self._items())

    def __len__(self) -> int:
        return len(self._items())
