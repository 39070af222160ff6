"""Ctrl-C and termination: exit 130 (143), one line, nothing that looks finished, nothing left.

The command-line cases send SIGINT to a real ``bayesgrowth`` process once it is at
work (its staging folder exists, the sampler has started, a batch chunk is done),
then check the exit code, the message, the output folder and that no process of
its session is left. The batch resume case runs in-process with a hook that
interrupts after the first chunk, so it is exact and quick.
"""

from __future__ import annotations

import signal
import subprocess
import sys
import threading
import time
from pathlib import Path

import pytest

from bayesgrowth.data.panel import invented_panel

DEMO = Path(__file__).resolve().parents[2] / "bayesgrowth" / "data" / "demo_revenue.csv"

pytestmark = pytest.mark.skipif(not sys.platform.startswith("linux"),
                                reason="signals and /proc: Linux")


class Cli:
    """A ``bayesgrowth`` process in its own session, its stderr read as it comes."""

    def __init__(self, *args: object, cwd: Path) -> None:
        self.proc = subprocess.Popen(
            [sys.executable, "-m", "bayesgrowth", *map(str, args)], cwd=cwd, text=True,
            stdout=subprocess.PIPE, stderr=subprocess.PIPE, start_new_session=True,
            # a shell starts background jobs with Ctrl-C ignored; a user's terminal does not
            preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL),
        )
        self.err: list[str] = []
        self._reader = threading.Thread(target=self._read, daemon=True)
        self._reader.start()

    def _read(self) -> None:
        for line in self.proc.stderr:
            self.err.append(line)

    def wait_for(self, ready, what: str, timeout: float = 60) -> None:
        end = time.monotonic() + timeout
        while not ready():
            assert self.proc.poll() is None, f"finished before {what}: {''.join(self.err)}"
            assert time.monotonic() < end, f"never {what}: {''.join(self.err)}"
            time.sleep(0.05)

    def stop(self, sig: int = signal.SIGINT, timeout: float = 30) -> tuple[int, str, list[str]]:
        self.proc.send_signal(sig)
        self.proc.wait(timeout=timeout)
        self._reader.join(timeout=5)
        return self.proc.returncode, self.proc.stdout.read(), self.err

    def leftover_processes(self) -> list[int]:
        """Processes of the command's session still running (workers that outlived it)."""
        end = time.monotonic() + 5
        while True:
            found = [pid for pid, sid in _sessions() if sid == self.proc.pid]
            if not found or time.monotonic() > end:
                return found
            time.sleep(0.1)


def _sessions() -> list[tuple[int, int]]:
    found = []
    for entry in Path("/proc").iterdir():
        if not entry.name.isdigit():
            continue
        try:
            stat = (entry / "stat").read_text()
        except OSError:
            continue
        fields = stat[stat.rindex(")") + 2:].split()
        if fields[0] != "Z":  # zombies are dead already
            found.append((int(entry.name), int(fields[3])))
    return found


def _stop_line(err: list[str], *fragments: str) -> str:
    lines = [line.rstrip("\n") for line in err]
    assert not any("Traceback" in line for line in lines), "".join(err)
    ours = [line for line in lines if line.startswith("bayesgrowth:")]
    assert len(ours) == 1 and lines[-1] == ours[0], lines[-5:]
    for fragment in fragments:
        assert fragment in ours[0], (fragment, ours[0])
    return ours[0]


def _hidden_leftovers(folder: Path) -> list[str]:
    return [str(p.relative_to(folder)) for p in folder.rglob(".bayesgrowth-*")
            if "stage" in p.name or "tmp" in p.name]


def test_nuts_interrupted_while_sampling_exits_130_and_writes_nothing(tmp_path):
    # PyMC catches KeyboardInterrupt and returns the chains so far; the run must stop instead
    (tmp_path / "tiny.csv").write_text("".join(DEMO.read_text().splitlines(True)[:9]))
    out = tmp_path / "out"
    cli = Cli("forecast", "tiny.csv", "-H", "4", "--engine", "nuts", "--model",
              "exponential", "--draws", "50000", "--chains", "2", "--cores", "2",
              "--out", out, cwd=tmp_path)
    cli.wait_for(lambda: any(line.startswith("NUTS: [") for line in cli.err), "sampling")
    time.sleep(0.3)
    code, stdout, err = cli.stop()
    assert code == 130, "".join(err)[-2000:]
    _stop_line(err, "interrupted", "no output written")
    assert stdout == ""
    assert not out.exists()  # the run created it, and takes it away again
    assert cli.leftover_processes() == []  # the chains' processes went with it


def _says(cli: Cli, start: str):
    return lambda: any(line.startswith(start) for line in cli.err)


def test_exact_backtest_interrupted_leaves_user_files_alone(tmp_path, snapshot):
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("the analyst's own file\n")
    data = tmp_path / "revenue.csv"
    data.write_bytes(DEMO.read_bytes())
    before, data_before = snapshot(out), data.read_bytes()
    cli = Cli("backtest", data, "-H", "4", "--min-train", "8", "--out", out, cwd=tmp_path)
    cli.wait_for(_says(cli, "backtesting "), "backtesting")
    time.sleep(0.3)  # inside the refits of the exact engine
    code, stdout, err = cli.stop()
    assert code == 130, "".join(err)[-2000:]
    _stop_line(err, "interrupted", "no output written")
    assert snapshot(out) == before  # no staging folder, no manifest, no output
    assert data.read_bytes() == data_before


