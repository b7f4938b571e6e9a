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
"""

import gc
import sys

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


if __name__ == "__main__":
    sys.exit(entry())
