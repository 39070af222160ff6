"""The command line's argument parser: every usage error in one line, exit code 2."""

from __future__ import annotations

import argparse
import difflib
import re
import sys

__all__ = ["Parser", "UsageError", "nearest_choice"]


class UsageError(Exception):
    """Bad usage, reported in one line with exit code 2."""


class Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line (exit code 2).

    An option it does not know is named first, with the nearest one it knows, before
    any complaint about required options that the misspelling left out.
    """

    def error(self, message: str) -> None:  # noqa: D102 - one line, not a usage block
        raise UsageError(f"{self.prog}: {message}{nearest_choice(message)} (see --help)")

    def parse_known_args(self, args=None, namespace=None):  # noqa: D102
        if self._subparsers is None:  # a command's own parser sees all its options
            for token in sys.argv[1:] if args is None else args:
                if token == "--":
                    break
                name = token.split("=", 1)[0]
                if name.startswith("--") and not self._option_matches(name):
                    known = [o for a in self._actions for o in a.option_strings
                             if o.startswith("--")]
                    near = difflib.get_close_matches(name, known, n=1)
                    self.error(f"unknown option {name}" + (
                        f"; did you mean {near[0]}?" if near else ""))
        return super().parse_known_args(args, namespace)

    def _option_matches(self, name: str) -> bool:
        """Whether ``name`` is one of the options, or the start of one or more (an abbreviation)."""
        if name in self._option_string_actions:
            return True
        # several: argparse names them all
        return any(o.startswith(name) for o in self._option_string_actions)


def nearest_choice(message: str) -> str:
    """``"; did you mean 'forecast'?"`` for argparse's invalid-choice message, or ``""``."""
    got = re.match(r".*invalid choice: '([^']*)' \(choose from (.*)\)$", message)
    if not got:
        return ""
    near = difflib.get_close_matches(got[1], re.findall(r"'([^']*)'", got[2]), n=1)
    return f"; did you mean {near[0]!r}?" if near else ""
