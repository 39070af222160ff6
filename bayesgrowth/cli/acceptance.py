"""Failed sampling diagnostics end a run with a non-zero exit code unless the user accepts them.

A run whose sampler did not converge (R-hat, effective sample size, divergent
transitions) still writes its outputs, which record the failure, but exits with
:data:`EXIT_DIAGNOSTICS` so that a script or a pipeline does not take the
forecast for a sound one. ``--accept-warnings`` turns that exit code into 0.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence

__all__ = ["EXIT_DIAGNOSTICS", "add_accept_option", "diagnostics_exit"]

#: Exit code of a finished run whose sampling diagnostics failed (not accepted).
EXIT_DIAGNOSTICS = 4

ACCEPT_HELP = (
    "finish with exit code 0 even when the sampling diagnostics (R-hat, effective sample "
    "size, divergent transitions) fail; without it such a run still writes its outputs, "
    f"which say that the diagnostics failed, but exits with code {EXIT_DIAGNOSTICS}"
)


def add_accept_option(p: argparse.ArgumentParser) -> None:
    """Register ``--accept-warnings`` on a subcommand that fits models."""
    p.add_argument("--accept-warnings", action="store_true", help=ACCEPT_HELP)


def diagnostics_exit(args: argparse.Namespace, problems: Sequence[str], out: object) -> int:
    """The exit code of a finished run, given its diagnostic problems (empty when sound).

    Parameters
    ----------
    args : argparse.Namespace
        The parsed options (``accept_warnings`` is read).
    problems : sequence of str
        One entry per failed check, in words; empty when every fit passed.
    out : path-like
        The output folder, named in the message.

    Returns
    -------
    int
        0 when nothing failed or the user accepted it, else :data:`EXIT_DIAGNOSTICS`;
        a one-line explanation goes to stderr in the second case.
    """
    if not problems:
        return 0
    shown = "; ".join(problems[:3]) + (" ..." if len(problems) > 3 else "")
    if getattr(args, "accept_warnings", False):
        print(f"bayesgrowth: sampling diagnostics failed ({shown}); accepted with "
              "--accept-warnings", file=sys.stderr)
        return 0
    print(f"bayesgrowth: sampling diagnostics failed ({shown}); the outputs in {out} are "
          "written but not to be trusted: rerun with more --draws or --chains, or pass "
          f"--accept-warnings to accept them (exit code {EXIT_DIAGNOSTICS})", file=sys.stderr)
    return EXIT_DIAGNOSTICS
