"""Never replace a file the tool did not write; replace its own outputs; stage inside --out."""

from __future__ import annotations

import hashlib
import json
import os
import tempfile

import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.output import MANIFEST

QUARTERS = "period,value\n2023Q1,100\n2023Q2,110\n2023Q3,121\n2023Q4,133\n"
OUTPUTS = ["fan_chart.png", "forecast.csv", "summary.json"]  # posterior.nc on request


@pytest.fixture
def src(tmp_path):
    path = tmp_path / "sales.csv"
    path.write_text(QUARTERS)
    return path


def _argv(src, out, *extra):
    return ["forecast", str(src), "--horizon", "2", "--out", str(out), "--engine", "exact",
            "--quiet", *extra]


def test_own_outputs_are_replaced_and_recorded(tmp_path, src, run_cli):
    out = tmp_path / "out"
    for _ in range(2):  # the second run replaces what the first wrote
        proc = run_cli(*_argv(src, out))
        assert proc.returncode == 0, proc.stderr
    assert sorted(p.name for p in out.iterdir()) == sorted([MANIFEST, *OUTPUTS])
    recorded = json.loads((out / MANIFEST).read_text())["files"]
    assert sorted(recorded) == OUTPUTS


def _wrote(capsys) -> str:
    return capsys.readouterr().out.strip().splitlines()[-1]


def test_an_earlier_runs_posterior_goes_when_this_run_writes_none(tmp_path, src, capsys):
    out = tmp_path / "out"
    assert main(_argv(src, out, "--save-posterior")) == 0
    assert _wrote(capsys) == (f"wrote forecast.csv, summary.json, fan_chart.png, posterior.nc "
                              f"to {out}")
    assert "posterior.nc" in json.loads((out / MANIFEST).read_text())["files"]
    assert main(_argv(src, out)) == 0  # the exact engine's default: no posterior.nc
    assert _wrote(capsys) == (f"wrote forecast.csv, summary.json, fan_chart.png to {out} "
                              "(removed posterior.nc of an earlier run)")
    assert sorted(p.name for p in out.iterdir()) == sorted([MANIFEST, *OUTPUTS])
    assert sorted(json.loads((out / MANIFEST).read_text())["files"]) == OUTPUTS


def test_an_earlier_runs_scenario_goes_too(tmp_path, src, capsys):
    out = tmp_path / "out"
    assert main(_argv(src, out, "--scenario-growth", "0.5")) == 0
    assert (out / "scenario.csv").exists()
    assert main(_argv(src, out)) == 0
    assert _wrote(capsys).endswith("(removed scenario.csv of an earlier run)")
    assert not (out / "scenario.csv").exists()


def test_an_earlier_posterior_changed_since_is_kept(tmp_path, src, capsys, snapshot):
    out = tmp_path / "out"
    assert main(_argv(src, out, "--save-posterior")) == 0
    with (out / "posterior.nc").open("ab") as f:
        f.write(b"edited")
    kept = snapshot(out)["posterior.nc"]
    assert main(_argv(src, out)) == 0
    assert _wrote(capsys).endswith("(posterior.nc there: of an earlier run and changed since, "
                                   "left as it is)")
    assert snapshot(out)["posterior.nc"] == kept


def test_a_users_own_posterior_is_left_alone(tmp_path, src, capsys, snapshot):
    out = tmp_path / "out"
    out.mkdir()
    (out / "posterior.nc").write_text("mine\n")
    assert main(_argv(src, out)) == 0  # not an output of this run: no refusal, no removal
    assert _wrote(capsys) == f"wrote forecast.csv, summary.json, fan_chart.png to {out}"
    assert (out / "posterior.nc").read_text() == "mine\n"


@pytest.mark.parametrize("edited", ["forecast.csv", "summary.json"])
def test_a_users_file_is_never_replaced(tmp_path, src, run_cli, snapshot, user_error, edited):
    out = tmp_path / "out"
    out.mkdir()
    (out / edited).write_text("my own numbers\n")
    (out / "notes.txt").write_text("keep\n")
    before = snapshot(out)
    proc = run_cli(*_argv(src, out))
    user_error(proc, f"--out {out}: {edited} is already there and not written by bayesgrowth",
               "--force")
    assert snapshot(out) == before  # nothing written, nothing lost, no staging left


def test_an_output_changed_since_is_the_users(tmp_path, src, run_cli, snapshot, user_error):
    out = tmp_path / "out"
    assert run_cli(*_argv(src, out)).returncode == 0
    with (out / "forecast.csv").open("a") as f:
        f.write("a note of mine\n")
    before = snapshot(out)
    proc = run_cli(*_argv(src, out))
    user_error(proc, "forecast.csv is already there and changed since bayesgrowth wrote it",
               "--force")
    assert snapshot(out) == before


