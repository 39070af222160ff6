"""Ctrl-C stops a sampler for real, and a sampler that stopped early is never taken as done.

PyMC and nutpie catch ``KeyboardInterrupt`` while sampling and return the draws
made so far: PyMC running chains one after another even goes on to the next
chain. A forecast from such a posterior would look finished with fewer chains or
draws than asked for. :func:`stoppable` makes an interrupt (and a termination
request the program handles) leave the sampler as an exception it does not catch,
raised again outside as the original signal's exception; :func:`check_complete`
refuses a posterior with fewer chains or draws than asked for.
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["SamplingStopped", "check_complete", "stoppable"]


class _Stop(BaseException):
    """Raised by the signal handler inside :func:`stoppable`; no sampler catches it."""

    def __init__(self, signum: int) -> None:
        super().__init__(signum)
        self.signum = signum


class SamplingStopped(KeyboardInterrupt):
    """The sampler returned fewer chains or draws than asked for: it was interrupted."""


@contextmanager
def stoppable() -> Iterator[None]:
    """Let SIGINT (and a handled SIGTERM) out of a sampler that would swallow it.

    Inside the block those signals raise an exception no sampler catches; on the
    way out the handler that was in place before is called, so the caller sees
    what it would have seen without samplers in between (``KeyboardInterrupt``
    for Ctrl-C). Signals left at their defaults or ignored are left alone, and
    outside the main thread nothing changes.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    old = {s: signal.getsignal(s) for s in (signal.SIGINT, signal.SIGTERM)}
    mine = [s for s, h in old.items() if callable(h)]

    def _raise(signum, frame):
        raise _Stop(signum)

    for s in mine:
        signal.signal(s, _raise)
    try:
        yield
    except _Stop as stop:
        for s in mine:
            signal.signal(s, old[s])
        old[stop.signum](stop.signum, None)  # raises the caller's exception
        raise KeyboardInterrupt from None  # a handler that returned: still stop here
    finally:
        for s in mine:
            signal.signal(s, old[s])


def check_complete(idata, chains: int, draws: int) -> None:
    """Raise :class:`SamplingStopped` when ``idata`` has fewer chains or draws than asked for.

    Parameters
    ----------
    idata : arviz.InferenceData
        A sampler's result, with a ``posterior`` group of dimensions ``chain`` and
        ``draw``.
    chains, draws : int
        What the sampler was asked for.
    """
    sizes = idata.posterior.sizes
    got_chains, got_draws = int(sizes.get("chain", 0)), int(sizes.get("draw", 0))
    if got_chains < chains or got_draws < draws:
        raise SamplingStopped(
            f"sampling stopped early: {got_chains} of {chains} chains, {got_draws} of "
            f"{draws} draws each"
        )
