"""Atomic output: every file of a run appears together, or none does."""

from __future__ import annotations

import os
import shutil
import tempfile
from collections.abc import Iterator
from contextlib import contextmanager
from pathlib import Path

from bayesgrowth.data.series import InputError

__all__ = ["staged_output"]


@contextmanager
def staged_output(out_dir: str | Path, names: list[str], protect: list[Path]) -> Iterator[Path]:
    """Stage files in a temporary folder and move them into ``out_dir`` only on success.

    Parameters
    ----------
    out_dir : path
        Destination folder; created if missing (and removed again on failure).
    names : list of str
        File names the run will write; checked against ``protect`` first.
    protect : list of Path
        Files that must never be overwritten (the user's input).

    Yields
    ------
    Path
        The staging folder to write into, on the same file system as ``out_dir``.
    """
    out = Path(out_dir)
    if out.exists() and not out.is_dir():
        raise InputError(f"--out {out}: exists and is not a folder; name a folder")
    protected = {p.resolve() for p in protect}
    for name in names:
        if (out / name).resolve() in protected:
            raise InputError(
                f"--out {out}: writing {name} there would overwrite the input file; "
                "choose another folder"
            )
    created = not out.exists()
    parent = out.resolve().parent
    if not parent.exists():
        raise InputError(f"--out {out}: parent folder {parent} does not exist")
    stage = Path(tempfile.mkdtemp(prefix=".bayesgrowth-", dir=parent))
    try:
        yield stage
        out.mkdir(exist_ok=True)
        for name in names:
            src = stage / name
            if src.exists():
                os.replace(src, out / name)
    except BaseException:
        if created and out.exists() and not any(out.iterdir()):
            out.rmdir()
        raise
    finally:
        shutil.rmtree(stage, ignore_errors=True)
