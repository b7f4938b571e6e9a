"""hcfplan's cache folder: results of pure, slow computations kept between runs.

Two things are kept: FFTW wisdom (:mod:`.fftw_wisdom`) and tables of photoionisation rates
(:func:`cached_rate_table`). A new process otherwise spent 0.7 s measuring FFT plans and 1.2 s
tabulating the PPT rate of argon (N = 16384, profile of a scan point of
``configs/yb_arf_argon.toml``), once per process: every ``simulate`` and every scan worker.

Folder: ``HCFPLAN_CACHE_DIR``, else ``$XDG_CACHE_HOME/hcfplan``, else ``~/.cache/hcfplan``
(common practice on Linux: the XDG base directory specification). Deleting it at any time is
harmless. A file that cannot be read, or a folder that cannot be written, only costs the time
of computing again; it is never an error. A cached table is keyed by a sha256 of its inputs,
of the source files of the code that computes it and of the numpy, scipy and hcfplan
versions, so a change of the formulas makes a new entry instead of reusing an old one.
"""

from __future__ import annotations

import hashlib
import json
import os
import zipfile
from collections.abc import Callable
from pathlib import Path

import numpy as np

#: Version of the cached-array file layout.
ARRAYS_VERSION = 1


def cache_dir() -> Path:
    """hcfplan's cache folder (module docstring)."""
    if os.environ.get("HCFPLAN_CACHE_DIR"):
        return Path(os.environ["HCFPLAN_CACHE_DIR"])
    base = os.environ.get("XDG_CACHE_HOME") or str(Path.home() / ".cache")
    return Path(base) / "hcfplan"


def _fingerprint(kind: str, inputs: tuple, sources: tuple[Path, ...]) -> str:
    import scipy

    from hcfplan.version import __version__

    digest = hashlib.sha256()
    digest.update(json.dumps([kind, ARRAYS_VERSION, repr(inputs), __version__,
                              np.__version__, scipy.__version__]).encode())
    for path in sources:
        digest.update(Path(path).read_bytes())
    return digest.hexdigest()[:32]


def cached_arrays(kind: str, inputs: tuple, sources: tuple[Path, ...],
                  compute: Callable[[], dict[str, np.ndarray]],
                  sound: Callable[[dict[str, np.ndarray]], bool] = lambda arrays: True,
                  ) -> dict[str, np.ndarray]:
    """The arrays ``compute()`` returns, read from ``<kind>-<key>.npz`` in the cache folder when
    an earlier run stored them for the same ``inputs`` and ``sources`` (module docstring). A
    file that cannot be read, or whose arrays ``sound`` rejects, is computed again and
    replaced."""
    from hcfplan.numerics.storage import write_npz

    path = cache_dir() / f"{kind}-{_fingerprint(kind, inputs, sources)}.npz"
    try:
        with np.load(path, allow_pickle=False) as stored:
            arrays = {name: stored[name] for name in stored.files}
        if sound(arrays):
            return arrays
    except (OSError, ValueError, EOFError, zipfile.BadZipFile):
        pass  # missing or damaged: computed again and replaced
    arrays = compute()
    try:
        write_npz(path, arrays)
    except OSError:
        pass  # a cache that cannot be written only costs the time of computing again
    return arrays


def _sound_rate_table(arrays: dict[str, np.ndarray]) -> bool:
    x, y = arrays.get("log_intensity"), arrays.get("log_rate")
    return (x is not None and y is not None and x.ndim == y.ndim == 1 and x.size == y.size >= 2
            and bool(np.all(np.diff(x) > 0)) and bool(np.all(np.isfinite(x))))


def cached_rate_table(model: str, wavelength: float, ip: float, l: int, m: int,  # noqa: E741
                      charge: int, intensity_min: float, intensity_max: float):
    """:func:`hcfplan.ionization.tables.tabulate_rate` with its default accuracy, kept in the
    cache folder (the same numbers: the nodes and log rates are stored exactly)."""
    from hcfplan import constants
    from hcfplan.ionization import rates as ionization
    from hcfplan.ionization import tables as ionization_tables

    def compute() -> dict[str, np.ndarray]:
        table = ionization_tables.tabulate_rate(model, wavelength, ip, l, m, charge,
                                                intensity_min, intensity_max)
        return {"log_intensity": table.log_intensity, "log_rate": table.log_rate}

    inputs = (model, float(wavelength), float(ip), int(l), int(m), int(charge),
              float(intensity_min), float(intensity_max))
    sources = tuple(Path(module.__file__) for module in (constants, ionization, ionization_tables))
    arrays = cached_arrays("rate-table", inputs, sources, compute, _sound_rate_table)
    x, y = arrays["log_intensity"], arrays["log_rate"]
    x.setflags(write=False)
    y.setflags(write=False)
    return ionization_tables.RateTable(log_intensity=x, log_rate=y, model=model)
