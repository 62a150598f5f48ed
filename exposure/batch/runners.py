"""Where the sites of a run are assessed: in this process, on a local process pool, or on a
Dask cluster. Each runner yields (task, row) pairs as sites finish.
"""

from __future__ import annotations

import os
import signal
import time
import uuid
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from typing import Any

from exposure.batch.plan import SiteTask
from exposure.batch.rows import SiteRow, first_line
from exposure.batch.site import run_site
from exposure.errors import InputError

POOL_CONTEXT = "spawn"
"""Start method of the local process pool (see ``tests/benchmarks/bench_batch.py``)."""


THREAD_VARIABLES: tuple[str, ...] = (
    "OMP_NUM_THREADS",
    "OPENBLAS_NUM_THREADS",
    "MKL_NUM_THREADS",
    "BLIS_NUM_THREADS",
    "VECLIB_MAXIMUM_THREADS",
    "NUMEXPR_NUM_THREADS",
    "NUMBA_NUM_THREADS",  # the compiled field kernels: one thread per worker, the pool is the parallelism
)


CLUSTER_EXTRA_HINT = "install the cluster extra: pip install 'rf-exposure[cluster]'"


class InProcessRunner:
    """Runs the sites one after another in this process."""

    description = "in-process"

    def __enter__(self) -> InProcessRunner:
        return self

    def __exit__(self, *exc) -> None:
        return None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow]]:
        for task in tasks:
            yield task, run_site(task)


class ProcessPoolRunner:
    """Runs the sites in a local pool of worker processes, BLAS threads limited to one each.

    On an interrupt the queued sites are not started and the running ones end: at once on
    Ctrl-C (the terminal signals the workers too, and each stops in its atomic writer,
    which removes its temporary file), or after their current site when only this process
    is signalled. Either way no partial file remains.
    """

    def __init__(self, jobs: int, context: str = POOL_CONTEXT) -> None:
        self.jobs = jobs
        self.context = context
        self.description = f"process pool ({jobs} workers, {context})"

    def __enter__(self) -> ProcessPoolRunner:
        return self

    def __exit__(self, *exc) -> None:
        return None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow | None]]:
        import multiprocessing
        from concurrent.futures import ProcessPoolExecutor, as_completed

        if not tasks:
            return
        workers = min(self.jobs, len(tasks))
        context = multiprocessing.get_context(self.context)
        stop = context.Event()  # set on an interrupt: queued sites are not started
        executor = ProcessPoolExecutor(
            max_workers=workers, mp_context=context, initializer=_init_pool_worker, initargs=(stop,)
        )
        try:
            with _one_thread_environment():  # workers start during submit, inheriting it
                futures = {executor.submit(_pool_task, task): task for task in tasks}
            for future in as_completed(futures):
                task = futures[future]
                try:
                    row: SiteRow | None = future.result()
                except Exception as exc:  # e.g. BrokenProcessPool: a worker was killed
                    row = SiteRow(
                        task.file,
                        task.site_id,
                        "failed",
                        problems=(f"worker process failed: {type(exc).__name__}: {first_line(exc)}",),
                    )
                yield task, row
        except BaseException:  # an interrupt, or the caller stopped early
            stop.set()
            raise
        finally:
            executor.shutdown(wait=True, cancel_futures=True)


@contextmanager
def _one_thread_environment():
    """One numpy/BLAS/numba thread in processes started inside; the environment restored after."""
    saved = {name: os.environ.get(name) for name in THREAD_VARIABLES}
    os.environ.update(dict.fromkeys(THREAD_VARIABLES, "1"))
    try:
        yield
    finally:
        for name, value in saved.items():
            if value is None:
                os.environ.pop(name, None)
            else:
                os.environ[name] = value


_STOP = None  # in a pool worker: the pool's stop event


PARENT_POLL_S = 0.5
"""How often a pool worker checks that the batch that started it is still alive [s]."""


def _init_pool_worker(stop) -> None:
    """An idle worker ignores Ctrl-C (the parent ends the pool), keeps the stop event, and
    dies with its parent: a watchdog thread ends the process within half a second of the
    parent's death (``kill -9`` of the batch gives the pool no chance to stop it); a site
    it was writing leaves at most a temporary file, which the next run removes."""
    global _STOP
    _STOP = stop
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    import threading

    parent = os.getppid()

    def watch() -> None:
        while True:
            time.sleep(PARENT_POLL_S)
            if os.getppid() != parent:
                os._exit(1)

    threading.Thread(target=watch, name="exposure-parent-watchdog", daemon=True).start()


