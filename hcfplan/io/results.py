"""Writing results: every file is written to a temporary name in the same folder and renamed
into place, so a reader (or an interrupted run) sees either the complete file or none."""

from __future__ import annotations

import contextlib
import json
import math
import os
import tempfile
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

import numpy as np

from ..errors import ConfigError


@contextlib.contextmanager
def _atomic_path(path: Path, suffix: str) -> Iterator[Path]:
    path = Path(path)
    path.parent.mkdir(parents=True, exist_ok=True)
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
    """Create the output folder; refuse an existing non-empty one unless ``force``."""
    path = Path(path)
    if path.exists() and not path.is_dir():
        raise ConfigError(f"--out {path}: exists and is not a folder")
    if path.is_dir() and any(path.iterdir()) and not force:
        raise ConfigError(f"--out {path}: folder exists and is not empty; use --force to "
                          "overwrite or choose another --out")
    path.mkdir(parents=True, exist_ok=True)
    return path
