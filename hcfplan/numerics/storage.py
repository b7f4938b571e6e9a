"""Atomic file writes: a file is complete or absent, never half-written.

Each write goes to a temporary file in the target folder, is flushed to disk (``fsync`` of the
file), renamed over the target and the folder is synced, so a crash or a full disk leaves
either the old file or the new one. SIGTERM/SIGHUP are held back during the rename. Used by
the disk cache (:mod:`hcfplan.numerics.cache`) and every output writer (:mod:`hcfplan.io.results`).
"""

from __future__ import annotations

import contextlib
import os
import signal
import tempfile
import threading
from collections.abc import Iterator
from pathlib import Path

import numpy as np

#: Signals that end the process without clean-up by default; held back during a write.
HELD_SIGNALS = tuple(getattr(signal, name) for name in ("SIGTERM", "SIGHUP")
                     if hasattr(signal, name))


@contextlib.contextmanager
def termination_held() -> Iterator[None]:
    """Hold SIGTERM/SIGHUP inside the block; deliver them, to the previous handlers, after it.

    Only the main thread can set signal handlers; elsewhere the block runs unprotected.
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    caught: list[int] = []

    def hold(signum, frame):
        caught.append(signum)

    previous = {sig: signal.signal(sig, hold) for sig in HELD_SIGNALS}
    try:
        yield
    finally:
        for sig, handler in previous.items():
            signal.signal(sig, signal.SIG_DFL if handler is None else handler)
        for signum in dict.fromkeys(caught):
            signal.raise_signal(signum)


@contextlib.contextmanager
def atomic_path(path: Path, suffix: str) -> Iterator[Path]:
    """A temporary path beside ``path``; on leaving the block it is synced and renamed to ``path``
    (removed instead when the block raises)."""
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    with termination_held():
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=path.parent)
        os.close(fd)
        tmp_path = Path(tmp)
        try:
            yield tmp_path
            os.chmod(tmp_path, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
            _sync(tmp_path)
            os.replace(tmp_path, path)
            _sync(path.parent)
        finally:
            if tmp_path.exists():
                tmp_path.unlink()


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def _sync(path: Path) -> None:
    """Flush a file's (or a folder's) data to disk; a file system that cannot sync a folder
    (some network and FUSE file systems) is passed over."""
    flags = os.O_RDONLY | getattr(os, "O_DIRECTORY", 0) if path.is_dir() else os.O_RDONLY
    fd = os.open(path, flags)
    try:
        os.fsync(fd)
    except OSError:
        if not path.is_dir():
            raise
    finally:
        os.close(fd)


def write_text(path: Path, text: str) -> None:
    """Write a text file atomically."""
    with atomic_path(Path(path), ".tmp") as tmp:
        tmp.write_text(text, encoding="utf-8")


def write_npz(path: Path, arrays: dict[str, np.ndarray]) -> None:
    """Write arrays to a compressed ``.npz`` atomically."""
    with atomic_path(Path(path), ".npz") as tmp:
        with open(tmp, "wb") as handle:
            np.savez_compressed(handle, **arrays)
