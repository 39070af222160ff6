"""Many series: independent fits and forecasts of every series, on local or Dask workers.

:func:`run_batch` fits each series of a panel (see
:func:`bayesgrowth.data.panel.read_panel`) on its own, with a seed derived from
the global seed and the series name (:func:`series_seed`), records each chunk of
results as it finishes, and merges them into ``forecast.csv``, ``summary.csv`` and
``failures.csv``. A run into a folder that holds an interrupted run resumes it.
"""

from bayesgrowth.batch.executors import DaskExecutor, Executor, LocalExecutor, make_executor
from bayesgrowth.batch.runner import BatchResult, run_batch
from bayesgrowth.batch.work import BatchSettings
from bayesgrowth.seeds import series_seed

__all__ = [
    "BatchResult",
    "BatchSettings",
    "DaskExecutor",
    "Executor",
    "LocalExecutor",
    "make_executor",
    "run_batch",
    "series_seed",
]