def test_terminated_exact_forecast_exits_143_and_cleans_up(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    cli = Cli("forecast", DEMO, "-H", "8", "--draws", "30000", "--out", out, cwd=tmp_path)
    cli.wait_for(_says(cli, "fitting "), "fitting")
    time.sleep(0.2)
    code, stdout, err = cli.stop(signal.SIGTERM)
    assert code == 143, "".join(err)[-2000:]
    _stop_line(err, "terminated", "no output written")
    assert list(out.iterdir()) == []  # the staging folder went too


def test_batch_interrupted_keeps_finished_chunks_only_and_stops_workers(tmp_path):
    data = tmp_path / "panel.csv"
    invented_panel(120, min_periods=12, max_periods=16, seed=3).to_csv(data, index=False)
    out = tmp_path / "out"
    parts = out / ".bayesgrowth-batch" / "parts"
    cli = Cli("batch", data, "-H", "4", "--workers", "2", "--chunk-size", "2", "--quiet",
              "--out", out, cwd=tmp_path)
    cli.wait_for(lambda: parts.is_dir() and any(parts.glob("*.done.json")), "a chunk done")
    code, stdout, err = cli.stop()
    assert code == 130, "".join(err)[-2000:]
    _stop_line(err, "interrupted", "run the same command again to resume")
    assert not any((out / name).exists() for name in ("forecast.csv", "summary.csv",
                                                      "failures.csv"))
    done = {p.name.split(".")[0] for p in parts.glob("*.done.json")}
    assert done
    assert {p.name.split(".")[0] for p in parts.iterdir()} == done  # no partial chunk
    assert _hidden_leftovers(out) == []
    assert not (out / ".bayesgrowth-batch" / "lock").exists()
    assert cli.leftover_processes() == []  # the worker processes died with the run


def _interrupt_after_first_chunk(outcomes):
    raise KeyboardInterrupt


def test_interrupted_rerun_leaves_no_stale_results_and_resumes_exactly(tmp_path):
    from bayesgrowth.batch.executors import LocalExecutor
    from bayesgrowth.batch.runner import run_batch
    from bayesgrowth.batch.work import BatchSettings
    from bayesgrowth.data.panel import read_panel

    settings = BatchSettings(horizon=3, engine="exact", model_options={"model": "exponential"})

    def run(frame, out, hook=None):
        panel, bad = read_panel(frame)
        assert not bad
        return run_batch(panel, out, settings, executor=LocalExecutor(1), chunk_size=2,
                         save_posteriors=True, on_chunk=hook)

    first = invented_panel(10, min_periods=8, max_periods=12, seed=11)
    out = tmp_path / "out"
    run(first, out)
    before = {p.name: p.read_bytes() for p in (out / "posteriors").iterdir()}
    second = first.copy()
    names = list(second["series"].unique())
    moved = second["series"].isin(names[4:])  # six series change, four stay
    second.loc[moved, "value"] = second.loc[moved, "value"] * 1.5
    with pytest.raises(KeyboardInterrupt):
        run(second, out, _interrupt_after_first_chunk)
    # no merged result of the first run stays beside the second run's first chunk
    assert not any((out / n).exists() for n in ("forecast.csv", "summary.csv", "failures.csv"))
    now = {p.name: p.read_bytes() for p in (out / "posteriors").iterdir()}
    assert len(now) == 4 + 2  # the unchanged series' and the finished chunk's
    unchanged = [n for n in now if now[n] == before.get(n)]
    assert len(unchanged) == 4
    assert _hidden_leftovers(out) == []
    resumed = run(second, out)
    assert (resumed.n_skipped, resumed.n_fitted) == (6, 4)
    run(second, tmp_path / "fresh")
    for name in ("forecast.csv", "summary.csv", "failures.csv"):
        assert (out / name).read_bytes() == (tmp_path / "fresh" / name).read_bytes(), name


def test_a_sampler_that_stopped_early_is_never_taken_as_done():
    # PyMC and nutpie return fewer chains or draws after an interrupt they caught
    import xarray as xr

    from bayesgrowth.inference.interrupt import SamplingStopped, check_complete

    class Idata:
        posterior = xr.Dataset({"sigma": (("chain", "draw"), [[1.0] * 5] * 3)})

    check_complete(Idata, chains=3, draws=5)
    with pytest.raises(SamplingStopped, match="3 of 4 chains"):
        check_complete(Idata, chains=4, draws=5)
    with pytest.raises(KeyboardInterrupt, match="5 of 6 draws"):
        check_complete(Idata, chains=3, draws=6)


def test_a_daemon_thread_does_not_hold_back_the_quick_exit():
    # A progress bar's monitor is a daemon thread: the command still ends at once with its
    # code, skipping the interpreter's teardown (which would run the __del__ below). Under
    # load, the ordinary exit it took before sometimes ended a backtest stopped by Ctrl-C
    # with signal 2 instead of 130 (Python re-sends SIGINT to itself at the end of a
    # program run with -m when it saw an interrupt it counts as unhandled).
    code = (
        "import threading, time\n"
        "class Torn:\n"
        "    def __del__(self):\n"
        "        print('torn down', flush=True)\n"
        "kept = Torn()\n"
        "threading.Thread(target=time.sleep, args=(60,), daemon=True).start()\n"
        "from bayesgrowth.cli.main import end_process\n"
        "end_process(130)\n")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=60)
    assert proc.returncode == 130, proc.stderr[-2000:]
    assert "torn down" not in proc.stdout
