"""Gas data tables: the frozen records, the TOML loader and its validation.

One TOML file per gas lives in the top-level ``gases/`` folder (shipped as the package
``hcfplan._gases``). Users may put their own tables in further directories; those are searched
first. Every block of a table carries a ``source`` string, and every key with a unit carries the
unit as a suffix (``potential_ev``, ``reference_pressure_pa``); values are converted to SI exactly
once, here. Dispersion coefficients are kept as printed (micrometre units) and the wavelength is
converted when a fit is evaluated, see :func:`refractive_index_from_fit`.

Table layout (blocks, ``[[...]]`` = array of records)::

    schema_version = 1
    [gas]          name, symbol, molar_mass_g_per_mol, source, notes?
    [[dispersion]] key, default?, form, <form coefficients>, reference_temperature_k,
                   reference_pressure_pa | _bar, valid_wavelength_um = [lo, hi], source
    [kerr]         n2_m2_per_w, wavelength_nm, pulse_duration_fs?, reference_temperature_k,
                   reference_pressure_pa | _bar, kind, source, notes?
    [ionization]   species, mole_fraction, potential_ev, l, m, charge, source
    [[raman]]      molecule, mole_fraction, rotational_constant_per_cm,
                   centrifugal_constant_per_cm, polarizability_anisotropy_angstrom3 | _m3,
                   spin_weight_even, spin_weight_odd, dephasing_time_ps,
                   dephasing_reference_pressure_pa, source        (molecular gases only)
    [eos]          coolprop_name, source, notes?
    [notes]        text                                              (optional)
"""

from __future__ import annotations

import importlib.resources
import math
import os
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Any

import numpy as np

from hcfplan.constants import eV
from hcfplan.errors import ConfigError
from hcfplan.materials.table_files import read_table_toml
from hcfplan.units import SUFFIXES

#: Environment variable with extra table directories (os.pathsep-separated); read only by
#: :func:`gas_search_dirs` when the caller passes an environment mapping.
GAS_PATH_VARIABLE = "HCFPLAN_GAS_PATH"

_SHIPPED_PACKAGE = "hcfplan._gases"

#: Unit suffixes used by the gas tables that the shared table in units.py does not (yet) have.
_EXTRA_FACTORS = {
    "ev": eV,
    "g_per_mol": 1e-3,
    "per_cm": 100.0,
    "angstrom3": 1e-30,
    "m2_per_w": 1.0,
}


@dataclass(frozen=True)
class DispersionFit:
    """One published refractive-index fit at its reference state.

    ``coefficients`` holds pairs in the published micrometre units: ``(B_i, C_i [um^2])`` for
    ``"n2_minus_1_sellmeier"`` and ``(A_i [um^-2], B_i [um^-2])`` for ``"n_minus_1_inverse"``.
    Temperatures in [K], pressure in [Pa], ``valid_wavelength`` = (lo, hi) in [m].
    """

    form: str
    coefficients: tuple
    reference_temperature: float
    reference_pressure: float
    valid_wavelength: tuple[float, float]
    source: str
    key: str = ""


@dataclass(frozen=True)
class KerrData:
    """Kerr coefficient ``n2`` [m^2/W] at the reference state (T [K], p [Pa]).

    ``wavelength`` [m] and ``pulse_duration`` [s] (NaN if not stated) are those of the
    measurement; ``kind`` is ``"electronic"`` (instantaneous) or ``"effective"``.
    """

    n2: float
    wavelength: float
    reference_temperature: float
    reference_pressure: float
    kind: str
    source: str
    pulse_duration: float = math.nan


@dataclass(frozen=True)
class IonizationData:
    """Ionisation data of the species that ionises (``potential`` in [J]).

    ``l``, ``m`` are the (atom-like) orbital quantum numbers, ``charge`` the charge state of the
    ion produced; ``mole_fraction`` is the fraction of the gas made of ``species`` (1 for pure).
    """

    potential: float
    l: int
    m: int
    charge: int
    source: str
    species: str = ""
    mole_fraction: float = 1.0


@dataclass(frozen=True)
class RotationalRamanSpecies:
    """Rotational Raman data of one linear molecule in the gas.

    ``rotational_constant`` B and ``centrifugal_constant`` D as wavenumbers [1/m];
    ``polarizability_anisotropy`` as polarizability volume [m^3]; ``spin_weights`` =
    (even J, odd J); ``dephasing_time`` T2 [s] at ``dephasing_reference_pressure`` [Pa]
    (collisional, so T2 scales as 1/pressure).
    """

    molecule: str
    mole_fraction: float
    rotational_constant: float
    centrifugal_constant: float
    polarizability_anisotropy: float
    spin_weights: tuple[float, float]
    dephasing_time: float
    source: str
    dephasing_reference_pressure: float = 101325.0


