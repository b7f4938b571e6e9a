"""Number density of a gas fill from an equation of state: pure gases and mixing rules.

Pure functions in SI. The phase of a fill (liquid, two-phase, near-critical) is checked in
:mod:`hcfplan.materials.gas_phase`; the index and n2 that scale with this density are in
:mod:`hcfplan.materials.gases`.

Equations of state (registry :data:`EOS_MODELS`)
------------------------------------------------
* ``"coolprop"``: the reference EOS of each fluid as implemented in CoolProp [1] (Ar: Tegeler,
  Span, Wagner 1999; Kr, Xe: Lemmon & Span 2006; N2: Span et al. 2000; air: Lemmon et al. 2000;
  the citations are in each gas table's ``[eos]`` block). CoolProp is imported lazily.
* ``"ideal"``: :math:`N = p/(k_B T)`.

Mixtures: CoolProp's HEOS mixture model [1] where it has the binary parameters, else a mixing
rule of the pure-fluid densities (Amagat's law of additive volumes, Dalton's law of additive
pressures; textbook rules, common practice, no source cited here).

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid thermophysical
       property evaluation and the open-source thermophysical property library CoolProp,"
       Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
"""

from __future__ import annotations

import math
from collections.abc import Callable, Sequence
from functools import lru_cache
from typing import Literal

from hcfplan.constants import N_A, k_B
from hcfplan.errors import ConfigError
from hcfplan.materials.gas_tables import GasTable

__all__ = [
    "EOS_MODELS",
    "EosName",
    "amagat_density",
    "check_state",
    "coolprop_mixture_density",
    "dalton_density",
    "eos_model",
    "number_density",
    "reference_density",
]

EosName = Literal["coolprop", "ideal"]


def _density_ideal(coolprop_name: str, pressure: float, temperature: float) -> float:
    return pressure / (k_B * temperature)


def _density_coolprop(coolprop_name: str, pressure: float, temperature: float) -> float:
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

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


def eos_model(eos: str) -> Callable[[str, float, float], float]:
    """The density function of the equation of state called ``eos``.

    Parameters
    ----------
    eos : str
        A key of :data:`EOS_MODELS`.

    Returns
    -------
    callable
        ``function(coolprop_name, pressure [Pa], temperature [K]) -> number density [1/m^3]``.

    Raises
    ------
    ConfigError
        Unknown name; the message lists the allowed ones.

    References
    ----------
    None: registry look-up; the models themselves are cited in the module docstring ([1]).
    """
    if eos not in EOS_MODELS:
        raise ConfigError(f"eos = {eos!r}: unknown; allowed: {', '.join(EOS_MODELS)}")
    return EOS_MODELS[eos]


def check_state(pressure: float, temperature: float, *, allow_zero_pressure: bool) -> None:
    """Refuse a non-finite or negative pressure (zero unless allowed) or temperature.

    Parameters
    ----------
    pressure : float
        Pressure. [Pa]
    temperature : float
        Temperature. [K]
    allow_zero_pressure : bool
        Whether ``pressure == 0`` is accepted.

    Raises
    ------
    ConfigError
        One line naming the value and what it must be.

    References
    ----------
    None: numerical helper (input validation).
    """
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
    :func:`hcfplan.materials.gas_phase.check_fill` (or :func:`hcfplan.materials.gases.gas_medium`,
    which does) for fills near condensation. Valid within the range of the fluid's reference EOS
    (``check_fill`` warns outside it).

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.

    The reference EOS of each fluid is cited in the ``[eos]`` block of its gas table.
    """
    function = eos_model(eos)
    check_state(float(pressure), float(temperature), allow_zero_pressure=True)
    return float(function(table.coolprop_name, float(pressure), float(temperature)))


@lru_cache(maxsize=256)
def reference_density(coolprop_name: str, pressure: float, temperature: float, eos: str) -> float:
    """Number density [1/m^3] at a record's reference state (scalar inputs, so it is cached).

    Parameters
    ----------
    coolprop_name : str
        CoolProp fluid name of the gas.
    pressure : float
        Reference pressure of the record. [Pa]
    temperature : float
        Reference temperature of the record. [K]
    eos : str
        A key of :data:`EOS_MODELS`; use the one that gives the density being scaled.

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999
           (for ``eos="coolprop"``).
    """
    return float(eos_model(eos)(coolprop_name, pressure, temperature))


def coolprop_mixture_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> float:
    """Number density [1/m^3] of a mixture from CoolProp's HEOS mixture model.

    Parameters
    ----------
    tables : sequence of GasTable
        The components.
    fractions : sequence of float
        Their mole fractions (summing to 1). [-]
    pressure : float
        Total pressure. [Pa]
    temperature : float
        Temperature. [K]

    Raises
    ------
    ValueError
        Where CoolProp has no binary parameters for a pair, or its phase-stability search fails.

    References
    ----------
    .. [1] I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
           thermophysical property evaluation and the open-source thermophysical property
           library CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
    """
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

    fluid = "HEOS::" + "&".join(
        f"{t.coolprop_name}[{x!r}]" for t, x in zip(tables, fractions, strict=True)
    )
    return PropsSI("Dmolar", "T", temperature, "P", pressure, fluid) * N_A


def amagat_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> float:
    """Mixture number density [1/m^3] from Amagat's law of additive volumes.

    Parameters
    ----------
    tables, fractions, pressure, temperature
        As in :func:`coolprop_mixture_density`.

    Notes
    -----
    :math:`1/N = \\sum_i x_i / N_i(p, T)` with each pure-fluid density from CoolProp at the
    total pressure; meaningful only where every pure component is gas-like at that pressure.

    References
    ----------
    Amagat's law: textbook mixing rule (common practice, no source cited here). Pure-fluid
    densities: I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
    thermophysical property evaluation and the open-source thermophysical property library
    CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
    """
    volume = sum(
        x / _density_coolprop(t.coolprop_name, pressure, temperature)
        for t, x in zip(tables, fractions, strict=True)
    )
    return 1.0 / volume


def dalton_density(
    tables: Sequence[GasTable], fractions: Sequence[float], pressure: float, temperature: float
) -> float:
    """Mixture number density [1/m^3] from Dalton's law of additive pressures.

    Parameters
    ----------
    tables, fractions, pressure, temperature
        As in :func:`coolprop_mixture_density`.

    Notes
    -----
    Solves :math:`\\sum_i p_i(x_i N, T) = p` for N (Brent's method, relative tolerance 1e-12)
    with each partial pressure from the pure-fluid EOS at the component's own density.

    References
    ----------
    Dalton's law: textbook mixing rule (common practice, no source cited here). Pure-fluid
    pressures: I. H. Bell, J. Wronski, S. Quoilin, V. Lemort, "Pure and pseudo-pure fluid
    thermophysical property evaluation and the open-source thermophysical property library
    CoolProp," Ind. Eng. Chem. Res. 53, 2498-2508 (2014), doi:10.1021/ie4033999.
    """
    from CoolProp.CoolProp import PropsSI
    from scipy.optimize import brentq

    def excess(molar_density: float) -> float:
        return pressure - sum(
            PropsSI("P", "T", temperature, "Dmolar", x * molar_density, t.coolprop_name)
            for t, x in zip(tables, fractions, strict=True)
        )

    ideal = pressure / (k_B * N_A * temperature)  # [mol/m^3]
    return brentq(excess, 0.05 * ideal, 20 * ideal, xtol=1e-12 * ideal, rtol=1e-12) * N_A