def test_force_replaces(tmp_path, src, run_cli):
    out = tmp_path / "out"
    out.mkdir()
    (out / "forecast.csv").write_text("old\n")
    (out / "notes.txt").write_text("keep\n")
    proc = run_cli(*_argv(src, out, "--force"))
    assert proc.returncode == 0, proc.stderr
    assert (out / "forecast.csv").read_text().startswith("period,step")
    assert (out / "notes.txt").read_text() == "keep\n"
    assert "forecast.csv" in json.loads((out / MANIFEST).read_text())["files"]


def test_a_folder_of_an_output_name_is_refused(tmp_path, src, run_cli, user_error):
    out = tmp_path / "out"
    (out / "forecast.csv").mkdir(parents=True)
    proc = run_cli(*_argv(src, out, "--force"))
    user_error(proc, "forecast.csv there is a folder")
    assert sorted(p.name for p in out.iterdir()) == ["forecast.csv"]


def test_missing_parent_is_refused(tmp_path, src, run_cli, user_error):
    proc = run_cli(*_argv(src, tmp_path / "no" / "out"))
    user_error(proc, "parent folder", "does not exist", "create it first")
    assert not (tmp_path / "no").exists()


def test_staging_happens_inside_the_output_folder(tmp_path, src, monkeypatch):
    out = tmp_path / "out"
    made = []
    real = tempfile.mkdtemp

    def spy(*args, **kwargs):
        made.append(kwargs.get("dir"))
        return real(*args, **kwargs)

    monkeypatch.setattr(tempfile, "mkdtemp", spy)
    assert main(_argv(src, out)) == 0
    assert made == [out]  # so a writable folder under a read-only parent works
    assert not [p for p in out.iterdir() if p.name.startswith(".bayesgrowth-stage")]


def test_unwritable_folder_fails_before_any_work(tmp_path, src, monkeypatch, capsys):
    import importlib

    cli_main = importlib.import_module("bayesgrowth.cli.main")

    def no_room(*args, **kwargs):
        raise PermissionError(13, "Permission denied")

    def computed(*args, **kwargs):
        raise AssertionError("fitted before checking the output folder")

    monkeypatch.setattr(tempfile, "mkdtemp", no_room)
    monkeypatch.setattr(cli_main, "fit_from_args", computed)
    out = tmp_path / "out"
    assert main(_argv(src, out)) == 2
    err = capsys.readouterr().err.strip()
    assert f"--out {out}: cannot write there (Permission denied)" in err
    assert not out.exists()  # the folder it created is gone again


def test_failure_inside_the_run_leaves_nothing(tmp_path, src, monkeypatch, capsys):
    import importlib

    from bayesgrowth.data.series import InputError

    fc_module = importlib.import_module("bayesgrowth.forecast.forecast")

    def fails(*args, **kwargs):
        raise InputError("a problem found late")

    monkeypatch.setattr(fc_module, "forecast", fails)
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("keep\n")
    assert main(_argv(src, out)) == 2
    assert [p.name for p in out.iterdir()] == ["notes.txt"]
    new = tmp_path / "new"
    assert main(_argv(src, new)) == 2
    assert not new.exists()
    capsys.readouterr()


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0,
                    reason="file permissions do not bind the superuser")
def test_read_only_parent_with_writable_output_folder(tmp_path, src, run_cli):
    parent = tmp_path / "locked"
    out = parent / "out"
    out.mkdir(parents=True)
    parent.chmod(0o555)
    try:
        proc = run_cli(*_argv(src, out))
    finally:
        parent.chmod(0o755)
    assert proc.returncode == 0, proc.stderr
    assert (out / "forecast.csv").exists()


@pytest.mark.parametrize("command, name, extra", [
    ("compare", "comparison.csv", ("--engine", "exact")),
    ("report", "report.html", ("--engine", "exact")),
    ("backtest", "backtest_scores.csv", ("--min-train", "12")),
    ("models", "models.png", ("--engine", "exact")),
])
def test_every_subcommand_keeps_a_users_file(tmp_path, run_cli, snapshot, user_error, command,
                                             name, extra):
    from bayesgrowth.data.demo import demo_path

    out = tmp_path / "out"
    out.mkdir()
    (out / name).write_text("mine\n")
    before = snapshot(out)
    proc = run_cli(command, demo_path(), "--horizon", 2, "--out", out, *extra)
    user_error(proc, f"{name} is already there and not written by bayesgrowth", "--force")
    assert snapshot(out) == before


def test_an_input_named_like_an_earlier_output_is_never_removed(tmp_path, capsys):
    # contrived on purpose: the input sits in --out under the name of a file an earlier
    # run wrote there and this run does not write; it is the user's input, so it stays
    out = tmp_path / "out"
    src = out / "scenario.csv"
    out.mkdir()
    src.write_text(QUARTERS)
    manifest = {"written_by": "bayesgrowth",
                "files": {"scenario.csv": hashlib.sha256(QUARTERS.encode()).hexdigest()}}
    (out / MANIFEST).write_text(json.dumps(manifest))
    assert main(_argv(src, out)) == 0
    assert src.read_text() == QUARTERS
    capsys.readouterr()
