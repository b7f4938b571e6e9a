"""Gas physics: real-gas number density, fill phase, refractive index, Kerr coefficient, mixtures.

Pure functions in SI. The tables (published fits and constants with their sources) are loaded
by :mod:`hcfplan.materials.gas_tables`; the names used most are re-exported here.

Density scaling (stated once, used by the index and the Kerr coefficient)
-------------------------------------------------------------------------
A fit or an n2 value holds at its reference state (T_ref, p_ref). At another state the
Lorentz-Lorenz quantity :math:`(n^2-1)/(n^2+2)` and n2 scale with the number density,
:math:`N / N_{ref}`, where :math:`N_{ref}` is computed **with the same equation of state** as
``N`` at (T_ref, p_ref). With ``eos="coolprop"`` the real-gas density is used on both sides, so
a fit is reproduced exactly at its own reference state.

Equations of state (registry :data:`EOS_MODELS`)
------------------------------------------------
* ``"coolprop"``: the reference EOS of each fluid as implemented in CoolProp [1] (Ar: Tegeler,
  Span, Wagner 1999; Kr, Xe: Lemmon & Span 2006; N2: Span et al. 2000; air: Lemmon et al. 2000;
  the citations are in each gas table's ``[eos]`` block). CoolProp is imported lazily.
* ``"ideal"``: :math:`N = p/(k_B T)`.

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid thermophysical
       property evaluation and the open-source thermophysical property library CoolProp,"
       Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
.. [2] M. Born, E. Wolf, *Principles of Optics*, 7th ed., Cambridge Univ. Press, 1999, Sec. 2.3
       (Lorentz-Lorenz formula) [section number from memory].
"""

from __future__ import annotations

import math
import warnings
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from typing import Literal

import numpy as np

from hcfplan.constants import N_A, c, k_B
from hcfplan.errors import ConfigError, GasPhaseError, ValidityWarning
from hcfplan.materials.gas_tables import (
    GAS_PATH_VARIABLE,
    DispersionFit,
    GasTable,
    IonizationData,
    KerrData,
    RotationalRamanSpecies,
    available_gases,
    gas_search_dirs,
    load_gas_table,
    refractive_index_from_fit,
    shipped_gas_dir,
)

__all__ = [
    "EOS_MODELS",
    "GAS_PATH_VARIABLE",
    "DispersionFit",
    "EosName",
    "GasComponent",
    "GasFill",
    "GasMedium",
    "GasTable",
    "IonizationData",
    "KerrData",
    "RotationalRamanSpecies",
    "available_gases",
    "check_fill",
    "fill_phase",
    "gas_medium",
    "gas_search_dirs",
    "kerr_coefficient",
    "load_gas_table",
    "number_density",
    "refractive_index",
    "refractive_index_reference",
    "shipped_gas_dir",
]

EosName = Literal["coolprop", "ideal"]
Phase = Literal["gas", "supercritical", "liquid", "two-phase", "unknown"]

#: Near-critical warning: |T/Tc - 1| below this ... (common practice, no source)
NEAR_CRITICAL_TEMPERATURE_BAND = 0.10
#: ... and p/pc above this. (common practice, no source)
NEAR_CRITICAL_PRESSURE_RATIO = 0.7
#: Below Tc, warn when p exceeds this fraction of the saturation pressure. (common practice)
NEAR_SATURATION_RATIO = 0.9
#: Mole fractions must sum to 1 within this.
FRACTION_SUM_TOLERANCE = 1e-6

#: CoolProp phase string -> hcfplan phase. CoolProp calls T < Tc, p > pc "supercritical_liquid"
#: (compressed liquid, continuous with the liquid: refused) and T > Tc, p < pc
#: "supercritical_gas" (gas-like). Anything else (e.g. "unknown: ...") maps to "unknown".
_PHASES: dict[str, Phase] = {
    "gas": "gas",
    "supercritical_gas": "gas",
    "supercritical": "supercritical",
    "liquid": "liquid",
    "supercritical_liquid": "liquid",
    "twophase": "two-phase",
}
_REFUSED_PHASES = ("liquid", "two-phase", "unknown")


# --- equation of state --------------------------------------------------------------------------


def _density_ideal(coolprop_name: str, pressure: float, temperature: float) -> float:
    return pressure / (k_B * temperature)


