"""How sure is a prediction: the chain run at the corners of an input uncertainty band.

``--spread energy=5%,pressure=2%,fwhm=5%`` varies each named input by ± its fraction and runs
the full chain at every corner of that box (2^k runs for k inputs, in parallel, with the same
worker function as a scan: :func:`hcfplan.planning.scan.compute_point`). The result is the
range (lowest, highest) of the compressed FWHM, the compressed peak power, the THz cutoff and
both margins over the corners, together with the nominal value; the limits use the worst
corner. The corners of a box bound the band for outputs that change monotonically with each
input, which is the usual case over a few percent (common practice, no source); the nominal
point is run too, so a non-monotonic output shows up as a nominal value outside the range.
Every corner carries its verdict (:mod:`hcfplan.planning.verdict`); a value that a corner's
verdict voids is left out of the range (the margins never are: they bound the limits).
"""

from __future__ import annotations

import itertools
import math
import re
from dataclasses import dataclass
from pathlib import Path

from hcfplan.errors import ConfigError
from hcfplan.io.config import parse_override

#: Short names accepted by ``--spread`` and the config keys they vary.
SPREAD_KEYS = {"energy": "laser.energy_uj", "pressure": "gas.pressure_bar",
               "fwhm": "laser.fwhm_fs", "length": "fiber.length_m",
               "core": "fiber.core_diameter_um"}
#: More inputs than this would need more than 2^4 = 16 runs.
MAX_INPUTS = 4
#: Summary values whose range is reported: (label, section, key, worst = "min" | "max").
REPORTED = (
    ("compressed FWHM", "compressed", "fwhm_s", "max"),
    ("compressed peak power", "compressed", "peak_power_w", "min"),
    ("THz cutoff", "thz", "cutoff_hz", "min"),
    ("THz peak field", "thz", "peak_field_v_per_m", "min"),
    ("THz efficiency", "thz", "efficiency", "min"),
    ("EH11 share of the exit energy", "output", "eh11_fraction", "min"),
    ("self-focusing margin", "margins", "self_focusing", "min"),
    ("self-focusing margin in fiber", "margins", "self_focusing_in_fiber", "min"),
    ("ionisation fraction", "margins", "ionization_fraction", "max"),
)
_ITEM = re.compile(r"^\s*([a-z_.]+)\s*=\s*([0-9.eE+-]+)\s*%\s*$")


@dataclass(frozen=True)
class SpreadSpec:
    """The inputs varied and their relative half-widths."""

    #: (config key path, fraction), e.g. ("gas.pressure_bar", 0.02)
    items: tuple[tuple[str, float], ...]


@dataclass(frozen=True)
class SpreadResult:
    """Corner runs and the ranges of the reported values (SI, as in the summary)."""

    spec: SpreadSpec
    corners: tuple[dict, ...]  #: point records of :func:`hcfplan.planning.scan.compute_point`
    ranges: dict  #: label -> {"low", "high", "nominal", "worst", "key", "void_corners"}
    failed: tuple[str, ...]  #: messages of corners whose run did not complete
    #: every corner's varied values and verdict: {"values", "verdict", "verdict_reasons"}
    verdicts: tuple[dict, ...] = ()


def parse_spread(text: str) -> SpreadSpec:
    """``energy=5%,pressure=2%`` (or full key paths such as ``laser.energy_uj=5%``)."""
    items = []
    for part in text.split(","):
        match = _ITEM.match(part)
        if not match:
            raise ConfigError(f"--spread {text!r}: each item must be NAME=P% (e.g. energy=5%), "
                              f"got {part.strip()!r}")
        name, percent = match.group(1), float(match.group(2))
        key = SPREAD_KEYS.get(name, name)
        if "." not in key:
            raise ConfigError(f"--spread {name}: unknown input; use one of "
                              f"{', '.join(SPREAD_KEYS)} or a section.key path")
        parse_override(f"{key}=0")  # an unknown section.key path is refused here
        if not (math.isfinite(percent) and 0 < percent < 100):
            raise ConfigError(f"--spread {name}={percent}%: must be > 0 % and < 100 %")
        if any(k == key for k, _ in items):
            raise ConfigError(f"--spread {name}: given twice")
        items.append((key, percent / 100))
    if len(items) > MAX_INPUTS:
        raise ConfigError(f"--spread: at most {MAX_INPUTS} inputs ({2 ** MAX_INPUTS} runs), "
                          f"got {len(items)}")
    return SpreadSpec(tuple(items))


def for_fill(spec: SpreadSpec, config) -> SpreadSpec:
    """``spec`` for the config's fill: a gradient's ``pressure`` spread varies its exit
    pressure (``gas.exit_pressure_bar``), the entrance pressure staying as configured."""
    if config.gas is None or not config.gas.is_gradient:
        return spec
    return SpreadSpec(tuple(("gas.exit_pressure_bar" if key == "gas.pressure_bar" else key, f)
                            for key, f in spec.items))


def corner_tasks(config, spec: SpreadSpec, overrides=(), extra_gas_dirs=()) -> list[dict]:
    """The worker tasks of every corner, each validated through the config machinery."""
    if config.source is None:
        raise ConfigError("--spread: needs a config file")
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.tomlio import read_toml
    from hcfplan.planning.scan import config_key, override_text

    source = Path(config.source)
    raw = read_toml(source)
    tasks = []
    for signs in itertools.product((-1.0, 1.0), repeat=len(spec.items)):
        values, point_over = {}, []
        for (key, fraction), sign in zip(spec.items, signs, strict=True):
            section, name = key.split(".")
            nominal = config.resolved.get(section, {}).get(name)
            if not isinstance(nominal, (int, float)) or isinstance(nominal, bool):
                raise ConfigError(f"--spread {key}: needs a numeric value in the config, got "
                                  f"{nominal!r}")
            values[key] = nominal * (1 + sign * fraction)
            point_over.append(override_text(key, values[key]))
        over = tuple(overrides) + tuple(point_over)
        cfg = config_from_mapping(raw, base_dir=source.parent, overrides=over,
                                  extra_gas_dirs=extra_gas_dirs, source=source)
        tasks.append({"raw": raw, "base_dir": str(source.parent), "source": str(source),
                      "overrides": list(over), "extra_gas_dirs": [str(d) for d in extra_gas_dirs],
                      "key": config_key(cfg.resolved), "values": values})
    return tasks


