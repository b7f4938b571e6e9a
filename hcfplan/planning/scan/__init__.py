"""Parameter scans: every point is one full chain run, saved as it finishes, resumable.

The package's public face; its parts, lowest first:

- :mod:`~hcfplan.planning.scan.plan`: what is varied (``--vary``), every point validated and
  keyed by the hash of its resolved config;
- :mod:`~hcfplan.planning.scan.records`: one point as a self-checking record (the point file
  format), its margins against the limits, and the table;
- :mod:`~hcfplan.planning.scan.ordering`: which task a local worker takes next;
- :mod:`~hcfplan.planning.scan.pool`: the local worker processes (fork server, environment,
  the pool kept between runs);
- :mod:`~hcfplan.planning.scan.executors`: serial, local processes beside the parent, Dask;
- :mod:`~hcfplan.planning.scan.run`: a scan folder and its run;
- :mod:`~hcfplan.planning.scan.warmup`: imported by the fork server only (not from here).

A name is looked up in the submodule that defines it; patch it there.
"""

from __future__ import annotations

from hcfplan.planning.scan.executors import (
    DASK_CONNECT_TIMEOUT,
    EXECUTORS,
    HANDOFF_SWITCH_INTERVAL,
    ParentWorker,
    run_dask,
    run_processes,
    run_serial,
)
from hcfplan.planning.scan.ordering import CostlierEndFirst, point_work
from hcfplan.planning.scan.plan import (
    ScanPlan,
    ScanPoint,
    Vary,
    canonical_json,
    config_key,
    override_text,
    parse_vary,
    plan_scan,
)
from hcfplan.planning.scan.pool import (
    KEPT_POOL,
    WORKER_PRELOAD,
    WORKER_THREADS,
    KeptPool,
    pool_context,
    release_workers,
    start_worker_server,
    worker_environment,
)
from hcfplan.planning.scan.records import (
    POINT_FIELDS,
    POINT_FORMAT,
    POINT_VERSION,
    SPECTRUM_FLOOR,
    SPECTRUM_POINTS,
    RunNumbers,
    check_point,
    compute_point,
    flatten,
    limits_values,
    number_or_none,
    point_margins,
    point_row,
    point_task,
    read_point,
    run_numbers,
    run_summary,
    table_rows,
    write_table,
)
from hcfplan.planning.scan.run import (
    SCAN_FORMAT,
    ScanOutcome,
    choose_executor,
    prepare_scan_dir,
    run_scan,
)

__all__ = [
    "DASK_CONNECT_TIMEOUT", "EXECUTORS", "HANDOFF_SWITCH_INTERVAL", "KEPT_POOL", "POINT_FIELDS",
    "POINT_FORMAT", "POINT_VERSION", "SCAN_FORMAT", "SPECTRUM_FLOOR", "SPECTRUM_POINTS",
    "WORKER_PRELOAD", "WORKER_THREADS", "CostlierEndFirst", "KeptPool", "ParentWorker",
    "RunNumbers", "ScanOutcome", "ScanPlan", "ScanPoint", "Vary", "canonical_json",
    "check_point", "choose_executor", "compute_point", "config_key", "flatten",
    "limits_values", "number_or_none", "override_text", "parse_vary", "plan_scan",
    "point_margins", "point_row", "point_task", "point_work", "pool_context",
    "prepare_scan_dir", "read_point", "release_workers", "run_dask", "run_numbers",
    "run_processes", "run_scan", "run_serial", "run_summary", "start_worker_server",
    "table_rows", "write_table", "worker_environment",
]