def _density_coolprop(coolprop_name: str, pressure: float, temperature: float) -> float:
    from CoolProp.CoolProp import PropsSI  # lazy: the import takes seconds

    if pressure == 0:
        return 0.0
    try:
        return PropsSI("Dmolar", "T", temperature, "P", pressure, coolprop_name) * N_A
    except ValueError as err:
        raise ConfigError(
            f"density of {coolprop_name} at {pressure / 1e5:.6g} bar, {temperature:.6g} K: "
            f"CoolProp cannot evaluate it ({err})"
        ) from err


#: eos name -> function(coolprop_name, pressure [Pa], temperature [K]) -> number density [1/m^3]
EOS_MODELS: dict[str, Callable[[str, float, float], float]] = {
    "coolprop": _density_coolprop,
    "ideal": _density_ideal,
}


def _eos(eos: str) -> Callable[[str, float, float], float]:
    if eos not in EOS_MODELS:
        raise ConfigError(f"eos = {eos!r}: unknown; allowed: {', '.join(EOS_MODELS)}")
    return EOS_MODELS[eos]


def _check_state(pressure: float, temperature: float, *, allow_zero_pressure: bool) -> None:
    low = pressure < 0 if allow_zero_pressure else pressure <= 0
    if not math.isfinite(pressure) or low:
        allowed = ">= 0" if allow_zero_pressure else "> 0"
        raise ConfigError(f"pressure = {pressure!r} Pa: must be finite and {allowed}")
    if not (math.isfinite(temperature) and temperature > 0):
        raise ConfigError(f"temperature = {temperature!r} K: must be finite and > 0")


def number_density(
    table: GasTable, pressure: float, temperature: float, eos: EosName = "coolprop"
) -> float:
    """Number density of a pure gas.

    Parameters
    ----------
    table : GasTable
        The gas.
    pressure : float
        Pressure (0 gives 0). [Pa]
    temperature : float
        Temperature. [K]
    eos : {"coolprop", "ideal"}
        Equation of state, see the module docstring.

    Returns
    -------
    float
        Number density. [1/m^3]

    Notes
    -----
    CoolProp: :math:`N = \\rho_{molar}(T, p)\\, N_A`. The phase is not checked here; use
    :func:`check_fill` (or :func:`gas_medium`, which does) for fills near condensation.
    """
    function = _eos(eos)
    _check_state(float(pressure), float(temperature), allow_zero_pressure=True)
    return float(function(table.coolprop_name, float(pressure), float(temperature)))


@lru_cache(maxsize=256)
def _reference_density(coolprop_name: str, pressure: float, temperature: float, eos: str) -> float:
    """Density at a record's reference state (pure, scalar inputs: cached)."""
    return float(_eos(eos)(coolprop_name, pressure, temperature))


# --- phase --------------------------------------------------------------------------------------


@lru_cache(maxsize=32)
def _critical_point(coolprop_name: str) -> tuple[float, float, float, float]:
    """(Tc [K], pc [Pa], Tmax [K], pmax [Pa]) of the CoolProp fluid."""
    from CoolProp.CoolProp import PropsSI

    return tuple(PropsSI(key, coolprop_name) for key in ("Tcrit", "pcrit", "Tmax", "pmax"))


def _saturation_pressure(coolprop_name: str, temperature: float) -> float:
    """Bubble-point pressure below Tc (NaN where CoolProp has none). [Pa]"""
    from CoolProp.CoolProp import PropsSI

    try:
        return float(PropsSI("P", "T", temperature, "Q", 0, coolprop_name))
    except ValueError:
        return math.nan


def _coolprop_phase(coolprop_name: str, pressure: float, temperature: float) -> str:
    from CoolProp.CoolProp import PhaseSI

    return PhaseSI("T", temperature, "P", pressure, coolprop_name)


def fill_phase(table: GasTable, pressure: float, temperature: float) -> Phase:
    """Phase of a pure-gas fill from the CoolProp reference EOS.

    Parameters
    ----------
    table : GasTable
        The gas.
    pressure : float
        Pressure. [Pa]
    temperature : float
        Temperature. [K]

    Returns
    -------
    str
        ``"gas"`` (also T > Tc with p < pc), ``"supercritical"`` (T > Tc, p > pc), ``"liquid"``
        (also T < Tc with p > pc, which CoolProp calls ``supercritical_liquid``),
        ``"two-phase"``, or ``"unknown"`` (CoolProp cannot tell: below the triple or melting
        point, or inside the two-phase dome of the pseudo-pure air model).
    """
    _check_state(pressure, temperature, allow_zero_pressure=False)
    return _PHASES.get(_coolprop_phase(table.coolprop_name, pressure, temperature), "unknown")


