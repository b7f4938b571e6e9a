"""Solid optical materials (fiber cladding, windows): refractive index, dispersion, n2, strength.

The data live in ``hcfplan/materials/data/solids.toml`` (one table per material, the numbers in the
units of the source, each with its citation and a ``from_memory`` flag). This module reads and
checks that table once, converts it to SI and evaluates the Sellmeier fits. Dispersion follows the
conventions of :mod:`hcfplan.numerics.grid` (k(omega) = n omega / c; positive GVD is normal
dispersion).

Materials: ``fused_silica`` (Malitson 1965 [1]), ``caf2`` (Malitson 1963 [2]), ``mgf2_ordinary``
(Dodge 1984 [3], coefficients from memory), ``sapphire_ordinary`` (Malitson & Dodge 1972 [4],
coefficients from memory). Kerr values: Kabacinski et al. 2019 [5] (fused silica, CaF2) and
Adair et al. 1989 [6] (MgF2, sapphire; from memory).

References
----------
.. [1] I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965), doi:10.1364/JOSA.55.001205.
.. [2] I. H. Malitson, Appl. Opt. 2, 1103 (1963), doi:10.1364/AO.2.001103.
.. [3] M. J. Dodge, Appl. Opt. 23, 1980 (1984), doi:10.1364/AO.23.001980 [from memory].
.. [4] I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972) [from memory].
.. [5] T. Kabacinski et al., Opt. Express 27, 11018 (2019), doi:10.1364/OE.27.011018.
.. [6] R. Adair, L. L. Chase, S. A. Payne, Phys. Rev. B 39, 3337 (1989) [from memory].
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable
from dataclasses import dataclass
from functools import lru_cache
from importlib import resources
from pathlib import Path

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials.table_files import read_table_toml
from hcfplan.numerics.derivatives import derivative_table

_MICROMETRE = 1e-6  # [m]
_NANOMETRE = 1e-9  # [m]
_FEMTOSECOND = 1e-15  # [s]
_MPA = 1e6  # [Pa]
_J_PER_CM2 = 1e4  # [J/m^2]


@dataclass(frozen=True)
class SellmeierFit:
    """A published Sellmeier fit, coefficients as printed (wavelengths in micrometres).

    ``wavelength_min``/``wavelength_max`` [m] is the fitted range, ``temperature`` [K] the
    measurement temperature.
    """

    form: str
    a: float
    b: tuple[float, ...]
    resonance_um: tuple[float, ...]
    wavelength_min: float
    wavelength_max: float
    temperature: float
    source: str
    from_memory: bool


@dataclass(frozen=True)
class QuotedValue:
    """A single published number in SI with where it comes from.

    ``wavelength`` [m] and ``pulse_duration`` [s] are nan when the source states none.
    """

    value: float
    source: str
    from_memory: bool
    wavelength: float = math.nan
    pulse_duration: float = math.nan


@dataclass(frozen=True)
class SolidMaterial:
    """One solid material: dispersion fit, n2 [m^2/W], modulus of rupture [Pa], damage fluence."""

    name: str
    description: str
    dispersion: SellmeierFit
    n2: QuotedValue
    modulus_of_rupture: QuotedValue
    damage_fluence: QuotedValue | None = None


#: A material given by name or as a loaded record.
MaterialRef = str | SolidMaterial


def _sellmeier_wavelength_um(fit: SellmeierFit, wavelength: np.ndarray) -> np.ndarray:
    """n from n^2 = 1 + a + sum B_i lam^2/(lam^2 - lam_i^2), lam in um (Eq. form of [1]-[4])."""
    lam2 = (wavelength / _MICROMETRE) ** 2  # the published fits take micrometres
    n_squared = 1.0 + fit.a
    for b_i, lam_i in zip(fit.b, fit.resonance_um, strict=True):
        n_squared = n_squared + b_i * lam2 / (lam2 - lam_i**2)
    return np.sqrt(n_squared)


#: Sellmeier form key (as written in the TOML) -> evaluator (fit, wavelength [m]) -> n.
SELLMEIER_FORMS: dict[str, Callable[[SellmeierFit, np.ndarray], np.ndarray]] = {
    "sellmeier_wavelength_um": _sellmeier_wavelength_um,
}


def _table(value, where: str) -> dict:
    if not isinstance(value, dict):
        raise ConfigError(f"{where} = {value!r}: must be a table")
    return value


def _require(table: dict, key: str, where: str):
    if key not in table:
        raise ConfigError(f"{where}: missing key '{key}'")
    return table[key]


def _finite(value, where: str) -> float:
    """``value`` as a finite float (bool, text, inf, nan and huge integers are refused)."""
    try:
        number = float(value) if isinstance(value, int | float) else math.nan
    except OverflowError:
        number = math.inf
    if isinstance(value, bool) or not math.isfinite(number):
        raise ConfigError(f"{where} = {value!r}: must be a finite number")
    return number


def _positive(table: dict, key: str, where: str, *, allow_zero: bool = False) -> float:
    value = _require(table, key, where)
    number = _finite(value, f"{where}.{key}")
    if not (number >= 0 if allow_zero else number > 0):
        raise ConfigError(f"{where}.{key} = {value!r}: must be a number "
                          f"{'>=' if allow_zero else '>'} 0")
    return number


def _number_list(table: dict, key: str, where: str) -> tuple[float, ...]:
    values = _require(table, key, where)
    if not isinstance(values, list):
        raise ConfigError(f"{where}.{key} = {values!r}: must be a list of numbers")
    return tuple(_finite(v, f"{where}.{key}[{i}]") for i, v in enumerate(values))


def _source(table: dict, where: str) -> tuple[str, bool]:
    source = _require(table, "source", where)
    if not isinstance(source, str) or not source.strip():
        raise ConfigError(f"{where}.source = {source!r}: must be a non-empty citation")
    return source, bool(table.get("from_memory", False))


def _parse_dispersion(table: dict, where: str) -> SellmeierFit:
    table = _table(table, where)
    form = _require(table, "form", where)
    if not isinstance(form, str) or form not in SELLMEIER_FORMS:
        raise ConfigError(f"{where}.form = {form!r}: must be one of {sorted(SELLMEIER_FORMS)}")
    b = _number_list(table, "b", where)
    poles = _number_list(table, "resonance_um", where)
    if len(b) != len(poles) or not b:
        raise ConfigError(
            f"{where}: 'b' ({len(b)} values) and 'resonance_um' ({len(poles)}) must match"
        )
    if any(p < 0 for p in poles):
        raise ConfigError(f"{where}.resonance_um = {list(poles)}: must be >= 0")
    lo = _positive(table, "wavelength_min_um", where)
    hi = _positive(table, "wavelength_max_um", where)
    if lo >= hi:
        raise ConfigError(f"{where}: wavelength_min_um = {lo} >= wavelength_max_um = {hi}")
    source, memory = _source(table, where)
    return SellmeierFit(
        form, _finite(table.get("a", 0.0), f"{where}.a"), b, poles, lo * _MICROMETRE,
        hi * _MICROMETRE,
        _positive(table, "temperature_k", where), source, memory,
    )


def _parse_quoted(table: dict, key: str, factor: float, where: str) -> QuotedValue:
    table = _table(table, where)
    source, memory = _source(table, where)
    value = _positive(table, key, where, allow_zero=True) * factor
    def optional(k: str, f: float) -> float:
        return math.nan if k not in table else _positive(table, k, where) * f

    return QuotedValue(
        value, source, memory,
        optional("wavelength_nm", _NANOMETRE), optional("pulse_duration_fs", _FEMTOSECOND),
    )


def _parse_material(name: str, record: dict, path: str) -> SolidMaterial:
    where = f"{path} [{name}]"
    record = _table(record, where)
    section = {k: _require(record, k, where) for k in ("dispersion", "kerr", "strength")}
    damage = record.get("damage")
    return SolidMaterial(
        name=name,
        description=str(record.get("description", name)),
        dispersion=_parse_dispersion(section["dispersion"], f"{where}.dispersion"),
        n2=_parse_quoted(section["kerr"], "n2_m2_per_w", 1.0, f"{where}.kerr"),
        modulus_of_rupture=_parse_quoted(
            section["strength"], "modulus_of_rupture_mpa", _MPA, f"{where}.strength"
        ),
        damage_fluence=None if damage is None else _parse_quoted(
            damage, "fluence_j_per_cm2", _J_PER_CM2, f"{where}.damage"
        ),
    )


def read_solid_table(path: str | Path) -> dict[str, SolidMaterial]:
    """Read and check a solid-material TOML table (format: see ``data/solids.toml``).

    Raises
    ------
    ConfigError
        If the file is not valid TOML or a record lacks a key or source, has min > max or a
        negative value; the message names the file and the key.

    References
    ----------
    None: file reader (no published model); every record names its own ``source``.
    """
    path = Path(path)
    data = read_table_toml(path)
    return {name: _parse_material(name, rec, str(path)) for name, rec in data.items()}


@lru_cache(maxsize=1)
def _default_table() -> dict[str, SolidMaterial]:
    with resources.as_file(resources.files("hcfplan.materials.data") / "solids.toml") as path:
        return read_solid_table(path)


def material_names() -> list[str]:
    """Names of the shipped solid materials, sorted.

    References
    ----------
    None: file helper (no published model).
    """
    return sorted(_default_table())


def load_material(name: str) -> SolidMaterial:
    """The shipped :class:`SolidMaterial` called ``name``.

    Raises
    ------
    ConfigError
        For an unknown name; the message lists the valid names.

    References
    ----------
    None: file reader (no published model); the sources of the shipped records are listed in
    the module docstring ([1]-[6]) and beside each number in ``data/solids.toml``.
    """
    table = _default_table()
    if name not in table:
        raise ConfigError(f"solid material = {name!r}: unknown; valid names are {sorted(table)}")
    return table[name]


def _as_material(material: MaterialRef) -> SolidMaterial:
    return material if isinstance(material, SolidMaterial) else load_material(material)


def refractive_index(material: MaterialRef, omega: float | np.ndarray) -> np.ndarray:
    """Refractive index of a solid from its Sellmeier fit.

    Parameters
    ----------
    material : str or SolidMaterial
        Material name (see :func:`material_names`) or a loaded record.
    omega : float or ndarray
        Angular frequency, > 0. [rad/s]

    Returns
    -------
    ndarray
        Phase index n(omega). [-]

    Warns
    -----
    ValidityWarning
        If a wavelength 2 pi c / omega lies outside the fitted range (the fit is extrapolated).

    Notes
    -----
    :math:`n^2 = 1 + a + \\sum_i B_i \\lambda^2/(\\lambda^2 - \\lambda_i^2)`, lambda in micrometres
    as printed by the source of the record; valid over the record's fitted wavelength range.

    References
    ----------
    .. [1] I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965), doi:10.1364/JOSA.55.001205
           (``fused_silica``).
    .. [2] I. H. Malitson, Appl. Opt. 2, 1103 (1963), doi:10.1364/AO.2.001103 (``caf2``).
    .. [3] M. J. Dodge, Appl. Opt. 23, 1980 (1984), doi:10.1364/AO.23.001980 [from memory]
           (``mgf2_ordinary``).
    .. [4] I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972) [from memory]
           (``sapphire_ordinary``).
    """
    mat = _as_material(material)
    fit = mat.dispersion
    wavelength = 2.0 * np.pi * c / np.asarray(omega, dtype=float)
    if np.any(wavelength < fit.wavelength_min) or np.any(wavelength > fit.wavelength_max):
        warnings.warn(
            f"{mat.name}: wavelength outside the Sellmeier range "
            f"{fit.wavelength_min * 1e6:.3g}-{fit.wavelength_max * 1e6:.3g} um; extrapolated",
            ValidityWarning,
            stacklevel=2,
        )
    return SELLMEIER_FORMS[fit.form](fit, wavelength)


def _wavenumber_derivatives(material: MaterialRef, omega, max_order: int) -> np.ndarray:
    mat = _as_material(material)
    return derivative_table(lambda w: w * refractive_index(mat, w) / c, omega, max_order)


def group_index(material: MaterialRef, omega: float | np.ndarray) -> np.ndarray:
    """Group index n_g = c dk/d omega. [-]  (omega [rad/s])

    References
    ----------
    The material's Sellmeier fit, as in :func:`refractive_index`: I. H. Malitson, J. Opt. Soc.
    Am. 55, 1205 (1965); I. H. Malitson, Appl. Opt. 2, 1103 (1963); M. J. Dodge, Appl. Opt. 23,
    1980 (1984) [from memory]; I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972)
    [from memory]. The derivatives are numerical (:mod:`hcfplan.numerics.derivatives`).
    """
    return c * _wavenumber_derivatives(material, omega, 1)[1]


def group_velocity_dispersion(material: MaterialRef, omega: float | np.ndarray) -> np.ndarray:
    """GVD d^2k/d omega^2 of the bulk material. [s^2/m]  (omega [rad/s]; > 0 is normal)

    References
    ----------
    The material's Sellmeier fit, as in :func:`refractive_index`: I. H. Malitson, J. Opt. Soc.
    Am. 55, 1205 (1965); I. H. Malitson, Appl. Opt. 2, 1103 (1963); M. J. Dodge, Appl. Opt. 23,
    1980 (1984) [from memory]; I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972)
    [from memory]. The derivatives are numerical (:mod:`hcfplan.numerics.derivatives`).
    """
    return _wavenumber_derivatives(material, omega, 2)[2]


def group_delay_dispersion(
    material: MaterialRef, omega: float | np.ndarray, thickness: float
) -> np.ndarray:
    """GDD of a plate of the given thickness, d^2(k L)/d omega^2. [s^2]

    Parameters
    ----------
    material : str or SolidMaterial
        Material name or record.
    omega : float or ndarray
        Angular frequency. [rad/s]
    thickness : float
        Path length through the material. [m]

    References
    ----------
    The material's Sellmeier fit, as in :func:`refractive_index`: I. H. Malitson, J. Opt. Soc.
    Am. 55, 1205 (1965); I. H. Malitson, Appl. Opt. 2, 1103 (1963); M. J. Dodge, Appl. Opt. 23,
    1980 (1984) [from memory]; I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972)
    [from memory]. The derivatives are numerical (:mod:`hcfplan.numerics.derivatives`).
    """
    return group_velocity_dispersion(material, omega) * thickness


def third_order_dispersion(
    material: MaterialRef, omega: float | np.ndarray, thickness: float
) -> np.ndarray:
    """TOD of a plate of the given thickness, d^3(k L)/d omega^3. [s^3]  (thickness [m])

    References
    ----------
    The material's Sellmeier fit, as in :func:`refractive_index`: I. H. Malitson, J. Opt. Soc.
    Am. 55, 1205 (1965); I. H. Malitson, Appl. Opt. 2, 1103 (1963); M. J. Dodge, Appl. Opt. 23,
    1980 (1984) [from memory]; I. H. Malitson, M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972)
    [from memory]. The derivatives are numerical (:mod:`hcfplan.numerics.derivatives`).
    """
    return _wavenumber_derivatives(material, omega, 3)[3] * thickness
