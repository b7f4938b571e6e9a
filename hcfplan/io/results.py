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
import tempfile
import threading
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import ConfigError

#: Signals that end the process without clean-up by default; held back during a write.
HELD_SIGNALS = tuple(getattr(signal, name) for name in ("SIGTERM", "SIGHUP")
                     if hasattr(signal, name))


@contextlib.contextmanager
def _termination_held() -> Iterator[None]:
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
def _atomic_path(path: Path, suffix: str) -> Iterator[Path]:
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
    with _termination_held():
        fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=suffix, dir=path.parent)
        os.close(fd)
        tmp_path = Path(tmp)
        try:
            yield tmp_path
            os.chmod(tmp_path, 0o666 & ~_umask())  # mkstemp makes 0600; give the usual mode
            os.replace(tmp_path, path)
        finally:
            if tmp_path.exists():
                tmp_path.unlink()


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def _jsonable(value: Any) -> Any:
    if isinstance(value, dict):
        return {str(k): _jsonable(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_jsonable(v) for v in value]
    if isinstance(value, np.ndarray):
        return _jsonable(value.tolist())
    if isinstance(value, (np.floating, np.integer, np.bool_)):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, Path):
        return str(value)
    return value


def write_text(path: Path, text: str) -> None:
    """Write a text file atomically."""
    with _atomic_path(Path(path), ".tmp") as tmp:
        tmp.write_text(text, encoding="utf-8")


def write_json(path: Path, data: dict) -> None:
    """Write ``data`` as indented JSON atomically (NaN/inf become null)."""
    write_text(path, json.dumps(_jsonable(data), indent=2) + "\n")


def write_npz(path: Path, arrays: dict[str, np.ndarray]) -> None:
    """Write arrays to a compressed ``.npz`` atomically."""
    with _atomic_path(Path(path), ".npz") as tmp:
        with open(tmp, "wb") as handle:
            np.savez_compressed(handle, **arrays)


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
            with _atomic_path(path, path.suffix or ".png") as tmp:
                fig.savefig(tmp, format=(path.suffix.lstrip(".") or "png"))
        finally:
            plt.close(fig)


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