def _raw_value(record: dict, section: str, key: str):
    from hcfplan.planning.scan import number_or_none

    holder = record["margins"] if section == "margins" else record["summary"].get(section, {})
    return number_or_none(holder.get(key) if isinstance(holder, dict) else None)


def _void(record: dict, section: str, key: str) -> bool:
    """Whether the record's verdict voids the summary value (margins never are)."""
    from hcfplan.planning.verdict import verdict_of_record

    return (section != "margins" and bool(record.get("summary"))
            and verdict_of_record(record).void_reason(f"{section}.{key}") is not None)


def _value(record: dict, section: str, key: str):
    """A reported value of a record; None where its verdict voids it."""
    return None if _void(record, section, key) else _raw_value(record, section, key)


def _ranges(corners, nominal: dict) -> dict:
    """Lowest and highest of each reported value over the corners whose verdict leaves it
    standing (``void_corners`` counts the others)."""
    out = {}
    for label, section, key, worst in REPORTED:
        values = [v for v in (_value(r, section, key) for r in corners) if v is not None]
        if not values:
            continue
        low, high = min(values), max(values)
        void = sum(1 for r in corners
                   if _raw_value(r, section, key) is not None and _void(r, section, key))
        out[label] = {"key": f"{section}.{key}", "low": low, "high": high,
                      "nominal": _value(nominal, section, key),
                      "worst": low if worst == "min" else high, "void_corners": void}
    return out


def corner_verdicts(records) -> tuple[dict, ...]:
    """The varied values and the verdict of every corner record
    (:func:`hcfplan.planning.verdict.verdict_of_record`)."""
    from hcfplan.planning.verdict import verdict_of_record

    out = []
    for r in records:
        verdict = verdict_of_record(r)
        out.append({"values": r["values"], "verdict": verdict.status,
                    "verdict_reasons": [x.as_dict() for x in verdict.reasons]})
    return tuple(out)


def run_spread(tasks: list[dict], spec: SpreadSpec, nominal: dict, *,
               workers: int = 1) -> SpreadResult:
    """Run the chain at every corner task (from :func:`corner_tasks`).

    ``nominal`` is the record-like dict ``{"summary": ..., "margins": ...}`` of the nominal run
    (the caller has it already). ``workers`` > 1 runs the corners in local processes.
    """
    from hcfplan.planning.scan import run_processes, run_serial

    records: list[dict] = []
    runner = run_processes if workers > 1 and len(tasks) > 1 else run_serial
    runner(tasks, records.append, workers, None)
    ok = [r for r in records if r["status"] == "ok"]
    failed = tuple(f"{r['values']}: {r['message']}" for r in records if r["status"] != "ok")
    return SpreadResult(spec=spec, corners=tuple(ok), ranges=_ranges(ok, nominal), failed=failed,
                        verdicts=corner_verdicts(records))


def worst_case_limits(result: SpreadResult, limits_spec) -> dict:
    """``limits.worst_case.*``: the margins at the worst corner against the configured limits.

    Margins as in :mod:`hcfplan.limits.margins`: the self-focusing margin is the lowest P_cr / P
    over the corners (input and in the fiber), beside its required value
    ``limits.self_focusing_margin``; the ionisation margin is limit / highest fraction
    (required 1). ``worst_case.status`` is ``"exceeds"`` when either is not met.
    """
    from hcfplan.limits.margins import margin, margin_met

    out = {}
    sf = [result.ranges[k]["worst"] for k in ("self-focusing margin",
                                               "self-focusing margin in fiber")
          if k in result.ranges]
    ion = result.ranges.get("ionisation fraction")
    met = []
    if sf:
        out["worst_case.self_focusing_margin"] = min(sf)
        out["worst_case.self_focusing_required_margin"] = limits_spec.self_focusing_margin
        met.append(margin_met(min(sf), limits_spec.self_focusing_margin))
    if ion is not None:
        ion_margin = (margin(limits_spec.ionization_fraction_limit, ion["worst"])
                      if ion["worst"] else None)  # no fraction: no finite margin to report
        out["worst_case.ionization_fraction"] = ion["worst"]
        out["worst_case.ionization_margin"] = ion_margin
        out["worst_case.ionization_margin_required"] = 1.0
        met.append(margin_met(ion_margin, 1.0))
    out["worst_case.status"] = "exceeds" if False in met else "within"
    return out


def spread_summary(result: SpreadResult) -> dict:
    """The ``spread`` part of ``summary.json`` (SI, unit in the key names)."""
    return {
        "inputs": {key: fraction for key, fraction in result.spec.items},
        "runs": len(result.corners) + len(result.failed),
        "failed": list(result.failed),
        "ranges": {r["key"]: {k: v for k, v in r.items() if k != "key"}
                   for r in result.ranges.values()},
        "corners": list(result.verdicts),
        "invalid_corners": sum(1 for v in result.verdicts if v["verdict"] == "invalid"),
        "method": ("full chain at the 2^k corners of the input box; the limits use the worst "
                   "corner; a value a corner's verdict voids is left out of its range"),
    }
