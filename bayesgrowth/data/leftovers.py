"""Temporary files and folders of runs that were killed before they could clean up.

A run names its temporary files and folders ``<prefix><pid>-<random>``, with its
process id. A run killed outright (out of memory, ``kill -9``, a power cut) leaves
them behind; the next run in the same folder removes those whose process is gone
and leaves those of runs still at work alone.
"""

from __future__ import annotations

import os
import shutil
from pathlib import Path

__all__ = ["TMP_PREFIX", "pid_alive", "remove_abandoned", "temp_prefix"]

#: Start of the names of temporary files written beside their final place.
TMP_PREFIX = ".bayesgrowth-tmp-"


def pid_alive(pid: int) -> bool:
    """Whether a process with this id exists (on this machine)."""
    if pid <= 0:
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except OSError:  # it exists but belongs to someone else
        return True
    return True


def temp_prefix(prefix: str) -> str:
    """``prefix`` followed by this process's id: the start of a temporary name."""
    return f"{prefix}{os.getpid()}-"


def remove_abandoned(folder: str | Path, prefix: str) -> list[Path]:
    """Remove the files and folders named ``<prefix><pid>-...`` whose process is gone.

    Returns
    -------
    list of Path
        What was removed.
    """
    removed = []
    for path in Path(folder).glob(f"{prefix}*"):
        pid = path.name[len(prefix):].split("-", 1)[0]
        if not pid.isdigit() or pid_alive(int(pid)):
            continue
        if path.is_dir() and not path.is_symlink():
            shutil.rmtree(path, ignore_errors=True)
        else:
            path.unlink(missing_ok=True)
        removed.append(path)
    return removed