def _label(table: GasTable) -> str:
    return table.symbol or table.name


def _state(pressure: float, temperature: float) -> str:
    return f"{pressure / 1e5:.4g} bar and {temperature:.5g} K"


def _refusal(table: GasTable, pressure: float, temperature: float, phase: str) -> str:
    t_crit, p_crit, _, _ = _critical_point(table.coolprop_name)
    raw = _coolprop_phase(table.coolprop_name, pressure, temperature)
    message = (
        f"{_label(table)} at {_state(pressure, temperature)} would be {phase} "
        f"(CoolProp phase {raw!r}); critical point {t_crit:.5g} K, {p_crit / 1e5:.4g} bar"
    )
    p_sat = _saturation_pressure(table.coolprop_name, temperature) if temperature < t_crit else 0
    if p_sat > 0:
        message += (
            f"; saturation pressure at {temperature:.5g} K is {p_sat / 1e5:.4g} bar: lower the "
            f"pressure below that or raise the temperature above {t_crit:.5g} K"
        )
    return message


def _fill_warnings(table: GasTable, pressure: float, temperature: float) -> list[str]:
    t_crit, p_crit, t_max, p_max = _critical_point(table.coolprop_name)
    found = []
    where = f"{_label(table)} at {_state(pressure, temperature)}"
    near_tc = abs(temperature / t_crit - 1) < NEAR_CRITICAL_TEMPERATURE_BAND
    if near_tc and pressure > NEAR_CRITICAL_PRESSURE_RATIO * p_crit:
        found.append(
            f"{where} is near the critical point ({t_crit:.5g} K, {p_crit / 1e5:.4g} bar): "
            "density, dispersion and n2 change steeply with pressure and temperature"
        )
    if temperature < t_crit:
        p_sat = _saturation_pressure(table.coolprop_name, temperature)
        if pressure > NEAR_SATURATION_RATIO * p_sat:
            found.append(
                f"{where} is within {1 - NEAR_SATURATION_RATIO:.0%} of the saturation pressure "
                f"{p_sat / 1e5:.4g} bar: the gas may condense on cold spots"
            )
    if temperature > t_max or pressure > p_max:
        found.append(
            f"{where} lies outside the range of the {table.coolprop_name} equation of state "
            f"(T <= {t_max:.5g} K, p <= {p_max / 1e5:.5g} bar): the density is extrapolated"
        )
    return found


def check_fill(table: GasTable, pressure: float, temperature: float) -> list[str]:
    """Refuse liquid or two-phase fills; return warnings for fills near condensation.

    Parameters
    ----------
    table : GasTable
        The gas.
    pressure : float
        Pressure. [Pa]
    temperature : float
        Temperature. [K]

    Returns
    -------
    list of str
        Warnings: near-critical (|T/Tc - 1| < 0.1 and p > 0.7 pc), near saturation
        (T < Tc and p > 0.9 p_sat(T)), outside the EOS range. These thresholds are common
        practice, no published source.

    Raises
    ------
    GasPhaseError
        The fill would be liquid or two-phase, or CoolProp cannot determine its phase.
    """
    phase = fill_phase(table, pressure, temperature)
    if phase in _REFUSED_PHASES:
        raise GasPhaseError(_refusal(table, pressure, temperature, phase))
    return _fill_warnings(table, pressure, temperature)


# --- refractive index and Kerr coefficient ------------------------------------------------------


def _fit(table: GasTable, key: str | None) -> DispersionFit:
    if key is None:
        return table.dispersion
    fits = {fit.key: fit for fit in table.dispersion_fits or (table.dispersion,)}
    if key not in fits:
        raise ConfigError(f"{table.name}: dispersion fit {key!r}: unknown; allowed: {list(fits)}")
    return fits[key]


def _outside_message(fit: DispersionFit, wavelength: np.ndarray, label: str) -> str:
    """One message if any wavelength lies outside the fit's range, else ''."""
    lo, hi = fit.valid_wavelength
    outside = (wavelength < lo) | (wavelength > hi)
    if not np.any(outside):
        return ""
    return (
        f"{label} dispersion fit {fit.key!r} is valid for {lo * 1e9:.0f}-{hi * 1e9:.0f} nm; "
        f"{int(np.count_nonzero(outside))} of {wavelength.size} wavelengths "
        f"({np.min(wavelength) * 1e9:.4g}-{np.max(wavelength) * 1e9:.4g} nm) are extrapolated"
    )


