"""Interrupts and termination requests: stop cleanly, say so in one line, leave nothing behind.

Ctrl-C (SIGINT) raises ``KeyboardInterrupt`` as usual; :func:`handled_signals` makes a
termination request (SIGTERM) raise :class:`Terminated`, a kind of
``KeyboardInterrupt``, so the same clean-up runs (staging folders removed, worker
processes stopped) instead of the process vanishing mid-write. :func:`deferred`
holds both back while a run moves its finished files into place, so that a
folder is never left half old, half new.
"""

from __future__ import annotations

import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["EXIT_INTERRUPTED", "EXIT_TERMINATED", "Terminated", "deferred", "exit_code",
           "handled_signals", "stop_line"]

#: Exit codes of a run stopped by Ctrl-C and by a termination request (128 + signal).
EXIT_INTERRUPTED = 128 + signal.SIGINT
EXIT_TERMINATED = 128 + signal.SIGTERM


class Terminated(KeyboardInterrupt):
    """The process was asked to terminate (SIGTERM) while working."""


def _raise_terminated(signum, frame) -> None:
    raise Terminated()


def _main_thread() -> bool:
    return threading.current_thread() is threading.main_thread()


@contextmanager
def handled_signals() -> Iterator[None]:
    """While the block runs, SIGTERM raises :class:`Terminated` (unless it was ignored)."""
    if not _main_thread() or signal.getsignal(signal.SIGTERM) == signal.SIG_IGN:
        yield
        return
    old = signal.signal(signal.SIGTERM, _raise_terminated)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, old)


@contextmanager
def deferred() -> Iterator[None]:
    """Hold SIGINT and SIGTERM back while the block runs; act on them when it ends.

    For short steps that must not stop half-way, such as moving a run's finished
    files into place and recording them.
    """
    if not _main_thread():
        yield
        return
    caught: list[tuple[int, object]] = []
    old = {s: signal.getsignal(s) for s in (signal.SIGINT, signal.SIGTERM)}
    mine = [s for s, h in old.items() if callable(h)]
    for s in mine:
        signal.signal(s, lambda signum, frame: caught.append((signum, frame)))
    try:
        yield
    finally:
        for s in mine:
            signal.signal(s, old[s])
    if caught:
        signum, frame = caught[0]
        old[signum](signum, frame)


def exit_code(exc: KeyboardInterrupt) -> int:
    """130 for Ctrl-C, 143 for a termination request."""
    return EXIT_TERMINATED if isinstance(exc, Terminated) else EXIT_INTERRUPTED


def stop_line(exc: KeyboardInterrupt) -> str:
    """What the one line on stderr says after ``exc`` stopped a run (without the prefix).

    A run that was stopped after its outputs were moved into place carries the
    folder in ``exc.outputs_complete``; otherwise nothing was written.
    """
    what = "terminated" if isinstance(exc, Terminated) else "interrupted"
    done = getattr(exc, "outputs_complete", None)
    if done is not None:
        return f"{what} after the outputs were complete in {done}"
    detail = f" ({exc})" if str(exc) else ""
    return f"{what}{detail}; no output written"
