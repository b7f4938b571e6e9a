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

import hashlib
import itertools
import json
import math
import time
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from ..errors import ConfigError, HcfplanError

POINT_FORMAT = "hcfplan-scan-point"
POINT_VERSION = 1
SCAN_FORMAT = "hcfplan-scan"
#: Largest number of spectral bins kept per point.
SPECTRUM_POINTS = 512
#: Spectral floor of the stored output spectrum, relative to its peak. [1]
SPECTRUM_FLOOR = 1e-6
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

    from ..io.schema import SCHEMA

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
    from ..io.tomlio import parse_toml_value

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
    return hashlib.sha256(_canonical(plain(resolved)).encode()).hexdigest()[:16]


def plan_scan(config_path: str | Path, varies: list[Vary] | tuple[Vary, ...],
              overrides=(), extra_gas_dirs=()) -> ScanPlan:
    """Validate the base config and every point through the config machinery."""
    from ..io.config import config_from_mapping
    from ..io.tomlio import read_toml

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
        values = {v.key: x for v, x in zip(varies, combo)}
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


def _limits_report(config, chain) -> dict | None:
    try:
        from .limits_report import limits_report
    except ImportError:
        return None
    return flatten(limits_report(config, run=chain))


def _first(flat: dict, names: tuple[str, ...]):
    for name in names:
        value = flat.get(name)
        if isinstance(value, (int, float)) and not isinstance(value, bool):
            return float(value)
    return None


def _fallback_self_focusing(config, chain) -> float | None:
    """P_cr of the fill at the pump over the launched peak power (no limits_report)."""
    if config.gas is None:
        return None
    from .. import limits, pulse
    from .build import build_medium, coupling, pump_omega

    import numpy as np

    medium = chain.medium if chain is not None else build_medium(config.gas)
    if chain is not None:
        power = chain.input_peak_power
    else:
        efficiency, _, _ = coupling(config)
        power = pulse.peak_power_from_energy(config.laser.energy * efficiency,
                                             config.laser.duration_fwhm, config.laser.shape)
    n0 = float(medium.refractive_index(np.array([pump_omega(config.laser)]))[0])
    critical = limits.self_focusing_power(config.laser.wavelength, n0, medium.n2)
    return float(critical / power) if power > 0 else math.inf


#: Candidate ``limits_report`` keys (flattened) for the two margins.
_SF_KEYS = ("limits.self_focusing.margin_input", "limits.self_focusing.margin")
_ION_KEYS = ("limits.ionization.max_fraction", "limits.ionization.fraction",
             "limits.ionization.fraction_max")


def point_margins(config, chain=None, summary: dict | None = None) -> dict:
    """Self-focusing margin, ionisation fraction and pressure of one point against the limits.

    Values come from :func:`hcfplan.planning.limits_report.limits_report` when that module
    exists, otherwise from P_cr / launched peak power and the run's maximum ionisation
    fraction. Without ``chain`` (analytic use) the ionisation fraction is unknown (None).
    ``binding`` lists the limits the point is outside of.
    """
    lim = config.limits
    report = _limits_report(config, chain)
    sf = _first(report, _SF_KEYS) if report else None
    source = "limits_report" if sf is not None else "fallback"
    if sf is None:
        sf = _fallback_self_focusing(config, chain)
    ion = _first(report, _ION_KEYS) if report else None
    if ion is None and summary is not None:
        ion = summary.get("output", {}).get("max_ionization_fraction")
    pressure = config.gas.pressure if config.gas is not None else None
    rated = config.cell.rated_pressure
    binding = []
    if sf is not None and sf < lim.self_focusing_margin:
        binding.append("self_focusing")
    if ion is not None and ion > lim.ionization_fraction_limit:
        binding.append("ionization")
    if pressure is not None and rated is not None and pressure > rated:
        binding.append("pressure")
    return {
        "self_focusing": sf, "self_focusing_required": lim.self_focusing_margin,
        "ionization_fraction": ion, "ionization_limit": lim.ionization_fraction_limit,
        "ionization_margin": (lim.ionization_fraction_limit / ion if ion else None),
        "pressure_pa": pressure, "rated_pressure_pa": rated,
        "acceptable": not binding, "binding": ", ".join(binding), "source": source,
    }
