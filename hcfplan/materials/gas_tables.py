"""Gas data tables: the frozen records, the TOML loader and search path.

One TOML file per gas lives in the top-level ``gases/`` folder (shipped as the package
``hcfplan._gases``). Users may put their own tables in further directories; those are searched
first. The layout of a file and the checks of each key are in
:mod:`hcfplan.materials.gas_table_schema`; this module builds the records from the checked SI
values. The dispersion records, their forms and the combination of several fits live in
:mod:`hcfplan.materials.gas_dispersion` and are re-exported here. A fit with a pole or an index
not real and above 1 inside its stated range, and an equation-of-state name CoolProp does not
know, are refused while loading (:mod:`hcfplan.materials.gas_fit_checks`).

References
----------
.. [1] A. Borzsonyi, Z. Heiner, M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47,
       4856-4863 (2008), doi:10.1364/AO.47.004856 (form ``n2_minus_1_sellmeier``).
.. [2] P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996), doi:10.1364/AO.35.001566, Eq. (1)
       (form ``n_minus_1_inverse``).
"""

from __future__ import annotations

import importlib.resources
import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache, partial
from pathlib import Path
from typing import Any

from hcfplan.errors import ConfigError
from hcfplan.materials.gas_dispersion import (
    DISPERSION_FORMS,
    CombinedDispersion,
    DispersionFit,
    combined_term,
    fit_term,
    refractive_index_from_fit,
    switch_weight,
)
from hcfplan.materials.gas_fit_checks import check_eos_name, index_defect
from hcfplan.materials.gas_table_schema import (
    COMBINED_FIELDS,
    DISPERSION_FIELDS,
    EOS_FIELDS,
    GAS_FIELDS,
    IONIZATION_FIELDS,
    KERR_FIELDS,
    NOTES_FIELDS,
    RAMAN_FIELDS,
    check_block,
    check_top_level,
    dispersion_coefficient_fields,
    required_block,
)
from hcfplan.materials.table_files import read_table_toml

__all__ = [
    "DISPERSION_FORMS", "GAS_PATH_VARIABLE", "CombinedDispersion", "DispersionFit", "GasTable",
    "IonizationData", "KerrData", "RotationalRamanSpecies", "available_gases",
    "combined_term", "fit_term", "gas_search_dirs", "load_gas_table", "refractive_index_from_fit",
    "shipped_gas_dir", "switch_weight",
]

#: Environment variable with extra table directories (os.pathsep-separated); read only by
#: :func:`gas_search_dirs` when the caller passes an environment mapping.
GAS_PATH_VARIABLE = "HCFPLAN_GAS_PATH"

_SHIPPED_PACKAGE = "hcfplan._gases"

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

    ``dispersion`` is what the index uses by default: the ``[dispersion_combined]`` record if
    the file has one, else the default fit; ``dispersion_fits`` holds all fits of the file.
    """

    name: str
    coolprop_name: str
    molar_mass: float
    dispersion: DispersionFit | CombinedDispersion
    kerr: KerrData
    ionization: IonizationData
    raman: tuple[RotationalRamanSpecies, ...]
    path: str
    notes: str
    symbol: str = ""
    dispersion_fits: tuple[DispersionFit, ...] = ()

    @property
    def label(self) -> str:
        """Short name for messages: the symbol, or the name if the table has no symbol."""
        return self.symbol or self.name


# --- record builders ------------------------------------------------------------------------


def _dispersion_record(block: Any, where: str, path: str) -> tuple[DispersionFit, bool]:
    """Build one DispersionFit; returns (fit, marked default)."""
    form = block.get("form") if isinstance(block, Mapping) else None
    coefficient_fields = dispersion_coefficient_fields(form)
    values = check_block(block, DISPERSION_FIELDS + coefficient_fields, where, path)
    first, second = (f.name for f in coefficient_fields)
    if len(values[first]) != len(values[second]):
        raise ConfigError(
            f"{path}: {where}.{first} and {where}.{second}: must have the same length "
            f"(got {len(values[first])} and {len(values[second])})"
        )
    lo, hi = values["valid_wavelength"]
    constant = values["constant"]
    fit = DispersionFit(
        form=form,
        coefficients=tuple(zip(values[first], values[second], strict=True)),
        reference_temperature=float(values["reference_temperature"]),
        reference_pressure=float(values["reference_pressure"]),
        valid_wavelength=(float(lo), float(hi)),
        source=values["source"],
        key=values["key"],
        constant=0.0 if constant is None else float(constant),
    )
    problem = index_defect(partial(refractive_index_from_fit, fit), form, fit.coefficients, lo, hi)
    if problem:  # a pole, or n not real and > 1, inside the fit's own range
        raise ConfigError(f"{path}: {where}.{problem}, inside the fit's own stated range "
                          f"({lo * 1e9:.4g}-{hi * 1e9:.4g} nm)")
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


def _combined_record(block: Any, fits: tuple[DispersionFit, ...], default: DispersionFit,
                     path: str) -> CombinedDispersion:
    """Build the ``[dispersion_combined]`` record; every band inside both fits' ranges."""
    values = check_block(block, COMBINED_FIELDS, "dispersion_combined", path)
    by_key = {fit.key: fit for fit in fits}
    unknown = [k for k in values["keys"] if k not in by_key]
    if unknown:
        raise ConfigError(f"{path}: dispersion_combined.keys: {unknown[0]!r} is not a "
                          f"[[dispersion]] key (keys: {list(by_key)})")
    chosen = tuple(by_key[k] for k in values["keys"])
    if default.key not in values["keys"]:
        raise ConfigError(f"{path}: dispersion_combined.keys = {values['keys']}: must include "
                          f"the default fit {default.key!r} (used exactly next to it)")
    bands = [tuple(float(v) for v in band) for band in values["switch_wavelength"]]
    if len(chosen) < 2 or len(bands) != len(chosen) - 1:
        raise ConfigError(f"{path}: dispersion_combined: {len(chosen)} keys need "
                          f"{max(len(chosen) - 1, 1)} switch band(s), got {len(bands)}")
    for i, (lo, hi) in enumerate(bands):
        if i and lo < bands[i - 1][1]:
            raise ConfigError(f"{path}: dispersion_combined.switch_wavelength band {i}: must "
                              "start at or above the end of the band before it")
        for fit in chosen[i : i + 2]:
            f_lo, f_hi = fit.valid_wavelength
            if lo < f_lo or hi > f_hi:
                raise ConfigError(
                    f"{path}: dispersion_combined.switch_wavelength band {i} "
                    f"({lo * 1e6:g}-{hi * 1e6:g} um): must lie inside the range of fit "
                    f"{fit.key!r} ({f_lo * 1e6:g}-{f_hi * 1e6:g} um)")
    parts = [f"{fit.key} ({fit.valid_wavelength[0] * 1e9:.0f}-"
             f"{fit.valid_wavelength[1] * 1e9:.0f} nm)" for fit in chosen]
    switches = ", ".join(f"{lo * 1e9:.0f}-{hi * 1e9:.0f} nm" for lo, hi in bands)
    cited = " | ".join(dict.fromkeys(fit.source for fit in chosen))
    source = (f"combined fits {', '.join(parts)}, switched smoothly across {switches} "
              f"({values['source']}). Fits: {cited}")
    return CombinedDispersion(fits=chosen, switches=tuple(bands), source=source,
                              reference_temperature=default.reference_temperature,
                              reference_pressure=default.reference_pressure,
                              anchor=values["keys"].index(default.key))


