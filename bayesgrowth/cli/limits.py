"""Memory a run will need, checked against what the machine has before any work starts.

A forecast holds its predictive paths (draws x chains of them, each as long as the
history plus the horizon) several times over while it computes bands, targets and
charts, and the exact engine of the local trend keeps a mixture over its grid of
nodes for every forecast period. The byte counts below were measured with
``/usr/bin/time`` (peak resident memory) on invented series on Linux, numpy 2.4:

* 73 bytes per path value on the demo series (20 quarters, seasonal local trend:
  1.03 GB at 400,000 paths of 28 periods, 3.52 GB at 1.6 million), 36 on a
  six-point series; budgeted :data:`BYTES_PER_PATH_VALUE`.
* 170 bytes per grid node and forecast period (six points, horizon 500: 1.09 GB;
  the grid carried 9,420 nodes); budgeted :data:`BYTES_PER_GRID_VALUE` over
  :data:`GRID_NODES` nodes.
* About 230 MB for the program itself; budgeted :data:`BASE_BYTES`.

A run that would need more than :data:`SHARE` of the memory available (Linux:
``MemAvailable`` in ``/proc/meminfo``, and the container's limit if it sets one)
is refused with the limit and the largest ``--draws`` and ``--horizon`` that fit.
"""

from __future__ import annotations

import os
from pathlib import Path

from bayesgrowth.cli.common import UsageError

__all__ = ["available_memory", "check_memory", "check_run_size", "needed_bytes"]

BYTES_PER_PATH_VALUE = 80
BYTES_PER_GRID_VALUE = 200
GRID_NODES = 10_000
BASE_BYTES = 300 * 2**20
#: The share of the available memory one run may plan to use.
SHARE = 0.8


def _meminfo_available() -> int | None:
    try:
        for line in Path("/proc/meminfo").read_text().splitlines():
            if line.startswith("MemAvailable:"):
                return int(line.split()[1]) * 1024
    except (OSError, ValueError, IndexError):
        pass
    return None


def _cgroup_room() -> int | None:
    """Memory left under a cgroup v2 limit (containers, CI runners), if one is set."""
    root = Path("/sys/fs/cgroup")
    try:
        limit = (root / "memory.max").read_text().strip()
        if limit == "max":
            return None
        return int(limit) - int((root / "memory.current").read_text().strip())
    except (OSError, ValueError):
        return None


def available_memory() -> int | None:
    """Bytes of memory this process may still take, or ``None`` when the system does not say."""
    found = [m for m in (_meminfo_available(), _cgroup_room()) if m is not None]
    if not found and hasattr(os, "sysconf"):
        try:
            found.append(os.sysconf("SC_AVPHYS_PAGES") * os.sysconf("SC_PAGE_SIZE"))
        except (ValueError, OSError):
            pass
    return min(found) if found else None


def needed_bytes(paths: int, n_obs: int, horizon: int, grid: bool = True) -> int:
    """Estimated peak memory of one fit and forecast (see the module notes)."""
    need = BASE_BYTES + BYTES_PER_PATH_VALUE * paths * (n_obs + horizon)
    if grid:
        need += BYTES_PER_GRID_VALUE * GRID_NODES * horizon
    return need


def _gib(n: float) -> str:
    return f"{n / 2**30:,.1f} GiB"


def check_memory(*, draws: int, chains: int, n_obs: int, horizon: int, engine: str = "exact",
                 parallel: int = 1, available: int | None = None) -> None:
    """Refuse, before any work, a run that would need more memory than the machine has.

    Parameters
    ----------
    draws, chains : int
        Posterior draws per chain and chains: ``draws * chains`` predictive paths.
    n_obs, horizon : int
        Observed periods (the longest series for a batch) and forecast periods.
    engine : str
        ``"exact"`` adds the grid mixture of the local trend's exact engine.
    parallel : int
        Fits held in memory at once (batch worker processes).
    available : int, optional
        Bytes available; default :func:`available_memory`.

    Raises
    ------
    UsageError
        Stating the estimate, the limit, and the largest ``--draws`` and
        ``--horizon`` that fit.
    """
    available = available_memory() if available is None else available
    if available is None:
        return
    budget = SHARE * available / max(1, parallel)
    grid = engine == "exact"
    need = needed_bytes(draws * chains, n_obs, horizon, grid)
    if need <= budget:
        return
    room = budget - BASE_BYTES - (BYTES_PER_GRID_VALUE * GRID_NODES * horizon if grid else 0)
    max_draws = int(room / (BYTES_PER_PATH_VALUE * chains * (n_obs + horizon)))
    per_period = BYTES_PER_PATH_VALUE * draws * chains + (
        BYTES_PER_GRID_VALUE * GRID_NODES if grid else 0)
    max_horizon = int((budget - BASE_BYTES - BYTES_PER_PATH_VALUE * draws * chains * n_obs)
                      / per_period)
    ways = []
    if max_draws >= 1:
        ways.append(f"--draws {max_draws:,} or fewer")
    if max_horizon >= 1:
        ways.append(f"--horizon {max_horizon:,} or shorter")
    if parallel > 1:
        ways.append("fewer --workers")
    fix = " or ".join(ways) if ways else "a machine with more memory"
    workers = f" in each of {parallel} worker processes" if parallel > 1 else ""
    raise UsageError(
        f"--draws {draws:,} x --chains {chains} over {n_obs + horizon:,} periods "
        f"(--horizon {horizon:,}) would need about {_gib(need)} of memory{workers}, more than "
        f"the {_gib(budget)} this run may use ({SHARE:.0%} of the {_gib(available)} "
        f"available); use {fix}"
    )


def check_run_size(args, n_obs: int, parallel: int = 1) -> None:
    """:func:`check_memory` for the options of a command (those it has)."""
    horizon = getattr(args, "horizon", None)
    if not horizon or not hasattr(args, "draws"):
        return
    grid = getattr(args, "engine", "exact") == "exact" and getattr(
        args, "model", "local-trend") == "local-trend"
    check_memory(draws=args.draws, chains=getattr(args, "chains", 1), n_obs=n_obs,
                 horizon=horizon, engine="exact" if grid else "other", parallel=parallel)
