"""Shared fixtures (seeded generators, the demo series, reference data, figure clean-up).

Also the run's resource summary: every process (the xdist controller and each
worker) measures its peak resident set size with ``resource.getrusage``
(``ru_maxrss``) and that of the largest subprocess it waited for (the CLI tests run
the real command); workers hand theirs to the controller through xdist's
``workeroutput``. The controller prints one line per process and the total time at
the end of every run, and fails the run when a process went above
:data:`MEMORY_LIMIT`.
"""

from __future__ import annotations

import os
import resource
import sys
import time
from pathlib import Path

import numpy as np
import pytest

os.environ.setdefault("MPLBACKEND", "Agg")

REPO = Path(__file__).resolve().parents[1]
#: shared/reference sits beside the repository (as laid out for developers and CI).
REFERENCE = REPO.parent / "shared" / "reference"
#: The most memory one test process may use (CI: 2 workers on a 7 GiB machine).
MEMORY_LIMIT = 4 * 1024**3
_STARTED = time.monotonic()
_WORKERS: dict[str, dict] = {}
#: Tests that raised their process's peak memory by more than this are named at the end.
PEAK_STEP = 256 * 2**20
_PEAK_TESTS: list[tuple[int, int, str]] = []  # (raise, new peak, test id)


@pytest.fixture
def rng() -> np.random.Generator:
    return np.random.default_rng(20261201)


@pytest.fixture(scope="session")
def reference_dir() -> Path:
    if not REFERENCE.is_dir():
        pytest.skip(f"reference data not found at {REFERENCE} (shared/ beside the repo)")
    return REFERENCE


@pytest.fixture(scope="session")
def demo():
    import bayesgrowth as bg

    return bg.load_demo()


@pytest.fixture(scope="session")
def demo_exact_fit(demo):
    from bayesgrowth.inference import fit_series

    return fit_series(demo, engine="exact", seed=7, model="exponential")


@pytest.fixture(autouse=True)
def _close_figures():
    yield
    import sys

    if "matplotlib.pyplot" in sys.modules:
        import matplotlib.pyplot as plt

        plt.close("all")


# --- peak memory and time of the run, printed in every log -------------------------------

def _measure() -> dict:
    scale = 1 if sys.platform == "darwin" else 1024  # ru_maxrss: KiB on Linux, bytes on macOS
    return {
        "self": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * scale,
        "children": resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss * scale,
        "seconds": time.monotonic() - _STARTED,
    }


def _summary(own: dict) -> tuple[list[str], list[str]]:
    gib = 1024**3
    lines, over = [], []
    for name, fig in [*sorted(_WORKERS.items()), ("controller" if _WORKERS else "main", own)]:
        lines.append(f"{name}: peak RSS {fig['self'] / gib:.2f} GiB, largest subprocess "
                     f"{fig['children'] / gib:.2f} GiB, {fig['seconds']:.0f} s")
        over += [f"{name} {'itself' if kind == 'self' else 'subprocess'} "
                 f"{fig[kind] / gib:.2f} GiB" for kind in ("self", "children")
                 if fig[kind] > MEMORY_LIMIT]
    lines.append(f"total time {own['seconds']:.0f} s ({own['seconds'] / 60:.1f} min); "
                 f"memory limit {MEMORY_LIMIT / gib:.0f} GiB per process")
    for step, peak, nodeid in sorted(_PEAK_TESTS, reverse=True)[:8]:
        lines.append(f"  raised its process's peak by {step / gib:.2f} to {peak / gib:.2f} GiB: "
                     f"{nodeid}")
    return lines, over


@pytest.hookimpl(hookwrapper=True)
def pytest_runtest_protocol(item, nextitem):
    before = _measure()["self"]
    yield
    after = _measure()["self"]  # a high-water mark: only a test that pushed it up shows here
    if after - before > PEAK_STEP:
        _PEAK_TESTS.append((after - before, after, item.nodeid))


def pytest_sessionfinish(session, exitstatus):
    figures = _measure()
    workeroutput = getattr(session.config, "workeroutput", None)
    if workeroutput is not None:  # an xdist worker: hand the figures to the controller
        workeroutput["bayesgrowth_resources"] = figures
        workeroutput["bayesgrowth_peak_tests"] = _PEAK_TESTS
        return
    lines, over = _summary(figures)
    session.config.stash[_RESOURCES] = (lines, over)
    if over:
        session.exitstatus = pytest.ExitCode.TESTS_FAILED


@pytest.hookimpl(optionalhook=True)
def pytest_testnodedown(node, error):
    figures = getattr(node, "workeroutput", {}).get("bayesgrowth_resources")
    if figures is not None:
        _WORKERS[node.gateway.id] = figures
    _PEAK_TESTS.extend(tuple(t) for t in
                       getattr(node, "workeroutput", {}).get("bayesgrowth_peak_tests", []))


def pytest_terminal_summary(terminalreporter, exitstatus, config):
    lines, over = config.stash.get(_RESOURCES, ([], []))
    if not lines:
        return
    terminalreporter.section("peak memory and time")
    for line in lines:
        terminalreporter.write_line(line)
    if over:
        terminalreporter.write_line(
            f"FAILED: above {MEMORY_LIMIT / 1024**3:.0f} GiB in one process: {'; '.join(over)}. "
            "Run that worker's tests alone (-n 0) and make the one that grew smaller.",
            red=True, bold=True,
        )


_RESOURCES = pytest.StashKey[tuple]()
