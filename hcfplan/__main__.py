"""``python -m hcfplan`` and the installed ``hcfplan`` command: the command line.

:func:`entry` is the console entry point. It guards the import of the command line (typer,
pydantic and the commands' modules, about 0.1 s) against Ctrl-C, so that an interrupt during
that import prints one line instead of a traceback, then runs
:func:`hcfplan.cli.app.main`. A SIGTERM or SIGHUP during the import ends the process with the
default action of the signal, as before any command started (nothing is written yet).
"""

import sys


def entry() -> int:
    """Import the command line under a Ctrl-C guard and run it; the exit code."""
    try:
        from hcfplan.cli.app import main
    except KeyboardInterrupt:  # Ctrl-C while the command line loads: one line, as in a command
        sys.stderr.write("hcfplan: interrupted; nothing written\n")
        return 130
    return main()


if __name__ == "__main__":
    sys.exit(entry())
