"""Layering: reading data, the exact engine, least squares and plotting never import PyMC;
the exact engine's forecast command imports no scipy either."""

import subprocess
import sys


def test_exact_path_does_not_import_pymc_or_arviz():
    code = (
        "import sys, matplotlib; matplotlib.use('Agg')\n"
        "import bayesgrowth as bg\n"
        "from bayesgrowth.leastsq import compare_fits\n"
        "s = bg.load_demo()\n"
        "fc = bg.GrowthModel(engine='exact', seed=1).fit(s).forecast(4)\n"
        "bg.plot_fan(fc)\n"
        "compare_fits(s.t, s.values, 4)\n"
        "print(sorted(m for m in ('pymc', 'pytensor', 'arviz') if m in sys.modules))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True).stdout
    assert out.strip() == "[]"


def test_public_api_is_listed():
    import bayesgrowth as bg

    for name in bg.__all__:
        assert hasattr(bg, name), name


def _modules_after(code: str) -> set[str]:
    out = subprocess.run([sys.executable, "-c", code + "\nprint(' '.join(sys.modules))"],
                         capture_output=True, text=True, check=True).stdout
    return set(out.splitlines()[-1].split())


def test_the_package_front_loads_names_on_first_use():
    loaded = _modules_after(
        "import sys\nimport bayesgrowth as bg\nassert 'numpy' not in sys.modules\n"
        "import bayesgrowth.backtest.runner, bayesgrowth.forecast.forecast\n"
        "assert bg.backtest.__module__ == 'bayesgrowth.backtest.runner', bg.backtest\n"
        "assert bg.forecast.__module__ == 'bayesgrowth.forecast.forecast', bg.forecast\n"
        "assert bg.data.__name__ == 'bayesgrowth.data'"
    )
    assert "bayesgrowth.backtest.runner" in loaded


def test_exact_forecast_command_loads_no_sampler_netcdf_or_backtest(tmp_path):
    from bayesgrowth.data.demo import demo_path

    loaded = _modules_after(
        "import sys\nfrom bayesgrowth.cli import main\n"
        f"assert main(['forecast', {str(demo_path())!r}, '-H', '2', '--out', "
        f"{str(tmp_path / 'out')!r}, '--quiet']) == 0"
    )
    assert (tmp_path / "out" / "forecast.csv").exists()
    heavy = {"pymc", "pytensor", "arviz", "xarray", "dask", "matplotlib.pyplot",
             "bayesgrowth.backtest", "bayesgrowth.scoring", "bayesgrowth.select"}
    assert heavy & loaded == set()


def test_exact_forecast_commands_load_no_scipy(tmp_path):
    # scipy.special alone costs about 0.1 s of a one-second command (benchmarks/forecast.py)
    from bayesgrowth.data.demo import demo_path

    runs = [[], ["--model", "exponential"], ["--model", "exponential", "--errors", "ar1"]]
    loaded = _modules_after(
        "import sys\nfrom bayesgrowth.cli import main\n"
        + "".join(f"assert main(['forecast', {str(demo_path())!r}, '-H', '2', '--out', "
                  f"{str(tmp_path / str(i))!r}, '--quiet', *{extra!r}]) == 0\n"
                  for i, extra in enumerate(runs))
    )
    assert all((tmp_path / str(i) / "forecast.csv").exists() for i in range(len(runs)))
    assert {m for m in loaded if m.split(".")[0] in ("scipy", "pymc", "pytensor", "arviz")} == set()


def test_default_priors_command_loads_no_pymc(tmp_path):
    # the default model's prior check draws in NumPy (bayesgrowth.forecast.prior_draws)
    from bayesgrowth.data.demo import demo_path

    loaded = _modules_after(
        "import sys\nfrom bayesgrowth.cli import main\n"
        f"assert main(['priors', {str(demo_path())!r}, '-H', '2', '--out', "
        f"{str(tmp_path / 'p')!r}, '--quiet']) == 0"
    )
    assert (tmp_path / "p" / "prior_predictive.csv").exists()
    assert {m for m in loaded if m.split(".")[0] in ("pymc", "pytensor", "arviz")} == set()
