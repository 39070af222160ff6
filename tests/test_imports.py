"""Layering: reading data, the exact engine, least squares and plotting never import PyMC."""

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