def _kerr_record(block: Any, path: str) -> KerrData:
    v = check_block(block, KERR_FIELDS, "kerr", path)
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
    v = check_block(block, IONIZATION_FIELDS, "ionization", path)
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
    v = check_block(block, RAMAN_FIELDS, where, path)
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


def _table_from_data(data: Mapping, path: str) -> GasTable:
    """Validate parsed TOML data and build the GasTable."""
    check_top_level(data, path)
    gas = check_block(required_block(data, "gas", path), GAS_FIELDS, "gas", path)
    eos = check_block(required_block(data, "eos", path), EOS_FIELDS, "eos", path)
    check_eos_name(eos["coolprop_name"], "eos.coolprop_name", path)
    default_fit, fits = _dispersion_records(required_block(data, "dispersion", path), path)
    combined = data.get("dispersion_combined")
    dispersion = (default_fit if combined is None
                  else _combined_record(combined, fits, default_fit, path))
    raman_blocks = data.get("raman", [])
    if not isinstance(raman_blocks, list):
        raise ConfigError(f"{path}: raman: must be an array of [[raman]] records")
    notes = data.get("notes")
    text = check_block(notes, NOTES_FIELDS, "notes", path)["text"] if notes is not None else ""
    return GasTable(
        name=gas["name"],
        coolprop_name=eos["coolprop_name"],
        molar_mass=float(gas["molar_mass"]),
        dispersion=dispersion,
        kerr=_kerr_record(required_block(data, "kerr", path), path),
        ionization=_ionization_record(required_block(data, "ionization", path), path),
        raman=tuple(_raman_record(b, f"raman[{i}]", path) for i, b in enumerate(raman_blocks)),
        path=path,
        notes="\n".join(s.strip() for s in (gas["notes"] or "", text) if s and s.strip()),
        symbol=gas["symbol"],
        dispersion_fits=fits,
    )


# --- files and search path ----------------------------------------------------------------------


def shipped_gas_dir(package: str = _SHIPPED_PACKAGE) -> Path:
    """Directory of the gas tables shipped with hcfplan.

    The ``gases/`` folder next to the ``hcfplan/`` package that is running, where there is one
    (a source checkout, also one run from PYTHONPATH while another checkout is installed, so
    code and tables always come from the same tree); otherwise ``importlib.resources`` on
    ``package`` (an installed hcfplan). A ``package`` other than the default is always looked
    up through ``importlib.resources``.

    References
    ----------
    None: file helper (no published model).
    """
    checkout = Path(__file__).resolve().parents[2] / "gases"
    if package == _SHIPPED_PACKAGE and checkout.is_dir():
        return checkout
    try:
        root = Path(str(importlib.resources.files(package)))
        if root.is_dir():
            return root
    except ModuleNotFoundError:
        pass
    return checkout


def gas_search_dirs(
    extra: Sequence[str | Path] = (), environ: Mapping[str, str] | None = None
) -> list[Path]:
    """User table directories: ``extra`` first, then the entries of ``HCFPLAN_GAS_PATH``.

    The environment is read only from ``environ`` when it is passed (the CLI passes
    ``os.environ``). The shipped tables are not included; :func:`load_gas_table` always
    searches them last.

    References
    ----------
    None: file helper (no published model).
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

    References
    ----------
    None: file reader (no published model); each block of the table names its own source.
    """
    return _load_file(str(_find_table(name, _all_dirs(search_dirs))))


def available_gases(search_dirs: Sequence[str | Path] = ()) -> list[str]:
    """File stems of all tables in ``search_dirs`` and the shipped directory, sorted.

    References
    ----------
    None: file helper (no published model).
    """
    return _stems(_all_dirs(search_dirs))
