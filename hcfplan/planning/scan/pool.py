"""The local worker processes of a scan: their fork server, environment and kept pool.

Workers fork from a server that has imported :data:`WORKER_PRELOAD` (start-up cost paid once),
run their numerical libraries on one thread each (:data:`WORKER_THREADS`), and the pool is
kept between the runs of one parent process (:class:`KeptPool`).

Interrupts and a killed command: the server and the workers ignore Ctrl-C (the command stops
them, :mod:`hcfplan.planning.scan_server`), and every worker ends by itself once the command
has ended, SIGKILL included (:func:`worker_start`: a :class:`~hcfplan.numerics.lifeline.Lifeline`
pipe); the server then ends too (its clients are gone).
"""

from __future__ import annotations

import contextlib
import os
import signal
import threading

from hcfplan.numerics.lifeline import Lifeline, exit_at_eof, ignore_interrupts, signals_blocked

#: Modules a fork server imports once before forking the scan workers (start-up cost): every
#: module a point imports (a test checks that a point imports no other hcfplan module), and
#: ``hcfplan.cli.app``: a worker runs the command's script again (multiprocessing does so for a
#: script run by path, such as the ``hcfplan`` command), which imports the command line
#: (0.1-0.2 s per worker otherwise; listing ``"__main__"`` instead does nothing in Python 3.11,
#: whose fork server is never given the script's path). The last one
#: (:mod:`hcfplan.planning.scan.warmup`) also loads the compiled solver and THz kernels and the
#: FFT library (about 1.5 s per worker otherwise, measured with ``bench/scan.py``).
WORKER_PRELOAD = [
    "hcfplan.cli.app",
    "hcfplan.planning.chain",
    "hcfplan.planning.stages",
    "hcfplan.planning.input_field",
    "hcfplan.planning.fiber_run",
    "hcfplan.propagation.solve",
    "hcfplan.thz.generation",
    "hcfplan.compression.compressor",
    "hcfplan.planning.reports.limits",
    "hcfplan.planning.reports.limits_power",
    "hcfplan.planning.hardware",
    "hcfplan.planning.reports.fiber",
    "hcfplan.planning.reports.thz",
    "hcfplan.planning.reports.thz_absolute",
    "hcfplan.thz.waveforms",
    "hcfplan.planning.verdict",
    "hcfplan.limits.beam",
    "hcfplan.limits.margins",
    "hcfplan.limits.cell",
    "hcfplan.limits.cautions",
    "hcfplan.limits.rotational",
    "hcfplan.limits.thermal",
    "hcfplan.compression.losses",
    "hcfplan.materials.kerr_polarization",
    "hcfplan.materials.gas_transport",
    "hcfplan.materials.coolprop_calls",
    "hcfplan.planning.memo",
    "hcfplan.ionization.rates",
    "hcfplan.ionization.tables",
    "hcfplan.ionization.fraction",
    "hcfplan.pulse.fields",
    "hcfplan.fibers.derived",
    "hcfplan.io.results",
    "hcfplan.io.csvdata",
    "hcfplan.io.config",
    "hcfplan.materials.gases",
    "hcfplan.materials.data.crystals",
    "hcfplan._gases",
    "hcfplan.planning.scan.warmup",
]
#: Thread counts of the numerical libraries in the scan workers: the workers are the
#: parallelism. OpenBLAS's own threads (it busy-waits) in two workers on two cores doubled the
#: time per point (0.29 s instead of 0.15 s, 1024-point grid, bench/scan.py).
WORKER_THREADS = {"OMP_NUM_THREADS": "1", "OPENBLAS_NUM_THREADS": "1", "MKL_NUM_THREADS": "1",
                  "NUMBA_NUM_THREADS": "1"}


@contextlib.contextmanager
def worker_environment():
    """Set :data:`WORKER_THREADS` in os.environ while worker processes (and the fork server)
    are started from it, then restore it."""
    saved = {key: os.environ.get(key) for key in WORKER_THREADS}
    os.environ.update(WORKER_THREADS)
    try:
        yield
    finally:
        for key, value in saved.items():
            if value is None:
                os.environ.pop(key, None)
            else:
                os.environ[key] = value


#: The fork server's one preload module: it imports :data:`WORKER_PRELOAD` and sets the
#: server's signal handling and its watch of the command (:mod:`hcfplan.planning.scan_server`).
SERVER_PRELOAD = ["hcfplan.planning.scan_server"]


def pool_context():
    """``forkserver`` where available: workers fork from a clean server process that has
    imported :data:`WORKER_PRELOAD` (no threads or numba state copied from the parent, no
    per-worker import cost); ``spawn`` elsewhere."""
    import multiprocessing

    if "forkserver" in multiprocessing.get_all_start_methods():
        context = multiprocessing.get_context("forkserver")
        context.set_forkserver_preload(SERVER_PRELOAD)
        return context
    return multiprocessing.get_context("spawn")


