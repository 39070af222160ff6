"""The example scripts run (fast settings), so they never rot."""

import subprocess
import sys
from pathlib import Path

import pytest

EXAMPLES = sorted((Path(__file__).resolve().parents[1] / "examples").glob("*.py"))


@pytest.mark.parametrize("script", EXAMPLES, ids=[p.name for p in EXAMPLES])
def test_example_runs(tmp_path, script):
    proc = subprocess.run([sys.executable, str(script), "--fast", "--out", str(tmp_path)],
                          capture_output=True, text=True, timeout=600, check=False,
                          env={**__import__("os").environ, "MPLBACKEND": "Agg"})
    assert proc.returncode == 0, proc.stderr[-2000:]
    assert any(tmp_path.iterdir())
