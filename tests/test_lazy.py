"""Fields computed when first read (bayesgrowth.lazy), and the exact engine's use of them."""

from __future__ import annotations

import dataclasses
import pickle

import numpy as np

import bayesgrowth as bg
from bayesgrowth.lazy import Deferred, DeferredMapping, LazyField


@dataclasses.dataclass
class _Holder:
    a: object = LazyField(0)
    b: object = LazyField(1)
    c: int = 0


def test_deferred_runs_once_on_first_read_and_pickles_as_values():
    calls = []

    def make():
        calls.append(1)
        return np.arange(3), {"k": 2}

    d = Deferred(make)
    h = _Holder(a=d, b=d)
    assert calls == []
    assert h.a.tolist() == [0, 1, 2] and h.b == {"k": 2}
    assert calls == [1]
    h2 = pickle.loads(pickle.dumps(_Holder(a=Deferred(make), b=np.ones(2))))
    assert h2.a.tolist() == [0, 1, 2] and len(calls) == 2  # computed once, for the pickle
    assert dataclasses.replace(h, c=1).a is h.a
    m = DeferredMapping(Deferred(make), 1)
    assert len(calls) == 2 and dict(m) == {"k": 2} and "k" in m and len(calls) == 3


def test_plain_values_pass_through_and_fields_have_no_default():
    h = _Holder(a=1, b="x", c=2)
    assert (h.a, h.b, h.c) == (1, "x", 2)
    try:
        _Holder()
    except TypeError:
        pass
    else:
        raise AssertionError("a LazyField must be passed")


def test_exact_fit_and_forecast_draw_only_when_read_and_the_same_numbers():
    demo = bg.load_demo()
    fit = bg.fit_series(demo, engine="exact", seed=3, **bg.config.DEFAULT_MODEL)
    assert isinstance(fit.__dict__["_posterior"], Deferred)
    fc = bg.forecast(fit, 4)
    assert isinstance(fc.__dict__["_draws"], Deferred)
    table = fc.table  # from the mixture: no draws needed
    assert isinstance(fc.__dict__["_draws"], Deferred) and table.shape[0] == 4
    # the same seed gives the same draws whether read at once or after other work
    again = bg.forecast(bg.fit_series(demo, engine="exact", seed=3, **bg.config.DEFAULT_MODEL), 4)
    assert np.array_equal(again.draws, fc.draws)
    assert np.array_equal(again.fit.posterior["sigma"], fit.posterior["sigma"])
    assert np.array_equal(again.fit.extra["nodes"], fit.extra["nodes"])


def test_deferred_computes_once_when_threads_read_it_together():
    import threading
    import time

    calls = []

    def make():
        calls.append(1)
        time.sleep(0.05)  # long enough for every thread to arrive while it runs
        return (len(calls),)

    d = Deferred(make)
    seen = []
    threads = [threading.Thread(target=lambda: seen.append(d.get(0))) for _ in range(4)]
    for th in threads:
        th.start()
    for th in threads:
        th.join()
    assert calls == [1] and seen == [1, 1, 1, 1]
