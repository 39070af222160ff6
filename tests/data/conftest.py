"""Fixtures of the reader's tests: a command run on a file that must be refused."""

from __future__ import annotations

from collections.abc import Callable

import pytest

from bayesgrowth.cli import main


@pytest.fixture
def refused(tmp_path, capsys) -> Callable[..., str]:
    """Run ``forecast`` on a file: exit 2, one line with every fragment, nothing written.

    Call it with the file's name, its text and the fragments the line must hold
    (``extra=`` more options); it returns the line.
    """
    def run(name: str, text: str | bytes, *fragments: str, extra=()) -> str:
        folder = tmp_path / "refused"
        folder.mkdir()
        src = folder / name
        src.write_bytes(text if isinstance(text, bytes) else text.encode())
        out = tmp_path / "refused-out"
        code = main(["forecast", str(src), "-H", "2", "--out", str(out), "--quiet", *extra])
        lines = capsys.readouterr().err.strip().splitlines()
        assert code == 2, lines
        assert len(lines) == 1 and lines[0].startswith("bayesgrowth: error: "), lines
        assert "Traceback" not in lines[0]
        missing = [f for f in fragments if f not in lines[0]]
        assert not missing, (missing, lines[0])
        assert not out.exists() and [p.name for p in folder.iterdir()] == [name]
        return lines[0]

    return run
