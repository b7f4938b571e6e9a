"""Writing results: every file is written to a temporary name in the same folder and renamed
into place, so a reader (or an interrupted run) sees either the complete file or none.

Interruption: Ctrl-C (KeyboardInterrupt) inside a write removes the temporary file on the way
out. SIGTERM and SIGHUP, which end the process without any clean-up, are held back while a
temporary file exists and delivered once the file is complete and renamed (or removed); the
process then ends as it would have, with every file in the folder complete.

Faults of the machine: a write that fails (full disk, read-only file system) raises
:class:`~hcfplan.numerics.storage.WriteError` naming the file; output paths are checked before
a run (:func:`prepare_output_dir`, :func:`check_output_file`), and an output folder is locked
against other hcfplan commands while one writes into it (:func:`lock_output_dir`).
"""

from __future__ import annotations

import contextlib
import io
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
from hcfplan.numerics.lifeline import exit_with_parent, ignore_interrupts, signals_blocked
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
            kind = path.suffix.lstrip(".").lower() or "png"
            with atomic_path(path, path.suffix or ".png") as tmp:
                if kind == "png":
                    save_png(fig, tmp)
                else:
                    fig.savefig(tmp, format=kind)
        finally:
            plt.close(fig)


#: zlib level of the PNG files: 3 encodes the demo figures in 0.7 of the time of level 6 (the
#: default of matplotlib and Pillow) for files 8 % larger (measured).
PNG_COMPRESS_LEVEL = 3
#: Margin around the figure drawn by :func:`save_png` on the left, bottom and top, and on the
#: right (where legends placed beside the axes reach out of the figure). [in]
PNG_MARGIN_IN, PNG_MARGIN_RIGHT_IN = 1.0, 6.0


def save_png(fig, tmp) -> None:
    """Save ``fig`` as a PNG of its tight box into ``tmp`` (the temporary file of an atomic
    write, or a binary stream), as ``savefig`` with the style's ``savefig.bbox: tight``,
    ``savefig.pad_inches`` and ``savefig.dpi``, but drawn once.

    ``savefig`` with a tight box lays the figure out twice: once to find the box, once to
    draw it (0.38-0.44 s for the THz figure of the demo run, against 0.22 s for one draw;
    measured). Here the figure is drawn once, with a margin around it (:data:`PNG_MARGIN_IN`,
    :data:`PNG_MARGIN_RIGHT_IN`) for what reaches out of it, into an RGBA buffer; the image is
    the box of every pixel that differs from the background, padded by
    ``savefig.pad_inches``. Where something reaches into the margin's edge, or the background
    is not uniform there, ``savefig`` draws it the usual way. An artist lying wholly beyond
    the margin would be lost: the figure-layout tests check that the tight box of every
    figure of the registry lies inside it. The alpha channel is dropped where the image is
    opaque (a smaller file, encoded faster).

    References
    ----------
    none: image handling (common practice, no source)
    """
    import matplotlib
    from matplotlib.transforms import Bbox
    from PIL import Image

    dpi = matplotlib.rcParams["savefig.dpi"]
    dpi = fig.dpi if dpi == "figure" else float(dpi)
    pad = matplotlib.rcParams["savefig.pad_inches"]
    usual = {"format": "png", "dpi": dpi, "pil_kwargs": {"compress_level": PNG_COMPRESS_LEVEL}}
    if matplotlib.rcParams["savefig.bbox"] != "tight":
        fig.savefig(tmp, **usual)
        return
    width, height = fig.get_size_inches()
    drawn = Bbox([[-PNG_MARGIN_IN, -PNG_MARGIN_IN],
                  [width + PNG_MARGIN_RIGHT_IN, height + PNG_MARGIN_IN]])
    memory = io.BytesIO()
    fig.savefig(memory, format="rgba", dpi=dpi, bbox_inches=drawn, pad_inches=0)
    pixels = np.frombuffer(memory.getbuffer(), dtype=np.uint32)
    # the canvas is the drawn box in pixels, truncated (as the Agg canvas sizes it) or rounded
    shapes = [(rows, columns) for rows in (int(drawn.height * dpi), round(drawn.height * dpi))
              for columns in (int(drawn.width * dpi), round(drawn.width * dpi))
              if rows * columns == pixels.size and columns >= 3]
    if not shapes:  # a canvas of another size: no guess at its shape
        fig.savefig(tmp, **usual)
        return
    pixels = pixels.reshape(shapes[0])
    background = pixels[0, 0]
    edge = np.concatenate([pixels[0], pixels[-1], pixels[:, 0], pixels[:, -1]])
    if np.any(edge != background):  # drawn up to the margin's edge: the margin was too small
        fig.savefig(tmp, **usual)
        return
    ink = pixels != background
    rows, cols = np.flatnonzero(ink.any(axis=1)), np.flatnonzero(ink.any(axis=0))
    if rows.size:
        margin = round(pad * dpi)
        pixels = pixels[max(rows[0] - margin, 0):rows[-1] + margin + 1,
                        max(cols[0] - margin, 0):cols[-1] + margin + 1]
    image = np.ascontiguousarray(pixels).view(np.uint8).reshape(*pixels.shape, 4)
    picture = Image.fromarray(image)
    if np.all(image[..., 3] == 255):
        picture = picture.convert("RGB")
    picture.save(tmp, format="png", dpi=(dpi, dpi), compress_level=PNG_COMPRESS_LEVEL)


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
    child = context.Process(target=_serve_in_child, args=(serve, os.getpid()), daemon=True)
    with signals_blocked(signal.SIGINT):  # no Ctrl-C in the child before it ignores it
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


