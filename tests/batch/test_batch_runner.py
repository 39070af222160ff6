"""Batch runs: same results on any executor or chunking, resumable, failures listed."""

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.batch import BatchSettings, LocalExecutor, run_batch, series_seed
from bayesgrowth.batch.store import OUTPUTS, STATE_DIR
from bayesgrowth.data import InputError
from bayesgrowth.data.panel import read_panel

SETTINGS = BatchSettings(horizon=4, engine="exact", seed=3, draws=250)


def _files(folder):
    return {name: (folder / name).read_bytes() for name in OUTPUTS}


def test_bad_series_are_listed_and_good_ones_finish(tmp_path, panel_csv):
    panel, bad = read_panel(panel_csv)
    result = run_batch(panel, tmp_path / "out", SETTINGS, read_failures=bad,
                       executor=LocalExecutor(1))
    assert len(result.summary) == 12 and list(result.summary["series"]) == list(panel)
    assert len(result.forecast) == 12 * 4
    failures = pd.read_csv(tmp_path / "out" / "failures.csv")
    assert list(failures["series"]) == ["zero", "dup", "short"]
    # The zero value and the duplicate period name their row; the short series cannot.
    assert failures["reason"].str.contains(r"row \d+", regex=True).sum() == 2
    assert failures["reason"].str.contains("at least 3").sum() == 1
    forecast = pd.read_csv(tmp_path / "out" / "forecast.csv")
    assert list(forecast.columns[:5]) == ["series", "period", "step", "mean", "median"]
    summary = pd.read_csv(tmp_path / "out" / "summary.csv")
    for col in ("growth_median", "growth_lower_95", "growth_upper_95", "initial_value_median",
                "diagnostics_ok", "max_rhat", "min_ess_bulk", "divergences", "n_observations"):
        assert col in summary
    assert not result.ok


def test_rows_equal_the_single_series_forecast_with_the_derived_seed(tmp_path, good_csv):
    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.forecast import forecast
    from bayesgrowth.inference import fit_series

    panel, _ = read_panel(good_csv)
    result = run_batch(panel, tmp_path / "out", SETTINGS, executor=LocalExecutor(1))
    # without model options a batch fits the recommended model, as the command does
    assert SETTINGS.model_options == DEFAULT_MODEL
    name = list(panel)[2]
    fit = fit_series(panel[name], engine="exact", seed=series_seed(3, name), draws=250,
                     **DEFAULT_MODEL)
    table = forecast(fit, 4).table
    rows = result.forecast[result.forecast["series"] == name]
    # The merged files are written with 6 significant digits, as forecast.csv is.
    np.testing.assert_allclose(rows["median"].to_numpy(), table["median"], rtol=1e-5)
    np.testing.assert_allclose(rows["upper_95"].to_numpy(), table["upper_95"], rtol=1e-5)


def test_process_pool_and_chunking_give_identical_files(tmp_path, good_csv):
    panel, _ = read_panel(good_csv)
    run_batch(panel, tmp_path / "a", SETTINGS, executor=LocalExecutor(1), chunk_size=6)
    with LocalExecutor(2) as pool:
        run_batch(panel, tmp_path / "b", SETTINGS, executor=pool, chunk_size=1)
    assert _files(tmp_path / "a") == _files(tmp_path / "b")


def _blas_threads(chunk, arg):
    from threadpoolctl import threadpool_info

    return [pool["num_threads"] for pool in threadpool_info() if pool["user_api"] == "blas"]


def test_pool_workers_use_one_blas_thread_each():
    # The workers share the cores; a thread per core in each would oversubscribe them.
    with LocalExecutor(2) as pool:
        counts = [result for _, result in pool.run(_blas_threads, [0, 1], None)]
    assert counts and all(c and set(c) == {1} for c in counts), counts


class Stop(Exception):
    pass


def test_interrupted_run_resumes_to_the_uninterrupted_result(tmp_path, panel_csv):
    panel, bad = read_panel(panel_csv)
    run_batch(panel, tmp_path / "whole", SETTINGS, read_failures=bad,
              executor=LocalExecutor(1), chunk_size=2)

    seen = []

    def stop_after_two_chunks(outcomes):
        seen.append(outcomes)
        if len(seen) == 2:
            raise Stop

    out = tmp_path / "resumed"
    with pytest.raises(Stop):
        run_batch(panel, out, SETTINGS, read_failures=bad, executor=LocalExecutor(1),
                  chunk_size=2, on_chunk=stop_after_two_chunks)
    assert not (out / "forecast.csv").exists()  # nothing merged, nothing half-written
    assert len(list((out / STATE_DIR / "parts").glob("*.done.json"))) == 2
    with LocalExecutor(2) as pool:  # resume on another executor and chunking
        result = run_batch(panel, out, SETTINGS, read_failures=bad, executor=pool,
                           chunk_size=3)
    assert result.n_skipped == 4 and result.n_fitted == 8
    assert _files(out) == _files(tmp_path / "whole")
    again = run_batch(panel, out, SETTINGS, read_failures=bad, executor=LocalExecutor(1))
    assert again.n_fitted == 0 and again.n_skipped == 12
    assert _files(out) == _files(tmp_path / "whole")


def test_changed_series_is_refitted_and_changed_settings_refused(tmp_path, good_csv):
    panel, _ = read_panel(good_csv)
    out = tmp_path / "out"
    run_batch(panel, out, SETTINGS, executor=LocalExecutor(1))
    frame = pd.read_csv(good_csv)
    first = frame["series"].iloc[0]
    frame.loc[frame.index[0], "value"] *= 1.5
    changed, _ = read_panel(frame)
    result = run_batch(changed, out, SETTINGS, executor=LocalExecutor(1))
    assert result.n_fitted == 1 and result.n_skipped == len(panel) - 1
    run_batch(changed, tmp_path / "fresh", SETTINGS, executor=LocalExecutor(1))
    assert _files(out) == _files(tmp_path / "fresh")
    assert first in set(result.summary["series"])
    other = BatchSettings(horizon=5, engine="exact", seed=3, draws=250)
    with pytest.raises(InputError, match="other settings.*horizon was 4, now 5"):
        run_batch(panel, out, other, executor=LocalExecutor(1))


def test_foreign_results_and_the_input_are_never_overwritten(tmp_path, good_csv):
    panel, _ = read_panel(good_csv)
    out = tmp_path / "mine"
    out.mkdir()
    (out / "summary.csv").write_text("precious\n")
    with pytest.raises(InputError, match="no batch run wrote there"):
        run_batch(panel, out, SETTINGS, executor=LocalExecutor(1))
    assert (out / "summary.csv").read_text() == "precious\n"
    inside = tmp_path / "forecast.csv"
    inside.write_bytes(good_csv.read_bytes())
    with pytest.raises(InputError, match="overwrite the input"):
        run_batch(panel, tmp_path, SETTINGS, executor=LocalExecutor(1), protect=[inside])


def test_saved_posteriors_are_readable(tmp_path, good_csv):
    import arviz as az

    panel, _ = read_panel(good_csv)
    result = run_batch(dict(list(panel.items())[:2]), tmp_path / "out", SETTINGS,
                       executor=LocalExecutor(1), save_posteriors=True)
    for rel in result.summary["posterior_file"]:
        idata = az.from_netcdf(tmp_path / "out" / rel)
        assert idata.posterior["log1p_g"].shape == (4, 250)
        assert idata.posterior_predictive["value"].shape[-1] == 4
    assert not list((tmp_path / "out" / "posteriors").glob(".*"))  # no temporary file left
