"""``--sheet``: the sheet of an ``.xlsx`` workbook a command reads."""

from __future__ import annotations

import argparse

__all__ = ["add_sheet_option"]


def add_sheet_option(p: argparse.ArgumentParser) -> None:
    """``--sheet NAME``: read that sheet of a workbook (refused for a CSV file)."""
    p.add_argument("--sheet", default=None, metavar="NAME",
                   help="sheet of an .xlsx workbook to read; an unknown name is refused with "
                   "the workbook's sheets listed [the first sheet; a note names it when the "
                   "workbook has several]")
