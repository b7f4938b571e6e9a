"""Phase of a gas fill from the CoolProp reference EOS: refuse liquid fills, warn near condensation.

Pure functions in SI. A fill that would be liquid or two-phase (or whose phase CoolProp cannot
tell) is refused with :class:`~hcfplan.errors.GasPhaseError`; fills near the critical point, near
the saturation pressure or beyond the range of the EOS return warnings. The warning thresholds
below are common practice, no published source. These checks describe the gas model only; the
pressure a cell may hold is set by the cell maker's rating and local codes (see
:mod:`hcfplan.limits.cell`).

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid thermophysical
       property evaluation and the open-source thermophysical property library CoolProp,"
       Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
"""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Literal

from hcfplan.errors import GasPhaseError
from hcfplan.materials.gas_density import check_state
from hcfplan.materials.gas_tables import GasTable

__all__ = [
    "NEAR_CRITICAL_PRESSURE_RATIO",
    "NEAR_CRITICAL_TEMPERATURE_BAND",
    "NEAR_SATURATION_RATIO",
    "Phase",
    "check_fill",
    "coolprop_phase",
    "fill_phase",
]

Phase = Literal["gas", "supercritical", "liquid", "two-phase", "unknown"]

#: Near-critical warning: |T/Tc - 1| below this ... (common practice, no source)
NEAR_CRITICAL_TEMPERATURE_BAND = 0.10
#: ... and p/pc above this. (common practice, no source)
NEAR_CRITICAL_PRESSURE_RATIO = 0.7
#: Below Tc, warn when p exceeds this fraction of the saturation pressure. (common practice)
NEAR_SATURATION_RATIO = 0.9

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


@lru_cache(maxsize=32)
def _critical_point(coolprop_name: str) -> tuple[float, float, float, float]:
    """(Tc [K], pc [Pa], Tmax [K], pmax [Pa]) of the CoolProp fluid."""
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

    return tuple(PropsSI(key, coolprop_name) for key in ("Tcrit", "pcrit", "Tmax", "pmax"))


def _saturation_pressure(coolprop_name: str, temperature: float) -> float:
    """Bubble-point pressure below Tc (NaN where CoolProp has none). [Pa]"""
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

    try:
        return float(PropsSI("P", "T", temperature, "Q", 0, coolprop_name))
    except ValueError:
        return math.nan


def coolprop_phase(coolprop_name: str, pressure: float, temperature: float) -> str:
    """CoolProp's own phase string of a pure fluid at (T, p), e.g. ``"supercritical_gas"``.

    Parameters
    ----------
    coolprop_name : str
        CoolProp fluid name.
    pressure : float
        Pressure. [Pa]
    temperature : float
        Temperature. [K]

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999
           (``PhaseSI``).
    """
    from hcfplan.materials.coolprop_calls import phase_si as PhaseSI  # cached on disk

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

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.

    The reference EOS of each fluid is cited in the ``[eos]`` block of its gas table.
    """
    check_state(pressure, temperature, allow_zero_pressure=False)
    return _PHASES.get(coolprop_phase(table.coolprop_name, pressure, temperature), "unknown")


def _state(pressure: float, temperature: float) -> str:
    return f"{pressure / 1e5:.4g} bar and {temperature:.5g} K"


def _refusal(table: GasTable, pressure: float, temperature: float, phase: str) -> str:
    t_crit, p_crit, _, _ = _critical_point(table.coolprop_name)
    raw = coolprop_phase(table.coolprop_name, pressure, temperature)
    message = (
        f"{table.label} at {_state(pressure, temperature)} would be {phase} "
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
    where = f"{table.label} at {_state(pressure, temperature)}"
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

    Notes
    -----
    A fill that passes is a gas in the EOS model; it says nothing about whether the cell may
    hold that pressure, which is for the cell maker's rating and local codes to decide.

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999
           (critical point, saturation pressure and EOS range of each fluid).

    Warning thresholds: common practice, no source.
    """
    phase = fill_phase(table, pressure, temperature)
    if phase in _REFUSED_PHASES:
        raise GasPhaseError(_refusal(table, pressure, temperature, phase))
    return _fill_warnings(table, pressure, temperature)
