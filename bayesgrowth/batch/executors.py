"""Where the chunks run: processes on this machine, or a Dask cluster.

An executor takes a function and a list of chunks and yields ``(index, result)``
pairs as chunks finish, in whatever order they finish; a chunk whose run failed
yields the exception instead of a result. Results do not depend on the executor:
each series' seed is fixed by the global seed and its name.
"""

from __future__ import annotations

import ctypes
import logging
import multiprocessing
import os
import signal
import sys
from collections.abc import Callable, Iterator
from concurrent.futures import ProcessPoolExecutor, as_completed

__all__ = ["Executor", "LocalExecutor", "DaskExecutor", "make_executor", "EXECUTORS"]

EXECUTORS = ("local", "dask")


def available_cores() -> int:
    """CPUs this process may use."""
    if hasattr(os, "sched_getaffinity"):
        return len(os.sched_getaffinity(0))
    return os.cpu_count() or 1


#: prctl option: the signal a process gets when its parent dies (linux/prctl.h).
PR_SET_PDEATHSIG = 1


def _worker_start(parent: int) -> None:
    """Set up a local worker process so that it never outlives the run.

    The parent alone decides what an interrupt means (it stops the workers
    itself), so a worker ignores Ctrl-C and takes a termination request at face
    value; on Linux the kernel kills it when the parent dies, even by ``kill -9``.
    """
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    signal.signal(signal.SIGTERM, signal.SIG_DFL)
    if sys.platform.startswith("linux"):
        try:
            ctypes.CDLL(None, use_errno=True).prctl(PR_SET_PDEATHSIG, signal.SIGKILL)
        except (OSError, AttributeError):
            pass
    if os.getppid() != parent:  # the parent died before the line above took effect
        os._exit(1)
    _one_blas_thread()


def _one_blas_thread() -> None:
    """Let the linear-algebra library use one thread in a worker: the workers share the cores.

    Each worker's library would otherwise start a thread per core, and the workers' small
    matrix products would wait on each other's threads. ``threadpoolctl`` (a PyMC
    requirement) sets the limit in the running library, which environment variables no
    longer can once it is loaded.
    """
    try:
        from threadpoolctl import threadpool_limits
    except ImportError:  # pragma: no cover - installed with PyMC
        return
    threadpool_limits(1)


class Executor:
    """Base class: ``with executor: for i, result in executor.run(fn, chunks, arg): ...``."""

    workers: int = 1

    def __enter__(self) -> Executor:
        return self

    def __exit__(self, *exc) -> None:
        self.close()

    def close(self) -> None:
        """Release the workers."""

    def abort(self) -> None:
        """Stop the workers now, dropping the chunks in flight (after an interrupt)."""
        self.close()

    def run(self, fn: Callable, chunks: list, arg) -> Iterator[tuple[int, object]]:
        """Yield ``(index, fn(chunks[index], arg))`` (or the exception) as chunks finish."""
        raise NotImplementedError


class LocalExecutor(Executor):
    """Processes on this machine.

    Parameters
    ----------
    workers : int, optional
        Processes; default the CPUs available. With 1 the chunks run one after
        another in this process (no pool to start). Otherwise a pool of processes
        started by ``fork``, so they begin with this process's imports.
    """

    def __init__(self, workers: int | None = None) -> None:
        self.workers = int(workers or available_cores())
        if self.workers < 1:
            raise ValueError(f"workers must be at least 1, got {workers}")
        self._pool: ProcessPoolExecutor | None = None

    def run(self, fn, chunks, arg):  # noqa: D102 - see Executor.run
        if self.workers == 1 or len(chunks) <= 1:
            for i, chunk in enumerate(chunks):
                try:
                    result = fn(chunk, arg)
                except Exception as exc:  # reported per chunk, like a lost worker
                    result = exc
                yield i, result
            return
        ctx = multiprocessing.get_context("fork")
        self._pool = ProcessPoolExecutor(max_workers=min(self.workers, len(chunks)),
                                         mp_context=ctx, initializer=_worker_start,
                                         initargs=(os.getpid(),))
        futures = {self._pool.submit(fn, chunk, arg): i for i, chunk in enumerate(chunks)}
        for future in as_completed(futures):
            i = futures.pop(future)
            try:
                result = future.result()
            except Exception as exc:
                result = exc
            yield i, result

    def close(self) -> None:  # noqa: D102
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None

    def abort(self) -> None:  # noqa: D102 - see Executor.abort
        pool, self._pool = self._pool, None
        if pool is None:
            return
        processes = list((getattr(pool, "_processes", None) or {}).values())
        manager = getattr(pool, "_executor_manager_thread", None)
        for process in processes:
            process.kill()
        pool.shutdown(wait=False, cancel_futures=True)
        for process in processes:
            process.join(timeout=10)
        # The pool's manager thread notices the killed workers and closes its wake-up
        # pipe; if it were still doing so at interpreter exit, the exit hook of
        # concurrent.futures would write to that pipe as it closes and print a traceback.
        if manager is not None:
            manager.join(timeout=10)


class DaskExecutor(Executor):
    """A Dask cluster: the one at ``address``, or a local cluster started for the run.

    Parameters
    ----------
    address : str, optional
        Scheduler address (``tcp://host:8786``). Its workers must have bayesgrowth
        installed, in the same version.
    workers : int, optional
        For a local cluster: worker processes of one thread each (default the CPUs
        available). Ignored with ``address``.

    Raises
    ------
    ImportError
        If dask.distributed is not installed (``pip install "bayesgrowth[dask]"``).
    """

    def __init__(self, address: str | None = None, workers: int | None = None) -> None:
        try:
            from dask.distributed import Client, LocalCluster
        except ImportError:
            raise ImportError(
                "the dask executor needs dask.distributed: pip install \"bayesgrowth[dask]\""
            ) from None
        self._cluster = None
        if address:
            self._client = Client(address, timeout="10s")
            self.workers = max(1, len(self._client.scheduler_info().get("workers", {})))
        else:
            self.workers = int(workers or available_cores())
            self._cluster = LocalCluster(
                n_workers=self.workers, threads_per_worker=1, processes=True,
                dashboard_address=None, silence_logs=logging.ERROR,
            )
            self._client = Client(self._cluster)

    def run(self, fn, chunks, arg):  # noqa: D102 - see Executor.run
        from dask.distributed import as_completed as dask_completed

        shared = self._client.scatter(arg, broadcast=True)
        futures = self._client.map(fn, chunks, [shared] * len(chunks), pure=False)
        index = {f.key: i for i, f in enumerate(futures)}
        try:
            for future in dask_completed(futures):
                i = index[future.key]
                try:
                    result = future.result()
                except Exception as exc:
                    result = exc
                future.release()
                yield i, result
        finally:
            self._client.cancel(futures)

    def close(self) -> None:  # noqa: D102
        self._client.close()
        if self._cluster is not None:
            self._cluster.close()


def make_executor(kind: str, workers: int | None = None, scheduler: str | None = None):
    """The executor called ``kind`` (``"local"`` or ``"dask"``)."""
    if kind == "local":
        return LocalExecutor(workers)
    if kind == "dask":
        return DaskExecutor(scheduler, workers)
    raise ValueError(f"executor must be one of {', '.join(EXECUTORS)}, got {kind!r}")
