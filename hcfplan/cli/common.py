"""Helpers shared by the commands of :mod:`hcfplan.cli.app` and :mod:`hcfplan.cli.workflows`.

Loading a config with the gas folders of the environment, the ``--spread`` and ``--workers``
handling, the help texts of shared options, the record of the files a command writes (so an
interrupted command can say what it kept), and the handling of signals and of faults of
the machine (full disk, read-only folder). Imports nothing else of the command line; heavy
modules are imported inside the functions.
"""

from __future__ import annotations

import contextlib
import os
import signal
import sys
import threading
from collections.abc import Iterator
from pathlib import Path

#: Help texts of options that several commands share.
SET_HELP = "Override one config value, e.g. --set gas.pressure_bar=3 (repeatable)."
JSON_HELP = "Print machine-readable JSON (SI values, unit in the key name)."
NO_REPORT_HELP = "Skip report.html (the self-contained page of the results and figures)."
SPREAD_WORKERS_HELP = ("Corners of --spread computed at a time, by this process and worker "
                       "processes (default: all cores).")


# ---------------------------------------------------------------------------------------------
# configs and gas tables


def command_line() -> str:
    """The command as typed (``hcfplan`` and its arguments), for a report's provenance."""
    import shlex
    import sys

    return shlex.join(["hcfplan", *sys.argv[1:]])


def gas_dirs() -> tuple[Path, ...]:
    """Gas table folders named by the environment
    (:func:`hcfplan.materials.gases.gas_search_dirs`)."""
    from hcfplan.materials.gases import gas_search_dirs

    return tuple(gas_search_dirs(environ=os.environ))


def load_cli_config(config: Path, overrides: list[str]):
    """The config file ``config`` with the ``--set`` ``overrides`` applied, validated."""
    from hcfplan.io.config import load_config

    return load_config(config, overrides=overrides or (), extra_gas_dirs=gas_dirs())


# ---------------------------------------------------------------------------------------------
# --spread and --workers


def spread_plan(cfg, text: str | None, overrides: list[str]):
    """(spec, corner tasks) for ``--spread``, validated before any run; None without it."""
    if text is None:
        return None
    from hcfplan.planning.spread import corner_tasks, for_fill, parse_spread

    if text.strip() == "default":
        s = cfg.spread
        items = [f"energy={s.energy_percent}%", f"fwhm={s.fwhm_percent}%"]
        if cfg.gas is not None:
            items.append(f"pressure={s.pressure_percent}%")
        text = ",".join(items)
    spec = for_fill(parse_spread(text), cfg)  # a gradient: its exit pressure
    return spec, corner_tasks(cfg, spec, overrides, gas_dirs())


def worker_count(workers: int | None) -> int:
    """Points or corners computed at a time for ``--workers`` (0 or not given: all cores)."""
    return workers or os.cpu_count() or 1


def start_workers(workers: int | None) -> None:
    """Start the local worker processes' fork server now, so that it imports on another core
    while this process plans or runs the nominal chain
    (:func:`hcfplan.planning.scan.start_worker_server`)."""
    from hcfplan.planning.scan import start_worker_server

    start_worker_server(worker_count(workers))


def stop_workers() -> None:
    """Stop the worker processes kept for a next run (no more points to compute)."""
    from hcfplan.planning.scan import release_workers

    release_workers()


def run_spread_corners(cfg, chain, plan, workers: int | None, quiet: bool):
    """Run the corner tasks of ``plan`` (from :func:`spread_plan`) around the nominal ``chain``;
    returns the :class:`~hcfplan.planning.spread.SpreadResult`."""
    import typer

    from hcfplan.planning.scan import run_summary
    from hcfplan.planning.spread import run_spread

    spec, tasks = plan
    summary, margins = run_summary(cfg, chain)
    if not quiet:
        typer.echo(f"  spread: {len(tasks)} corner runs ...", err=True)
    return run_spread(tasks, spec, {"summary": summary, "margins": margins},
                      workers=worker_count(workers))


# ---------------------------------------------------------------------------------------------
# what an interrupted command kept


def _identity(path: Path) -> tuple[int, int]:
    """(inode, modification time [ns]) of a file: an atomic write (a new file renamed into
    place) changes the inode even where the clock is too coarse to change the time."""
    stat = path.stat()
    return stat.st_ino, stat.st_mtime_ns


def _snapshot(path: Path) -> dict[str, tuple[int, int]]:
    """:func:`_identity` of every complete file in ``path`` (a folder, searched through, or a
    single file), by its name relative to ``path``. Temporary files of an atomic write (names
    starting with ".") are left out."""
    if path.is_file():
        return {path.name: _identity(path)}
    found = {}
    for folder, subfolders, files in os.walk(path):
        subfolders[:] = [d for d in subfolders if not d.startswith(".")]
        for name in files:
            if not name.startswith("."):
                full = Path(folder) / name
                try:
                    found[full.relative_to(path).as_posix()] = _identity(full)
                except OSError:  # removed meanwhile
                    pass
    return found


