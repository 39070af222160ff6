"""Regenerate every image in docs/images/ from the bundled demo data, in the package's look.

Run from the repository root::

    python docs/make_images.py            # every image (several minutes: NUTS fits)
    python docs/make_images.py --fast     # leave out the NUTS-only images; they stay as they are
    python docs/make_images.py --only fan_chart.png report.png

Every figure uses a fixed seed and the invented demo series, except calibration_gdp.png
(US real GDP from statsmodels' macrodata, public domain; needs statsmodels). It also rewrites
docs/example-report.html (make_report.py: the report of the command written there); report.png
is the top of that page, screenshot by headless Chromium (Debian's ``chromium`` package);
without Chromium it is skipped with a note. The numbers quoted in the guide pages are printed
on the way.
"""

from __future__ import annotations

import argparse
import shutil
import subprocess
import sys
import tempfile
import time
from collections.abc import Callable
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))  # the per-page scripts beside this one

import make_calibration_figures  # noqa: E402
import make_figures  # noqa: E402
import make_model_figures  # noqa: E402
import make_report  # noqa: E402

IMAGES = HERE / "images"

#: Width and height of the report screenshot, in CSS pixels.
REPORT_WINDOW = (1200, 1100)


def report_screenshot(images: Path = IMAGES) -> list[str]:
    """docs/example-report.html (see make_report.py) and report.png, the top of that page."""
    page = make_report.example_page()
    make_report.PAGE.write_text(page, encoding="utf-8")
    chrome = shutil.which("chromium") or shutil.which("chromium-browser")
    if chrome is None:
        print("report.png: skipped, no Chromium on this machine (apt-get install chromium)")
        return ["../example-report.html"]
    with tempfile.TemporaryDirectory() as tmp:
        html_path = Path(tmp) / "report.html"
        html_path.write_text(page, encoding="utf-8")
        shot = Path(tmp) / "report.png"
        subprocess.run(
            [chrome, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
             "--disable-background-networking", "--disable-component-update", "--disable-sync",
             "--hide-scrollbars", f"--user-data-dir={Path(tmp) / 'profile'}",
             f"--window-size={REPORT_WINDOW[0]},{REPORT_WINDOW[1]}", f"--screenshot={shot}",
             html_path.as_uri()],
            capture_output=True, timeout=180, check=False,
        )
        if not shot.exists():
            raise RuntimeError("report.png: Chromium wrote no screenshot")
        shutil.copyfile(shot, images / "report.png")
    return ["../example-report.html", "report.png"]


def _comparison(images: Path) -> list[str]:
    return make_figures.comparison(images)[0]


#: Every image maker: (files it writes, function, whether it needs NUTS fits).
MAKERS: list[tuple[tuple[str, ...], Callable[[Path], list[str]], bool]] = [
    (("fan_chart.png",), make_figures.fan_chart, False),
    (("comparison.png",), _comparison, False),
    (("report.png", "example-report.html"), report_screenshot, False),
    (("scenario.png",), make_figures.scenario_chart, False),
    (("calibration_demo.png", "backtest_fans_demo.png"), make_calibration_figures.demo_figures,
     False),
    (("calibration_gdp.png",), make_calibration_figures.gdp_figure, False),
    (("prior_predictive.png", "prior_predictive_logistic.png"),
     make_model_figures.prior_predictive_figures, False),
    (("prior_sensitivity.png",), make_model_figures.sensitivity_figure, False),
    (("prior_sensitivity_ceiling.png",), make_model_figures.ceiling_figure, True),
    (("models.png",), make_model_figures.models_figure, True),
]


def main(argv: list[str] | None = None) -> int:
    """Regenerate the images asked for; returns the exit code."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--fast", action="store_true",
                        help="leave out the images that need NUTS fits (they stay as they are)")
    parser.add_argument("--only", nargs="+", metavar="NAME", default=None,
                        help="regenerate only these files of docs/images/")
    args = parser.parse_args(argv)
    known = {name for names, _, _ in MAKERS for name in names}
    unknown = sorted(set(args.only or ()) - known)
    if unknown:
        print(f"make_images: --only {' '.join(unknown)}: not an image this script makes; "
              f"choose from {', '.join(sorted(known))}", file=sys.stderr)
        return 2
    IMAGES.mkdir(exist_ok=True)
    written, kept = [], []
    for names, make, slow in MAKERS:
        if args.only is not None and not set(names) & set(args.only):
            continue
        if slow and args.fast:
            kept += names
            continue
        start = time.monotonic()
        done = make(IMAGES)
        written += done
        print(f"== wrote {', '.join(done) or 'nothing'} in {time.monotonic() - start:.0f} s",
              flush=True)
    print(f"wrote {len(written)} image(s) to {IMAGES}: {', '.join(written)}")
    if kept:
        print(f"kept as they were (NUTS fits; run without --fast): {', '.join(kept)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
