"""Checks of single config values against :data:`hcfplan.io.schema.SCHEMA`, in the user's units.

Every problem is one :class:`~hcfplan.errors.ConfigError` line naming the key path
(``section.key``) and the value as the user wrote it. Checks between keys are in
:mod:`hcfplan.io.crosschecks`.
"""

from __future__ import annotations

import difflib
import math
import re
from typing import Any

from hcfplan.errors import ConfigError
from hcfplan.io.schema import REQUIRED, REQUIRED_SECTIONS, SCHEMA, Key

#: Section and key names shown as typed; anything else is shown quoted (repr).
_PLAIN_NAME = re.compile(r"[A-Za-z0-9_+\-]{1,64}", re.ASCII)


def suggest(name: str, options) -> str:
    """'; did you mean ...?' with the closest option (case-insensitive), or ''."""
    by_lower = {str(option).lower(): option for option in options}
    close = difflib.get_close_matches(str(name).lower(), list(by_lower), n=1, cutoff=0.5)
    return f"; did you mean {by_lower[close[0]]!r}?" if close else ""


def display_name(name: Any) -> str:
    """A section or key name for a message: as typed if plain, else quoted (one line)."""
    text = str(name)
    return text if _PLAIN_NAME.fullmatch(text) else repr(text[:64])


def known_key(section: str, key: str, prefix: str = "") -> Key:
    """The schema entry of ``section.key``; an unknown name gets the nearest one suggested."""
    if section not in SCHEMA:
        shown = display_name(section)
        raise ConfigError(
            f"{prefix}{shown}.{display_name(key)}: unknown section [{shown}]"
            f"{suggest(section, SCHEMA)} (sections: {', '.join(SCHEMA)})"
        )
    if key not in SCHEMA[section]:
        raise ConfigError(
            f"{prefix}{section}.{display_name(key)}: unknown key{suggest(key, SCHEMA[section])} "
            f"(keys of [{section}]: {', '.join(SCHEMA[section])})"
        )
    return SCHEMA[section][key]


#: Most entries of a list or table value (``fiber.betas_fs_n_per_mm``, ``gas.mixture``): a
#: Taylor expansion or a mixture longer than this is a slip, not a model (common practice, no
#: source).
MAX_LIST_ITEMS = 64

#: Longest rendering of a received value in a message. [characters]
_MAX_SHOWN = 120


def describe(value: Any) -> str:
    """The received value for a message: one line, shortened if long."""
    if isinstance(value, int) and not isinstance(value, bool) and abs(value) > 10**30:
        return f"{'-' if value < 0 else ''}~1e{int(abs(value).bit_length() * math.log10(2))}"
    try:
        text = repr(value) if isinstance(value, str) else str(value)
    except ValueError:  # e.g. a list holding an integer too long to print
        text = f"<{type(value).__name__}>"
    text = " ".join(text.split())
    return text if len(text) <= _MAX_SHOWN else text[:_MAX_SHOWN] + "..."


def _check_number(path: str, value: Any, spec: Key, integer: bool) -> float | int:
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        kind = "an integer" if integer else "a number"
        raise ConfigError(f"{path} = {describe(value)}: must be {kind}")
    if integer and not isinstance(value, int):
        raise ConfigError(f"{path} = {value}: must be an integer")
    if isinstance(value, float) and not math.isfinite(value):
        raise ConfigError(f"{path} = {value}: must be a finite number")
    shown = describe(value)  # int/float comparisons below are exact, even for huge ints
    if spec.low is not None:
        if spec.low_open and not value > spec.low:
            raise ConfigError(f"{path} = {shown}: must be > {spec.low:g}")
        if not spec.low_open and not value >= spec.low:
            raise ConfigError(f"{path} = {shown}: must be >= {spec.low:g}")
    if spec.high is not None:
        if spec.high_open and not value < spec.high:
            raise ConfigError(f"{path} = {shown}: must be < {spec.high:g}")
        if not spec.high_open and not value <= spec.high:
            raise ConfigError(f"{path} = {shown}: must be <= {spec.high:g}")
    if integer:
        return value
    try:
        return float(value)
    except OverflowError:
        raise ConfigError(f"{path} = {shown}: too large for a floating-point number") from None


def _check_fractions(path: str, value: Any) -> dict[str, float]:
    if not isinstance(value, dict) or not value:
        raise ConfigError(f"{path}: must be a table of gas = mole fraction, e.g. "
                          "{ He = 0.7, Ar = 0.3 }")
    if len(value) > MAX_LIST_ITEMS:
        raise ConfigError(f"{path}: {len(value)} gases; at most {MAX_LIST_ITEMS}")
    out = {}
    for name, frac in value.items():
        where = f"{path}.{display_name(name)}"
        if not str(name).strip():
            raise ConfigError(f"{where}: the gas name must not be empty")
        if isinstance(frac, bool) or not isinstance(frac, (int, float)):
            raise ConfigError(f"{where} = {describe(frac)}: must be a finite number")
        if isinstance(frac, float) and not math.isfinite(frac):
            raise ConfigError(f"{where} = {frac}: must be a finite number")
        if not 0.0 < frac <= 1.0:
            raise ConfigError(f"{where} = {describe(frac)}: must be > 0 and <= 1")
        out[name] = float(frac)
    total = sum(out.values())
    if abs(total - 1.0) > 1e-6:
        raise ConfigError(f"{path}: mole fractions sum to {total:.6g}, must sum to 1")
    return out


