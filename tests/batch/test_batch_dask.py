"""The Dask executor gives the local executor's results, on a two-worker local cluster."""

import pytest

from bayesgrowth.batch import BatchSettings, DaskExecutor, LocalExecutor, run_batch
from bayesgrowth.batch.store import OUTPUTS
from bayesgrowth.data.panel import read_panel

distributed = pytest.importorskip(
    "dask.distributed", reason="dask.distributed is not installed (pip install 'bayesgrowth[dask]')"
)


def test_dask_cluster_matches_local_executor(tmp_path, panel_csv):
    panel, bad = read_panel(panel_csv)
    settings = BatchSettings(horizon=3, engine="exact", seed=8, draws=250)
    run_batch(panel, tmp_path / "local", settings, read_failures=bad,
              executor=LocalExecutor(1))
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True,
                                       dashboard_address=None)
    try:
        executor = DaskExecutor(cluster.scheduler_address)
        assert executor.workers == 2
        with executor:
            result = run_batch(panel, tmp_path / "dask", settings, read_failures=bad,
                               executor=executor, chunk_size=2)
    finally:
        cluster.close()
    assert result.n_fitted == 12
    for name in OUTPUTS:
        assert (tmp_path / "dask" / name).read_bytes() == (tmp_path / "local" / name).read_bytes()
