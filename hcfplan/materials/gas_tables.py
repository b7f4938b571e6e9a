"""Gas data tables: the frozen records, the dispersion forms, the TOML loader and search path.

One TOML file per gas lives in the top-level ``gases/`` folder (shipped as the package
``hcfplan._gases``). Users may put their own tables in further directories; those are searched
first. The layout of a file and the checks of each key are in
:mod:`hcfplan.materials.gas_table_schema`; this module builds the records from the checked SI
values. Dispersion coefficients are kept as printed (micrometre units) and the wavelength is
converted when a fit is evaluated, see :func:`refractive_index_from_fit`. A fit with a pole or
an index not real and above 1 inside its stated range, and an equation-of-state name CoolProp
does not know, are refused while loading (:mod:`hcfplan.materials.gas_fit_checks`).

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
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from functools import lru_cache, partial
from pathlib import Path
from typing import Any

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.materials.gas_fit_checks import check_eos_name, index_defect
from hcfplan.materials.gas_table_schema import (
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

#: Environment variable with extra table directories (os.pathsep-separated); read only by
#: :func:`gas_search_dirs` when the caller passes an environment mapping.
GAS_PATH_VARIABLE = "HCFPLAN_GAS_PATH"

_SHIPPED_PACKAGE = "hcfplan._gases"

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

    @property
    def label(self) -> str:
        """Short name for messages: the symbol, or the name if the table has no symbol."""
        return self.symbol or self.name


# --- dispersion forms ---------------------------------------------------------------------------


def _n_sellmeier(coefficients: tuple, wavelength: np.ndarray) -> np.ndarray:
    """n from n^2 - 1 = sum B_i lambda^2 / (lambda^2 - C_i), lambda in um (form of [1])."""
    wavelength_um = np.asarray(wavelength, dtype=float) * 1e6  # the fits take micrometres
    lam2 = wavelength_um**2
    n2_minus_1 = sum(b * lam2 / (lam2 - c_um2) for b, c_um2 in coefficients)
    return np.sqrt(1.0 + n2_minus_1)


def _n_inverse(coefficients: tuple, wavelength: np.ndarray) -> np.ndarray:
    """n from n - 1 = sum A_i / (B_i - lambda^-2), lambda in um (form of Eq. (1) of [2])."""
    wavenumber2 = (1.0 / (np.asarray(wavelength, dtype=float) * 1e6)) ** 2  # [um^-2]
    return 1.0 + sum(a / (b - wavenumber2) for a, b in coefficients)


#: form name -> evaluator(coefficients, wavelength [m]) -> n
DISPERSION_FORMS: dict[str, Callable[[tuple, np.ndarray], np.ndarray]] = {
    "n2_minus_1_sellmeier": _n_sellmeier,
    "n_minus_1_inverse": _n_inverse,
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
    ``"n2_minus_1_sellmeier"``: :math:`n^2 - 1 = \\sum_i B_i \\lambda^2/(\\lambda^2 - C_i)`, the
    form of [1]; ``"n_minus_1_inverse"``: :math:`n - 1 = \\sum_i A_i/(B_i - \\lambda^{-2})`, the
    form of Eq. (1) of [2]; :math:`\\lambda` in micrometres as printed. The coefficients and the
    reference state come from the record (its ``source`` names the paper). No range check here;
    :func:`hcfplan.materials.gases.refractive_index_reference` warns.

    References
    ----------
    .. [1] A. Borzsonyi, Z. Heiner, M. P. Kalashnikov, A. P. Kovacs, K. Osvay, Appl. Opt. 47,
           4856-4863 (2008), doi:10.1364/AO.47.004856.
    .. [2] P. E. Ciddor, Appl. Opt. 35, 1566-1573 (1996), doi:10.1364/AO.35.001566.
    """
    return DISPERSION_FORMS[fit.form](fit.coefficients, wavelength)


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
    fit = DispersionFit(
        form=form,
        coefficients=tuple(zip(values[first], values[second], strict=True)),
        reference_temperature=float(values["reference_temperature"]),
        reference_pressure=float(values["reference_pressure"]),
        valid_wavelength=(float(lo), float(hi)),
        source=values["source"],
        key=values["key"],
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
    raman_blocks = data.get("raman", [])
    if not isinstance(raman_blocks, list):
        raise ConfigError(f"{path}: raman: must be an array of [[raman]] records")
    notes = data.get("notes")
    text = check_block(notes, NOTES_FIELDS, "notes", path)["text"] if notes is not None else ""
    return GasTable(
        name=gas["name"],
        coolprop_name=eos["coolprop_name"],
        molar_mass=float(gas["molar_mass"]),
        dispersion=default_fit,
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

    Uses ``importlib.resources`` on ``package`` (present when hcfplan is installed); in a plain
    source checkout on PYTHONPATH it falls back to the ``gases/`` folder next to ``hcfplan/``.

    References
    ----------
    None: file helper (no published model).
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
