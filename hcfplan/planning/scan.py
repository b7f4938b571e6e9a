"""Parameter scans: every point is one full chain run, saved as it finishes, resumable.

A scan varies one or two config keys (``section.key``) over a linear range or a list of values.
Each point is identified by a short hash of its resolved config (:func:`config_key`), so a
finished point is found again whatever the order of the points, and a rerun of the same scan
recomputes nothing that is already finished. Points are computed by :func:`compute_point`, a
module-level function of a plain task dict; the local process pool and a Dask cluster call the
same function. Only the parent process writes files (atomically, temp file + rename), so a
killed scan leaves complete point files or none.

Point file ``points/<key>.json`` (format ``hcfplan-scan-point``, version 1): ``key``,
``values`` (the varied values in the config's own units), ``status`` (``ok`` or ``failed``),
``message``, ``config`` (the resolved config), ``summary`` (the chain summary plus ``limits``),
``margins`` (:func:`point_margins`), ``spectrum`` (the fiber output spectrum, downsampled to
at most :data:`SPECTRUM_POINTS` bins over its -60 dB extent: ``frequency_hz``,
``energy_density_j_per_hz``), ``seconds`` and ``checksum`` (sha256 of the canonical JSON of
all other fields). A file with bad JSON, another format or version, a key that does not match
its name or its config, missing fields or a wrong checksum is recomputed.
"""

from __future__ import annotations

import contextlib
import hashlib
import itertools
import json
import math
import os
import queue
import sys
import threading
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError, HcfplanError
from hcfplan.io.results import json_ready

POINT_FORMAT = "hcfplan-scan-point"
POINT_VERSION = 1
SCAN_FORMAT = "hcfplan-scan"
#: Largest number of spectral bins kept per point.
SPECTRUM_POINTS = 512
#: Spectral floor of the stored output spectrum, relative to its peak. [1]
SPECTRUM_FLOOR = 1e-6
#: How long to wait for a Dask scheduler to answer. [s]
DASK_CONNECT_TIMEOUT = 10.0
#: Fields every point file must hold.
POINT_FIELDS = ("format", "version", "key", "values", "status", "message", "config", "summary",
                "margins", "spectrum", "seconds", "checksum")


# ---------------------------------------------------------------------------------------------
# what is varied


@dataclass(frozen=True)
class Vary:
    """One varied config key and its values (in the key's own unit)."""

    key: str
    values: tuple


@dataclass(frozen=True)
class ScanPoint:
    index: int
    values: dict
    overrides: tuple[str, ...]
    key: str


@dataclass(frozen=True)
class ScanPlan:
    """A validated scan: the base config, what varies, and every point with its key."""

    source: Path
    raw: dict
    overrides: tuple[str, ...]
    extra_gas_dirs: tuple[str, ...]
    varies: tuple[Vary, ...]
    points: tuple[ScanPoint, ...]
    definition: str