def _wavelength(omega: np.ndarray) -> np.ndarray:
    omega = np.asarray(omega, dtype=float)
    if np.any(omega <= 0):
        raise ConfigError("omega: all angular frequencies must be > 0 rad/s")
    return 2 * np.pi * c / omega


def _lorentz_lorenz_term(
    table: GasTable, omega: np.ndarray, density: float, fit: str | None, eos: str
) -> tuple[np.ndarray, str]:
    """(n^2-1)/(n^2+2) at ``density`` by density scaling from the fit, and a range message."""
    record = _fit(table, fit)
    wavelength = _wavelength(omega)
    n_ref = refractive_index_from_fit(record, wavelength)
    density_ref = _reference_density(
        table.coolprop_name, record.reference_pressure, record.reference_temperature, eos
    )
    # Lorentz-Lorenz, Sec. 2.3 of [2]: (n^2-1)/(n^2+2) is proportional to N
    term = (n_ref**2 - 1) / (n_ref**2 + 2) * (density / density_ref)
    return term, _outside_message(record, wavelength, _label(table))


def _index_from_lorentz_lorenz(term: np.ndarray) -> np.ndarray:
    """n from L = (n^2-1)/(n^2+2): n = sqrt((1 + 2L)/(1 - L)); L = 0 gives exactly 1."""
    return np.sqrt((1 + 2 * term) / (1 - term))


def refractive_index_reference(
    table: GasTable, omega: np.ndarray, fit: str | None = None
) -> np.ndarray:
    """Refractive index of the gas at the fit's own reference state.

    Parameters
    ----------
    table : GasTable
        The gas.
    omega : float or ndarray
        Angular frequency. [rad/s]
    fit : str, optional
        Key of a dispersion record (e.g. ``"ciddor1996"`` for air); default record if None.

    Returns
    -------
    ndarray
        n at (``fit.reference_temperature``, ``fit.reference_pressure``). [-]

    Notes
    -----
    Issues one :class:`~hcfplan.errors.ValidityWarning` per call if any wavelength lies
    outside the fit's stated range (the values there are extrapolated).
    """
    record = _fit(table, fit)
    wavelength = _wavelength(omega)
    message = _outside_message(record, wavelength, _label(table))
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=2)
    return refractive_index_from_fit(record, wavelength)


def refractive_index(
    table: GasTable,
    omega: np.ndarray,
    number_density: float,
    fit: str | None = None,
    eos: EosName = "coolprop",
) -> np.ndarray:
    """Refractive index of a pure gas at a given number density (Lorentz-Lorenz scaling).

    Parameters
    ----------
    table : GasTable
        The gas.
    omega : float or ndarray
        Angular frequency. [rad/s]
    number_density : float
        Number density of the gas. [1/m^3]
    fit : str, optional
        Key of a dispersion record; default record if None.
    eos : {"coolprop", "ideal"}
        EOS used for the reference density; use the one that gave ``number_density``.

    Returns
    -------
    ndarray
        Refractive index n. [-]

    Notes
    -----
    .. math:: \\frac{n^2-1}{n^2+2} = \\frac{N}{N_{ref}}\\,\\frac{n_{ref}^2-1}{n_{ref}^2+2}

    (Lorentz-Lorenz, Sec. 2.3 of [2]), with :math:`N_{ref}` from ``eos`` at the fit's
    reference state. Valid over the fit's wavelength range (one ValidityWarning per call
    otherwise) and while the molecular polarisability does not depend on density.
    """
    if not number_density >= 0:
        raise ConfigError(f"number_density = {number_density!r} 1/m^3: must be >= 0")
    term, message = _lorentz_lorenz_term(table, omega, number_density, fit, eos)
    if message:
        warnings.warn(message, ValidityWarning, stacklevel=2)
    return _index_from_lorentz_lorenz(term)


