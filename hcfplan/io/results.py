"""Writing results: every file is written to a temporary name in the same folder and renamed
into place, so a reader (or an interrupted run) sees either the complete file or none.

Interruption: Ctrl-C (KeyboardInterrupt) inside a write removes the temporary file on the way
out. SIGTERM and SIGHUP, which end the process without any clean-up, are held back while a
temporary file exists and delivered once the file is complete and renamed (or removed); the
process then ends as it would have, with every file in the folder complete.
"""

from __future__ import annotations

import contextlib
import json
import math
import os
import signal
import sys
import threading
import time
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.numerics.storage import atomic_path, write_text


def json_ready(value: Any) -> Any:
    """JSON-ready copy: numpy arrays and scalars to Python values, non-finite floats to None,
    paths to strings, dict keys to strings, tuples to lists.

    Plain Python leaves are told apart by their exact type first (one comparison each): a
    scan point record holds about 2000 numbers, and a chain of isinstance tests per value cost
    3 ms per record."""
    kind = type(value)
    if kind is float:
        return value if math.isfinite(value) else None
    if kind is str or kind is int or kind is bool or value is None:
        return value
    if isinstance(value, dict):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, (np.ndarray, np.generic)):
        return json_ready(value.tolist())
    if isinstance(value, float):
        return float(value) if math.isfinite(value) else None
    if isinstance(value, Path):
        return str(value)
    return value


def write_json(path: Path, data: dict, *, one_line_fields: bool = False) -> None:
    """Write ``data`` as JSON atomically (NaN/inf become null), indented by 2.

    With ``one_line_fields``, each top-level field is written on one line of its own instead
    (for machine records such as scan points, 40 kB each): Python's C encoder writes only
    unindented JSON, and the indenting one, in Python, took 3.9 ms per point record against
    1.1 ms. Both are the same JSON data."""
    ready = json_ready(data)
    if one_line_fields and isinstance(ready, dict) and ready:
        fields = (f"  {json.dumps(k)}: {json.dumps(v)}" for k, v in ready.items())
        write_text(path, "{\n" + ",\n".join(fields) + "\n}\n")
    else:
        write_text(path, json.dumps(ready, indent=2) + "\n")


