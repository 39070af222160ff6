"""Runaway sizes are refused before any work: exit 2, the limit and the way around it.

The memory estimate's byte counts are measurements (see bayesgrowth/cli/limits.py);
these tests check that the refusals happen, say what to change, and that the sizes
they suggest do fit the same budget. A period label far from the others is refused
by the calendar (tests/robust/test_exit_codes.py, "at most 10,000 periods").
"""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from bayesgrowth.cli.common import UsageError
from bayesgrowth.cli.limits import (
    BASE_BYTES,
    SHARE,
    available_memory,
    check_memory,
    needed_bytes,
)
from bayesgrowth.cli.main import main

DEMO = Path(__file__).resolve().parents[2] / "bayesgrowth" / "data" / "demo_revenue.csv"


@pytest.fixture
def counted(tmp_path) -> Path:
    """Periods numbered 1, 2, 3, ...: no calendar end stops a long horizon."""
    path = tmp_path / "counted.csv"
    path.write_text("period,value\n1,10\n2,12\n3,14\n4,17\n5,20\n6,24\n")
    return path


def _refused(capsys, argv: list[str], *fragments: str) -> str:
    code = main(argv)
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2 and len(err) == 1, err
    for fragment in fragments:
        assert fragment in err[0], (fragment, err[0])
    return err[0]


def test_a_huge_horizon_is_refused_with_the_longest_that_fits(counted, tmp_path, capsys):
    line = _refused(capsys, ["forecast", str(counted), "--horizon", "1000000", "--out",
                             str(tmp_path / "out")], "--horizon 1,000,000", "GiB of memory",
                    "available", "or shorter")
    assert "Traceback" not in line
    assert not (tmp_path / "out").exists()


def test_a_huge_draw_count_is_refused_with_the_most_that_fit(tmp_path, capsys):
    _refused(capsys, ["forecast", str(DEMO), "-H", "4", "--draws", "100000000", "--out",
                      str(tmp_path / "out")], "--draws 100,000,000", "--draws", "or fewer")
    _refused(capsys, ["demo", "--draws", "100000000", "--out", str(tmp_path / "demo")],
             "--draws 100,000,000")
    assert sorted(p.name for p in tmp_path.iterdir()) == []


def test_backtest_and_batch_check_before_any_work(tmp_path, capsys):
    _refused(capsys, ["backtest", str(DEMO), "-H", "4", "--min-train", "8", "--draws",
                      "100000000", "--out", str(tmp_path / "bt")], "--draws 100,000,000")
    panel = tmp_path / "panel.csv"
    panel.write_text("series,period,value\n" + "".join(
        f"{s},{t},{10 + t}\n" for s in ("a", "b") for t in range(1, 9)))
    _refused(capsys, ["batch", str(panel), "-H", "4", "--draws", "100000000", "--workers",
                      "2", "--out", str(tmp_path / "batch")], "in each of 2 worker processes",
             "fewer --workers")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["panel.csv"]


@pytest.mark.parametrize(("engine", "draws", "horizon"),
                         [("exact", 2 * 10**6, 100), ("nuts", 2 * 10**6, 100),
                          ("exact", 10**5, 10**5)])
def test_the_suggested_sizes_fit_the_budget_and_one_more_does_not(engine, draws, horizon):
    available = 64 * 2**30
    budget, grid, n = SHARE * available, engine == "exact", 20
    with pytest.raises(UsageError) as refused:
        check_memory(draws=draws, chains=4, n_obs=n, horizon=horizon, engine=engine,
                     available=available)
    text = str(refused.value)
    most = re.search(r"use --draws ([\d,]+) or fewer", text)
    longest = re.search(r"--horizon ([\d,]+) or shorter", text)
    assert most or longest, text
    if most:
        most = int(most.group(1).replace(",", ""))
        assert needed_bytes(4 * most, n, horizon, grid) <= budget
        assert needed_bytes(4 * (most + 1), n, horizon, grid) > budget
        check_memory(draws=most, chains=4, n_obs=n, horizon=horizon, engine=engine,
                     available=available)  # accepted
    if longest:
        longest = int(longest.group(1).replace(",", ""))
        assert needed_bytes(4 * draws, n, longest, grid) <= budget
        assert needed_bytes(4 * draws, n, longest + 1, grid) > budget


def test_a_run_of_the_default_size_is_accepted_and_memory_is_measured():
    available = available_memory()
    assert available is None or available > 0
    check_memory(draws=1000, chains=4, n_obs=40, horizon=8, available=4 * 2**30)
    assert needed_bytes(4000, 40, 8) > BASE_BYTES
