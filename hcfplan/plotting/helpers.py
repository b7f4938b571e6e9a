"""Figure helpers started before a run: processes forked while the run has not begun, which
import matplotlib and the figure modules while the run computes, then draw its figures.

:func:`hcfplan.io.results.write_figures` forks its helper after the run, so the matplotlib
import (0.4 s of the demo command) and the drawing come after the computation. Helpers forked
before the run (:meth:`FigureHelpers.start`) do that import on the other core while the run
computes; :meth:`FigureHelpers.write` then sends them the figure jobs (pickled once, with the
results: 1.4 MB for the demo config) and they take the figures in turn. A figure no helper
completes (a helper failed, was killed or the jobs could not be pickled) is drawn in this
process afterwards, so an error is raised here as without helpers. A helper ends when this
process closes its end of the pipe (:meth:`FigureHelpers.close`, or this process ending).

One helper process is forked before the run; it imports matplotlib once and, given two or
more figures, forks the second drawer itself after the import (which the drawer then shares,
copy-on-write), so the import is paid once instead of once per drawer (0.4-0.6 s of CPU). The
second drawer ends with the first (Linux parent-death signal) and the first waits for it.

The ``simulate`` command forks the helper first, before it imports the run's modules or reads
the config: the helper then imports matplotlib, the figure modules and the modules of the
results (which unpickling the jobs needs) on the other core while this process does all that
and the run. Forked after those imports, the helper's matplotlib import (0.4 s) had not ended
when a small run had (measured on the demo config).

Helpers are only started where :func:`hcfplan.io.results.figure_helpers` allows a forked
helper (Linux, more than one core free to this process).
"""

from __future__ import annotations

import contextlib
import os
import pickle
import signal
import sys
import threading
import time
from collections.abc import Iterator
from pathlib import Path

from hcfplan.io.results import FigureJob, figure_helpers, write_figure, write_figures
from hcfplan.numerics.storage import termination_held

#: Most drawers of a run's figures: two draw on both cores after the run while this process
#: waits. The second drawer is forked from the first after its matplotlib import and costs no
#: import of its own, so two are used on a busy machine too (at load average 3 on 2 cores the
#: demo command took 2.50-2.58 s with two against 2.67-2.80 s with one, the same CPU time;
#: when each helper imported matplotlib itself, one was better there).
HELPER_COUNT = 2


def helper_count() -> int:
    """Drawers to use: :data:`HELPER_COUNT`, at most one per core free to this process."""
    return max(1, min(HELPER_COUNT, len(os.sched_getaffinity(0))))


#: Modules of the results a figure job carries (a run's ChainResult), imported by the helper
#: while it waits for the jobs (unpickling the jobs imports them otherwise, after the run; none
#: of them imports numba).
RESULT_MODULES = (
    "hcfplan.io.config",
    "hcfplan.materials.gases",
    "hcfplan.planning.chain",
    "hcfplan.planning.convergence",
    "hcfplan.propagation.result",
    "hcfplan.pulse.metrics",
    "hcfplan.fibers",
    "hcfplan.compression.compressor",
    "hcfplan.thz.generation",
)


def _import_result_modules() -> None:
    import importlib

    for name in RESULT_MODULES:
        with contextlib.suppress(ImportError):  # a module that moved: only costs the helper
            importlib.import_module(name)


#: Most figure jobs one :meth:`FigureHelpers.write` hands to the helpers (the rest are drawn
#: here).
MAX_JOBS = 64
#: Longest wait [s] for a helper to complete its next figure before it is taken to be stuck and
#: killed (its figures are then drawn here); a figure takes 0.1-0.5 s.
STALL_LIMIT = 120.0


