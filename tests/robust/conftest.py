"""Helpers for the robustness tests: run the real command line, and see what it touched."""

from __future__ import annotations

import hashlib
import subprocess
import sys
from collections.abc import Callable
from pathlib import Path

import pytest


def _run(*args: object, cwd: Path | None = None) -> subprocess.CompletedProcess:
    return subprocess.run(
        [sys.executable, "-m", "bayesgrowth", *map(str, args)],
        capture_output=True, text=True, cwd=cwd, timeout=600,
    )


def _snapshot(folder: Path) -> dict[str, str]:
    """SHA-256 of every file below ``folder`` (hidden ones too), by relative path."""
    return {
        str(p.relative_to(folder)): hashlib.sha256(p.read_bytes()).hexdigest()
        for p in sorted(folder.rglob("*")) if p.is_file()
    }


def _user_error(proc: subprocess.CompletedProcess, *fragments: str) -> str:
    """Check the contract for bad input: exit 2, one plain line on stderr naming the fault."""
    assert proc.returncode == 2, (proc.returncode, proc.stderr)
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert lines[0].startswith("bayesgrowth: error: "), lines[0]
    assert "Traceback" not in proc.stderr and "Error:" not in lines[0], lines[0]
    for fragment in fragments:
        assert fragment in lines[0], (fragment, lines[0])
    return lines[0]


@pytest.fixture
def run_cli() -> Callable[..., subprocess.CompletedProcess]:
    """Run ``python -m bayesgrowth ARGS`` in a fresh process; returns the finished process."""
    return _run


@pytest.fixture
def snapshot() -> Callable[[Path], dict[str, str]]:
    """Fingerprints of every file below a folder, to show nothing was written or lost."""
    return _snapshot


@pytest.fixture
def user_error() -> Callable[..., str]:
    """Assert exit 2 with one ``bayesgrowth: error:`` line holding every fragment."""
    return _user_error
