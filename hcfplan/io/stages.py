"""Cascaded stages in a config: ``[[stage]]`` tables, stage key paths and their overrides.

A config holds either one stage (top-level ``[fiber]``, ``[gas]``, ``[cell]``,
``[compressor]``) or several, as an array of tables::

    [laser]
    ...
    [[stage]]
    [stage.fiber]
    ...
    [stage.gas]
    ...
    [[stage]]
    ...

Each ``[[stage]]`` holds the sections of :data:`STAGE_SECTIONS`; the other sections
(``laser``, ``thz``, ``limits``, ``spread``, ``grid``) stay at the top and hold for every
stage. :func:`stage_mappings` turns a staged mapping into one single-stage mapping per stage,
so every stage is validated and built exactly like a single-stage config. Keys of one stage
are written ``stage.K.section.key`` (K counted from 0) in ``--set``, ``--vary`` and messages.
"""

from __future__ import annotations

from typing import Any

from hcfplan.errors import ConfigError

#: The array-of-tables name of the stages.
STAGE_TABLE = "stage"
#: Sections that belong to one stage.
STAGE_SECTIONS = ("fiber", "gas", "cell", "compressor")
#: Most stages one config may hold: each runs a full chain, so more is a slip (common
#: practice, no source).
MAX_STAGES = 16


def split_stage_path(path: str, option: str = "") -> tuple[int | None, str]:
    """``stage.K.section.key`` -> ``(K, "section.key")``; any other path -> ``(None, path)``.

    Raises
    ------
    ConfigError
        ``stage.`` followed by no index, a non-integer or negative index, or a section that
        does not belong to a stage.
    """
    head, _, rest = path.partition(".")
    if head != STAGE_TABLE:
        return None, path
    index_text, _, tail = rest.partition(".")
    if not index_text.isdigit():
        raise ConfigError(f"{option}{path}: a stage key is stage.K.section.key with K = 0, "
                          f"1, ... (e.g. stage.1.gas.pressure_bar)")
    section = tail.partition(".")[0]
    if section not in STAGE_SECTIONS:
        raise ConfigError(f"{option}{path}: a stage holds the sections "
                          f"{', '.join(STAGE_SECTIONS)}; got {section!r}")
    return int(index_text), tail


def stage_label(index: int, path: str) -> str:
    """The key path of ``section.key`` in stage ``index`` (``stage.1.gas.pressure_bar``)."""
    return f"{STAGE_TABLE}.{index}.{path}"


def is_staged(data: dict[str, Any]) -> bool:
    """Whether a raw mapping uses ``[[stage]]`` tables."""
    return STAGE_TABLE in data


def _stage_tables(data: dict[str, Any]) -> list:
    stages = data[STAGE_TABLE]
    if not isinstance(stages, list) or not all(isinstance(s, dict) for s in stages):
        raise ConfigError("stage: must be an array of tables, written [[stage]]")
    if not stages:
        raise ConfigError("stage: the array of [[stage]] tables is empty")
    if len(stages) > MAX_STAGES:
        raise ConfigError(f"stage: {len(stages)} stages; at most {MAX_STAGES}")
    return stages


def stage_override(data: dict[str, Any], index: int, section: str, key: str, value) -> None:
    """Set ``stage.index.section.key = value`` in the raw mapping ``data`` (in place; the
    stage list and the tables touched are copied first, the caller's mapping is unchanged)."""
    path = stage_label(index, f"{section}.{key}")
    if not is_staged(data):
        raise ConfigError(f"--set {path}: the config has no [[stage]] tables; use "
                          f"{section}.{key}")
    stages = [dict(s) for s in _stage_tables(data)]
    if index >= len(stages):
        raise ConfigError(f"--set {path}: the config has {len(stages)} stages "
                          f"(stage.0 to stage.{len(stages) - 1})")
    table = stages[index].get(section, {})
    if not isinstance(table, dict):
        raise ConfigError(f"--set {path}: [stage.{section}] of stage {index} is not a table")
    stages[index][section] = table = dict(table)
    table[key] = value
    if section == "gas" and key in ("species", "mixture"):
        table.pop("mixture" if key == "species" else "species", None)
    data[STAGE_TABLE] = stages


def refuse_top_level_stage_key(data: dict[str, Any], section: str, key: str) -> None:
    """A ``--set fiber.x`` (a stage section) on a staged config names no stage: refused."""
    if is_staged(data) and section in STAGE_SECTIONS:
        raise ConfigError(f"--set {section}.{key}: the config has [[stage]] tables; name the "
                          f"stage, e.g. stage.0.{section}.{key}")


def stage_mappings(data: dict[str, Any]) -> list[dict[str, Any]]:
    """One single-stage raw mapping per ``[[stage]]``: the shared top-level sections plus the
    stage's own sections.

    Raises
    ------
    ConfigError
        Both forms in one file (a top-level stage section beside ``[[stage]]``), a stage with
        an unknown section, or a malformed ``stage`` value.
    """
    both = [s for s in STAGE_SECTIONS if s in data]
    if both:
        raise ConfigError(f"[{both[0]}]: the config has [[stage]] tables too; give the stage "
                          f"sections ({', '.join(STAGE_SECTIONS)}) either at the top (one "
                          "stage) or inside each [[stage]], not both")
    shared = {k: v for k, v in data.items() if k != STAGE_TABLE}
    out = []
    for index, stage in enumerate(_stage_tables(data)):
        for section in stage:
            if section not in STAGE_SECTIONS:
                raise ConfigError(f"stage.{index}.{section}: unknown stage section; a stage "
                                  f"holds {', '.join(STAGE_SECTIONS)} (the other sections "
                                  "go at the top, for every stage)")
        out.append({**shared, **stage})
    return out


def prefixed_error(index: int, exc: ConfigError) -> ConfigError:
    """A stage's config problem with the stage named: ``stage.1.fiber.length_m ...``."""
    text = str(exc)
    for section in STAGE_SECTIONS:
        if text.startswith(f"{section}."):
            return ConfigError(stage_label(index, text))
        if text.startswith(f"[{section}]"):
            return ConfigError(f"[{stage_label(index, text[1:])}")
    return ConfigError(f"stage.{index}: {text}")


def staged_resolved(shared: dict[str, dict], stage_resolved: list[dict[str, dict]]) -> dict:
    """The resolved table of a staged config: the shared sections, then ``stage``, a list with
    the stage sections of each stage (as :func:`hcfplan.io.tomlio.dump_toml` writes them)."""
    out = {s: t for s, t in shared.items() if s not in STAGE_SECTIONS}
    out[STAGE_TABLE] = [{s: r[s] for s in STAGE_SECTIONS if s in r} for r in stage_resolved]
    return out