@dataclass(frozen=True)
class GasTable:
    """Everything hcfplan knows about one gas, in SI (``molar_mass`` in [kg/mol]).

    ``dispersion`` is the default fit; ``dispersion_fits`` holds all fits of the file,
    including the default one.
    """

    name: str
    coolprop_name: str
    molar_mass: float
    dispersion: DispersionFit
    kerr: KerrData
    ionization: IonizationData
    raman: tuple[RotationalRamanSpecies, ...]
    path: str
    notes: str
    symbol: str = ""
    dispersion_fits: tuple[DispersionFit, ...] = ()


# --- dispersion forms ---------------------------------------------------------------------------


def _n_sellmeier(coefficients: tuple, wavelength: np.ndarray) -> np.ndarray:
    """n from n^2 - 1 = sum B_i lambda^2 / (lambda^2 - C_i), lambda in um (Borzsonyi 2008 form)."""
    wavelength_um = np.asarray(wavelength, dtype=float) * 1e6  # the fits take micrometres
    lam2 = wavelength_um**2
    n2_minus_1 = sum(b * lam2 / (lam2 - c_um2) for b, c_um2 in coefficients)
    return np.sqrt(1.0 + n2_minus_1)


def _n_inverse(coefficients: tuple, wavelength: np.ndarray) -> np.ndarray:
    """n from n - 1 = sum A_i / (B_i - lambda^-2), lambda in um (Peck/Ciddor form)."""
    wavenumber2 = (1.0 / (np.asarray(wavelength, dtype=float) * 1e6)) ** 2  # [um^-2]
    return 1.0 + sum(a / (b - wavenumber2) for a, b in coefficients)


#: form name -> evaluator(coefficients, wavelength [m]) -> n
DISPERSION_FORMS: dict[str, Callable[[tuple, np.ndarray], np.ndarray]] = {
    "n2_minus_1_sellmeier": _n_sellmeier,
    "n_minus_1_inverse": _n_inverse,
}

#: form name -> the two TOML keys holding its coefficient lists
_FORM_KEYS = {
    "n2_minus_1_sellmeier": ("b", "c_um2"),
    "n_minus_1_inverse": ("a_per_um2", "b_per_um2"),
}


def refractive_index_from_fit(fit: DispersionFit, wavelength: np.ndarray) -> np.ndarray:
    """Refractive index of a fit at its own reference state.

    Parameters
    ----------
    fit : DispersionFit
        The fit record.
    wavelength : float or ndarray
        Vacuum wavelength. [m]

    Returns
    -------
    ndarray
        Refractive index n. [-]

    Notes
    -----
    No range check here; :func:`hcfplan.materials.gases.refractive_index_reference` warns.
    """
    return DISPERSION_FORMS[fit.form](fit.coefficients, wavelength)


# --- field checks -------------------------------------------------------------------------------


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
}


def _values(value: Any) -> list:
    return value if isinstance(value, list) else [value]


_CHECKS: dict[str, Callable[[Any], str]] = {
    "": lambda v: "",
    "positive": lambda v: "" if all(x > 0 for x in _values(v)) else "must be > 0",
    "nonnegative": lambda v: "" if all(x >= 0 for x in _values(v)) else "must be >= 0",
    "fraction": lambda v: "" if 0 < v <= 1 else "must be in (0, 1]",
    "charge": lambda v: "" if v >= 1 else "must be >= 1",
    "kerr_kind": lambda v: (
        "" if v in ("electronic", "effective") else "must be 'electronic' or 'effective'"
    ),
    "form": lambda v: "" if v in DISPERSION_FORMS else f"must be one of {sorted(DISPERSION_FORMS)}",
}


@dataclass(frozen=True)
class _Field:
    """One table key: base name, value kind, value check, allowed unit suffixes, required."""

    name: str
    kind: str
    check: str = ""
    units: tuple[str, ...] = ()
    required: bool = True


def _factor(unit: str) -> float:
    return _EXTRA_FACTORS[unit] if unit in _EXTRA_FACTORS else SUFFIXES[unit][0]


def _to_si(value: Any, factor: float) -> Any:
    if isinstance(value, list):
        return [v * factor for v in value]
    return value * factor