def _serve_in_child(serve: Callable[[], None], parent: int) -> None:
    """The child's part of :func:`write_figures`; any failure leaves its figure to the parent.

    It ignores Ctrl-C (the parent stops it, SIGTERM) and ends, after the file it writes, when
    the parent ``parent`` ends, SIGKILL included
    (:func:`~hcfplan.numerics.lifeline.exit_with_parent`)."""
    signal.signal(signal.SIGTERM, signal.SIG_DFL)  # not the parent's handlers, copied by fork
    ignore_interrupts()
    exit_with_parent(parent)
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


def _writable_ancestor(option: str, path: Path, start: Path | None = None) -> Path:
    """The nearest existing folder at or above ``start`` (default ``path``), checked to be a
    writable folder; ConfigError naming ``option`` and ``path`` otherwise."""
    start = path if start is None else start
    ancestor = next(p for p in (start, *start.absolute().parents) if p.exists())
    if not ancestor.is_dir():
        raise ConfigError(f"{option} {path}: {ancestor} is a file, not a folder")
    if not os.access(ancestor, os.W_OK | os.X_OK):
        cause = "read-only file system" if _read_only(ancestor) else "no write permission"
        raise ConfigError(f"{option} {path}: cannot create files under {ancestor} ({cause})")
    return ancestor


def _read_only(folder: Path) -> bool:
    """Whether ``folder`` lies on a file system mounted read-only (where statvfs tells)."""
    try:
        return bool(os.statvfs(folder).f_flag & getattr(os, "ST_RDONLY", 1))
    except (OSError, AttributeError):
        return False


def check_output_file(option: str, path: Path) -> Path:
    """Check a file to be written (e.g. ``--plot``) before any work: not an existing folder,
    under a writable folder (or one that can be created there). ConfigError otherwise."""
    path = Path(path)
    if path.is_dir():
        raise ConfigError(f"{option} {path}: is a folder; give a file name, e.g. "
                          f"{path / 'figure.png'}")
    _writable_ancestor(option, path, path.parent)
    return path


class OutputBusyError(ConfigError):
    """An output folder is being written by another hcfplan command (:func:`lock_output_dir`)."""


