"""CoolProp's ``PropsSI`` and ``PhaseSI``, answered from hcfplan's cache folder where an earlier
run asked the same question.

Importing CoolProp and loading its fluid library cost the demo command about 0.3 s of CPU time
(0.12 s import, 0.18 s at the first call; ``python -X importtime`` and ``cProfile``), although
a run asks only a handful of values (the fill density, the reference densities of the gas
fits, the critical and triple points, the phase). :func:`props_si` and :func:`phase_si` keep
each answer in one small JSON file of the cache folder (:func:`hcfplan.numerics.cache.cache_dir`),
keyed by the exact arguments (floats by their ``repr``, which round-trips exactly) and by the
installed CoolProp (its version file, and the size and time of its compiled library), so a
repeat run of the same config does not import CoolProp at all and gets the same numbers.

Only answers are kept: a call CoolProp refuses (``ValueError``) is asked again each time and
raises as before. A file that cannot be read or written only costs the time of asking CoolProp.
"""

from __future__ import annotations

import functools
import hashlib
import importlib.util
import json
import numbers
from pathlib import Path

#: Most answers kept in the file (beyond, it starts again empty: a scan over many fills).
MAX_ENTRIES = 4096

_memo: dict[str, float | str] | None = None
_memo_path: Path | None = None


@functools.lru_cache(maxsize=1)
def _library_stamp() -> str:
    """Version and build of the installed CoolProp, without importing it (sha256, short; once
    per process)."""
    spec = importlib.util.find_spec("CoolProp")
    digest = hashlib.sha256()
    if spec is None or not spec.submodule_search_locations:
        return "none"
    folder = Path(next(iter(spec.submodule_search_locations)))
    for path in sorted(folder.iterdir()):
        if path.suffix in (".so", ".pyd") or path.name in ("__init__.py", "constants.py"):
            stat = path.stat()
            digest.update(f"{path.name}:{stat.st_size}:{stat.st_mtime_ns};".encode())
    return digest.hexdigest()[:24]


def _path() -> Path:
    from hcfplan.numerics.cache import cache_dir

    return cache_dir() / f"coolprop-{_library_stamp()}.json"


def _load() -> dict[str, float | str]:
    global _memo, _memo_path
    path = _path()
    if _memo is None or path != _memo_path:  # a new cache folder (tests set their own)
        try:
            stored = json.loads(path.read_text(encoding="utf-8"))
            _memo = stored if isinstance(stored, dict) else {}
        except (OSError, ValueError):
            _memo = {}
        _memo_path = path
    return _memo


def _store(memo: dict[str, float | str]) -> None:
    """Write the answers atomically (:func:`hcfplan.numerics.storage.write_text`: a
    half-written file is never read); a folder that cannot be written is ignored."""
    from hcfplan.numerics.storage import write_text

    if _memo_path is None:
        return
    try:
        write_text(_memo_path, json.dumps(memo))
    except OSError:
        pass  # a cache that cannot be written only costs the time of asking again


def _ask(kind: str, args: tuple, compute):
    # numbers keyed as floats (numpy scalars print otherwise); repr round-trips exactly
    key = kind + repr(tuple(float(a) if isinstance(a, numbers.Real) else a for a in args))
    memo = _load()
    if key in memo:
        return memo[key]
    value = compute()  # a ValueError of CoolProp propagates and nothing is kept
    if len(memo) >= MAX_ENTRIES:
        memo.clear()
    memo[key] = value
    _store(memo)
    return value


def props_si(*args) -> float:
    """``CoolProp.CoolProp.PropsSI(*args)`` as a float, from the cache where it is known.

    Parameters
    ----------
    *args
        The arguments of ``PropsSI``: ``(output, fluid)`` for a fluid constant or
        ``(output, name1, value1, name2, value2, fluid)`` for a state value (SI units).

    Returns
    -------
    float
        CoolProp's answer.

    Raises
    ------
    ValueError
        Where CoolProp refuses the call (never cached).

    References
    ----------
    I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng. Chem. Res. 53, 2498-2508 (2014),
    doi:10.1021/ie4033999 (CoolProp's ``PropsSI``).
    """
    def compute() -> float:
        from CoolProp.CoolProp import PropsSI  # lazy: 0.3 s with its fluid library

        return float(PropsSI(*args))

    return _ask("PropsSI", args, compute)


def phase_si(*args) -> str:
    """``CoolProp.CoolProp.PhaseSI(*args)`` (the phase string), from the cache where it is known.

    References
    ----------
    I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, Ind. Eng. Chem. Res. 53, 2498-2508 (2014),
    doi:10.1021/ie4033999 (CoolProp's ``PhaseSI``).
    """
    def compute() -> str:
        from CoolProp.CoolProp import PhaseSI

        return str(PhaseSI(*args))

    return _ask("PhaseSI", args, compute)
