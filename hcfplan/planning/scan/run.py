"""A scan run: open its folder, compute the missing points, write the table.

A rerun of the same scan recomputes nothing that is already finished (the point files are
found by their config key, :func:`hcfplan.planning.scan.plan.config_key`). Only the process
that calls :func:`run_scan` writes files (atomically, temp file + rename), so a killed scan
leaves complete point files or none.
"""

from __future__ import annotations

import json
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

from hcfplan.errors import ConfigError
from hcfplan.planning.scan.executors import EXECUTORS
from hcfplan.planning.scan.plan import ScanPlan
from hcfplan.planning.scan.records import POINT_VERSION, point_task, read_point, write_table

SCAN_FORMAT = "hcfplan-scan"


@dataclass(frozen=True)
class ScanOutcome:
    """What :func:`run_scan` did: every record in plan order and where each came from."""

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


#: Files and folders of a scan folder and their kind ("file" or "folder").
SCAN_ENTRIES = {"scan.json": "file", "table.csv": "file", "points": "folder"}


def _check_scan_entries(out_dir: Path) -> None:
    """Refuse a scan folder whose index, table or points folder is of the wrong kind, or that
    cannot be written (a read-only folder): before anything is computed."""
    import os

    for name, kind in SCAN_ENTRIES.items():
        path = out_dir / name
        if path.exists() and path.is_dir() != (kind == "folder"):
            found = "folder" if kind == "file" else "file"
            raise ConfigError(f"--out {out_dir}: {path} is a {found} where the scan keeps its "
                              f"{kind} {name}; move it away or choose another --out")
    for folder in (out_dir, out_dir / "points"):
        if folder.is_dir() and not os.access(folder, os.W_OK | os.X_OK):
            raise ConfigError(f"--out {out_dir}: {folder} is not writable (the scan updates "
                              "its index and adds points there)")


def prepare_scan_dir(out_dir: Path, plan: ScanPlan, *, fresh: bool, force: bool) -> Path:
    """Create or reopen the scan folder; refuse a folder of another scan or unrelated files.

    The caller holds the folder's lock (:func:`hcfplan.io.results.lock_output_dir`): the
    checks are made under it, so two scans of one folder never run at once."""
    from hcfplan.io.results import write_json

    out_dir = Path(out_dir)
    if out_dir.exists() and not out_dir.is_dir():
        raise ConfigError(f"--out {out_dir}: exists and is not a folder")
    _check_scan_entries(out_dir)
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
    """Name of the executor (a key of :data:`~hcfplan.planning.scan.executors.EXECUTORS`)."""
    if address:
        return "dask"
    return "serial" if workers <= 1 or n_tasks <= 1 else "processes"


def run_scan(plan: ScanPlan, out_dir: Path, *, workers: int = 1, address: str | None = None,
             fresh: bool = False, force: bool = False,
             on_point: Callable[[int, int, dict], None] | None = None) -> ScanOutcome:
    """Compute the missing points of ``plan`` into ``out_dir/points`` and write the table.

    With ``workers`` > 1 (and no ``address``), the worker processes are kept for the next run
    of this process (:class:`~hcfplan.planning.scan.pool.KeptPool`);
    :func:`~hcfplan.planning.scan.pool.release_workers` stops them. The folder is locked
    during the run (:func:`hcfplan.io.results.lock_output_dir`): a scan or another command
    writing into it from another process is refused (ConfigError), and refuses this one."""
    from hcfplan.io.results import lock_output_dir, unlock_output_dir

    if workers < 1:
        raise ConfigError(f"--workers = {workers}: must be >= 1")
    out_dir = lock_output_dir(out_dir)  # another command writing there is refused
    try:
        return _run_locked(plan, out_dir, workers, address, fresh, force, on_point)
    finally:
        unlock_output_dir(out_dir)


def _run_locked(plan: ScanPlan, out_dir: Path, workers: int, address: str | None, fresh: bool,
                force: bool, on_point) -> ScanOutcome:
    """:func:`run_scan` in the locked folder ``out_dir``."""
    from hcfplan.io.results import write_json

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