def _pool_task(task: SiteTask) -> SiteRow | None:
    """:func:`run_site` in a pool worker: Ctrl-C or SIGTERM stops the site cleanly.

    None, without starting, once the run is being stopped.
    """
    if _STOP is not None and _STOP.is_set():
        return None
    signal.signal(signal.SIGINT, signal.default_int_handler)
    signal.signal(signal.SIGTERM, _interrupt)
    try:
        return run_site(task)
    except KeyboardInterrupt:
        if _STOP is not None:  # before the parent can: this worker takes no queued site next
            _STOP.set()
        raise
    finally:
        signal.signal(signal.SIGINT, signal.SIG_IGN)
        signal.signal(signal.SIGTERM, signal.SIG_DFL)


def _interrupt(signum, frame) -> None:
    raise KeyboardInterrupt


class DaskRunner:
    """Sends :func:`run_site` to a running Dask distributed scheduler.

    Workers write each site's folder themselves, so the output folder (and the inputs)
    must be on a filesystem every worker sees at the same path; this process writes the
    summary. The connection is made on entering, before any record is read.
    """

    def __init__(self, address: str, timeout_s: float = 10.0) -> None:
        self.address = address
        self.timeout_s = timeout_s
        self.description = f"dask scheduler {address}"
        self.client: Any = None

    def __enter__(self) -> DaskRunner:
        try:
            from distributed import Client
        except ImportError:
            raise InputError(f"the Dask distributed package is missing; {CLUSTER_EXTRA_HINT}", "--scheduler") from None
        self._probe()
        try:
            self.client = Client(self.address, timeout=self.timeout_s, set_as_default=False)
        except Exception as exc:
            raise InputError(
                f"cannot connect to the Dask scheduler at {self.address!r}: {first_line(exc)}", "--scheduler"
            ) from None
        return self

    def _probe(self) -> None:
        """Open and close one connection first, so that a failure leaves no half-made client."""
        import asyncio

        from distributed.comm import connect

        async def probe() -> None:
            comm = await connect(self.address, timeout=self.timeout_s)
            await comm.close()

        try:
            asyncio.run(probe())
        except ValueError as exc:
            raise InputError(
                f"{self.address!r} is not a scheduler address ({first_line(exc)}); give tcp://HOST:PORT", "--scheduler"
            ) from None
        except OSError as exc:
            raise InputError(
                f"cannot reach the Dask scheduler at {self.address!r} within {self.timeout_s:g} s ({first_line(exc)})",
                "--scheduler",
            ) from None
        except Exception:
            raise InputError(
                f"something answers at {self.address!r}, but not a Dask scheduler", "--scheduler"
            ) from None

    def __exit__(self, *exc) -> None:
        if self.client is not None:
            self.client.close()
            self.client = None

    def run(self, tasks: Sequence[SiteTask]) -> Iterator[tuple[SiteTask, SiteRow]]:
        from distributed import as_completed

        if not tasks:
            return
        token = uuid.uuid4().hex[:12]
        futures = [
            self.client.submit(run_site, task, key=f"exposure-site-{task.site_id}-{token}", pure=False)
            for task in tasks
        ]
        by_key = {future.key: task for future, task in zip(futures, tasks, strict=True)}
        try:
            for future, outcome in as_completed(futures, with_results=True, raise_errors=False, loop=self.client.loop):
                task = by_key[future.key]
                if isinstance(outcome, BaseException):  # a worker died or could not run it
                    outcome = SiteRow(
                        task.file,
                        task.site_id,
                        "failed",
                        problems=(f"dask worker failed: {type(outcome).__name__}: {first_line(outcome)}",),
                    )
                yield task, outcome
        finally:
            self.client.cancel(futures)


def make_runner(jobs: int | None = None, scheduler: str | None = None, scheduler_timeout_s: float = 10.0):
    """The runner for the options: Dask with *scheduler*, else a pool of *jobs* workers.

    ``jobs`` defaults to ``os.cpu_count()``; one job runs in-process.
    """
    if scheduler is not None:
        if jobs is not None:
            raise InputError("does not apply with --scheduler (the cluster's workers run the sites)", "--jobs")
        return DaskRunner(scheduler, scheduler_timeout_s)
    if jobs is None:
        jobs = os.cpu_count() or 1
    if jobs < 1:
        raise InputError(f"must be at least 1, got {jobs}", "--jobs")
    return InProcessRunner() if jobs == 1 else ProcessPoolRunner(jobs)
