"""Property-based fuzzing of the command line with hypothesis: frames and options.

Random CSV files (column names, period labels, values with NaN, infinities, signs,
huge numbers, text, decimal commas and currency signs, three separators) and random
options go through ``bayesgrowth forecast`` on the exact engine. Whatever comes in,
the command must end with exit code 0 (all four outputs written) or 2 (one line on
stderr, nothing written), never 1 or a traceback, and the input must stay as it was.
Most examples run in-process through ``main(argv)``; a few hostile files go through a
real subprocess. Derandomised (the same examples on every run), about 20 s on one core.
"""

from __future__ import annotations

import contextlib
import io
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st

from bayesgrowth.cli.main import main

OUTPUTS = {"forecast.csv", "summary.json", "fan_chart.png"}  # posterior.nc on request

names = st.sampled_from(["period", "value", "Period", " value", "amount", "", "période",
                         "=cmd()", "value,1", 'va"lue'])
quarters = st.builds(lambda y, q: f"{y}Q{q}", st.integers(1990, 2030), st.integers(1, 4))
labels = st.one_of(
    st.integers(-5, 60).map(str),
    st.integers(-(2**70), 2**70).map(str),
    quarters,
    st.builds(lambda y, m: f"{y}-{m:02d}", st.integers(1990, 10050), st.integers(0, 13)),
    st.sampled_from(["FY24 Q1", "Q1 2024", "Jan 2024", "2024/01", "20240131", "", "NaT",
                     "１２", "1_100"]),
    st.text(max_size=8),
)
numbers = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.floats(1, 1e6).map(lambda v: f"{v:.2f}"),
    st.floats(1, 1e6).map(lambda v: f"{v:,.2f}"),
    st.floats(1, 1e6).map(lambda v: f"{v:.2f}".replace(".", ",")),
    st.floats(1, 1e6).map(lambda v: f"${v:.0f}"),
    st.sampled_from(["", "-3", "0", "1e308", "1e-320", "12%", "n/a", "inf", "1_100", "٣"]),
    st.text(max_size=6),
)


@st.composite
def growing(draw) -> list[tuple[str, str]]:
    """A plausible quarterly series, so that some examples get through to a forecast."""
    n = draw(st.integers(4, 14))
    start = draw(st.integers(2000, 2020))
    rate = draw(st.floats(-0.05, 0.2))
    level = draw(st.floats(10, 1e5))
    return [(f"{start + i // 4}Q{i % 4 + 1}", f"{level * (1 + rate) ** i:.2f}")
            for i in range(n)]


@st.composite
def frames(draw) -> str:
    sep = draw(st.sampled_from([",", ";", "\t"]))
    header = [draw(st.sampled_from(["period", "period", "Period", "quarter"])),
              draw(st.sampled_from(["value", "value", "revenue"]))]
    header += draw(st.lists(names, max_size=2))
    rows = draw(st.one_of(growing(), st.lists(st.tuples(labels, numbers), max_size=12)))
    lines = [sep.join(header)]
    for label, value in rows:
        cells = [label, value] + draw(st.lists(numbers, min_size=len(header) - 2,
                                               max_size=len(header) - 2))
        lines.append(sep.join(cells))
    return "\n".join(lines) + draw(st.sampled_from(["\n", "", "\r\n"]))


options = st.fixed_dictionaries({}, optional={
    "--horizon": st.one_of(st.integers(-2, 24), st.sampled_from([10**6, 10**12])).map(str),
    "--levels": st.sampled_from(["50,80,95", "90", "0", "100", "80,x", "99.9"]),
    "--draws": st.sampled_from(["50", "200", "0", "-1", "10000000000"]),
    "--model": st.sampled_from(["exponential", "local-trend", "logistic"]),
    "--decimal": st.sampled_from([".", ",", "auto"]),
    "--seed": st.sampled_from(["1", "-4", "x"]),
    "--target": st.sampled_from(["100", "inf", "nan", "-1", "0"]),
    "--period-col": st.sampled_from(["period", "quarter", "missing"]),
})


def _run(argv: list[str]) -> tuple[int, str]:
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        code = main(argv)
    return code, err.getvalue()


@settings(max_examples=80, deadline=None, derandomize=True, database=None,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])
@given(text=frames(), opts=options)
def test_any_frame_and_options_give_a_forecast_or_one_plain_line(text, opts):
    opts = {"--horizon": "4", "--draws": "200", **opts}
    with tempfile.TemporaryDirectory() as tmp:
        data, out = Path(tmp) / "input.csv", Path(tmp) / "out"
        data.write_bytes(text.encode("utf-8", "surrogatepass"))
        before = data.read_bytes()
        argv = ["forecast", str(data), "--out", str(out), "--quiet", "--accept-warnings"]
        code, err = _run(argv + [x for kv in opts.items() for x in kv])
        event(f"exit {code}")
        assert code in (0, 2), (code, err, text, opts)
        assert "Traceback" not in err
        assert data.read_bytes() == before  # the input is never touched
        written = {p.name for p in out.iterdir()} if out.exists() else set()
        if code == 2:
            lines = err.strip().splitlines()
            assert len(lines) == 1 and lines[0].startswith("bayesgrowth: error: "), err
            assert written == set()  # nothing half-written
        else:
            assert OUTPUTS <= written


HOSTILE = {
    "mixed.csv": "period,value\n2021Q1,12\n2021Q2,nan\n2021Q3,inf\n2021Q4,-5\n2022Q1,abc\n",
    "binary.csv": "\x00\x01\x02period,\xff\xfevalue\n\x00,\x00\n",
}


def test_hostile_files_through_a_real_process(tmp_path, run_cli):
    for name, text in HOSTILE.items():
        data = tmp_path / name
        data.write_text(text, encoding="utf-8", errors="surrogateescape")
        before = data.read_bytes()
        out = tmp_path / f"out-{name}"
        proc = run_cli("forecast", data, "-H", "3", "--out", out, "--quiet",
                       "--accept-warnings")
        assert proc.returncode in (0, 2), (name, proc.returncode, proc.stderr)
        assert "Traceback" not in proc.stderr
        assert data.read_bytes() == before
        if proc.returncode == 2:
            assert len(proc.stderr.strip().splitlines()) == 1, proc.stderr
            assert not out.exists()
