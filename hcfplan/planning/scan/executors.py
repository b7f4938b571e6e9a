"""Running the points of a scan: serially, on local processes beside the parent, or on Dask.

Every executor has the form ``executor(tasks, on_done, workers, address)``: it computes each
task with :func:`hcfplan.planning.scan.records.compute_point` once and calls ``on_done`` with
the record in the calling thread, which alone writes files (:data:`EXECUTORS`).
"""

from __future__ import annotations

import os
import queue
import sys
import threading
from collections.abc import Callable

from hcfplan.errors import ConfigError
from hcfplan.planning.scan.ordering import CostlierEndFirst
from hcfplan.planning.scan.pool import KEPT_POOL, worker_environment
from hcfplan.planning.scan.records import compute_point

#: How long to wait for a Dask scheduler to answer. [s]
DASK_CONNECT_TIMEOUT = 10.0


def run_serial(tasks: list[dict], on_done: Callable[[dict], None], _workers, _address) -> None:
    """One point after the other in this process."""
    for task in tasks:
        on_done(compute_point(task))


#: Interpreter switch interval [s] while the parent computes points beside the pool
#: (:func:`sys.setswitchinterval`; Python's default is 5 ms). The main thread, which hands the
#: pool its tasks and takes its results, and the executor's own threads wait for the parent's
#: compute thread to give up the GIL at each step of a hand-off. With a busy thread beside
#: them, a task took 16-22 ms from submission to its start in a pool process at the default
#: interval and 0.5-1.3 ms at this one, and a new pool process 23-115 ms to take its first
#: task against 14-39 ms (``bench/scan.py``, hand-off). A thread that waits for nothing is
#: not interrupted.
HANDOFF_SWITCH_INTERVAL = 2e-4


class ParentWorker:
    """The parent's own share of a local-process run: a daemon thread that takes tasks with
    ``take()`` until it gives None, and puts ``(self, record or None, exception or None)`` on
    ``results``. It feeds itself, so it keeps computing while the main thread waits for the
    pool's first process (the fork server imports first). A daemon thread, so an interrupted
    CLI exits without waiting for the point in progress (only the main thread writes files)."""

    def __init__(self, take: Callable[[], dict | None], results: queue.Queue,
                 finished: Callable[[dict], None] | None = None) -> None:
        self._take, self._results, self._finished = take, results, finished
        threading.Thread(target=self._serve, name="hcfplan-scan-parent", daemon=True).start()

    def _serve(self) -> None:
        while (task := self._take()) is not None:
            try:
                record = compute_point(task)
                if self._finished is not None:  # before it takes its next task
                    self._finished(record)
                self._results.put((self, record, None))
            except BaseException as exc:  # handed to the main thread, which raises it
                self._results.put((self, None, exc))
                return


def _pool_point(task: dict, folder: str) -> dict:
    """:func:`~hcfplan.planning.scan.records.compute_point` in a pool process, in the parent's
    current folder ``folder``: a new process starts in it, a kept one
    (:class:`~hcfplan.planning.scan.pool.KeptPool`) may have started in another, which may no
    longer exist."""
    os.chdir(folder)
    return compute_point(task)


def run_processes(tasks, on_done, workers: int, _address) -> None:
    """``workers`` points at a time: ``workers - 1`` pool processes (see
    :func:`~hcfplan.planning.scan.pool.pool_context`; the pool is kept for the next run of
    this process, :class:`~hcfplan.planning.scan.pool.KeptPool`) and the parent itself, in a
    thread (:class:`ParentWorker`), which starts at once: the first points are computed while
    the fork server imports :data:`~hcfplan.planning.scan.pool.WORKER_PRELOAD` (about 2.5 s,
    during which starting a pool process blocks the main thread). The tasks are taken in the
    order of :class:`~hcfplan.planning.scan.ordering.CostlierEndFirst` (the costliest first).
    A pool process is given its next task when it hands in a result, before that result is
    written (no queued tasks: none waits behind a long point at the end). BLAS runs one thread
    in the parent meanwhile (threadpoolctl), as in the workers
    (:data:`~hcfplan.planning.scan.pool.WORKER_THREADS`), and the switch interval is
    :data:`HANDOFF_SWITCH_INTERVAL`, so hand-offs do not wait for the compute thread."""
    from threadpoolctl import threadpool_limits

    order = CostlierEndFirst(tasks)
    lock = threading.Lock()
    stopped = False

    def take() -> dict | None:
        with lock:
            return None if stopped else order.take()

    def finished(record: dict) -> None:
        with lock:
            order.finished(record)

    results: queue.Queue = queue.Queue()
    children = min(workers, len(tasks)) - 1
    pool, kept = KEPT_POOL.lend(children)
    folder = os.getcwd()

    def give_pool() -> None:
        task = take()
        if task is not None:
            pool.submit(_pool_point, task, folder).add_done_callback(
                lambda future: results.put((pool, future, None)))

    switch = sys.getswitchinterval()
    sys.setswitchinterval(HANDOFF_SWITCH_INTERVAL)
    try:
        with threadpool_limits(limits=1):
            ParentWorker(take, results, finished)  # its thread keeps it alive
            with worker_environment():  # a new pool's processes start at these submissions
                for _ in range(children):
                    give_pool()
            for _ in range(len(tasks)):
                worker, record, error = results.get()
                if error is not None:
                    raise error
                if worker is pool:  # its next task first: on_done writes a file (about 6 ms)
                    record = record.result()
                    finished(record)
                    give_pool()
                on_done(record)
    except BaseException:
        # interrupted (Ctrl-C, SIGTERM via the CLI) or a bug: stop the pool's own workers
        with lock:
            stopped = True
        KEPT_POOL.give_back(pool, kept, failed=True)
        raise
    finally:
        sys.setswitchinterval(switch)
    KEPT_POOL.give_back(pool, kept, failed=False)


def run_dask(tasks, on_done, _workers, address: str) -> None:
    """Points as tasks on a running Dask scheduler; the workers must import hcfplan."""
    try:
        from distributed import Client, as_completed
    except ImportError:
        raise ConfigError(f"--dask-scheduler {address}: needs the 'distributed' package "
                          "(pip install 'hcfplan[cluster]')") from None
    try:
        client = Client(address, timeout=DASK_CONNECT_TIMEOUT)
    except (OSError, TimeoutError) as exc:
        raise ConfigError(f"--dask-scheduler {address}: cannot connect ({exc})") from None
    try:
        futures = client.map(compute_point, tasks, pure=False)
        for future in as_completed(futures):
            on_done(future.result())
    finally:
        client.close()


#: executor name -> function(tasks, on_done, workers, address)
EXECUTORS: dict[str, Callable[..., None]] = {
    "serial": run_serial,
    "processes": run_processes,
    "dask": run_dask,
}
