"""Gas helpers shared by the limits report and the envelope map: the configured composition at
another pressure (real-gas density, Lorentz-Lorenz scaling), the condensation ceiling, and the
ionisation rates of its species (tabulated once, cached).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from hcfplan.planning.build import build_medium

#: Range of the tabulated ionisation rates (1e11 to 1e16 W/cm^2). [W/m^2]
RATE_TABLE_RANGE = (1e15, 1e20)
#: Relative accuracy of the tabulated rate (1 % in the rate moves the limit intensity ~0.1 %).
RATE_TABLE_RTOL = 1e-2
#: Highest pressure searched for pressure limits (the schema's upper bound, 1000 bar). [Pa]
PRESSURE_SEARCH_MAX = 1e8


@dataclass(frozen=True)
class ScaledGas:
    """A gas medium at another number density of the same composition (GasLike).

    The Lorentz-Lorenz term (n^2-1)/(n^2+2) and n2 of every component scale with its partial
    density (:mod:`hcfplan.materials.gases`); at fixed composition all partial densities scale
    with the total, so scaling the reference medium's values by N / N_ref is exact in that model.
    """

    reference: Any  #: GasMedium at the configured fill
    number_density: float  #: [1/m^3]

    @property
    def ratio(self) -> float:
        return self.number_density / self.reference.number_density

    @property
    def n2(self) -> float:
        """Kerr coefficient at this density. [m^2/W]"""
        return self.reference.n2 * self.ratio

    def refractive_index(self, omega: np.ndarray) -> np.ndarray:
        """Refractive index [-] at ``omega`` [rad/s]."""
        n = self.reference.refractive_index(omega)
        term = (n**2 - 1) / (n**2 + 2) * self.ratio
        return np.sqrt((1 + 2 * term) / (1 - term))


def gas_density_at(gas_spec, medium, pressure: float) -> float:
    """Real-gas number density [1/m^3] of the configured composition at ``pressure`` [Pa]."""
    from hcfplan.materials import gas_density

    if len(medium.components) == 1:
        return gas_density.number_density(medium.components[0].table, pressure,
                                          gas_spec.temperature, gas_spec.equation_of_state)
    return build_medium(dataclasses.replace(gas_spec, pressure=pressure)).number_density


def gas_at(gas_spec, medium, pressure: float) -> ScaledGas:
    """The configured gas at another pressure (see :class:`ScaledGas`)."""
    return ScaledGas(medium, gas_density_at(gas_spec, medium, pressure))


def condensation_ceiling(medium, temperature: float, upper: float) -> float:
    """Highest pressure <= ``upper`` [Pa] at which no component (at its partial pressure) would
    be liquid or two-phase by the CoolProp EOS (bisection in ln p to 1e-6)."""
    from hcfplan.materials import gas_phase

    def gas_like(p: float) -> bool:
        try:
            return all(gas_phase.fill_phase(k.table, k.mole_fraction * p, temperature)
                       in ("gas", "supercritical") for k in medium.components)
        except (ValueError, RuntimeError):  # CoolProp outside its range
            return False

    if gas_like(upper):
        return upper
    lo, hi = math.log(1.0), math.log(upper)
    while hi - lo > 1e-6:
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if gas_like(math.exp(mid)) else (lo, mid)
    return math.exp(lo)


@lru_cache(maxsize=32)
def _rate_table(model: str, wavelength: float, ip: float, l: int, m: int, charge: int):
    """Tabulated rate (pure function of scalars, cached in memory and in hcfplan's cache
    folder, as it took 67 ms of the demo command; the table arrays are read-only)."""
    from hcfplan.ionization.tables import cached_rate_table

    return cached_rate_table(model, wavelength, ip, l, m, charge, *RATE_TABLE_RANGE, points=41,
                             rtol=RATE_TABLE_RTOL)


def weighted_rates(medium, wavelength: float, model: str) -> list:
    """(number fraction, RateTable) of the ionising species of every component.

    The weight is the component's mole fraction times the fraction of the ionising species in
    its table (air: O2, 0.2095).
    """
    rates = []
    for k in medium.components:
        ion = k.table.ionization
        table = _rate_table(model, float(wavelength), float(ion.potential), int(ion.l),
                            int(ion.m), int(ion.charge))
        rates.append((k.mole_fraction * ion.mole_fraction, table))
    return rates


def lowest_barrier_suppression(medium) -> float:
    """Lowest barrier-suppression intensity of the ionising species of a medium. [W/m^2]"""
    from hcfplan.ionization.rates import barrier_suppression_intensity

    return min(barrier_suppression_intensity(k.table.ionization.potential,
                                             k.table.ionization.charge)
               for k in medium.components)