def _finite_float(path: str, value: Any) -> float:
    """``value`` as a finite float, or a ConfigError naming ``path``."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        raise ConfigError(f"{path} = {describe(value)}: must be a finite number")
    try:
        number = float(value)
    except OverflowError:
        number = math.inf
    if not math.isfinite(number):
        raise ConfigError(f"{path} = {describe(value)}: must be a finite number")
    return number


def _check_value(path: str, value: Any, spec: Key) -> Any:
    kind = spec.kind
    if kind in ("float", "int"):
        return _check_number(path, value, spec, integer=(kind == "int"))
    if kind == "bool":
        if not isinstance(value, bool):
            raise ConfigError(f"{path} = {describe(value)}: must be true or false")
        return value
    if kind in ("str", "path", "choice"):
        if not isinstance(value, str) or not value.strip():
            raise ConfigError(f"{path} = {describe(value)}: must be a non-empty string")
        if kind == "choice" and value not in spec.choices:
            raise ConfigError(f"{path} = {value!r}: must be one of {', '.join(spec.choices)}"
                              f"{suggest(value, spec.choices)}")
        return value
    if kind == "float_list":
        if not isinstance(value, list) or not value:
            raise ConfigError(f"{path}: must be a non-empty list of numbers")
        if len(value) > MAX_LIST_ITEMS:
            raise ConfigError(f"{path}: {len(value)} entries; at most {MAX_LIST_ITEMS}")
        return [_finite_float(f"{path}[{i}]", v) for i, v in enumerate(value)]
    if kind == "band":
        if (not isinstance(value, list) or len(value) != 2
                or any(isinstance(v, bool) or not isinstance(v, (int, float)) for v in value)):
            raise ConfigError(f"{path} = {describe(value)}: must be [low, high]")
        lo, hi = (_finite_float(path, v) for v in value)
        if not 0.0 < lo < hi:
            raise ConfigError(f"{path} = {describe(value)}: must be [low, high] with "
                              "0 < low < high")
        return [lo, hi]
    if kind == "fractions":
        return _check_fractions(path, value)
    raise AssertionError(f"schema kind {kind!r} not handled")  # a bug, not bad input


def check_option(option: str, value: Any, section: str, key: str) -> Any:
    """A command-line option that stands for the config key ``section.key``, checked against
    that key's schema entry (type, finiteness, range) and named as the option.

    Example: ``check_option("--energy-uj", 5e-324, "laser", "energy_uj")`` raises
    ``--energy-uj = 5e-324: must be >= 1e-06``.
    """
    return _check_value(option, value, known_key(section, key))


def check_applicability(given: dict[str, dict[str, Any]]) -> None:
    """Refuse a key the configured ``fiber.kind`` does not read (``Key.fiber_kinds``).

    ``given`` holds the keys as written (file and ``--set``), before defaults are filled in, so
    a default never counts as given.
    """
    kind = given.get("fiber", {}).get("kind")
    for section, table in given.items():
        for key in table:
            spec = SCHEMA[section][key]
            if not spec.applies_to(kind):
                kinds = " and ".join(spec.fiber_kinds)
                raise ConfigError(f"{section}.{key}: does not apply to fiber.kind = {kind!r} "
                                  f"(only to {kinds}); remove it or change fiber.kind")


def shown_keys(resolved: dict[str, dict[str, Any]]) -> dict[str, dict[str, Any]]:
    """The resolved table without the keys the configured fiber kind does not read (what
    ``check`` prints and a run folder's ``config.resolved.toml`` holds, so it loads again)."""
    kind = resolved.get("fiber", {}).get("kind")
    return {section: {key: value for key, value in table.items()
                      if SCHEMA[section][key].applies_to(kind)}
            for section, table in resolved.items()}


def validate_raw(raw: dict[str, Any]) -> dict[str, dict[str, Any]]:
    """Check sections and keys, fill defaults; return the resolved table (user units).

    Problems are reported in reading order: unknown sections, then each present section's keys
    and values, then missing sections and missing required keys.
    """
    for section, table in raw.items():
        if section not in SCHEMA:
            raise ConfigError(f"[{display_name(section)}]: unknown section"
                              f"{suggest(section, SCHEMA)} (sections: {', '.join(SCHEMA)})")
        if not isinstance(table, dict):
            raise ConfigError(f"{section} = {describe(table)}: must be a [{section}] table")
    checked: dict[str, dict[str, Any]] = {}
    for section, table in raw.items():
        checked[section] = {key: _check_value(f"{section}.{key}", value,
                                              known_key(section, key))
                            for key, value in table.items()}
    for section in REQUIRED_SECTIONS:
        if section not in raw:
            raise ConfigError(f"[{section}]: required section is missing")
    check_applicability(checked)
    taylor = checked["fiber"].get("kind") == "taylor"
    resolved: dict[str, dict[str, Any]] = {}
    for section, keys in SCHEMA.items():
        given = checked.get(section, {})
        out: dict[str, Any] = {}
        for key, spec in keys.items():
            if key in given:
                out[key] = given[key]
            elif spec.default is REQUIRED:
                if section in raw and not (section == "gas" and taylor):
                    raise ConfigError(f"{section}.{key}: required key is missing")
                out[key] = None
            else:
                out[key] = spec.default
        resolved[section] = out
    return resolved
