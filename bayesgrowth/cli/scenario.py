"""``forecast --scenario-growth/--scenario-shock``: a stated adjustment beside the base case."""

from __future__ import annotations

import argparse
import math

from bayesgrowth.cli.common import UsageError
from bayesgrowth.report.words import band_phrases, fmt_number

__all__ = ["add_scenario_options", "scenario_from_args", "scenario_lines", "scenario_summary",
           "scenario_table"]

NAME = "scenario.csv"


def add_scenario_options(p: argparse.ArgumentParser) -> None:
    """Register the scenario options on ``forecast`` and ``demo``."""
    g = p.add_argument_group(
        "scenario (a stated 'what if', drawn beside the forecast; see docs/user-guide.md)")
    g.add_argument("--scenario-growth", type=_number, default=None, metavar="F",
                   help="multiply the forecast's growth per period by F (0.5: growth halves; "
                   "0: growth stops; -1: it turns into a decline as fast) from "
                   "--scenario-growth-from on")
    g.add_argument("--scenario-growth-from", default=None, metavar="PERIOD",
                   help="first period of the changed growth, e.g. 2027Q1 [the first "
                   "forecast period]")
    g.add_argument("--scenario-shock", type=_number, default=None, metavar="PCT",
                   help="a one-off change of the level by PCT percent in the period "
                   "--scenario-shock-in, kept afterwards (-10 takes 10%% off)")
    g.add_argument("--scenario-shock-in", default=None, metavar="PERIOD",
                   help="period of the shock, e.g. 2026Q3 [the first forecast period]")


def _number(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not math.isfinite(value):
        raise argparse.ArgumentTypeError(f"{text!r} is not a finite number")
    return value


def scenario_from_args(args, periods: list[str]):
    """The :class:`~bayesgrowth.forecast.scenario.Scenario` the options state, or ``None``.

    Parameters
    ----------
    args : argparse.Namespace
    periods : list of str
        The forecast periods, which any ``@PERIOD`` must name.
    """
    from bayesgrowth.forecast.scenario import Scenario

    growth, shock = getattr(args, "scenario_growth", None), getattr(args, "scenario_shock", None)
    for option, period, value in (
            ("--scenario-growth-from", args.scenario_growth_from, growth),
            ("--scenario-shock-in", args.scenario_shock_in, shock)):
        if period is not None and value is None:
            raise UsageError(f"{option}: only with {option.rsplit('-', 1)[0]}")
        if period is not None and period not in periods:
            raise UsageError(f"{option} {period}: not a forecast period; choose one from "
                             f"{periods[0]} to {periods[-1]}")
    if growth is None and shock is None:
        return None
    if getattr(args, "recalibrate", False):
        raise UsageError("--scenario-growth/--scenario-shock: not with --recalibrate; the "
                         "scenario shifts the model's own bands")
    try:
        return Scenario(growth_factor=1.0 if growth is None else growth,
                        growth_from=args.scenario_growth_from,
                        shock_pct=0.0 if shock is None else shock,
                        shock_at=args.scenario_shock_in)
    except ValueError as exc:
        raise UsageError(f"--scenario-shock {shock:g}: {exc}") from None


def scenario_table(base, scen):
    """scenario.csv: the scenario's table, with its median's change from the base case."""
    table = scen.table.copy()
    table.insert(4, "base_median", base.table["median"].to_numpy())
    table.insert(5, "change_from_base_pct",
                 100 * (table["median"] / table["base_median"] - 1))
    return table


def scenario_summary(base, scen, description: str) -> dict:
    """The ``scenario`` entry of summary.json."""
    last = scen.table.iloc[-1]
    base_median = float(base.table["median"].iloc[-1])
    return {
        "description": description,
        "period": str(last["period"]),
        "median": float(last["median"]),
        "bands": {str(lv): [float(last[f"lower_{lv}"]), float(last[f"upper_{lv}"])]
                  for lv in scen.levels},
        "change_from_base_pct": 100 * (float(last["median"]) / base_median - 1),
        "note": "a stated assumption applied to every predictive path, not a forecast of "
                "how likely it is",
    }


def scenario_lines(entry: dict, levels) -> list[str]:
    """The printed scenario line."""
    row = {f"lower_{lv}": lo for lv, (lo, _) in entry["bands"].items()}
    row.update({f"upper_{lv}": hi for lv, (_, hi) in entry["bands"].items()})
    change = entry["change_from_base_pct"]
    return [
        f"  scenario ({entry['description']}): {entry['period']} median "
        f"{fmt_number(entry['median'])} ({change:+.1f}% against the forecast); "
        + "; ".join(band_phrases(row, list(levels))),
        "  (a scenario is an assumption you state, applied to every path; it says nothing "
        "about how likely it is)",
    ]
