"""``python -m hcfplan`` and the installed ``hcfplan`` command: the command line.

:func:`entry` is the console entry point. It guards the import of the command line (typer,
pydantic and the commands' modules, about 0.1 s) against Ctrl-C, so that an interrupt during
that import prints one line instead of a traceback, then runs
:func:`hcfplan.cli.app.main`. A SIGTERM or SIGHUP during the import ends the process with the
default action of the signal, as before any command started (nothing is written yet).

A command is a short process that imports much (numpy, scipy, matplotlib in the figure helper;
numba only where a problem is large enough for the compiled kernels, see the ``"auto"`` kernel
policy of :mod:`hcfplan.numerics.kernel_choice`, which the command line sets) and frees
little, so the cyclic garbage collector's first generation is collected less
often than Python's default (:data:`GC_THRESHOLDS`; the demo ``simulate`` took about 5 % less
CPU time, measured in alternated runs). Programs that import :mod:`hcfplan` keep their own
settings.

When the command has ended, :func:`leave` ends the process without the interpreter's tear-down:
the exit functions registered with :mod:`atexit` run (they stop worker pools and child
processes), the standard streams are flushed, then ``os._exit``. The tear-down freed module by
module what the process imported and took 0.14 s after numba had loaded a kernel, 0.06 s for
scipy (measured from the last line written to the end of the process); every file of a command
is already complete (written atomically and synced), so nothing is lost by skipping it. A
thread still running at that point (none of the commands leaves one) gets the usual exit.
"""

import atexit
import gc
import os
import sys
import threading

#: Thresholds of the cyclic garbage collector in the ``hcfplan`` process (Python's default is
#: 700, 10, 10): objects allocated before a first-generation collection, and collections of
#: one generation before the next is collected.
GC_THRESHOLDS = (100_000, 50, 100)


def entry() -> int:
    """Import the command line under a Ctrl-C guard and run it; the exit code."""
    gc.set_threshold(*GC_THRESHOLDS)
    try:
        from hcfplan.cli.app import main
    except KeyboardInterrupt:  # Ctrl-C while the command line loads: one line, as in a command
        sys.stderr.write("hcfplan: interrupted; nothing written\n")
        return 130
    return main()


def leave(code: int) -> None:
    """End the ``hcfplan`` process with exit code ``code``: the :mod:`atexit` functions, the
    standard streams flushed, then ``os._exit`` (no tear-down of the imported modules); the
    usual ``sys.exit`` where a thread other than this one still runs, a profiler or tracer
    (``python -m cProfile``, coverage) is active and writes its data at the exit, or the
    interpreter has no ``atexit._run_exitfuncs`` (CPython's function that runs the exit
    functions; other interpreters need not have it)."""
    run_exit_functions = getattr(atexit, "_run_exitfuncs", None)  # CPython's, not documented
    if (run_exit_functions is None or threading.active_count() > 1
            or sys.getprofile() is not None or sys.gettrace() is not None):
        sys.exit(code)
    run_exit_functions()
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError):  # a closed pipe (``| head``): nothing more to say there
            pass
    os._exit(code)


def run() -> None:
    """The console entry point: :func:`entry`, then :func:`leave` with its exit code."""
    leave(entry())


if __name__ == "__main__":
    run()