def _read_field(block: Mapping, field: _Field, where: str, path: str) -> tuple[str, Any]:
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


def _check_block(block: Any, fields: Sequence[_Field], where: str, path: str) -> dict[str, Any]:
    """Validate one TOML table against ``fields``; return {base name: SI value or None}."""
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


# --- block schemas and record builders ----------------------------------------------------------

_T = _Field("reference_temperature", "number", "positive", ("k",))
_P = _Field("reference_pressure", "number", "positive", ("pa", "bar"))
_SOURCE = _Field("source", "str")
_NOTES = _Field("notes", "str", required=False)

_GAS_FIELDS = (
    _Field("name", "str"),
    _Field("symbol", "str"),
    _Field("molar_mass", "number", "positive", ("g_per_mol",)),
    _SOURCE,
    _NOTES,
)
_DISPERSION_FIELDS = (
    _Field("key", "str"),
    _Field("default", "bool", required=False),
    _Field("form", "str", "form"),
    _T,
    _P,
    _Field("valid_wavelength", "range", "positive", ("um", "nm")),
    _SOURCE,
    _NOTES,
)
_KERR_FIELDS = (
    _Field("n2", "number", "positive", ("m2_per_w",)),
    _Field("wavelength", "number", "positive", ("nm", "um")),
    _Field("pulse_duration", "number", "positive", ("fs", "ps"), required=False),
    _T,
    _P,
    _Field("kind", "str", "kerr_kind"),
    _SOURCE,
    _NOTES,
)
_IONIZATION_FIELDS = (
    _Field("species", "str"),
    _Field("mole_fraction", "number", "fraction"),
    _Field("potential", "number", "positive", ("ev",)),
    _Field("l", "int", "nonnegative"),
    _Field("m", "int"),
    _Field("charge", "int", "charge"),
    _SOURCE,
    _NOTES,
)
_RAMAN_FIELDS = (
    _Field("molecule", "str"),
    _Field("mole_fraction", "number", "fraction"),
    _Field("rotational_constant", "number", "positive", ("per_cm",)),
    _Field("centrifugal_constant", "number", "nonnegative", ("per_cm",)),
    _Field("polarizability_anisotropy", "number", "positive", ("angstrom3", "m3")),
    _Field("spin_weight_even", "number", "nonnegative"),
    _Field("spin_weight_odd", "number", "nonnegative"),
    _Field("dephasing_time", "number", "positive", ("ps", "fs", "s")),
    _Field("dephasing_reference_pressure", "number", "positive", ("pa", "bar")),
    _SOURCE,
)
_EOS_FIELDS = (_Field("coolprop_name", "str"), _SOURCE, _NOTES)
_NOTES_FIELDS = (_Field("text", "str"),)
_TOP_KEYS = ("schema_version", "gas", "dispersion", "kerr", "ionization", "raman", "eos", "notes")


def _dispersion_record(block: Any, where: str, path: str) -> tuple[DispersionFit, bool]:
    """Build one DispersionFit; returns (fit, marked default)."""
    form = block.get("form") if isinstance(block, Mapping) else None
    first, second = _FORM_KEYS.get(form, ("", "")) if isinstance(form, str) else ("", "")
    coefficient_fields = (_Field(first, "numbers"), _Field(second, "numbers")) if first else ()
    values = _check_block(block, _DISPERSION_FIELDS + coefficient_fields, where, path)
    if len(values[first]) != len(values[second]):
        raise ConfigError(
            f"{path}: {where}.{first} and {where}.{second}: must have the same length "
            f"(got {len(values[first])} and {len(values[second])})"
        )
    lo, hi = values["valid_wavelength"]
    fit = DispersionFit(
        form=form,
        coefficients=tuple(zip(values[first], values[second], strict=True)),
        reference_temperature=float(values["reference_temperature"]),
        reference_pressure=float(values["reference_pressure"]),
        valid_wavelength=(float(lo), float(hi)),
        source=values["source"],
        key=values["key"],
    )
    return fit, bool(values["default"])


