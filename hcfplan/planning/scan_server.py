"""The start of the scan workers' fork server: imported by the server only, as its one preload.

It lies outside the scan package, whose ``__init__`` imports numpy and the whole package (about
a second): the watch of step 2 starts before those imports.

Importing this module, in the fork server (:func:`hcfplan.planning.scan.pool.pool_context`):

1. ignores Ctrl-C (SIGINT): the command stops its workers itself, and the workers, forked
   from the server, inherit the setting (the command starts the server with SIGINT blocked,
   :func:`hcfplan.numerics.lifeline.signals_blocked`, so no KeyboardInterrupt can reach its
   start-up either);
2. watches for the end of the command while it imports (a thread polls ``os.getppid()``,
   :func:`hcfplan.numerics.lifeline.exit_when_orphaned`): the server notices the end of its
   clients only once it listens, after the imports (several seconds on a busy machine); the
   thread is stopped before the server forks any worker;
3. imports :data:`~hcfplan.planning.scan.pool.WORKER_PRELOAD` (an ImportError is passed over,
   as the fork server does with its own preload list);
4. silences the traceback the server prints when a worker's start fails because the command
   that asked for it has stopped meanwhile (it read end-of-file, or a broken pipe, from the
   command's side): the command reports its own interruption.
"""

from __future__ import annotations

import importlib
import os
import signal
import sys

from hcfplan.numerics.lifeline import exit_when_orphaned

#: Errors of a worker's start that mean the command stopped while starting it.
COMMAND_GONE = (EOFError, BrokenPipeError, ConnectionError, FileNotFoundError)


def _quiet_when_command_gone(kind, value, trace) -> None:
    """``sys.excepthook`` of the server: silent for :data:`COMMAND_GONE` errors (and Ctrl-C);
    otherwise Python's hook."""
    if issubclass(kind, (*COMMAND_GONE, KeyboardInterrupt)):
        return
    sys.__excepthook__(kind, value, trace)


def _preload() -> None:
    """Steps 1-4 of the module docstring."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    stop_watch = exit_when_orphaned(os.getppid())
    try:
        from hcfplan.planning.scan.pool import WORKER_PRELOAD

        for name in WORKER_PRELOAD:
            try:
                importlib.import_module(name)
            except ImportError:
                pass
    finally:
        stop_watch()
    sys.excepthook = _quiet_when_command_gone


_preload()
