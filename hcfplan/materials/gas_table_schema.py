"""Layout of a gas-table TOML file: the allowed blocks and keys, and the checks of each field.

:mod:`hcfplan.materials.gas_tables` builds its frozen records from the values this module has
checked and converted. Every block of a table carries a ``source`` string, and every key with a
unit carries the unit as a suffix (``potential_ev``, ``reference_pressure_pa``); values are
converted to SI exactly once, in :func:`check_block`. Dispersion coefficients are kept as printed
(micrometre units); the wavelength is converted when a fit is evaluated.

Table layout (blocks, ``[[...]]`` = array of records)::

    schema_version = 1
    [gas]          name, symbol, molar_mass_g_per_mol, source, notes?
    [[dispersion]] key, default?, form, <form coefficients>, constant?,
                   reference_temperature_k, reference_pressure_pa | _bar,
                   valid_wavelength_um = [lo, hi], source
    [dispersion_combined]  keys = [key, ...], switch_wavelength_um = [[lo, hi], ...],
                   source, notes?                                    (optional)
    [kerr]         n2_m2_per_w, wavelength_nm, pulse_duration_fs?, reference_temperature_k,
                   reference_pressure_pa | _bar, kind, source, notes?
    [ionization]   species, mole_fraction, potential_ev, l, m, charge, source
    [[raman]]      molecule, mole_fraction, rotational_constant_per_cm,
                   centrifugal_constant_per_cm, polarizability_anisotropy_angstrom3 | _m3,
                   spin_weight_even, spin_weight_odd, dephasing_time_ps,
                   dephasing_reference_pressure_pa, source        (molecular gases only)
    [eos]          coolprop_name, source, notes?
    [notes]        text                                              (optional)

The ``<form coefficients>`` are the two keys of :data:`DISPERSION_FORM_KEYS` for the record's
``form``; ``constant`` (default 0) is the published constant term of the form (added to
n^2 - 1 or to n - 1). ``[dispersion_combined]`` names fits of the file in order of increasing
wavelength and one switch band between each neighbouring pair; the loader refuses a band that
does not lie inside the stated ranges of both fits it joins.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from hcfplan.constants import eV
from hcfplan.errors import ConfigError
from hcfplan.units import SUFFIXES

#: The table layout version this loader reads.
SCHEMA_VERSION = 1

#: Unit suffixes used by the gas tables that the shared table in units.py does not (yet) have.
_EXTRA_FACTORS = {
    "ev": eV,
    "g_per_mol": 1e-3,
    "per_cm": 100.0,
    "angstrom3": 1e-30,
    "m2_per_w": 1.0,
}

#: Dispersion form name -> the two TOML keys holding its coefficient lists (as printed, um units).
#: The evaluators of the same forms are :data:`hcfplan.materials.gas_tables.DISPERSION_FORMS`.
DISPERSION_FORM_KEYS: dict[str, tuple[str, str]] = {
    "n2_minus_1_sellmeier": ("b", "c_um2"),
    "n_minus_1_inverse": ("a_per_um2", "b_per_um2"),
}


# --- value kinds and value checks ---------------------------------------------------------------


def _is_number(value: Any) -> bool:
    if not isinstance(value, int | float) or isinstance(value, bool):
        return False
    try:
        return math.isfinite(value)
    except OverflowError:  # an integer beyond the float range
        return False


def _kind_number(value: Any) -> str:
    return "" if _is_number(value) else "must be a finite number"


def _kind_int(value: Any) -> str:
    return "" if isinstance(value, int) and not isinstance(value, bool) else "must be an integer"


def _kind_str(value: Any) -> str:
    return "" if isinstance(value, str) and value.strip() else "must be a non-empty string"


def _kind_bool(value: Any) -> str:
    return "" if isinstance(value, bool) else "must be true or false"


def _kind_numbers(value: Any) -> str:
    ok = isinstance(value, list) and value and all(_is_number(v) for v in value)
    return "" if ok else "must be a non-empty list of numbers"


def _kind_strs(value: Any) -> str:
    ok = isinstance(value, list) and value and all(_kind_str(v) == "" for v in value)
    return "" if ok else "must be a non-empty list of non-empty strings"


def _kind_bands(value: Any) -> str:
    if not (isinstance(value, list) and value):
        return "must be a non-empty list of [lo, hi] pairs"
    problems = [_kind_range(v) for v in value]
    return next((f"band {i}: {p}" for i, p in enumerate(problems) if p), "")


def _kind_range(value: Any) -> str:
    if not (isinstance(value, list) and len(value) == 2 and all(_is_number(v) for v in value)):
        return "must be a list [lo, hi] of two numbers"
    if not 0 < value[0] < value[1]:
        return "must satisfy 0 < lo < hi"
    return ""


_KINDS: dict[str, Callable[[Any], str]] = {
    "number": _kind_number,
    "int": _kind_int,
    "str": _kind_str,
    "bool": _kind_bool,
    "numbers": _kind_numbers,
    "range": _kind_range,
    "strs": _kind_strs,
    "bands": _kind_bands,
}


def _values(value: Any) -> list:
    if not isinstance(value, list):
        return [value]
    return [x for v in value for x in _values(v)]


_CHECKS: dict[str, Callable[[Any], str]] = {
    "": lambda v: "",
    "positive": lambda v: "" if all(x > 0 for x in _values(v)) else "must be > 0",
    "nonnegative": lambda v: "" if all(x >= 0 for x in _values(v)) else "must be >= 0",
    "fraction": lambda v: "" if 0 < v <= 1 else "must be in (0, 1]",
    "charge": lambda v: "" if v >= 1 else "must be >= 1",
    "kerr_kind": lambda v: (
        "" if v in ("electronic", "effective") else "must be 'electronic' or 'effective'"
    ),
    "form": lambda v: (
        "" if v in DISPERSION_FORM_KEYS else f"must be one of {sorted(DISPERSION_FORM_KEYS)}"
    ),
}


@dataclass(frozen=True)
class TableField:
    """One table key: base name, value kind, value check, allowed unit suffixes, required.

    ``kind`` is one of ``number, int, str, bool, numbers, range, strs, bands``; ``check`` one of
    ``"", positive, nonnegative, fraction, charge, kerr_kind, form``. With ``units``, the key
    in the file is ``<name>_<unit>`` for one of the units, and the value is converted to SI.
    """

    name: str
    kind: str
    check: str = ""
    units: tuple[str, ...] = ()
    required: bool = True


def _factor(unit: str) -> float:
    return _EXTRA_FACTORS[unit] if unit in _EXTRA_FACTORS else SUFFIXES[unit][0]


def _to_si(value: Any, factor: float) -> Any:
    if isinstance(value, list):
        return [_to_si(v, factor) for v in value]
    return value * factor


def _read_field(block: Mapping, field: TableField, where: str, path: str) -> tuple[str, Any]:
    """Find, check and convert one field; returns (TOML key used, SI value or None)."""
    keys = [f"{field.name}_{u}" for u in field.units] or [field.name]
    present = [k for k in keys if k in block]
    if len(present) > 1:
        raise ConfigError(f"{path}: {where}: give only one of {', '.join(present)}")
    if not present:
        if field.required:
            hint = "every block needs a source string" if field.name == "source" else "required"
            alternatives = f" (or {', '.join(keys[1:])})" if len(keys) > 1 else ""
            raise ConfigError(f"{path}: {where}.{keys[0]}{alternatives}: missing: {hint}")
        return keys[0], None
    key = present[0]
    value = block[key]
    problem = _KINDS[field.kind](value) or _CHECKS[field.check](value)
    if problem:
        raise ConfigError(f"{path}: {where}.{key} = {value!r}: {problem}")
    if field.units:
        value = _to_si(value, _factor(key[len(field.name) + 1 :]))
    return key, value


def check_block(block: Any, fields: Sequence[TableField], where: str, path: str) -> dict[str, Any]:
    """Validate one TOML table against ``fields`` and convert its values to SI.

    Parameters
    ----------
    block : Any
        The parsed TOML table (anything else is refused).
    fields : sequence of TableField
        The keys allowed in the block.
    where : str
        Name of the block in messages, e.g. ``"dispersion[1]"``.
    path : str
        File named in messages.

    Returns
    -------
    dict
        {field base name: SI value, or None for an absent optional field}.

    Raises
    ------
    ConfigError
        One line naming the file and the key: not a table, a missing required key, a key given
        with two unit suffixes, a wrong kind or value, or an unknown key.

    References
    ----------
    None: numerical helper (input validation, no published model).
    """
    if not isinstance(block, Mapping):
        raise ConfigError(f"{path}: {where}: must be a table")
    used, values = set(), {}
    for field in fields:
        key, values[field.name] = _read_field(block, field, where, path)
        used.add(key)
    unknown = sorted(set(block) - used)
    if unknown:
        allowed = ", ".join(f.name + (f"_{f.units[0]}" if f.units else "") for f in fields)
        raise ConfigError(f"{path}: {where}.{unknown[0]}: unknown key (allowed: {allowed})")
    return values


def dispersion_coefficient_fields(form: Any) -> tuple[TableField, ...]:
    """The two coefficient-list fields of a dispersion ``form`` (none for an unknown form).

    An unknown or missing form yields no fields, so that :func:`check_block` reports the
    ``form`` key itself.

    References
    ----------
    None: numerical helper (table layout, no published model).
    """
    if not isinstance(form, str) or form not in DISPERSION_FORM_KEYS:
        return ()
    first, second = DISPERSION_FORM_KEYS[form]
    return TableField(first, "numbers"), TableField(second, "numbers")


# --- block schemas ------------------------------------------------------------------------------

_T = TableField("reference_temperature", "number", "positive", ("k",))
_P = TableField("reference_pressure", "number", "positive", ("pa", "bar"))
_SOURCE = TableField("source", "str")
_NOTES = TableField("notes", "str", required=False)

GAS_FIELDS = (
    TableField("name", "str"),
    TableField("symbol", "str"),
    TableField("molar_mass", "number", "positive", ("g_per_mol",)),
    _SOURCE,
    _NOTES,
)
#: Without the two coefficient lists, see :func:`dispersion_coefficient_fields`.
DISPERSION_FIELDS = (
    TableField("key", "str"),
    TableField("default", "bool", required=False),
    TableField("form", "str", "form"),
    _T,
    _P,
    TableField("valid_wavelength", "range", "positive", ("um", "nm")),
    TableField("constant", "number", required=False),
    _SOURCE,
    _NOTES,
)
#: The optional block joining several fits of one gas into the index used by default.
COMBINED_FIELDS = (
    TableField("keys", "strs"),
    TableField("switch_wavelength", "bands", "positive", ("um", "nm")),
    _SOURCE,
    _NOTES,
)
KERR_FIELDS = (
    TableField("n2", "number", "positive", ("m2_per_w",)),
    TableField("wavelength", "number", "positive", ("nm", "um")),
    TableField("pulse_duration", "number", "positive", ("fs", "ps"), required=False),
    _T,
    _P,
    TableField("kind", "str", "kerr_kind"),
    _SOURCE,
    _NOTES,
)
IONIZATION_FIELDS = (
    TableField("species", "str"),
    TableField("mole_fraction", "number", "fraction"),
    TableField("potential", "number", "positive", ("ev",)),
    TableField("l", "int", "nonnegative"),
    TableField("m", "int"),
    TableField("charge", "int", "charge"),
    _SOURCE,
    _NOTES,
)
RAMAN_FIELDS = (
    TableField("molecule", "str"),
    TableField("mole_fraction", "number", "fraction"),
    TableField("rotational_constant", "number", "positive", ("per_cm",)),
    TableField("centrifugal_constant", "number", "nonnegative", ("per_cm",)),
    TableField("polarizability_anisotropy", "number", "positive", ("angstrom3", "m3")),
    TableField("spin_weight_even", "number", "nonnegative"),
    TableField("spin_weight_odd", "number", "nonnegative"),
    TableField("dephasing_time", "number", "positive", ("ps", "fs", "s")),
    TableField("dephasing_reference_pressure", "number", "positive", ("pa", "bar")),
    _SOURCE,
)
EOS_FIELDS = (TableField("coolprop_name", "str"), _SOURCE, _NOTES)
NOTES_FIELDS = (TableField("text", "str"),)
#: The top-level keys (blocks) a table may have.
TOP_KEYS = ("schema_version", "gas", "dispersion", "dispersion_combined", "kerr", "ionization",
            "raman", "eos", "notes")


def check_top_level(data: Mapping, path: str) -> None:
    """Refuse unknown top-level blocks and a ``schema_version`` other than :data:`SCHEMA_VERSION`.

    Raises
    ------
    ConfigError
        One line naming the file and the block or the version found.

    References
    ----------
    None: numerical helper (table layout, no published model).
    """
    unknown = sorted(set(data) - set(TOP_KEYS))
    if unknown:
        shown = unknown[0] if unknown[0].isidentifier() else repr(unknown[0])
        raise ConfigError(f"{path}: {shown}: unknown block (allowed: {', '.join(TOP_KEYS)})")
    version = data.get("schema_version", SCHEMA_VERSION)
    if not (isinstance(version, int) and not isinstance(version, bool)
            and version == SCHEMA_VERSION):
        raise ConfigError(f"{path}: schema_version = {version!r}: this hcfplan reads "
                          f"schema_version = {SCHEMA_VERSION}")


def required_block(data: Mapping, key: str, path: str) -> Any:
    """The block ``key`` of a parsed table; a missing block is one ConfigError line.

    References
    ----------
    None: numerical helper (table layout, no published model).
    """
    if key not in data:
        raise ConfigError(f"{path}: [{key}]: missing block")
    return data[key]