def kerr_coefficient(table: GasTable, number_density: float, eos: EosName = "coolprop") -> float:
    """Kerr coefficient n2 of a pure gas at a given number density.

    Parameters
    ----------
    table : GasTable
        The gas.
    number_density : float
        Number density. [1/m^3]
    eos : {"coolprop", "ideal"}
        EOS used for the reference density of the Kerr record.

    Returns
    -------
    float
        n2 [m^2/W], :math:`n_2 = n_{2,ref} N / N_{ref}` with :math:`N_{ref}` at the Kerr
        record's reference state (n2 per molecule constant; valid while n - 1 << 1).
    """
    if not number_density >= 0:
        raise ConfigError(f"number_density = {number_density!r} 1/m^3: must be >= 0")
    kerr = table.kerr
    density_ref = _reference_density(
        table.coolprop_name, kerr.reference_pressure, kerr.reference_temperature, eos
    )
    return kerr.n2 * number_density / density_ref


# --- mixtures -----------------------------------------------------------------------------------


@dataclass(frozen=True)
class GasFill:
    """A gas fill: components as (table name, mole fraction), pressure [Pa], temperature [K]."""

    components: tuple[tuple[str, float], ...]
    pressure: float
    temperature: float
    eos: EosName = "coolprop"

    def __post_init__(self) -> None:
        try:
            pairs = tuple((str(name), float(x)) for name, x in self.components)
        except (TypeError, ValueError) as err:
            raise ConfigError(
                f"gas fill components = {self.components!r}: must be (name, mole fraction) pairs"
            ) from err
        object.__setattr__(self, "components", pairs)
        _check_fill_spec(self)


def _check_fill_spec(fill: GasFill) -> None:
    _eos(fill.eos)
    _check_state(fill.pressure, fill.temperature, allow_zero_pressure=False)
    shown = ", ".join(f"{name}: {x:g}" for name, x in fill.components) or "none"
    names = [name.lower() for name, _ in fill.components]
    if not names or len(set(names)) != len(names):
        raise ConfigError(f"gas fill components ({shown}): need at least one, each only once")
    if any(not x > 0 for _, x in fill.components):
        raise ConfigError(f"gas fill mole fractions ({shown}): each must be > 0")
    total = sum(x for _, x in fill.components)
    if abs(total - 1) > FRACTION_SUM_TOLERANCE:
        raise ConfigError(
            f"gas fill mole fractions ({shown}) sum to {total:.9g}: must sum to 1 "
            f"within {FRACTION_SUM_TOLERANCE:g}"
        )


@dataclass(frozen=True)
class GasComponent:
    """One component of a medium: its table, mole fraction and partial number density [1/m^3]."""

    table: GasTable
    mole_fraction: float
    number_density: float


@dataclass(frozen=True)
class GasMedium:
    """A filled gas at its state: total number density [1/m^3], n2 [m^2/W], warnings.

    Satisfies :class:`hcfplan.fibers.base.GasLike`.
    """

    fill: GasFill
    components: tuple[GasComponent, ...]
    number_density: float
    n2: float
    warnings: tuple[str, ...]

    def refractive_index(self, omega: np.ndarray) -> np.ndarray:
        """Refractive index [-] at angular frequency ``omega`` [rad/s].

        Lorentz-Lorenz sum of the component terms at their partial densities,
        :math:`(n^2-1)/(n^2+2) = \\sum_i (N_i/N_{i,ref})(n_{i,ref}^2-1)/(n_{i,ref}^2+2)`;
        one ValidityWarning per call names every fit whose range the grid leaves.
        """
        terms = [
            _lorentz_lorenz_term(k.table, omega, k.number_density, None, self.fill.eos)
            for k in self.components
        ]
        messages = [message for _, message in terms if message]
        if messages:
            warnings.warn("; ".join(messages), ValidityWarning, stacklevel=2)
        return _index_from_lorentz_lorenz(sum(term for term, _ in terms))


def _coolprop_mixture_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> float:
    """CoolProp HEOS mixture density; raises ValueError where binary parameters are missing."""
    from CoolProp.CoolProp import PropsSI

    fluid = "HEOS::" + "&".join(
        f"{t.coolprop_name}[{x!r}]" for t, x in zip(tables, fractions, strict=True)
    )
    return PropsSI("Dmolar", "T", temperature, "P", pressure, fluid) * N_A


def _dalton_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> float:
    """Dalton's law of additive pressures: solve sum_i p_i(x_i N, T) = p for N."""
    from CoolProp.CoolProp import PropsSI
    from scipy.optimize import brentq

    def excess(molar_density: float) -> float:
        return pressure - sum(
            PropsSI("P", "T", temperature, "Dmolar", x * molar_density, t.coolprop_name)
            for t, x in zip(tables, fractions, strict=True)
        )

    ideal = pressure / (k_B * N_A * temperature)  # [mol/m^3]
    return brentq(excess, 0.05 * ideal, 20 * ideal, xtol=1e-12 * ideal, rtol=1e-12) * N_A