def _dispersion_records(blocks: Any, path: str) -> tuple[DispersionFit, tuple[DispersionFit, ...]]:
    """All dispersion fits and the default one (exactly one marked, or a single record)."""
    if not isinstance(blocks, list) or not blocks:
        raise ConfigError(f"{path}: dispersion: missing: give at least one [[dispersion]] record")
    records = [_dispersion_record(b, f"dispersion[{i}]", path) for i, b in enumerate(blocks)]
    fits = tuple(fit for fit, _ in records)
    keys = [fit.key for fit in fits]
    if len(set(keys)) != len(keys):
        raise ConfigError(f"{path}: dispersion.key = {keys}: keys must be unique")
    defaults = [fit for fit, is_default in records if is_default]
    if len(fits) == 1 and not defaults:
        defaults = list(fits)
    if len(defaults) != 1:
        raise ConfigError(
            f"{path}: dispersion.default: exactly one record must have default = true "
            f"(found {len(defaults)})"
        )
    return defaults[0], fits


def _kerr_record(block: Any, path: str) -> KerrData:
    v = _check_block(block, _KERR_FIELDS, "kerr", path)
    duration = math.nan if v["pulse_duration"] is None else float(v["pulse_duration"])
    return KerrData(
        n2=float(v["n2"]),
        wavelength=float(v["wavelength"]),
        reference_temperature=float(v["reference_temperature"]),
        reference_pressure=float(v["reference_pressure"]),
        kind=v["kind"],
        source=v["source"],
        pulse_duration=duration,
    )


def _ionization_record(block: Any, path: str) -> IonizationData:
    v = _check_block(block, _IONIZATION_FIELDS, "ionization", path)
    if abs(v["m"]) > v["l"]:
        raise ConfigError(f"{path}: ionization.m = {v['m']}: must satisfy |m| <= l = {v['l']}")
    return IonizationData(
        potential=float(v["potential"]),
        l=v["l"],
        m=v["m"],
        charge=v["charge"],
        source=v["source"],
        species=v["species"],
        mole_fraction=float(v["mole_fraction"]),
    )


def _raman_record(block: Any, where: str, path: str) -> RotationalRamanSpecies:
    v = _check_block(block, _RAMAN_FIELDS, where, path)
    weights = (float(v["spin_weight_even"]), float(v["spin_weight_odd"]))
    if sum(weights) == 0:
        raise ConfigError(f"{path}: {where}.spin_weight_even/odd = 0, 0: one must be > 0")
    return RotationalRamanSpecies(
        molecule=v["molecule"],
        mole_fraction=float(v["mole_fraction"]),
        rotational_constant=float(v["rotational_constant"]),
        centrifugal_constant=float(v["centrifugal_constant"]),
        polarizability_anisotropy=float(v["polarizability_anisotropy"]),
        spin_weights=weights,
        dephasing_time=float(v["dephasing_time"]),
        source=v["source"],
        dephasing_reference_pressure=float(v["dephasing_reference_pressure"]),
    )


def _required_block(data: Mapping, key: str, path: str) -> Any:
    if key not in data:
        raise ConfigError(f"{path}: [{key}]: missing block")
    return data[key]


#: The table layout version this loader reads.
SCHEMA_VERSION = 1


def _table_from_data(data: Mapping, path: str) -> GasTable:
    """Validate parsed TOML data and build the GasTable."""
    unknown = sorted(set(data) - set(_TOP_KEYS))
    if unknown:
        shown = unknown[0] if unknown[0].isidentifier() else repr(unknown[0])
        raise ConfigError(f"{path}: {shown}: unknown block "
                          f"(allowed: {', '.join(_TOP_KEYS)})")
    version = data.get("schema_version", SCHEMA_VERSION)
    if not (isinstance(version, int) and not isinstance(version, bool)
            and version == SCHEMA_VERSION):
        raise ConfigError(f"{path}: schema_version = {version!r}: this hcfplan reads "
                          f"schema_version = {SCHEMA_VERSION}")
    gas = _check_block(_required_block(data, "gas", path), _GAS_FIELDS, "gas", path)
    eos = _check_block(_required_block(data, "eos", path), _EOS_FIELDS, "eos", path)
    default_fit, fits = _dispersion_records(_required_block(data, "dispersion", path), path)
    raman_blocks = data.get("raman", [])
    if not isinstance(raman_blocks, list):
        raise ConfigError(f"{path}: raman: must be an array of [[raman]] records")
    notes = data.get("notes")
    text = _check_block(notes, _NOTES_FIELDS, "notes", path)["text"] if notes is not None else ""
    return GasTable(
        name=gas["name"],
        coolprop_name=eos["coolprop_name"],
        molar_mass=float(gas["molar_mass"]),
        dispersion=default_fit,
        kerr=_kerr_record(_required_block(data, "kerr", path), path),
        ionization=_ionization_record(_required_block(data, "ionization", path), path),
        raman=tuple(_raman_record(b, f"raman[{i}]", path) for i, b in enumerate(raman_blocks)),
        path=path,
        notes="\n".join(s.strip() for s in (gas["notes"] or "", text) if s and s.strip()),
        symbol=gas["symbol"],
        dispersion_fits=fits,
    )


