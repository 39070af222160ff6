"""Every JSON file the tool writes is valid JSON: no Infinity, no NaN.

Reference: RFC 8259, section 6: "Numeric values that cannot be represented in the
grammar below (such as Infinity and NaN) are not permitted." Python's ``json.loads``
accepts them by default, so the strict reader below refuses them itself.
"""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from bayesgrowth.data.export import NOT_AVAILABLE_KEY, json_text


def _not_json(constant: str):
    raise ValueError(f"{constant} is not a JSON number (RFC 8259, section 6)")


def strict_load(text: str):
    """Parse ``text`` as RFC 8259 JSON: Infinity, -Infinity and NaN are errors."""
    return json.loads(text, parse_constant=_not_json)


def test_strict_reader_refuses_what_python_writes_by_default():
    with pytest.raises(ValueError, match="RFC 8259"):
        strict_load(json.dumps({"x": float("inf")}))


def test_non_finite_numbers_become_null_with_a_reason():
    data = {"a": {"upper": float("inf"), "lower": -np.inf, "n": np.int64(3)},
            "b": [1.0, np.float32("nan"), (2, float("nan"))], "ok": 0.5, "s": "x"}
    back = strict_load(json_text(data))
    assert back["a"] == {"upper": None, "lower": None, "n": 3}
    assert back["b"] == [1.0, None, [2, None]]
    assert back["ok"] == 0.5 and back["s"] == "x"
    fields = {m["field"]: m["reason"] for m in back[NOT_AVAILABLE_KEY]}
    assert set(fields) == {"a.upper", "a.lower", "b[1]", "b[2][1]"}
    assert fields["a.upper"].startswith("infinite: above")
    assert fields["a.lower"].startswith("infinite: below")
    assert fields["b[1]"].startswith("not a number")
    assert NOT_AVAILABLE_KEY not in strict_load(json_text({"x": 1.0}))


def test_values_near_the_largest_double_are_refused(tmp_path, run_cli, snapshot, user_error):
    src = tmp_path / "huge.csv"
    src.write_text("period,value\n1,1e307\n2,5e307\n3,1.7e308\n4,1.7e308\n")
    before = snapshot(tmp_path)
    proc = run_cli("forecast", src, "--horizon", 4, "--out", tmp_path / "out", "--engine",
                   "exact")
    user_error(proc, "huge.csv, row 2, column 'value'", "1e307", "larger units")
    assert snapshot(tmp_path) == before  # nothing written, the input kept


def test_infinite_target_is_refused(tmp_path, run_cli, snapshot, user_error):
    src = tmp_path / "sales.csv"
    src.write_text("period,value\n2023Q1,100\n2023Q2,110\n2023Q3,121\n2023Q4,133\n")
    before = snapshot(tmp_path)
    proc = run_cli("forecast", src, "--horizon", 4, "--out", tmp_path / "out", "--engine",
                   "exact", "--target", "inf")
    user_error(proc, "--target inf", "finite value above 0")
    assert snapshot(tmp_path) == before


def _at(doc, field: str):
    """The value at a dotted field path such as ``final_period.upper_95`` or ``b[1]``."""
    for part in field.replace("[", ".[").split("."):
        doc = doc[int(part[1:-1])] if part.startswith("[") else doc[part]
    return doc


def test_overflowing_forecast_writes_null_and_the_reason(tmp_path, run_cli):
    """Values growing by ten orders of magnitude a period pass 1.8e308 within 30 periods."""
    src = tmp_path / "steep.csv"
    src.write_text("period,value\n" + "".join(f"{i},1e{49 + 10 * i}\n" for i in range(1, 6)))
    out = tmp_path / "out"
    proc = run_cli("forecast", src, "--horizon", 30, "--out", out, "--engine", "exact",
                   "--target", "1e300", "--quiet")
    assert proc.returncode == 0, proc.stderr
    summary = strict_load((out / "summary.json").read_text())
    listed = summary[NOT_AVAILABLE_KEY]
    assert {"final_period.mean", "final_period.upper_95"} <= {m["field"] for m in listed}
    for m in listed:
        assert _at(summary, m["field"]) is None and m["reason"]
    assert "do not exist" in proc.stdout and NOT_AVAILABLE_KEY in proc.stdout


def test_batch_state_files_are_strict_json(tmp_path, run_cli):
    src = tmp_path / "panel.csv"
    src.write_text("series,period,value\n" + "".join(
        f"{s},2021Q{q},{100 * k + 10 * q}\n" for k, s in enumerate("ab", 1) for q in (1, 2, 3, 4)))
    out = tmp_path / "out"
    proc = run_cli("batch", src, "--horizon", 2, "--out", out, "--workers", 1, "--quiet")
    assert proc.returncode == 0, proc.stderr
    files = list(Path(out).rglob("*.json"))
    assert len(files) >= 2  # the run's settings and at least one finished chunk
    for path in files:
        strict_load(path.read_text())