def _schema_key(path: str, option: str):
    import difflib

    from hcfplan.io.schema import SCHEMA

    parts = path.split(".")
    if len(parts) != 2 or not all(parts):
        raise ConfigError(f"{option} {path!r}: the key path must be section.key")
    section, key = parts
    if section not in SCHEMA:
        close = difflib.get_close_matches(section, list(SCHEMA), n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        raise ConfigError(f"{option} {path}: unknown section [{section}]{hint} "
                          f"(sections: {', '.join(SCHEMA)})")
    if key not in SCHEMA[section]:
        close = difflib.get_close_matches(key, list(SCHEMA[section]), n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        raise ConfigError(f"{option} {path}: unknown key{hint} "
                          f"(keys of [{section}]: {', '.join(SCHEMA[section])})")
    return SCHEMA[section][key]


def _range_values(path: str, text: str, kind: str, option: str) -> tuple:
    parts = text.split(":")
    try:
        start, stop, count = float(parts[0]), float(parts[1]), int(parts[2])
    except (ValueError, IndexError):
        raise ConfigError(f"{option} {path}={text}: expected START:STOP:COUNT "
                          "(numbers, COUNT an integer)") from None
    if len(parts) != 3 or count < 1 or not (math.isfinite(start) and math.isfinite(stop)):
        raise ConfigError(f"{option} {path}={text}: expected START:STOP:COUNT with finite "
                          "START, STOP and COUNT >= 1")
    if kind not in ("float", "int"):
        raise ConfigError(f"{option} {path}: a START:STOP:COUNT range needs a numeric key "
                          f"({path} is {kind}); give a comma list instead")
    if count == 1 and start != stop:
        raise ConfigError(f"{option} {path}={text}: COUNT = 1 needs START = STOP")
    step = (stop - start) / (count - 1) if count > 1 else 0.0
    values = [start + i * step for i in range(count)]
    values[-1] = stop
    if kind == "int":
        if any(abs(v - round(v)) > 1e-9 for v in values):
            raise ConfigError(f"{option} {path}={text}: {path} is an integer key; the range "
                              "gives non-integer values")
        return tuple(int(round(v)) for v in values)
    return tuple(values)


def parse_vary(text: str, option: str = "--vary") -> Vary:
    """``section.key=START:STOP:COUNT`` (linear, COUNT values including both ends) or
    ``section.key=a,b,c`` (any key). Values are parsed as TOML, like ``--set``."""
    from hcfplan.io.tomlio import parse_toml_value

    if "=" not in text:
        raise ConfigError(f"{option} {text!r}: expected section.key=START:STOP:COUNT or "
                          "section.key=a,b,c")
    path, _, spec = text.partition("=")
    path, spec = path.strip(), spec.strip()
    key = _schema_key(path, option)
    if spec.count(":") == 2 and "," not in spec:
        return Vary(path, _range_values(path, spec, key.kind, option))
    items = [s.strip() for s in spec.split(",")]
    if not spec or any(not s for s in items):
        raise ConfigError(f"{option} {path}={spec!r}: empty value in the list")
    try:
        return Vary(path, tuple(parse_toml_value(s) for s in items))
    except ValueError as exc:
        raise ConfigError(f"{option} {path}: {exc}") from None


def override_text(path: str, value: Any) -> str:
    """``section.key=value`` with the value written as TOML."""
    if isinstance(value, bool):
        return f"{path}={'true' if value else 'false'}"
    if isinstance(value, (int, float)):
        return f"{path}={value!r}"
    if isinstance(value, str):
        return f"{path}={json.dumps(value)}"
    raise ConfigError(f"--vary {path}: value {value!r} cannot be varied (numbers, strings, "
                      "true/false only)")


def _canonical(data: Any) -> str:
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=True)


def config_key(resolved: dict) -> str:
    """First 16 hex digits of the sha256 of the canonical JSON of a resolved config."""
    return hashlib.sha256(_canonical(json_ready(resolved)).encode()).hexdigest()[:16]


def plan_scan(config_path: str | Path, varies: list[Vary] | tuple[Vary, ...],
              overrides=(), extra_gas_dirs=()) -> ScanPlan:
    """Validate the base config and every point through the config machinery."""
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.tomlio import read_toml

    if not 1 <= len(varies) <= 2:
        raise ConfigError(f"--vary: give one or two keys, got {len(varies)}")
    if len(varies) == 2 and varies[0].key == varies[1].key:
        raise ConfigError(f"--vary {varies[0].key}: the same key is given twice")
    path = Path(config_path)
    raw = read_toml(path)
    config_from_mapping(raw, base_dir=path.parent, overrides=overrides,
                        extra_gas_dirs=extra_gas_dirs, source=path)
    points, seen = [], {}
    for index, combo in enumerate(itertools.product(*(v.values for v in varies))):
        values = {v.key: x for v, x in zip(varies, combo, strict=True)}
        point_over = tuple(override_text(k, x) for k, x in values.items())
        cfg = config_from_mapping(raw, base_dir=path.parent,
                                  overrides=tuple(overrides) + point_over,
                                  extra_gas_dirs=extra_gas_dirs, source=path)
        key = config_key(cfg.resolved)
        if key in seen:
            raise ConfigError(f"--vary: points {seen[key]} and {values} resolve to the same "
                              "config; remove the duplicate value")
        seen[key] = values
        points.append(ScanPoint(index, values, point_over, key))
    definition = hashlib.sha256(_canonical(
        {"varied": [v.key for v in varies], "points": [p.key for p in points]}).encode())
    return ScanPlan(path, raw, tuple(overrides), tuple(str(d) for d in extra_gas_dirs),
                    tuple(varies), tuple(points), definition.hexdigest()[:16])


# ---------------------------------------------------------------------------------------------
# margins against the modelled limits


@dataclass(frozen=True)
class RunNumbers:
    """The numbers of a run that ``limits_report`` reads (duck-typed ``run``). [W, W/m^2]"""

    max_peak_power: float | None
    max_peak_intensity: float | None
    output_peak_power: float | None


def run_numbers(summary: dict) -> RunNumbers:
    out = summary.get("output", {})
    return RunNumbers(out.get("max_peak_power_w"), out.get("max_peak_intensity_w_per_m2"),
                      out.get("peak_power_w"))


def limits_values(config, summary: dict | None = None) -> dict:
    """``limits_report(config, run)`` (flat, plain JSON types); ``run`` from ``summary``."""
    from hcfplan.planning.reports.limits import limits_report

    run = run_numbers(summary) if summary else None
    return json_ready(limits_report(config, run=run))


def number_or_none(value, *, finite: bool = False) -> float | None:
    """``value`` as a float if it is a number (not a bool; with ``finite``, not inf or nan),
    else None: how the planning tables read a summary or margin value."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return None
    return None if finite and not math.isfinite(value) else float(value)


def _number(flat: dict, name: str) -> float | None:
    return number_or_none(flat.get(name))


def point_margins(config, report: dict) -> dict:
    """Self-focusing margin, ionisation fraction and pressure of one point against the limits.

    ``report`` is the flat :func:`limits_values`; ``binding`` lists every check of severity
    "limit" with status "exceeds".
    """
    lim = config.limits
    sf = _number(report, "limits.self_focusing.margin_input")
    sf_fiber = _number(report, "limits.self_focusing.margin_in_fiber")
    ion = _number(report, "limits.ionization.fraction_in_fiber")
    if ion is None:
        ion = _number(report, "limits.ionization.fraction_input")
    binding = [c["name"] for c in report.get("limits.checks", [])
               if c.get("severity") == "limit" and c.get("status") == "exceeds"]
    return {
        "self_focusing": sf, "self_focusing_in_fiber": sf_fiber,
        "self_focusing_required": lim.self_focusing_margin,
        "self_focusing_max_pressure_pa": _number(report, "limits.self_focusing.max_pressure_pa"),
        "ionization_fraction": ion, "ionization_limit": lim.ionization_fraction_limit,
        "ionization_margin": (lim.ionization_fraction_limit / ion if ion else None),
        "pressure_pa": config.gas.pressure if config.gas is not None else None,
        "rated_pressure_pa": config.cell.rated_pressure,
        "acceptable": not binding, "binding": ", ".join(binding),
    }


# ---------------------------------------------------------------------------------------------
# one point (runs in a worker process)


def flatten(data: dict, prefix: str = "") -> dict:
    """Nested dict -> ``{"a.b.c": leaf}``; keys already holding dots are kept as they are."""
    out: dict[str, Any] = {}
    for key, value in data.items():
        name = f"{prefix}{key}"
        if isinstance(value, dict):
            out.update(flatten(value, f"{name}."))
        else:
            out[name] = value
    return out


def _spectrum(chain) -> dict:
    """Output spectrum over its -60 dB extent, binned to <= SPECTRUM_POINTS (bin means)."""
    import numpy as np

    grid = chain.grid
    order = np.argsort(grid.frequency)
    freq = np.asarray(grid.frequency)[order]
    dens = np.abs(np.asarray(chain.propagation.field_out_spectrum)[order]) ** 2
    if not np.any(dens > 0):
        return {"frequency_hz": [], "energy_density_j_per_hz": []}
    above = np.flatnonzero(dens >= SPECTRUM_FLOOR * dens.max())
    freq, dens = freq[above[0]:above[-1] + 1], dens[above[0]:above[-1] + 1]
    if freq.size > SPECTRUM_POINTS:
        parts = np.array_split(np.arange(freq.size), SPECTRUM_POINTS)
        freq = np.array([freq[i].mean() for i in parts])
        dens = np.array([dens[i].mean() for i in parts])
    return {"frequency_hz": [float(f"{v:.7g}") for v in freq],
            "energy_density_j_per_hz": [float(f"{v:.5g}") for v in dens]}


def _with_checksum(record: dict) -> dict:
    record = json_ready(record)
    body = {k: v for k, v in record.items() if k != "checksum"}
    record["checksum"] = "sha256:" + hashlib.sha256(_canonical(body).encode()).hexdigest()
    return record


def run_summary(config, chain) -> tuple[dict, dict]:
    """(summary, margins) of a chain run; a partial run gets the analytic limits only."""
    from hcfplan.planning.chain import summary_dict

    summary = json_ready(summary_dict(chain))
    if chain.propagation.success:  # summary_dict holds limits_report with the run's peaks
        report = {f"limits.{k}": v for k, v in summary["limits"].items()}
    else:
        report = limits_values(config)
        summary["limits"] = {k.removeprefix("limits."): v for k, v in report.items()}
    return summary, point_margins(config, report)


def _run_point(config) -> tuple[dict, dict, dict, str, str]:
    from hcfplan.planning.chain import run_chain

    chain = run_chain(config, workers=1)
    summary, margins = run_summary(config, chain)
    prop = chain.propagation
    status = "ok" if prop.success else "failed"
    return summary, margins, _spectrum(chain), status, "" if prop.success else prop.message


def compute_point(task: dict) -> dict:
    """Run the chain for one point; returns the complete point record (see module docstring).

    ``task`` holds plain data only (``raw``, ``base_dir``, ``overrides``, ``extra_gas_dirs``,
    ``source``, ``key``, ``values``), so it pickles for a process pool or a Dask cluster. A
    config or gas-phase problem of this point (HcfplanError) becomes a failed record; any
    other exception is a bug and propagates.
    """
    from hcfplan.io.config import config_from_mapping

    start = time.perf_counter()
    config = config_from_mapping(task["raw"], base_dir=Path(task["base_dir"]),
                                 overrides=tuple(task["overrides"]),
                                 extra_gas_dirs=tuple(task["extra_gas_dirs"]),
                                 source=Path(task["source"]))
    key = config_key(config.resolved)
    if key != task["key"]:
        raise RuntimeError(f"point {task['values']}: config key {key} differs from the "
                           f"planned {task['key']} (package versions differ?)")
    summary, margins, spectrum, status, message = {}, {}, {}, "failed", ""
    chain_start = time.perf_counter()
    try:
        summary, margins, spectrum, status, message = _run_point(config)
    except HcfplanError as exc:
        message = " ".join(str(exc).split())
    chain_time = time.perf_counter() - chain_start
    return _with_checksum({
        "format": POINT_FORMAT, "version": POINT_VERSION, "key": key,
        "values": task["values"], "status": status, "message": message,
        "config": config.resolved, "summary": summary, "margins": margins,
        "spectrum": spectrum,
        "seconds": {"point": time.perf_counter() - start, "chain": chain_time},
    })


def point_task(plan: ScanPlan, point: ScanPoint) -> dict:
    """The plain-data task of one point for :func:`compute_point`."""
    return {"raw": plan.raw, "base_dir": str(plan.source.parent),
            "source": str(plan.source), "overrides": list(plan.overrides + point.overrides),
            "extra_gas_dirs": list(plan.extra_gas_dirs), "key": point.key,
            "values": point.values}


def check_point(record: Any, key: str) -> str:
    """Empty string for a sound point record of ``key``, otherwise what is wrong with it."""
    if not isinstance(record, dict):
        return "not a JSON object"
    missing = [f for f in POINT_FIELDS if f not in record]
    if missing:
        return f"missing fields {', '.join(missing)}"
    if record["format"] != POINT_FORMAT or record["version"] != POINT_VERSION:
        return f"format {record['format']!r} version {record['version']!r}"
    if record["key"] != key or config_key(record["config"]) != key:
        return "key does not match the file name or its config"
    if _with_checksum(record)["checksum"] != record["checksum"]:
        return "checksum mismatch"
    if record["status"] not in ("ok", "failed"):
        return f"status {record['status']!r}"
    return ""


def read_point(path: Path, key: str) -> tuple[dict | None, str]:
    """(record, "") for a sound point file, (None, reason) for a missing or damaged one."""
    try:
        record = json.loads(Path(path).read_text(encoding="utf-8"))
    except FileNotFoundError:
        return None, "missing"
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        return None, f"unreadable ({type(exc).__name__})"
    problem = check_point(record, key)
    return (None, problem) if problem else (record, "")


# ---------------------------------------------------------------------------------------------
# running the points: serial, local processes, Dask


def _run_serial(tasks: list[dict], on_done: Callable[[dict], None], _workers, _address) -> None:
    for task in tasks:
        on_done(compute_point(task))


#: Modules a fork server imports once before forking the scan workers (start-up cost): every
#: module a point imports (a test checks that a point imports no other hcfplan module), and
#: ``hcfplan.cli.app``: a worker runs the command's script again (multiprocessing does so for a
#: script run by path, such as the ``hcfplan`` command), which imports the command line
#: (0.1-0.2 s per worker otherwise; listing ``"__main__"`` instead does nothing in Python 3.11,
#: whose fork server is never given the script's path). The last one also loads the compiled
#: solver kernels and the FFT library (about 1.5 s per worker otherwise, measured with
#: ``bench/scan.py``).
WORKER_PRELOAD = [
    "hcfplan.cli.app",
    "hcfplan.planning.chain",
    "hcfplan.propagation.solve",
    "hcfplan.thz.generation",
    "hcfplan.compression.compressor",
    "hcfplan.planning.reports.limits",
    "hcfplan.planning.reports.fiber",
    "hcfplan.limits.beam",
    "hcfplan.limits.cell",
    "hcfplan.limits.cautions",
    "hcfplan.ionization.rates",
    "hcfplan.ionization.tables",
    "hcfplan.pulse.fields",
    "hcfplan.fibers.derived",
    "hcfplan.io.results",
    "hcfplan.io.csvdata",
    "hcfplan.io.config",
    "hcfplan.materials.gases",
    "hcfplan.materials.data.crystals",
    "hcfplan._gases",
    "hcfplan.propagation.warmup",
]
#: Thread counts of the numerical libraries in the scan workers: the workers are the
#: parallelism. OpenBLAS's own threads (it busy-waits) in two workers on two cores doubled the
#: time per point (0.29 s instead of 0.15 s, 1024-point grid, bench/scan.py).
WORKER_THREADS = {"OMP_NUM_THREADS": "1", "OPENBLAS_NUM_THREADS": "1", "MKL_NUM_THREADS": "1",
                  "NUMBA_NUM_THREADS": "1"}


@contextlib.contextmanager
def _worker_environment():
    """Set :data:`WORKER_THREADS` in os.environ while worker processes (and the fork server)
    are started from it, then restore it."""
    saved = {key: os.environ.get(key) for key in WORKER_THREADS}
    os.environ.update(WORKER_THREADS)
    try:
        yield
    finally:
        for key, value in saved.items():
            if value is None:
                os.environ.pop(key, None)
            else:
                os.environ[key] = value


def _pool_context():
    """``forkserver`` where available: workers fork from a clean server process that has
    imported :data:`WORKER_PRELOAD` (no threads or numba state copied from the parent, no
    per-worker import cost); ``spawn`` elsewhere."""
    import multiprocessing

    if "forkserver" in multiprocessing.get_all_start_methods():
        context = multiprocessing.get_context("forkserver")
        context.set_forkserver_preload(WORKER_PRELOAD)
        return context
    return multiprocessing.get_context("spawn")


def start_worker_server(workers: int) -> None:
    """Start the fork server of the local worker processes now, when ``workers`` > 1.

    The server imports :data:`WORKER_PRELOAD` (about 2 s) before it can fork the first worker.
    A command that will run points on local processes calls this first, so the server imports
    on another core while the command loads its config and plans (scan: 0.5-1 s) or runs its
    nominal chain (``--spread``: a whole point). Without a fork server (``spawn``), or with one
    worker, nothing is done; a server that is already running is kept.
    """
    context = _pool_context()
    if workers <= 1 or context.get_start_method() != "forkserver":
        return
    from multiprocessing import forkserver

    with _worker_environment():  # the server's environment is the workers' environment
        forkserver.ensure_running()


#: Interpreter switch interval [s] while the parent computes points beside the pool
#: (:func:`sys.setswitchinterval`; Python's default is 5 ms). The main thread, which hands the
#: pool its tasks and takes its results, and the executor's own threads wait for the parent's
#: compute thread to give up the GIL at each step of a hand-off. With a busy thread beside
#: them, a task took 16-22 ms from submission to its start in a pool process at the default
#: interval and 0.5-1.3 ms at this one, and a new pool process 23-115 ms to take its first
#: task against 14-39 ms (``bench/scan.py``, hand-off). A thread that waits for nothing is
#: not interrupted.
HANDOFF_SWITCH_INTERVAL = 2e-4


def point_work(record: dict) -> float:
    """Work of a computed point, for :class:`_CostlierEndFirst`: N evaluations of the solver
    times N log2 N of its grid (the FFTs dominate a point); 0 for a point without a solver run.
    Unlike its wall time, it does not include a new process's first-call set-up."""
    summary = record.get("summary") or {}
    evaluations = (summary.get("solver") or {}).get("rhs_evaluations") or 0
    points = (summary.get("grid") or {}).get("points") or 0
    return float(evaluations) * points * math.log2(max(points, 2))


class _CostlierEndFirst:
    """Order in which local workers take the tasks of a run: from the end of the task list
    whose points cost more so far, so the costliest points start first and the run does not
    end on one long point while the other workers wait.

    This is the longest-processing-time-first rule of Graham [1] (its makespan is within
    4/3 - 1/(3m) of the optimum on m workers), with the costs learnt on the way: along a
    scanned key the cost of a point mostly grows or falls steadily (more pressure or energy:
    more nonlinearity, more solver steps), so the first two tasks come from the two ends of
    the list; then each next task is taken from the end whose latest finished point had the
    larger :func:`point_work`; while only one end has a finished point, from the other end
    (its point is still running, so it costs more). Ties go to the start of the list. Results
    do not depend on the order (every point is computed once, alone).

    References
    ----------
    .. [1] R. L. Graham, "Bounds on multiprocessing timing anomalies," SIAM J. Appl. Math.,
           vol. 17, no. 2, pp. 416-429, 1969, doi:10.1137/0117039. [from memory, with the
           4/3 - 1/(3m) bound]
    """

    def __init__(self, tasks: list[dict]) -> None:
        self._tasks, self._low, self._high = tasks, 0, len(tasks) - 1
        self._ends: dict[str, str] = {}  # key of a task in progress -> "low" or "high"
        self._work: dict[str, float | None] = {"low": None, "high": None}  # latest finished

    def _pick(self) -> str:
        if self._low == 0:  # the two ends first
            return "low"
        if self._high == len(self._tasks) - 1:
            return "high"
        low, high = self._work["low"], self._work["high"]
        if low is None or high is None:  # the end without a finished point: still running
            return "low" if low is None else "high"
        return "high" if high > low else "low"

    def take(self) -> dict | None:
        """The next task, or None when all are given out."""
        if self._low > self._high:
            return None
        end = self._pick()
        if end == "low":
            task, self._low = self._tasks[self._low], self._low + 1
        else:
            task, self._high = self._tasks[self._high], self._high - 1
        self._ends[task.get("key", "")] = end
        return task

    def finished(self, record: dict) -> None:
        """Note the work of a finished point (a record of :func:`compute_point`)."""
        end = self._ends.pop(record.get("key", ""), None)
        if end is not None:
            self._work[end] = point_work(record)


class _ParentWorker:
    """The parent's own share of a local-process run: a daemon thread that takes tasks with
    ``take()`` until it gives None, and puts ``(self, record or None, exception or None)`` on
    ``results``. It feeds itself, so it keeps computing while the main thread waits for the
    pool's first process (the fork server imports first). A daemon thread, so an interrupted
    CLI exits without waiting for the point in progress (only the main thread writes files)."""

    def __init__(self, take: Callable[[], dict | None], results: queue.Queue,
                 finished: Callable[[dict], None] | None = None) -> None:
        self._take, self._results, self._finished = take, results, finished
        threading.Thread(target=self._serve, name="hcfplan-scan-parent", daemon=True).start()

    def _serve(self) -> None:
        while (task := self._take()) is not None:
            try:
                record = compute_point(task)
                if self._finished is not None:  # before it takes its next task
                    self._finished(record)
                self._results.put((self, record, None))
            except BaseException as exc:  # handed to the main thread, which raises it
                self._results.put((self, None, exc))
                return


def _shutdown(pool, *, terminate: bool) -> None:
    """Shut ``pool`` down; ``terminate``: stop its processes now (an interrupted run)."""
    started = list((getattr(pool, "_processes", None) or {}).values())
    pool.shutdown(wait=not terminate, cancel_futures=True)
    if terminate:
        for process in started:
            process.terminate()


class _KeptPool:
    """The local process pool kept between runs of one parent process.

    :meth:`lend` gives a run the pool of the previous run when it has the same size and is not
    broken (a session that runs several scans, or ``compare --spread``, which runs the corners
    of each side in turn): its processes are warm, so a run does not wait for a new process
    (30-90 ms from the fork server) nor pay a new process's first point (about twice a warm
    point at 1024 points: per-process tables and plans; ``bench/scan.py``). Otherwise the kept
    pool is shut down and a new one made and kept. While one run has it, a run from another
    thread gets a pool of its own, which is not kept. A run that fails or is interrupted stops
    the processes of its pool. The processes of a kept pool are idle between runs and end
    with this process: the executor stops them at exit, and the kept pool is released then
    (:mod:`atexit`), while the modules its clean-up uses still exist.
    """

    def __init__(self) -> None:
        import atexit

        self._lock = threading.Lock()
        self._pool, self._size, self._lent = None, 0, False
        atexit.register(self.release)

    @staticmethod
    def _new(children: int):
        from concurrent.futures import ProcessPoolExecutor

        return ProcessPoolExecutor(max_workers=children, mp_context=_pool_context())

    def lend(self, children: int):
        """(pool of ``children`` processes, whether it is the kept one) for one run."""
        with self._lock:
            if self._lent:
                return self._new(children), False
            if self._pool is not None and (self._size != children
                                           or getattr(self._pool, "_broken", False)):
                _shutdown(self._pool, terminate=False)
                self._pool = None
            if self._pool is None:
                self._pool, self._size = self._new(children), children
            self._lent = True
            return self._pool, True

    def give_back(self, pool, kept: bool, *, failed: bool) -> None:
        """End of a run with ``pool`` (from :meth:`lend`); ``failed``: it ended by an exception
        (the pool's processes are stopped, and a kept pool is not kept)."""
        if not kept:
            _shutdown(pool, terminate=failed)
            return
        with self._lock:
            self._lent = False
            if failed:
                self._pool = None
                _shutdown(pool, terminate=True)

    def release(self) -> None:
        """Shut the kept pool down, unless a run has it."""
        with self._lock:
            if self._pool is not None and not self._lent:
                pool, self._pool = self._pool, None
                _shutdown(pool, terminate=False)


_KEPT = _KeptPool()


def release_workers() -> None:
    """Stop the pool processes kept for a next run (:class:`_KeptPool`), if there are any.

    A command that has no more points to compute calls this before it draws its figures: the
    idle processes give back their memory (150 MB for one that ran the demo config), and the
    figures' helper process (:func:`hcfplan.io.results.write_figures` forks one) is not forked
    beside the pool's threads."""
    _KEPT.release()


def _pool_point(task: dict, folder: str) -> dict:
    """:func:`compute_point` in a pool process, in the parent's current folder ``folder``: a new
    process starts in it, a kept one (:class:`_KeptPool`) may have started in another, which
    may no longer exist."""
    os.chdir(folder)
    return compute_point(task)


def _run_processes(tasks, on_done, workers: int, _address) -> None:
    """``workers`` points at a time: ``workers - 1`` pool processes (see :func:`_pool_context`;
    the pool is kept for the next run of this process, :class:`_KeptPool`) and the parent
    itself, in a thread (:class:`_ParentWorker`), which starts at once: the first points are
    computed while the fork server imports :data:`WORKER_PRELOAD` (about 2.5 s, during which
    starting a pool process blocks the main thread). The tasks are taken in the order of
    :class:`_CostlierEndFirst` (the costliest first). A pool process is given its next task
    when it hands in a result, before that result is written (no queued tasks: none waits
    behind a long point at the end). BLAS runs one thread in the parent meanwhile
    (threadpoolctl), as in the workers (:data:`WORKER_THREADS`), and the switch interval is
    :data:`HANDOFF_SWITCH_INTERVAL`, so hand-offs do not wait for the compute thread."""
    from threadpoolctl import threadpool_limits

    order = _CostlierEndFirst(tasks)
    lock = threading.Lock()
    stopped = False

    def take() -> dict | None:
        with lock:
            return None if stopped else order.take()

    def finished(record: dict) -> None:
        with lock:
            order.finished(record)

    results: queue.Queue = queue.Queue()
    children = min(workers, len(tasks)) - 1
    pool, kept = _KEPT.lend(children)
    folder = os.getcwd()

    def give_pool() -> None:
        task = take()
        if task is not None:
            pool.submit(_pool_point, task, folder).add_done_callback(
                lambda future: results.put((pool, future, None)))

    switch = sys.getswitchinterval()
    sys.setswitchinterval(HANDOFF_SWITCH_INTERVAL)
    try:
        with threadpool_limits(limits=1):
            _ParentWorker(take, results, finished)  # its thread keeps it alive
            with _worker_environment():  # a new pool's processes start at these submissions
                for _ in range(children):
                    give_pool()
            for _ in range(len(tasks)):
                worker, record, error = results.get()
                if error is not None:
                    raise error
                if worker is pool:  # its next task first: on_done writes a file (about 6 ms)
                    record = record.result()
                    finished(record)
                    give_pool()
                on_done(record)
    except BaseException:
        # interrupted (Ctrl-C, SIGTERM via the CLI) or a bug: stop the pool's own workers
        with lock:
            stopped = True
        _KEPT.give_back(pool, kept, failed=True)
        raise
    finally:
        sys.setswitchinterval(switch)
    _KEPT.give_back(pool, kept, failed=False)


def _run_dask(tasks, on_done, _workers, address: str) -> None:
    """Points as tasks on a running Dask scheduler; the workers must import hcfplan."""
    try:
        from distributed import Client, as_completed
    except ImportError:
        raise ConfigError(f"--dask-scheduler {address}: needs the 'distributed' package "
                          "(pip install 'hcfplan[cluster]')") from None
    try:
        client = Client(address, timeout=DASK_CONNECT_TIMEOUT)
    except (OSError, TimeoutError) as exc:
        raise ConfigError(f"--dask-scheduler {address}: cannot connect ({exc})") from None
    try:
        futures = client.map(compute_point, tasks, pure=False)
        for future in as_completed(futures):
            on_done(future.result())
    finally:
        client.close()


#: executor name -> function(tasks, on_done, workers, address)
EXECUTORS: dict[str, Callable[..., None]] = {
    "serial": _run_serial,
    "processes": _run_processes,
    "dask": _run_dask,
}


@dataclass(frozen=True)
class ScanOutcome:
    plan: ScanPlan
    out_dir: Path
    records: tuple[dict, ...]  #: in plan order
    computed: tuple[str, ...]  #: keys computed in this call
    reused: tuple[str, ...]  #: keys read from sound point files
    damaged: tuple[tuple[str, str], ...]  #: (key, reason) of point files that were recomputed
    executor: str


def _scan_state(plan: ScanPlan) -> dict:
    return {"format": SCAN_FORMAT, "version": POINT_VERSION, "definition": plan.definition,
            "config": str(plan.source), "overrides": list(plan.overrides),
            "vary": [{"key": v.key, "values": list(v.values)} for v in plan.varies],
            "points": [{"index": p.index, "key": p.key, "values": p.values}
                       for p in plan.points]}


def prepare_scan_dir(out_dir: Path, plan: ScanPlan, *, fresh: bool, force: bool) -> Path:
    """Create or reopen the scan folder; refuse a folder of another scan or unrelated files."""
    from hcfplan.io.results import write_json

    out_dir = Path(out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise ConfigError(f"--out {out_dir}: exists and is not a folder")
    state = out_dir / "scan.json"
    if out_dir.is_dir() and not (fresh or force):
        try:
            old = json.loads(state.read_text(encoding="utf-8"))
        except FileNotFoundError:
            old = None
        except (OSError, ValueError):
            old = {}
        if old is None and any(out_dir.iterdir()):
            raise ConfigError(f"--out {out_dir}: folder is not empty and holds no hcfplan scan; "
                              "choose another --out or use --force")
        if old is not None and (not isinstance(old, dict)
                                or old.get("definition") != plan.definition):
            raise ConfigError(f"--out {out_dir}: holds points of a different scan definition "
                              "(config, overrides or --vary differ); use --fresh to start "
                              "over, --force to add to it, or another --out")
    if fresh:
        for path in (out_dir / "points").glob("*.json"):
            path.unlink()
    (out_dir / "points").mkdir(parents=True, exist_ok=True)
    write_json(state, _scan_state(plan))
    return out_dir


def choose_executor(workers: int, address: str | None, n_tasks: int) -> str:
    if address:
        return "dask"
    return "serial" if workers <= 1 or n_tasks <= 1 else "processes"


def run_scan(plan: ScanPlan, out_dir: Path, *, workers: int = 1, address: str | None = None,
             fresh: bool = False, force: bool = False,
             on_point: Callable[[int, int, dict], None] | None = None) -> ScanOutcome:
    """Compute the missing points of ``plan`` into ``out_dir/points`` and write the table.

    With ``workers`` > 1 (and no ``address``), the worker processes are kept for the next run
    of this process (:class:`_KeptPool`); :func:`release_workers` stops them."""
    from hcfplan.io.results import write_json

    if workers < 1:
        raise ConfigError(f"--workers = {workers}: must be >= 1")
    out_dir = prepare_scan_dir(out_dir, plan, fresh=fresh, force=force)
    points_dir = out_dir / "points"
    found, damaged, todo = {}, [], []
    for point in plan.points:
        record, reason = read_point(points_dir / f"{point.key}.json", point.key)
        if record is not None:
            found[point.key] = record
        else:
            if reason != "missing":
                damaged.append((point.key, reason))
            todo.append(point)
    reused = tuple(found)
    computed: list[str] = []

    def done(record: dict) -> None:
        write_json(points_dir / f"{record['key']}.json", record, one_line_fields=True)
        found[record["key"]] = record
        computed.append(record["key"])
        if on_point is not None:
            on_point(len(computed), len(todo), record)

    executor = choose_executor(workers, address, len(todo))
    if todo:
        EXECUTORS[executor]([point_task(plan, p) for p in todo], done, workers, address)
    records = tuple(found[p.key] for p in plan.points)
    write_table(out_dir / "table.csv", plan, records)
    return ScanOutcome(plan, out_dir, records, tuple(computed), reused, tuple(damaged),
                       executor)


# ---------------------------------------------------------------------------------------------
# the table


def point_row(plan: ScanPlan, record: dict) -> dict:
    """One table row: point index, varied values, status, then every scalar of the summary."""
    index = next(p.index for p in plan.points if p.key == record["key"])
    row: dict[str, Any] = {"point": index, "key": record["key"]}
    row.update(record["values"])
    row["status"] = record["status"]
    row["message"] = record["message"]
    scalars = flatten(record["summary"])
    scalars.update(flatten(record["margins"], "margins."))
    row.update({k: v for k, v in scalars.items() if not isinstance(v, (list, dict))})
    return row


def table_rows(plan: ScanPlan, records) -> tuple[list[str], list[dict]]:
    rows = [point_row(plan, r) for r in records]
    header = list(dict.fromkeys(k for row in rows for k in row))
    return header, rows


def write_table(path: Path, plan: ScanPlan, records) -> None:
    """``table.csv``: one row per point; column names carry their unit (SI, or the config's
    unit for the varied keys)."""
    import csv
    import io

    from hcfplan.numerics.storage import write_text

    header, rows = table_rows(plan, records)
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=header, lineterminator="\n")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: ("" if row.get(k) is None else row.get(k)) for k in header})
    write_text(path, buffer.getvalue())
