"""NUTS in a batch: one compiled model for all series, the same posterior as the exact engine."""

import numpy as np
import pytest

from bayesgrowth.batch import BatchSettings, LocalExecutor, run_batch
from bayesgrowth.data.panel import invented_panel, read_panel

pytest.importorskip("nutpie", reason="nutpie is not installed: batch NUTS fits one by one")


@pytest.mark.slow
def test_compiled_batch_nuts_matches_the_exact_posterior(tmp_path):
    # Same model and priors, two engines: the exact engine integrates the posterior by
    # quadrature (independent draws), NUTS samples it. Series of 5, 9 and 14 points,
    # padded into one compiled model of 16 rows.
    frame = invented_panel(3, min_periods=5, max_periods=14, seed=21)
    panel, _ = read_panel(frame)
    lengths = sorted(s.n for s in panel.values())
    assert lengths[0] < lengths[-1]
    common = dict(horizon=2, seed=4, draws=1000, chains=4, model_options={"model": "exponential"})
    nuts = run_batch(panel, tmp_path / "nuts", BatchSettings(engine="nuts", tune=1000,
                     **common), executor=LocalExecutor(1))
    exact = run_batch(panel, tmp_path / "exact", BatchSettings(engine="exact", **common),
                      executor=LocalExecutor(1))
    n, e = nuts.summary.set_index("series"), exact.summary.set_index("series")
    assert (n["divergences"] == 0).all() and n["diagnostics_ok"].all()
    assert (n["engine"] == "nuts").all()
    sd = (e["growth_upper_95"] - e["growth_lower_95"]) / 3.92  # normal approximation
    # Monte Carlo sd of a median from ESS >= 400 NUTS draws: 1.25 sd / sqrt(400) = 0.06
    # sd, of the 2.5%/97.5% quantiles about 0.13 sd; the exact engine's 4,000
    # independent draws add less. Allowed: about 3 combined MC sd.
    assert np.all(np.abs(n["growth_median"] - e["growth_median"]) < 0.2 * sd)
    for col in ("growth_lower_95", "growth_upper_95"):
        assert np.all(np.abs(n[col] - e[col]) < 0.45 * sd)
    assert np.all(n["min_ess_bulk"] >= 400)
