"""Child processes that end with their parent, and signals kept from a child while it starts.

A child process (a scan worker, the fork server of the workers, the helper that draws figures)
must not outlive the command that started it: a parent killed by SIGKILL cannot stop its
children, which would then compute for nobody and keep the caller's output pipe open. Three
watches, each where it fits:

- :func:`exit_with_parent`: the kernel sends the child a signal when its parent ends (Linux
  ``prctl(PR_SET_PDEATHSIG)``), or, elsewhere, a thread of the child polls ``os.getppid()``;
- :class:`Lifeline`: a pipe whose write end only the parent holds; a child given the read end
  (:func:`exit_at_eof`) sees end-of-file when the parent has ended, whoever its own parent is
  (a scan worker's parent is the fork server, not the command);
- :func:`exit_when_orphaned`: a thread that polls ``os.getppid()`` until it is stopped.

:func:`signals_blocked` keeps a signal (Ctrl-C's SIGINT) pending in the parent while it starts a
child, so the child starts with it blocked and never raises KeyboardInterrupt in its start-up
code; the parent receives the signal when the block ends.
"""

from __future__ import annotations

import contextlib
import os
import signal
import sys
import threading
from collections.abc import Callable, Iterator

#: ``prctl`` option that sets the signal sent to this process when its parent ends (Linux,
#: <linux/prctl.h>).
PR_SET_PDEATHSIG = 1
#: Seconds between two looks at ``os.getppid()`` where the kernel cannot watch. [s]
POLL_INTERVAL = 0.25


def _prctl_death_signal(signum: int) -> bool:
    """Ask the kernel for ``signum`` when the parent ends; False where that is not available."""
    if not sys.platform.startswith("linux"):
        return False
    import ctypes

    try:
        libc = ctypes.CDLL(None, use_errno=True)
        return libc.prctl(PR_SET_PDEATHSIG, int(signum), 0, 0, 0) == 0
    except (OSError, AttributeError):
        return False


def _end(signum: int) -> None:
    """End this process by ``signum`` (a handler, if any, runs: a file being written completes
    first, :func:`hcfplan.numerics.storage.termination_held`)."""
    os.kill(os.getpid(), signum)


def exit_when_orphaned(parent: int, signum: int = signal.SIGTERM,
                       interval: float = POLL_INTERVAL) -> Callable[[], None]:
    """Start a daemon thread that sends this process ``signum`` once its parent is no longer
    ``parent`` (the parent ended and the process was adopted). Returns the function that stops
    the thread and waits for its end."""
    stop = threading.Event()

    def watch() -> None:
        while not stop.wait(interval):
            if os.getppid() != parent:
                _end(signum)
                return

    thread = threading.Thread(target=watch, name="hcfplan-parent-watch", daemon=True)
    thread.start()

    def stop_watch() -> None:
        stop.set()
        thread.join()

    return stop_watch


def exit_with_parent(parent: int, signum: int = signal.SIGTERM) -> None:
    """End this process by ``signum`` when its parent ``parent`` (the pid the parent had when it
    started this child) ends: the kernel's parent-death signal on Linux, a polling thread
    (:func:`exit_when_orphaned`) elsewhere. A parent that has already ended ends this process
    at once.

    Call it in the child before it does any work. On Linux the signal follows the parent's
    thread that started the child, so the parent must start the child from a thread that
    outlives it (as :func:`hcfplan.io.results.write_figures` does: it waits for its helper).
    """
    if not _prctl_death_signal(signum):
        exit_when_orphaned(parent, signum)
    if os.getppid() != parent:  # ended before the watch was set
        _end(signum)


def exit_at_eof(reader, signum: int = signal.SIGTERM) -> None:
    """Start a daemon thread that sends this process ``signum`` once ``reader`` (the read end
    of a :class:`Lifeline`, a connection or a file descriptor) reaches end-of-file: every
    holder of the write end has ended."""
    fd = reader if isinstance(reader, int) else reader.fileno()

    def watch(_keep) -> None:
        try:
            while os.read(fd, 1):
                pass
        except OSError:
            pass
        _end(signum)

    # the thread's arguments keep ``reader`` (and so its descriptor) open
    threading.Thread(target=watch, args=(reader,), name="hcfplan-lifeline",
                     daemon=True).start()


class Lifeline:
    """A pipe whose write end stays in this process: a child given :attr:`reader` (passed as
    a ``multiprocessing`` connection, so it reaches processes forked by a fork server too) and
    calling :func:`exit_at_eof` on it ends when this process has ended.

    Nothing is ever written; the write end closes with this process (on any death, SIGKILL
    included). A process forked from this one (not exec'd) holds the write end too, so the
    children end once that process has ended as well.
    """

    def __init__(self) -> None:
        import multiprocessing

        self.reader, self._writer = multiprocessing.Pipe(duplex=False)


@contextlib.contextmanager
def signals_blocked(*signums: int) -> Iterator[None]:
    """Block ``signums`` in the calling thread inside the block (POSIX; elsewhere nothing is
    done). A child started inside it starts with them blocked (the mask is inherited over
    fork and exec); a signal that arrives meanwhile is delivered to this process after it."""
    if not hasattr(signal, "pthread_sigmask"):
        yield
        return
    previous = signal.pthread_sigmask(signal.SIG_BLOCK, signums)
    try:
        yield
    finally:
        signal.pthread_sigmask(signal.SIG_SETMASK, previous)


def ignore_interrupts() -> None:
    """In a child: ignore SIGINT (the parent stops its children on Ctrl-C) and unblock it (see
    :func:`signals_blocked`; a Ctrl-C pending from the start is dropped)."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)
    if hasattr(signal, "pthread_sigmask"):
        signal.pthread_sigmask(signal.SIG_UNBLOCK, (signal.SIGINT,))
