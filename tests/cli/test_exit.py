"""The program ends its process itself: exit handlers run, output is whole, threads are awaited."""

import subprocess
import sys

from bayesgrowth.data.demo import demo_path

PROGRAM = """
import atexit, sys, threading, time
from pathlib import Path
atexit.register(lambda: print("exit handler ran", file=sys.stderr))

def late(out):  # still busy when the command is done: its outputs appear, then half a second
    while not out.joinpath("forecast.csv").exists():
        time.sleep(0.01)
    time.sleep(0.5)
    out.parent.joinpath("late").touch()

if sys.argv.pop() == "thread":
    threading.Thread(target=late, args=(Path(sys.argv[-1]),)).start()
from bayesgrowth.cli import main
sys.exit(main())
"""


def _program(out, mode):
    return subprocess.run(
        [sys.executable, "-c", PROGRAM, "forecast", str(demo_path()), "-H", "2", "--out", str(out),
         mode], capture_output=True, text=True, timeout=120)


def test_program_runs_exit_handlers_and_prints_everything(tmp_path):
    # reference: the ordinary interpreter exit, which runs atexit handlers and flushes stdout
    proc = _program(tmp_path / "out", "alone")
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.rstrip().endswith(f"to {tmp_path / 'out'}")  # the last printed line
    assert "exit handler ran" in proc.stderr
    assert {p.name for p in (tmp_path / "out").iterdir()} >= {"forecast.csv", "summary.json",
                                                              "fan_chart.png"}


def test_program_waits_for_a_running_thread(tmp_path):
    # reference: an ordinary exit joins non-daemon threads; ending at once would lose their work
    proc = _program(tmp_path / "out", "thread")
    assert proc.returncode == 0, proc.stderr
    assert (tmp_path / "late").exists()
    assert "exit handler ran" in proc.stderr
