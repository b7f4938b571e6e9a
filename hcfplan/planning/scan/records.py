"""Point records: one chain run as a self-checking JSON record, its margins, and the table.

Point file ``points/<key>.json`` (format ``hcfplan-scan-point``, version 1): ``key``,
``values`` (the varied values in the config's own units), ``status`` (``ok`` or ``failed``),
``message``, ``config`` (the resolved config), ``summary`` (the chain summary plus ``limits``),
``margins`` (:func:`point_margins`), ``spectrum`` (the fiber output spectrum, downsampled to
at most :data:`SPECTRUM_POINTS` bins over its -60 dB extent: ``frequency_hz``,
``energy_density_j_per_hz``), ``seconds`` and ``checksum`` (sha256 of the canonical JSON of
all other fields). A file with bad JSON, another format or version, a key that does not match
its name or its config, missing fields or a wrong checksum is recomputed.

Points are computed by :func:`compute_point`, a module-level function of a plain task dict
(:func:`point_task`), so the serial run, the local process pool and a Dask cluster call the
same function (:mod:`hcfplan.planning.scan.executors`).
"""

from __future__ import annotations

import hashlib
import json
import math
import time
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from hcfplan.errors import HcfplanError
from hcfplan.io.results import json_ready
from hcfplan.planning.scan.plan import ScanPlan, ScanPoint, canonical_json, config_key

POINT_FORMAT = "hcfplan-scan-point"
POINT_VERSION = 1
#: Largest number of spectral bins kept per point.
SPECTRUM_POINTS = 512
#: Spectral floor of the stored output spectrum, relative to its peak. [1]
SPECTRUM_FLOOR = 1e-6
#: Fields every point file must hold.
POINT_FIELDS = ("format", "version", "key", "values", "status", "message", "config", "summary",
                "margins", "spectrum", "seconds", "checksum")


# ---------------------------------------------------------------------------------------------
# margins against the modelled limits


@dataclass(frozen=True)
class RunNumbers:
    """The numbers of a run that ``limits_report`` reads (duck-typed ``run``). [W, W/m^2]"""

    max_peak_power: float | None
    max_peak_intensity: float | None
    output_peak_power: float | None


def run_numbers(summary: dict) -> RunNumbers:
    """The :class:`RunNumbers` of a chain summary (its ``output`` section)."""
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
    "limit" with status "exceeds". Margins follow :mod:`hcfplan.limits.margins`
    (limit / value, met when >= the ``*_required`` value beside it): ``self_focusing`` is
    P_cr / P of the coupled input pulse (``limits.self_focusing.margin_input``),
    ``self_focusing_in_fiber`` P_cr / P at the highest peak power of the run.
    """
    from hcfplan.limits.margins import margin

    lim = config.limits
    sf = _number(report, "limits.self_focusing.margin_input")
    sf_fiber = _number(report, "limits.self_focusing.margin_in_fiber")
    if sf is None:  # a gradient with an evacuated entrance: no gas at the launch
        sf = sf_fiber
    ion = _number(report, "limits.ionization.fraction_in_fiber")
    if ion is None:
        ion = _number(report, "limits.ionization.fraction_input")
    binding = [c["name"] for c in report.get("limits.checks", [])
               if c.get("severity") == "limit" and c.get("status") == "exceeds"]
    pressure = config.gas.highest_pressure if config.gas is not None else None  # gradient: top
    return {
        "self_focusing": sf, "self_focusing_in_fiber": sf_fiber,
        "self_focusing_required": lim.self_focusing_margin,
        "self_focusing_max_pressure_pa": _number(report, "limits.self_focusing.max_pressure_pa"),
        "ionization_fraction": ion, "ionization_limit": lim.ionization_fraction_limit,
        "ionization_margin": margin(lim.ionization_fraction_limit, ion) if ion else None,
        "ionization_margin_required": 1.0,
        "pressure_pa": pressure, "rated_pressure_pa": config.cell.rated_pressure,
        "rating_margin": margin(config.cell.rated_pressure, pressure),
        "rating_margin_required": 1.0,
        "acceptable": not binding, "binding": ", ".join(binding),
    }


# ---------------------------------------------------------------------------------------------
# one point (runs in a worker process, or in the parent)


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
    """Output spectrum (of the whole beam for a multimode run) over its -60 dB extent, binned
    to <= SPECTRUM_POINTS (bin means)."""
    import numpy as np

    grid = chain.grid
    order = np.argsort(grid.frequency)
    freq = np.asarray(grid.frequency)[order]
    from hcfplan.planning.mode_run import exit_density

    dens = exit_density(chain.propagation)[order]  # multimode: the whole beam
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
    record["checksum"] = "sha256:" + hashlib.sha256(canonical_json(body).encode()).hexdigest()
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
# the table


def point_row(plan: ScanPlan, record: dict) -> dict:
    """One table row: point index, varied values, status, the verdict (``verdict``: status,
    ``verdict_reasons``: "code: message; ..."; :mod:`hcfplan.planning.verdict`), then every
    scalar of the summary."""
    from hcfplan.planning.verdict import verdict_of_record

    index = next(p.index for p in plan.points if p.key == record["key"])
    row: dict[str, Any] = {"point": index, "key": record["key"]}
    row.update(record["values"])
    row["status"] = record["status"]
    row["message"] = record["message"]
    verdict = verdict_of_record(record)
    row["verdict"] = verdict.status
    row["verdict_reasons"] = verdict.reasons_text()
    scalars = flatten(record["summary"])
    scalars.update(flatten(record["margins"], "margins."))
    row.update({k: v for k, v in scalars.items()
                if not isinstance(v, (list, dict)) and not k.startswith("verdict.")})
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
