"""Regenerate docs/example-report.html: the report of the documented command on the demo series.

Run from the repository root::

    python docs/make_report.py              # docs/example-report.html (about half a minute)

``python docs/make_images.py`` runs it too (report.png is the top of this page). The page is
what :data:`COMMAND` writes, built through the command line's own option parsing, with the
time stamp fixed so that an unchanged package gives an unchanged page.
"""

from __future__ import annotations

import shlex
import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
PAGE = HERE / "example-report.html"

#: The command the example reproduces (the demo file ships inside the package).
COMMAND = ("bayesgrowth report bayesgrowth/data/demo_revenue.csv --horizon 8 --target 9000 "
           "--unit 'Revenue (EUR thousand)' --models exponential,local-trend --out report/")


def example_page(*, with_backtest: bool = True, with_models: bool = True) -> str:
    """The HTML page :data:`COMMAND` writes, time stamp "(example)".

    ``with_backtest=False`` and ``with_models=False`` leave those sections' work out (for a
    quick check of the rest against the shipped page).
    """
    from bayesgrowth.cli.common import checked_model_options, priors_from_args, read_input
    from bayesgrowth.cli.main import build_parser
    from bayesgrowth.cli.report_models import average_from_args
    from bayesgrowth.cli.text import unit_from_args
    from bayesgrowth.data.demo import demo_path
    from bayesgrowth.report import build_report

    argv = shlex.split(COMMAND)[1:]
    argv[1] = str(demo_path())
    args = build_parser().parse_args([*argv, "--quiet"])
    series = read_input(args)  # as the command reads it: named after the file
    priors = priors_from_args(args)
    spec_options = checked_model_options(args, (args.engine,))
    return build_report(
        series, args.horizon, engine=args.engine, seed=args.seed, priors=priors,
        levels=args.levels, target=args.target, target_probability=args.target_probability,
        command=COMMAND, unit=unit_from_args(args), timestamp="(example)",
        fit_options={"draws": args.draws, "chains": args.chains, **spec_options},
        average=average_from_args(args, series, priors) if with_models else None,
        with_backtest=with_backtest,
    )


def main() -> int:
    """Write docs/example-report.html."""
    PAGE.write_text(example_page(), encoding="utf-8")
    print(f"wrote {PAGE.relative_to(HERE.parent)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
