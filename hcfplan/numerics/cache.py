"""hcfplan's cache folder: results of pure, slow computations kept between runs.

Two things are kept: FFTW wisdom (:mod:`.fftw_wisdom`) and arrays computed by
:func:`cached_arrays`, e.g. tables of photoionisation rates
(:func:`hcfplan.ionization.tables.cached_rate_table`). A new process otherwise spent 0.7 s
measuring FFT plans and 1.2 s tabulating the PPT rate of argon (N = 16384, profile of a scan
point of ``configs/yb_arf_argon.toml``), once per process: every ``simulate`` and every scan
worker.

Folder: ``HCFPLAN_CACHE_DIR``, else ``$XDG_CACHE_HOME/hcfplan``, else ``~/.cache/hcfplan``
(common practice on Linux: the XDG base directory specification). Deleting it at any time is
harmless. A file that cannot be read, or a folder that cannot be written, only costs the time
of computing again; it is never an error. Cached arrays are keyed by a sha256 of their inputs,
of the source files of the code that computes them and of the numpy, scipy and hcfplan
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
    """hcfplan's cache folder (module docstring).

    Returns
    -------
    Path
        ``HCFPLAN_CACHE_DIR``, else ``$XDG_CACHE_HOME/hcfplan``, else ``~/.cache/hcfplan``.

    References
    ----------
    none: the XDG base directory layout (common practice, no source).
    """
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
    """The arrays ``compute()`` returns, read from the cache folder when an earlier run stored them.

    Parameters
    ----------
    kind : str
        Prefix of the file name ``<kind>-<key>.npz``.
    inputs : tuple
        The (hashable, repr-stable) inputs of the computation; part of the key.
    sources : tuple of Path
        Source files of the code that computes the arrays; their bytes are part of the key.
    compute : callable
        () -> dict of name to ndarray, called when nothing usable is stored.
    sound : callable
        Check of arrays read back; False means "compute again and replace".

    Returns
    -------
    dict of str to ndarray

    Notes
    -----
    A file that cannot be read, or whose arrays ``sound`` rejects, is computed again and
    replaced; a folder that cannot be written only costs the time of computing again.

    References
    ----------
    none: numerical helper.
    """
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