def write_figure(path: Path, draw: Callable, *args, **kwargs) -> None:
    """Create a figure with the house style, let ``draw(fig, *args)`` fill it, save atomically."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    style = Path(__file__).resolve().parent.parent / "styles" / "hcfplan.mplstyle"
    with plt.style.context(str(style)):
        fig = plt.figure()
        try:
            draw(fig, *args, **kwargs)
            path = Path(path)
            with atomic_path(path, path.suffix or ".png") as tmp:
                fig.savefig(tmp, format=(path.suffix.lstrip(".") or "png"))
        finally:
            plt.close(fig)


#: A figure job of :func:`write_figures`: (path, draw, arguments of draw after the figure).
FigureJob = tuple[Path, Callable, tuple]


def figure_helpers(jobs: int) -> int:
    """Child processes :func:`write_figures` forks to draw ``jobs`` figures: one where fork is
    the platform's usual start method (Linux), more than one core is free to this process and
    there are at least two figures; otherwise 0 (all figures drawn here)."""
    if sys.platform != "linux" or jobs < 2:
        return 0
    return 1 if len(os.sched_getaffinity(0)) > 1 else 0


def write_figures(jobs: list[FigureJob]) -> None:
    """Write the figures of ``jobs`` (in order of expected cost, highest first), each with
    :func:`write_figure`, shared with a forked child process where :func:`figure_helpers`
    allows one.

    Matplotlib draws on one core, and the figures of a run took longer than the run itself
    (5.5 s against 3.3 s for the demo config, measured); they are independent, so this process
    and a child forked from it (which has the results in memory, nothing is pickled) each take
    the next figure in turn. A figure the child does not finish (it failed or was stopped) is
    drawn here afterwards, so an error is raised here as it would be without the child. On the
    way out (an exception, Ctrl-C, SIGTERM) the child is sent SIGTERM, which ends it once the
    file it writes is complete (:func:`~hcfplan.numerics.storage.termination_held`), and waited for.
    """
    jobs = list(jobs)
    if figure_helpers(len(jobs)) == 0:
        for path, draw, args in jobs:
            write_figure(path, draw, *args)
        return
    import multiprocessing

    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot  # noqa: F401 - imported once, before the fork, for both processes

    context = multiprocessing.get_context("fork")
    turn = context.Value("i", 0)  # index of the next job to take
    done = context.Array("b", len(jobs))  # 1 once a job's file is written

    def take() -> int | None:
        with turn.get_lock():
            index = turn.value
            if index >= len(jobs):
                return None
            turn.value = index + 1
            return index

    def serve() -> None:
        while (index := take()) is not None:
            path, draw, args = jobs[index]
            write_figure(path, draw, *args)
            done[index] = 1

    sys.stdout.flush()
    sys.stderr.flush()  # nothing buffered is written twice by the child
    child = context.Process(target=_serve_in_child, args=(serve,), daemon=True)
    child.start()
    try:
        with _child_stopped_on_sigterm(child):
            serve()
            _wait_while_busy(child, done)
    finally:
        if child.is_alive():
            child.terminate()  # SIGTERM: held until the child's current file is complete
            child.join()
    for index, (path, draw, args) in enumerate(jobs):
        if not done[index]:
            for stale in path.parent.glob(f".{path.name}.*"):  # of a child that was killed
                stale.unlink(missing_ok=True)
            write_figure(path, draw, *args)


#: Longest wait [s] for the helper of :func:`write_figures` to finish a figure once this process
#: has drawn its share (a figure takes 0.3-2 s). A helper that exceeds it is taken to be stuck
#: (a fork can in principle inherit a lock held by another thread) and is killed; its figures
#: are then drawn here.
HELPER_STALL_LIMIT = 120.0


def _wait_while_busy(child, done) -> None:
    """Wait for ``child`` to end; kill it if no figure is completed for HELPER_STALL_LIMIT."""
    count, since = sum(done), time.monotonic()
    while child.is_alive():
        child.join(0.1)
        if sum(done) != count:
            count, since = sum(done), time.monotonic()
        elif time.monotonic() - since > HELPER_STALL_LIMIT:
            child.kill()
            child.join()


def _serve_in_child(serve: Callable[[], None]) -> None:
    """The child's part of :func:`write_figures`; any failure leaves its figure to the parent."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C: the parent stops it (SIGTERM)
    try:
        serve()
    except BaseException:  # noqa: BLE001 - the parent draws what is left and raises there
        os._exit(1)
    os._exit(0)


@contextlib.contextmanager
def _child_stopped_on_sigterm(child) -> Iterator[None]:
    """While the block runs, SIGTERM to this process first stops ``child`` and waits for it,
    then ends this process as before (only in the main thread; elsewhere nothing is done)."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def stop(signum, frame):
        child.terminate()
        child.join()
        signal.signal(signum, signal.SIG_DFL if previous is None else previous)
        signal.raise_signal(signum)

    previous = signal.signal(signal.SIGTERM, stop)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, signal.SIG_DFL if previous is None else previous)


def prepare_output_dir(path: Path, *, force: bool) -> Path:
    """Check the output folder before a run; refuse an existing non-empty one unless ``force``.

    The folder is not created here but by the first file written into it, so a run that stops
    before writing anything (bad input found late, an interruption) leaves no folder behind.
    """
    path = Path(path)
    if path.exists() and not path.is_dir():
        raise ConfigError(f"--out {path}: exists and is not a folder")
    if path.is_dir() and any(path.iterdir()) and not force:
        raise ConfigError(f"--out {path}: folder exists and is not empty; use --force to "
                          "overwrite or choose another --out")
    ancestor = next(p for p in (path, *path.absolute().parents) if p.exists())
    if not ancestor.is_dir() or not os.access(ancestor, os.W_OK | os.X_OK):
        raise ConfigError(f"--out {path}: cannot create files under {ancestor} (not a "
                          "writable folder)")
    return path
