"""Command line interface (the only layer that parses arguments)."""

from bayesgrowth.cli.main import main

__all__ = ["main"]
