"""Heat transport of a gas fill: thermal conductivity, heat capacity and thermal diffusivity.

Values come from CoolProp's transport and equation-of-state models for the fluid of the gas
table (``[eos] coolprop_name``). CoolProp has a thermal-conductivity model for He, Ar, N2 and
air, not for Ne, Kr and Xe: for those (and for mixtures) :func:`thermal_diffusivity` returns
``None`` and callers say so.

References
----------
.. [1] I. H. Bell, J. Wronski, S. Quoilin and V. Lemort, "Pure and pseudo-pure fluid
       thermophysical property evaluation and the open-source thermophysical property library
       CoolProp," Ind. Eng. Chem. Res., vol. 53, no. 6, pp. 2498-2508, 2014,
       doi:10.1021/ie4033999.
.. [2] E. W. Lemmon and R. T. Jacobsen, "Viscosity and thermal conductivity equations for
       nitrogen, oxygen, argon, and air," Int. J. Thermophys., vol. 25, no. 1, pp. 21-69, 2004,
       doi:10.1023/B:IJOT.0000022327.04529.f3 (the model CoolProp uses for N2, Ar and air)
       [from memory].
"""

from __future__ import annotations

import math
from dataclasses import dataclass


@dataclass(frozen=True)
class HeatTransport:
    """Heat-transport properties of a gas at one state (SI)."""

    conductivity: float  #: thermal conductivity [W/(m K)]
    mass_density: float  #: [kg/m^3]
    heat_capacity: float  #: isobaric, per mass [J/(kg K)]

    @property
    def diffusivity(self) -> float:
        """Thermal diffusivity kappa / (rho c_p). [m^2/s]"""
        return self.conductivity / (self.mass_density * self.heat_capacity)


def heat_transport(table, pressure: float, temperature: float) -> HeatTransport | None:
    """Conductivity, density and c_p of a pure gas from CoolProp [1], [2].

    Parameters
    ----------
    table : GasTable
        Gas table (its ``coolprop_name`` names the fluid).
    pressure : float
        Pressure. [Pa]
    temperature : float
        Temperature. [K]

    Returns
    -------
    HeatTransport or None
        None when CoolProp has no conductivity model for the fluid or the state is outside its
        range.

    Notes
    -----
    Valid within CoolProp's range of each fluid's models; near 1 bar and room temperature the
    conductivities are those of the dilute gas (Ar 0.0177, N2 0.0259 W/(m K) at 300 K, from
    memory of [2]).

    References
    ----------
    .. [1] I. H. Bell et al., Ind. Eng. Chem. Res. 53, 2498 (2014).
    .. [2] E. W. Lemmon and R. T. Jacobsen, Int. J. Thermophys. 25, 21 (2004) [from memory].
    """
    from hcfplan.materials.coolprop_calls import props_si as PropsSI  # cached on disk

    name = table.coolprop_name
    try:
        values = [PropsSI(key, "T", temperature, "P", pressure, name)
                  for key in ("CONDUCTIVITY", "Dmass", "Cpmass")]
    except ValueError:  # no transport model for the fluid, or outside its range
        return None
    if not all(math.isfinite(v) and v > 0 for v in values):
        return None
    return HeatTransport(*values)


def thermal_diffusivity(medium) -> float | None:
    """Thermal diffusivity of a single-component medium at its fill state. [m^2/s]

    Parameters
    ----------
    medium : GasMedium
        The fill.

    Returns
    -------
    float or None
        :attr:`HeatTransport.diffusivity`; None for mixtures or when CoolProp has no
        conductivity model for the gas.

    References
    ----------
    .. [1] I. H. Bell et al., Ind. Eng. Chem. Res. 53, 2498 (2014).
    """
    if len(medium.components) != 1:
        return None
    fill = medium.fill
    found = heat_transport(medium.components[0].table, fill.pressure, fill.temperature)
    return None if found is None else found.diffusivity