def _ensure_server() -> None:
    """Start the fork server, if it is not running, in the workers' environment and with
    SIGINT blocked (it starts with Ctrl-C blocked, so its start-up cannot be interrupted; this
    process gets a Ctrl-C of the meantime afterwards)."""
    from multiprocessing import forkserver, resource_tracker

    # the resource tracker, which the server's start starts first, unblocks SIGINT after
    # starting itself (it ignores SIGINT on its own); started before, it leaves the mask alone
    with worker_environment():
        resource_tracker.ensure_running()
        with signals_blocked(signal.SIGINT):
            forkserver.ensure_running()


def worker_start(lifeline) -> None:
    """Initializer of every pool process: ignore Ctrl-C (the command stops its workers) and
    end when the command has ended (``lifeline``: the read end of the command's
    :class:`~hcfplan.numerics.lifeline.Lifeline`, :func:`~hcfplan.numerics.lifeline.exit_at_eof`).
    """
    ignore_interrupts()
    exit_at_eof(lifeline)


def start_worker_server(workers: int) -> None:
    """Start the fork server of the local worker processes now, when ``workers`` > 1.

    The server imports :data:`WORKER_PRELOAD` (about 2 s) before it can fork the first worker.
    A command that will run points on local processes calls this first, so the server imports
    on another core while the command loads its config and plans (scan: 0.5-1 s) or runs its
    nominal chain (``--spread``: a whole point). Without a fork server (``spawn``), or with one
    worker, nothing is done; a server that is already running is kept.
    """
    context = pool_context()
    if workers <= 1 or context.get_start_method() != "forkserver":
        return
    _ensure_server()  # the server's environment is the workers' environment


def _shutdown(pool, *, terminate: bool) -> None:
    """Shut ``pool`` down; ``terminate``: stop its processes now (an interrupted run)."""
    started = list((getattr(pool, "_processes", None) or {}).values())
    pool.shutdown(wait=not terminate, cancel_futures=True)
    if terminate:
        for process in started:
            process.terminate()


class KeptPool:
    """The local process pool kept between runs of one parent process.

    :meth:`lend` gives a run the pool of the previous run when it has the same size and is not
    broken (a process that runs several scans, or ``compare --spread``, which runs the corners
    of each side in turn): its processes are warm, so a run does not wait for a new process
    (30-90 ms from the fork server) nor pay a new process's first point (about twice a warm
    point at 1024 points: per-process tables and plans; ``bench/scan.py``). Otherwise the kept
    pool is shut down and a new one made and kept. While one run has it, a run from another
    thread gets a pool of its own, which is not kept. A run that fails or is interrupted stops
    the processes of its pool. The processes of a kept pool are idle between runs and end
    with this process: the executor stops them at exit, and the kept pool is released then
    (:mod:`atexit`), while the modules its clean-up uses still exist.
    """

    def __init__(self) -> None:
        import atexit

        self._lock = threading.Lock()
        self._pool, self._size, self._lent = None, 0, False
        self._lifeline: Lifeline | None = None
        atexit.register(self.release)

    @property
    def pool(self):
        """The kept pool (a ``ProcessPoolExecutor``), or None when none is kept."""
        return self._pool

    def _new(self, children: int):
        """A new pool whose processes end with this one (:func:`worker_start`)."""
        from concurrent.futures import ProcessPoolExecutor

        context = pool_context()
        if context.get_start_method() == "forkserver":
            _ensure_server()
        if self._lifeline is None:  # one for every pool of this process
            self._lifeline = Lifeline()
        return ProcessPoolExecutor(max_workers=children, mp_context=context,
                                   initializer=worker_start, initargs=(self._lifeline.reader,))

    def lend(self, children: int):
        """(pool of ``children`` processes, whether it is the kept one) for one run."""
        with self._lock:
            if self._lent:
                return self._new(children), False
            if self._pool is not None and (self._size != children
                                           or getattr(self._pool, "_broken", False)):
                _shutdown(self._pool, terminate=False)
                self._pool = None
            if self._pool is None:
                self._pool, self._size = self._new(children), children
            self._lent = True
            return self._pool, True

    def give_back(self, pool, kept: bool, *, failed: bool) -> None:
        """End of a run with ``pool`` (from :meth:`lend`); ``failed``: it ended by an exception
        (the pool's processes are stopped, and a kept pool is not kept)."""
        if not kept:
            _shutdown(pool, terminate=failed)
            return
        with self._lock:
            self._lent = False
            if failed:
                self._pool = None
                _shutdown(pool, terminate=True)

    def release(self) -> None:
        """Shut the kept pool down, unless a run has it."""
        with self._lock:
            if self._pool is not None and not self._lent:
                pool, self._pool = self._pool, None
                _shutdown(pool, terminate=False)


KEPT_POOL = KeptPool()


def release_workers() -> None:
    """Stop the pool processes kept for a next run (:class:`KeptPool`), if there are any.

    A command that has no more points to compute calls this before it draws its figures: the
    idle processes give back their memory (150 MB for one that ran the demo config), and the
    figures' helper process (:func:`hcfplan.io.results.write_figures` forks one) is not forked
    beside the pool's threads."""
    KEPT_POOL.release()
