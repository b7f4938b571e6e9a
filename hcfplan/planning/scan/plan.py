"""What a scan varies, and every point of it validated and keyed before anything runs.

A scan varies one or two config keys (``section.key``, or ``stage.K.section.key`` of a config
with cascaded stages) over a linear range or a list of values.
Each point is identified by a short hash of its resolved config (:func:`config_key`), so a
finished point is found again whatever the order of the points.
"""

from __future__ import annotations

import hashlib
import itertools
import json
import math
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError
from hcfplan.io.results import json_ready

#: Most points one scan may hold: a COUNT, a value list, or the product of two of them. Each
#: point is validated and keyed before anything runs and each runs a full chain, so a larger
#: scan is a typing slip (``1:2:1000000000``) rather than a plan; it is refused at once
#: (common practice, no source).
MAX_SCAN_POINTS = 10_000
#: Longest ``--vary`` argument. [characters]
MAX_VARY_CHARS = 100_000


@dataclass(frozen=True)
class Vary:
    """One varied config key and its values (in the key's own unit)."""

    key: str
    values: tuple


@dataclass(frozen=True)
class ScanPoint:
    """One point of a plan: its position, varied values, ``--set`` overrides and config key."""

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
    from hcfplan.io.stages import split_stage_path

    _, inner = split_stage_path(path, f"{option} ")  # stage.K.section.key: a key of stage K
    parts = inner.split(".")
    if len(parts) != 2 or not all(parts):
        raise ConfigError(f"{option} {path!r}: the key path must be section.key (or "
                          "stage.K.section.key)")
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
    if count > MAX_SCAN_POINTS:
        raise ConfigError(f"{option} {path}={text}: COUNT = {count} exceeds the limit of "
                          f"{MAX_SCAN_POINTS} points per scan")
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

    if len(text) > MAX_VARY_CHARS:
        raise ConfigError(f"{option} {text[:40]!r}...: {len(text)} characters; at most "
                          f"{MAX_VARY_CHARS}")
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
    if len(items) > MAX_SCAN_POINTS:
        raise ConfigError(f"{option} {path}=...: {len(items)} values exceed the limit of "
                          f"{MAX_SCAN_POINTS} points per scan")
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


def canonical_json(data: Any) -> str:
    """Compact JSON with sorted keys and ASCII only: the text that config keys and point
    checksums hash."""
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=True)


def config_key(resolved: dict) -> str:
    """First 16 hex digits of the sha256 of the canonical JSON of a resolved config."""
    return hashlib.sha256(canonical_json(json_ready(resolved)).encode()).hexdigest()[:16]


def plan_scan(config_path: str | Path, varies: list[Vary] | tuple[Vary, ...],
              overrides=(), extra_gas_dirs=()) -> ScanPlan:
    """Validate the base config and every point through the config machinery."""
    from hcfplan.io.config import config_from_mapping
    from hcfplan.io.tomlio import read_toml

    if not 1 <= len(varies) <= 2:
        raise ConfigError(f"--vary: give one or two keys, got {len(varies)}")
    if len(varies) == 2 and varies[0].key == varies[1].key:
        raise ConfigError(f"--vary {varies[0].key}: the same key is given twice")
    total = math.prod(len(v.values) for v in varies)
    if total > MAX_SCAN_POINTS:
        counts = " x ".join(f"{v.key} ({len(v.values)})" for v in varies)
        raise ConfigError(f"--vary {counts}: {total} points exceed the limit of "
                          f"{MAX_SCAN_POINTS} points per scan")
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
    definition = hashlib.sha256(canonical_json(
        {"varied": [v.key for v in varies], "points": [p.key for p in points]}).encode())
    return ScanPlan(path, raw, tuple(overrides), tuple(str(d) for d in extra_gas_dirs),
                    tuple(varies), tuple(points), definition.hexdigest()[:16])