# --- files and search path ----------------------------------------------------------------------


def shipped_gas_dir(package: str = _SHIPPED_PACKAGE) -> Path:
    """Directory of the gas tables shipped with hcfplan.

    Uses ``importlib.resources`` on ``package`` (present when hcfplan is installed); in a plain
    source checkout on PYTHONPATH it falls back to the ``gases/`` folder next to ``hcfplan/``.
    """
    try:
        root = Path(str(importlib.resources.files(package)))
        if root.is_dir():
            return root
    except ModuleNotFoundError:
        pass
    return Path(__file__).resolve().parents[2] / "gases"


def gas_search_dirs(
    extra: Sequence[str | Path] = (), environ: Mapping[str, str] | None = None
) -> list[Path]:
    """User table directories: ``extra`` first, then the entries of ``HCFPLAN_GAS_PATH``.

    The environment is read only from ``environ`` when it is passed (the CLI passes
    ``os.environ``). The shipped tables are not included; :func:`load_gas_table` always
    searches them last.
    """
    dirs = [Path(d) for d in extra]
    if environ is not None:
        dirs += [Path(p) for p in environ.get(GAS_PATH_VARIABLE, "").split(os.pathsep) if p]
    return dirs


def _is_dir(path: str | Path) -> bool:
    try:
        return Path(path).is_dir()
    except (OSError, ValueError):  # e.g. a name too long for the file system
        return False


def _all_dirs(search_dirs: Sequence[str | Path]) -> tuple[str, ...]:
    for d in search_dirs:
        if not _is_dir(d):
            raise ConfigError(f"gas table directory {str(d)!r}: does not exist (set by "
                              f"gas.table_dir or {GAS_PATH_VARIABLE})")
    return tuple(str(Path(d).resolve()) for d in search_dirs) + (str(shipped_gas_dir()),)


def _identifiers(path: Path) -> set[str]:
    """Lower-case symbol and name of a table (empty if the file cannot be parsed)."""
    try:
        gas = read_table_toml(path).get("gas", {})
    except ConfigError:
        return set()
    if not isinstance(gas, Mapping):
        return set()
    return {str(gas.get(k, "")).lower() for k in ("symbol", "name")} - {""}


def _table_files(dirs: tuple[str, ...]) -> list[Path]:
    return [f for d in dirs for f in sorted(Path(d).glob("*.toml")) if f.is_file()]


def _stems(dirs: tuple[str, ...]) -> list[str]:
    seen: dict[str, str] = {}
    for f in _table_files(dirs):
        seen.setdefault(f.stem.lower(), f.stem)
    return sorted(seen.values(), key=str.lower)


@lru_cache(maxsize=64)
def _load_file(path: str) -> GasTable:
    return _table_from_data(read_table_toml(path), path)


def _find_table(name: str, dirs: tuple[str, ...]) -> Path:
    """First file whose stem, then whose symbol or name, matches ``name`` (case-insensitive)."""
    wanted = name.strip().lower()
    files = _table_files(dirs)
    match = next((f for f in files if f.stem.lower() == wanted), None)
    match = match or next((f for f in files if wanted in _identifiers(f)), None)
    if match is None:
        raise ConfigError(
            f"gas {name!r}: unknown; available gases: {', '.join(_stems(dirs))} "
            f"(searched {', '.join(dirs)})"
        )
    return match


def load_gas_table(name: str, search_dirs: Sequence[str | Path] = ()) -> GasTable:
    """Load and validate the table of one gas.

    Parameters
    ----------
    name : str
        File stem, symbol or name of the gas, case-insensitive (``"Ar"``, ``"argon"``, ``"n2"``).
    search_dirs : sequence of str or Path
        User directories, searched in order before the shipped tables.

    Returns
    -------
    GasTable
        The validated table in SI (parsed tables are cached per file).

    Raises
    ------
    ConfigError
        Unknown gas (the message lists the available ones), a missing directory, or a
        malformed file (the message names the file and the key).
    """
    return _load_file(str(_find_table(name, _all_dirs(search_dirs))))


def available_gases(search_dirs: Sequence[str | Path] = ()) -> list[str]:
    """File stems of all tables in ``search_dirs`` and the shipped directory, sorted."""
    return _stems(_all_dirs(search_dirs))