class _FolderLock:
    """An exclusive lock (``flock``) on an output folder, held by this process."""

    def __init__(self, path: Path, fd: int, created: bool) -> None:
        self.path, self.fd, self.created, self.count = path, fd, created, 1

    def release(self) -> None:
        import fcntl

        fcntl.flock(self.fd, fcntl.LOCK_UN)
        os.close(self.fd)
        if self.created:
            with contextlib.suppress(OSError):  # not empty: kept
                self.path.rmdir()


#: Output folders this process holds locked, by (device, inode): a lock is taken once per
#: process (a second ``flock`` of the same folder by this process would refuse itself), and
#: counted, so that a command and the run it calls can both lock the folder.
_LOCKS: dict[tuple[int, int], _FolderLock] = {}
_LOCKS_GUARD = threading.Lock()


def lock_output_dir(path: Path, option: str = "--out") -> Path:
    """Create the output folder ``path`` if needed and lock it for this process: another
    hcfplan command that locks it meanwhile (another process) is refused with a ConfigError,
    so two commands never write into one folder at the same time.

    The lock is released by :func:`unlock_output_dir` (once per call of this function), by
    :func:`release_output_dirs` or when the process ends (by any means: the kernel drops it). A
    folder this call created and that is still empty then is removed. Where ``fcntl`` is
    missing (Windows), or the file system has no locks, the folder is created but not locked.
    """
    path = Path(path)
    if path.exists() and not path.is_dir():
        raise ConfigError(f"{option} {path}: exists and is not a folder")
    _writable_ancestor(option, path)
    created = not path.exists()
    try:
        path.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise ConfigError(f"{option} {path}: cannot create the folder ({exc.strerror})") from None
    try:
        import fcntl
    except ImportError:  # pragma: no cover - no flock on this platform
        return path
    with _LOCKS_GUARD:
        stat = path.stat()
        held = _LOCKS.get((stat.st_dev, stat.st_ino))
        if held is not None:
            held.count += 1
            return path
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except BlockingIOError:
            os.close(fd)
            raise OutputBusyError(f"{option} {path}: another hcfplan command is writing into "
                                  f"this folder; wait for it to finish or choose another "
                                  f"{option}") from None
        except OSError:  # a file system without locks (some network ones): not locked
            os.close(fd)
            return path
        _LOCKS[(stat.st_dev, stat.st_ino)] = _FolderLock(path, fd, created)
    return path


def unlock_output_dir(path: Path) -> None:
    """Undo one :func:`lock_output_dir` of ``path`` (the lock goes with the last one)."""
    with _LOCKS_GUARD:
        try:
            stat = Path(path).stat()
        except OSError:
            return
        key = (stat.st_dev, stat.st_ino)
        held = _LOCKS.get(key)
        if held is None:
            return
        held.count -= 1
        if held.count == 0:
            del _LOCKS[key]
            held.release()


def release_output_dirs() -> None:
    """Release every output folder lock of this process (the end of a command)."""
    with _LOCKS_GUARD:
        held = list(_LOCKS.values())
        _LOCKS.clear()
    for lock in held:
        lock.release()


def prepare_output_dir(path: Path, *, force: bool) -> Path:
    """Claim the output folder before a run: create it and lock it (:func:`lock_output_dir`:
    another command writing there is refused), then refuse an existing non-empty one unless
    ``force``. The check follows the lock, so two commands started together with the same
    folder never both write there, and never into a folder the other has filled.

    The folder stays locked until the command ends (:func:`release_output_dirs`); one that is
    still empty then (a run that stopped before writing anything: bad input found late, an
    interruption) is removed again, as it was created here.
    """
    path = lock_output_dir(path)
    if not force and any(path.iterdir()):
        unlock_output_dir(path)
        raise ConfigError(f"--out {path}: folder exists and is not empty; use --force to "
                          "overwrite or choose another --out")
    if not os.access(path, os.W_OK | os.X_OK):
        unlock_output_dir(path)
        raise ConfigError(f"--out {path}: folder is not writable")
    return path