def _preload() -> None:
    """What a helper imports while the run computes: matplotlib with the Agg back end, pyplot,
    the figure modules, the modules of the results (:data:`RESULT_MODULES`) and the fonts of
    the house style (one text drawn)."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    import hcfplan.plotting.compression  # noqa: F401
    import hcfplan.plotting.report  # noqa: F401
    import hcfplan.plotting.thz  # noqa: F401

    _import_result_modules()

    style = Path(__file__).resolve().parent.parent / "styles" / "hcfplan.mplstyle"
    with plt.style.context(str(style)):
        fig = plt.figure()
        fig.text(0.5, 0.5, "0.1 µJ")
        fig.canvas.draw()
        plt.close(fig)


def _draw_in_turn(jobs, turn, done) -> None:
    """Take the next job (shared counter ``turn``) and draw it, until none is left."""
    while True:
        with turn.get_lock():
            index = turn.value
            turn.value = index + 1
        if index >= len(jobs):
            return
        path, draw, args = jobs[index]
        with termination_held():  # SIGTERM ends the drawer once its file is complete
            write_figure(path, draw, *args)
            done[index] = 1


def _end_with_parent() -> None:
    """Have the kernel send this process SIGTERM when its parent ends (Linux ``prctl``
    PR_SET_PDEATHSIG; common practice, no source); end now if the parent already has."""
    import ctypes

    parent = os.getppid()
    with contextlib.suppress(OSError, AttributeError):
        ctypes.CDLL(None, use_errno=True).prctl(1, int(signal.SIGTERM), 0, 0, 0)
    if os.getppid() != parent:
        os._exit(0)


def _serve(reader, writers, turn, done, drawers: int = 1) -> None:
    """A helper's life: preload, wait for the jobs, draw them in turn, with a second drawer
    forked here after the import when ``drawers`` > 1 and there are two or more jobs.

    ``writers``: the parent's ends of the pipe, closed here at once (a copy kept open would
    keep the helper's own pipe from ever reporting the parent's close)."""
    for writer in writers:
        writer.close()
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C: the parent stops the helpers
    code, child = 0, None
    try:
        _preload()
        jobs = pickle.loads(reader.recv_bytes())
        reader.close()
        if drawers > 1 and len(jobs) > 1:
            child = os.fork()  # shares the import and the jobs
            if child == 0:
                _end_with_parent()
        _draw_in_turn(jobs, turn, done)
    except EOFError:  # the parent closed the pipe: no figures wanted
        pass
    except BaseException:  # noqa: BLE001 - the parent draws what is left and raises there
        code = 1
    if child == 0:  # the second drawer
        os._exit(code)
    if child:
        with contextlib.suppress(ChildProcessError, InterruptedError):
            os.waitpid(child, 0)
    os._exit(code)


class FigureHelpers:
    """Helper processes forked before a run; :meth:`write` hands them the run's figures."""

    def __init__(self, processes, writers, turn, done):
        self._processes = processes
        self._writers = writers
        self._turn = turn
        self._done = done

    @classmethod
    def start(cls, count: int | None = None) -> FigureHelpers | None:
        """Fork the helper that draws with ``count`` drawers (default :func:`helper_count`),
        or return None where a forked helper is not allowed."""
        if figure_helpers(2) == 0:
            return None
        count = helper_count() if count is None else count
        if count < 1:
            return None
        import multiprocessing

        context = multiprocessing.get_context("fork")
        turn = context.Value("i", 0)
        done = context.Array("b", MAX_JOBS)
        reader, writer = context.Pipe(duplex=False)
        sys.stdout.flush()
        sys.stderr.flush()  # nothing buffered is written twice by a helper
        process = context.Process(target=_serve, args=(reader, [writer], turn, done, count),
                                  daemon=True)
        process.start()
        reader.close()
        return cls([process], [writer], turn, done)

    def write(self, jobs: list[FigureJob]) -> None:
        """Draw ``jobs`` in the helpers (and here whatever they did not complete)."""
        jobs = list(jobs)
        try:
            data = pickle.dumps(jobs[:MAX_JOBS], protocol=pickle.HIGHEST_PROTOCOL)
        except Exception:  # noqa: BLE001 - results that do not pickle: draw the usual way
            self.close()
            write_figures(jobs)
            return
        try:
            with self._stopped_on_sigterm():
                for writer in self._writers:
                    with contextlib.suppress(OSError):  # a helper that died: drawn below
                        writer.send_bytes(data)
                self._wait()
        finally:
            self.close()
        for index, (path, draw, args) in enumerate(jobs):
            if index >= MAX_JOBS or not self._done[index]:
                for stale in path.parent.glob(f".{path.name}.*"):  # of a helper killed
                    stale.unlink(missing_ok=True)
                write_figure(path, draw, *args)

    def close(self) -> None:
        """Stop the helpers (those waiting for jobs end on the closed pipe) and wait for them."""
        for writer in self._writers:
            writer.close()
        for process in self._processes:
            process.join(5.0)
            if process.is_alive():
                process.terminate()  # SIGTERM: held until its current file is complete
                process.join()

    def _wait(self) -> None:
        """Wait for the helpers to end; kill one that completes no figure for STALL_LIMIT."""
        count, since = sum(self._done), time.monotonic()
        for process in self._processes:
            while process.is_alive():
                process.join(0.05)
                if sum(self._done) != count:
                    count, since = sum(self._done), time.monotonic()
                elif time.monotonic() - since > STALL_LIMIT:
                    process.kill()
                    process.join()

    @contextlib.contextmanager
    def _stopped_on_sigterm(self) -> Iterator[None]:
        """While the block runs, SIGTERM here first stops the helpers, then ends this process
        as before (only in the main thread)."""
        if threading.current_thread() is not threading.main_thread():
            yield
            return

        def stop(signum, frame):
            for process in self._processes:
                process.terminate()
            for process in self._processes:
                process.join()
            signal.signal(signum, signal.SIG_DFL if previous is None else previous)
            signal.raise_signal(signum)

        previous = signal.signal(signal.SIGTERM, stop)
        try:
            yield
        finally:
            signal.signal(signal.SIGTERM, signal.SIG_DFL if previous is None else previous)