class WrittenFiles:
    """The output folders and files of the running command, with their state before it wrote.

    A command calls :meth:`watch` on each output before it writes there; :meth:`kept` then
    lists what was written since (new or changed files). Every file of the package is written
    atomically (:mod:`hcfplan.io.results`), so a listed file is complete.
    """

    def __init__(self) -> None:
        self.before: dict[Path, tuple[dict[str, tuple[int, int]], str]] = {}

    def clear(self) -> None:
        """Forget every output (a new command starts)."""
        self.before.clear()

    @staticmethod
    def release() -> None:
        """Release the output folders the command locked
        (:func:`hcfplan.io.results.release_output_dirs`); one it created and left empty is
        removed."""
        import sys

        results = sys.modules.get("hcfplan.io.results")  # no folder locked without it
        if results is not None:
            results.release_output_dirs()

    def watch(self, path: Path, note: str = "") -> None:
        """Record ``path`` (folder or file) as an output; ``note`` is added to the message."""
        path = Path(path)
        self.before[path] = (_snapshot(path), note)

    def kept(self) -> list[tuple[Path, list[str], str]]:
        """(output, names written since :meth:`watch`, note) of every output written to.
        Files in a subfolder are counted: ``points/ with 12 files``."""
        found = []
        for path, (before, note) in self.before.items():
            written = sorted(name for name, identity in _snapshot(path).items()
                             if before.get(name) != identity)
            if not written:
                continue
            top = [name for name in written if "/" not in name]
            inner: dict[str, int] = {}
            for name in written:
                if "/" in name:
                    sub = name.split("/", 1)[0]
                    inner[sub] = inner.get(sub, 0) + 1
            names = top + [f"{sub}/ with {count} file{'s' if count > 1 else ''}"
                           for sub, count in sorted(inner.items())]
            found.append((path, names, note))
        return found


#: The outputs of the command being run (cleared by :func:`hcfplan.cli.app.main`).
WRITTEN = WrittenFiles()


def interrupted_message() -> str:
    """The one line printed for an interrupted command: what it kept, or that it wrote nothing."""
    kept = WRITTEN.kept()
    if not kept:
        return "interrupted; nothing written"
    parts = [f"{path}" if path.is_file() else f"{path}/: {', '.join(names)}"
             for path, names, _ in kept]
    notes = "".join(f"; {note}" for _, _, note in kept if note)
    return "interrupted; kept " + "; ".join(parts) + " (complete files only)" + notes


def fault_message(exc: OSError) -> str:
    """The one line for a fault of the machine met while a command ran (a full disk, a
    read-only folder, a folder where a file should be): the path, the cause, what was kept."""
    if exc.filename is not None and type(exc).__str__ is OSError.__str__:
        text = f"{exc.filename}: {exc.strerror}"  # not Python's "[Errno 28] ...: 'path'"
    else:  # hcfplan.numerics.storage.WriteError: "cannot write PATH: CAUSE"
        text = str(exc)
    kept = WRITTEN.kept()
    if kept:
        text += "; " + interrupted_message().removeprefix("interrupted; ")
    return text


#: Signals that end a command: Ctrl-C (SIGINT), ``kill`` (SIGTERM), a closed terminal (SIGHUP).
#: The command stops its workers, says what it kept and exits with 128 + the signal's number.
INTERRUPTING = tuple(getattr(signal, name) for name in ("SIGINT", "SIGTERM", "SIGHUP")
                     if hasattr(signal, name))


class CommandInterrupted(KeyboardInterrupt):
    """A signal of :data:`INTERRUPTING` inside a command. A subclass: every clean-up that
    handles Ctrl-C handles it, and CPython 3.11 does not take it for Ctrl-C left unhandled
    (a plain KeyboardInterrupt raised inside an ``exec`` of a string, as dataclasses create
    their methods, makes the interpreter end itself by SIGINT at exit, after the command's own
    exit code)."""


@contextlib.contextmanager
def signals_as_interrupt(received: list[int]) -> Iterator[None]:
    """Inside the block, :data:`INTERRUPTING` signals raise :class:`CommandInterrupted` (their
    number is appended to ``received``), so a command ends the same way on ``kill`` as on
    Ctrl-C. Only in the main thread; elsewhere nothing is changed."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    hook = sys.unraisablehook

    def handler(signum, frame):
        received.append(signum)
        # objects of a library torn down half-built by the interrupt (e.g. llvmlite's while
        # numba compiles) may fail in __del__: that is no news for a user who stopped the run
        sys.unraisablehook = _ignore_unraisable
        raise CommandInterrupted(signum)

    previous = {sig: signal.signal(sig, handler) for sig in INTERRUPTING}
    try:
        yield
    finally:
        for sig, old in previous.items():
            signal.signal(sig, signal.SIG_DFL if old is None else old)
        if not received:  # after an interrupt the torn-down objects are freed later, with
            sys.unraisablehook = hook  # the exception that carries their frames


def _ignore_unraisable(unraisable) -> None:
    """An ``sys.unraisablehook`` that prints nothing (after an interrupt, and at exit)."""


def end_quietly() -> None:
    """After the command has finished (or was interrupted): a further Ctrl-C or SIGTERM ends
    the process at once, without a traceback from its clean-up at exit. Only for the
    ``hcfplan`` process itself, never for a caller of :func:`hcfplan.cli.app.main`."""
    for sig in INTERRUPTING:
        signal.signal(sig, signal.SIG_DFL)
    sys.unraisablehook = _ignore_unraisable  # clean-up at exit of what a command left behind


def check_plot(plot: Path | None) -> None:
    """Refuse an unusable ``--plot`` path (a folder, under a file or a read-only folder) before
    any work: one line, exit 2."""
    if plot is not None:
        from hcfplan.io.results import check_output_file

        check_output_file("--plot", plot)