def _combined_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> tuple[float, str]:
    """Amagat's law of additive volumes, 1/N = sum x_i / N_i(p, T), with the pure-fluid EOS.

    If a pure component would not be gas-like at the total pressure, Dalton's law of additive
    pressures is used instead (see :func:`_dalton_density`).
    """
    names = "+".join(_label(t) for t in tables)
    phases = [fill_phase(t, pressure, temperature) for t in tables]
    if all(phase in ("gas", "supercritical") for phase in phases):
        volume = sum(
            x / _density_coolprop(t.coolprop_name, pressure, temperature)
            for t, x in zip(tables, fractions, strict=True)
        )
        rule = "Amagat's law of additive volumes with the pure-fluid EOS"
        return 1.0 / volume, f"{names}: CoolProp has no mixture model; density from {rule}"
    density = _dalton_density(tables, fractions, pressure, temperature)
    rule = "Dalton's law of additive pressures (a pure component would be liquid at the total p)"
    return density, f"{names}: CoolProp has no mixture model; density from {rule}"


def _mixture_density(
    tables: Sequence[GasTable], fractions: Sequence[float], fill: GasFill
) -> tuple[float, list[str]]:
    """Total number density [1/m^3] and the warnings on how it was obtained."""
    if len(tables) == 1:
        return number_density(tables[0], fill.pressure, fill.temperature, fill.eos), []
    if fill.eos == "ideal":
        return _density_ideal("", fill.pressure, fill.temperature), []
    try:
        return _coolprop_mixture_density(tables, fractions, fill.pressure, fill.temperature), []
    except ValueError:
        density, message = _combined_density(tables, fractions, fill.pressure, fill.temperature)
        return density, [message]


def _phase_warnings(tables: Sequence[GasTable], fractions: Sequence[float], fill: GasFill) -> list:
    """Phase check; a mixture component is checked at its partial pressure (Raoult estimate)."""
    if len(tables) == 1:
        return check_fill(tables[0], fill.pressure, fill.temperature)
    found = []
    for table, x in zip(tables, fractions, strict=True):
        found += [f"component {w}" for w in check_fill(table, x * fill.pressure, fill.temperature)]
    return found


def gas_medium(fill: GasFill, search_dirs: Sequence[str | Path] = ()) -> GasMedium:
    """Build the medium of a fill: tables, phase check, densities and n2.

    Parameters
    ----------
    fill : GasFill
        Components, pressure [Pa], temperature [K] and EOS.
    search_dirs : sequence of str or Path
        User gas-table directories, searched before the shipped tables.

    Returns
    -------
    GasMedium
        With n2 = sum_i n2_i(N_i) and the warnings collected on the way.

    Raises
    ------
    GasPhaseError
        A (component of the) fill would be liquid or two-phase.

    Notes
    -----
    Mixture density: CoolProp's HEOS mixture model where it evaluates (Ar-N2, Ar-Kr, N2-O2 have
    binary parameters); where it fails (missing binary parameters, or the phase-stability
    search fails as for He-Ar in CoolProp 6.8) Amagat's law of additive volumes with the
    pure-fluid EOS, or Dalton's law if a pure component would be liquid at the total pressure,
    with a warning. Where CoolProp's model exists, Amagat's law agrees with it to 1e-4 at 50 bar
    for Ar-N2 and to 7e-3 for Ar-Kr (our comparison), so the fallback is a percent-level
    estimate at tens of bar. A mixture's phase is checked per component at its partial
    pressure, which ignores the shift of the mixture's critical point.
    """
    tables = [load_gas_table(name, search_dirs) for name, _ in fill.components]
    fractions = [x for _, x in fill.components]
    found = _phase_warnings(tables, fractions, fill)
    total, density_warnings = _mixture_density(tables, fractions, fill)
    components = tuple(
        GasComponent(t, x, x * total) for t, x in zip(tables, fractions, strict=True)
    )
    n2 = sum(kerr_coefficient(k.table, k.number_density, fill.eos) for k in components)
    return GasMedium(fill, components, total, float(n2), tuple(found + density_warnings))
