"""What a command says on stderr while it works: progress, and notes about the data.

``--quiet`` drops the progress messages (what is being fitted, progress bars). It never
drops a note about the user's data (missing periods, a series left out) or a caution
about the result: a quiet run is one without chatter, not one without warnings.
"""

from __future__ import annotations

import argparse
import sys

__all__ = ["QUIET_HELP", "add_quiet_option", "note", "say", "show_bars"]

#: The help of ``--quiet``, in every command that takes it.
QUIET_HELP = ("no progress messages; notes about the input data and cautions about the "
              "result are still printed")


def add_quiet_option(p: argparse.ArgumentParser) -> None:
    """``--quiet``: no progress messages (notes and cautions stay)."""
    p.add_argument("--quiet", action="store_true", help=QUIET_HELP)


def say(args, message: str) -> None:
    """Progress message on stderr, unless ``--quiet``."""
    if not getattr(args, "quiet", False):
        print(message, file=sys.stderr, flush=True)


def show_bars(args) -> bool:
    """Whether to draw progress bars: not ``--quiet``, and stderr is a terminal.

    A bar redraws its line with carriage returns, which a log file or a pipe keeps as
    hundreds of half-lines; there the progress messages (:func:`say`) are enough.
    """
    return not getattr(args, "quiet", False) and sys.stderr.isatty()


def note(message: str) -> None:
    """A note about the user's data on stderr, ``note: ...``, with or without ``--quiet``."""
    print(f"note: {message}", file=sys.stderr, flush=True)
