"""Regenerate the figures of docs/calibration.md and print the numbers quoted there.

Run ``python docs/make_images.py`` to regenerate every image, or
``python docs/make_calibration_figures.py`` for these; every backtest uses a fixed seed.
The demo series is invented; US real GDP comes from statsmodels' macrodata
(FRED, public domain) and needs statsmodels installed.
"""

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import pandas as pd  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.backtest import backtest  # noqa: E402
from bayesgrowth.plots.backtest import calibration_figure, fans_figure  # noqa: E402

IMAGES = Path(__file__).with_name("images")
METHODS = ("exact", "log-linear", "naive")


def _save(fig, name: str, images: Path = IMAGES) -> None:
    fig.savefig(images / name, dpi=100)
    plt.close(fig)


def _print(result) -> None:
    overall = result.scores[result.scores["step"] == "all"]
    cols = ["method", "n", "coverage_50", "coverage_80", "coverage_80_low", "coverage_80_high",
            "coverage_95", "crps", "pit_ks_pvalue", "verdict"]
    print(overall[cols].round(3).to_string(index=False))


def _gdp():
    from statsmodels.datasets import macrodata

    data = macrodata.load_pandas().data
    periods = [f"{int(y)}Q{int(q)}" for y, q in zip(data["year"], data["quarter"], strict=True)]
    frame = pd.DataFrame({"period": periods, "value": data["realgdp"]}).tail(60)
    return bg.read_series(frame, name="US real GDP 1994Q4-2009Q3")


def demo_figures(images: Path = IMAGES) -> list[str]:
    """calibration_demo.png and backtest_fans_demo.png: one backtest of the demo series."""
    demo = backtest(bg.load_demo(), methods=METHODS, horizon=4, min_train=8, seed=1)
    _print(demo)
    _save(calibration_figure(demo), "calibration_demo.png", images)
    _save(fans_figure(demo), "backtest_fans_demo.png", images)
    return ["calibration_demo.png", "backtest_fans_demo.png"]


def gdp_figure(images: Path = IMAGES) -> list[str]:
    """calibration_gdp.png: the backtest of US real GDP (needs statsmodels)."""
    gdp = backtest(_gdp(), methods=METHODS, horizon=4, min_train=20, seed=1)
    _print(gdp)
    _save(calibration_figure(gdp), "calibration_gdp.png", images)
    return ["calibration_gdp.png"]


def main() -> None:
    """Write the calibration figures to docs/images/."""
    IMAGES.mkdir(exist_ok=True)
    demo_figures()
    gdp_figure()


if __name__ == "__main__":
    main()
