"""FFTW wisdom kept on disk between runs, so a new process does not measure its plans again.

FFTW's measuring planner times candidate algorithms for each transform size; the result
("wisdom") lets a later planner skip that [1]. Without a file, every new process of hcfplan
measured its plans again: 0.7 s in the first point of every ``simulate`` and scan worker at
N = 8192, where a warm point of bench/scan.py's config takes 0.5 s (profiled). Wisdom only
chooses among algorithms that all compute the same transform, so results agree to rounding
(about 1e-16) with or without it; a file from another machine of the same kind is still
correct, only perhaps slower.

File: ``fftw-wisdom.json`` in hcfplan's cache folder (:func:`.cache.cache_dir`), a JSON
object with ``format`` (``hcfplan-fftw-wisdom``), ``version`` (2; files of version 1 hold
plans whose measurement a 0.5 s time limit cut short, and are measured again), ``fftw``
(pyFFTW's version), ``machine`` (processor architecture and model) and ``wisdom`` (FFTW's
three wisdom texts: double, single, long double). A file that is unreadable, of another
format, version, pyFFTW version or machine is ignored and replaced; a cache folder that cannot
be written is not an error (the plans are then measured in each process, as before).

References
----------
.. [1] M. Frigo and S. G. Johnson, "The design and implementation of FFTW3," Proc. IEEE,
       vol. 93, no. 2, pp. 216-231, 2005, doi:10.1109/JPROC.2004.840301.
"""

from __future__ import annotations

import functools
import json
import os
import platform

from hcfplan.numerics.cache import cache_dir

WISDOM_FORMAT = "hcfplan-fftw-wisdom"
WISDOM_VERSION = 2
WISDOM_FILE = "fftw-wisdom.json"

#: Per process: the id of the process that read the file (a forked child inherits the
#: parent's state, and reads the file again), the wisdom last written or read, and the
#: problems (see :func:`save_wisdom`) whose wisdom was saved already.
_state: dict = {"loaded": None, "known": None, "saved": set()}


@functools.lru_cache(maxsize=1)
def _machine() -> str:
    model = ""
    try:
        with open("/proc/cpuinfo", encoding="utf-8", errors="replace") as handle:
            model = next((line.split(":", 1)[1].strip() for line in handle
                          if line.startswith("model name")), "")
    except OSError:
        pass
    return f"{platform.machine()} {model or platform.processor()}".strip()


def _header(pyfftw) -> dict:
    return {"format": WISDOM_FORMAT, "version": WISDOM_VERSION,
            "fftw": str(getattr(pyfftw, "__version__", "")), "machine": _machine()}


def _read(pyfftw) -> tuple[bytes, ...] | None:
    try:
        data = json.loads((cache_dir() / WISDOM_FILE).read_text(encoding="ascii"))
    except (OSError, UnicodeDecodeError, ValueError):
        return None
    if not isinstance(data, dict) or any(data.get(k) != v for k, v in _header(pyfftw).items()):
        return None
    texts = data.get("wisdom")
    if not (isinstance(texts, list) and len(texts) == 3 and all(isinstance(t, str) for t in texts)):
        return None
    return tuple(t.encode("ascii", errors="replace") for t in texts)


def load_wisdom(pyfftw) -> None:
    """Give FFTW the wisdom of the cache file, once per process (before the first plan).

    A process forked after its parent read the file reads it again: a scan worker forked from
    the fork server, which read the file when it started, would otherwise miss the plans that
    processes measured since (the parent's first point at a new grid size) and measure them
    again: 0.4 s at 8192 points and 0.6 s at 16384 for the two plans of the Kerr path, more
    with plasma. FFTW adds the file's wisdom to what it holds."""
    if _state["loaded"] == os.getpid():
        return
    _state["loaded"] = os.getpid()
    wisdom = _read(pyfftw)
    if wisdom is not None:
        pyfftw.import_wisdom(wisdom)
    _state["known"] = pyfftw.export_wisdom()


def save_wisdom(pyfftw, problem=None) -> None:
    """Write FFTW's wisdom to the cache file if it grew since the last read or write (merged
    with what another process wrote meanwhile; atomic: temporary file + rename).

    ``problem`` (hashable, e.g. sizes, types, direction and flags of the plan just made): once
    the wisdom of a problem was saved in this process, planning it again adds none, so later
    calls for it return at once. Exporting the wisdom to compare it took 2-3 ms a call, six
    calls per solver run with plasma (5 % of a 2^13-point run).
    """
    from hcfplan.numerics.storage import write_text

    if problem is not None and problem in _state["saved"]:
        return
    if problem is not None:
        _state["saved"].add(problem)
    wisdom = pyfftw.export_wisdom()
    if wisdom == _state["known"]:
        return
    on_disk = _read(pyfftw)
    if on_disk is not None:
        pyfftw.import_wisdom(on_disk)
        wisdom = pyfftw.export_wisdom()
    data = dict(_header(pyfftw), wisdom=[w.decode("ascii", errors="replace") for w in wisdom])
    try:
        write_text(cache_dir() / WISDOM_FILE, json.dumps(data) + "\n")
    except OSError:
        pass  # a cache that cannot be written only costs planning time (module docstring)
    _state["known"] = wisdom


def forget_loaded() -> None:
    """Read the file again before the next plan (for tests that change the cache folder)."""
    _state["loaded"], _state["known"], _state["saved"] = None, None, set()
