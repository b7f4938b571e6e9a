"""Limits of a configured setup (the ``limits`` command): every check with value, limit, source.

``limits_report(config, run=None)`` returns a flat dict of SI values whose keys carry their unit
(``limits.self_focusing.critical_power_w``) plus ``limits.checks``, a list of entries

    {name, value, limit, unit, limit_kind, margin, status, severity, source, assumption}

``limit_kind`` is ``"maximum"`` (value must not exceed limit; margin = limit / value) or
``"minimum"`` (value must not fall below limit; margin = value / limit), so margin >= 1 is
always on the within side. ``status`` is ``"within"``, ``"exceeds"`` (beyond the limit, in
either direction) or ``"not checked"``. ``severity`` is ``"limit"`` (counts for
``limits.acceptable``) or ``"warning"`` (shown, does not count). The words are neutral on
purpose: the report never calls a setup safe. Non-finite numbers become ``None`` (JSON null).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Any

import numpy as np

from ..constants import P_1ATM, T_ROOM
from .build import build_medium, build_waveguide, coupling, pump_omega
from .validity import quiet_validity

#: Range of the tabulated ionisation rates (1e11 to 1e16 W/cm^2). [W/m^2]
RATE_TABLE_RANGE = (1e15, 1e20)
#: Relative accuracy of the tabulated rate (1 % in the rate moves the limit intensity ~0.1 %).
RATE_TABLE_RTOL = 1e-2
#: Highest pressure searched for pressure limits (the schema's upper bound, 1000 bar). [Pa]
PRESSURE_SEARCH_MAX = 1e8
#: Fiber exit to exit window distance when limits.window_distance_m is not given. [m]
DEFAULT_WINDOW_DISTANCE = 0.3
#: Relative half-width of an anti-resonance band (the fiber model's default band of 5 %).
RESONANCE_HALF_WIDTH = 0.025

ACCEPTABLE_NOTE = ("within the modelled limits (estimates; the maker's rating, local codes and "
                   "licensed practice come first)")
NOT_ACCEPTABLE_NOTE = ("beyond at least one modelled limit (see the checks marked 'exceeds'); "
                       "the estimates do not replace the maker's rating, local codes and "
                       "licensed practice")

SOURCES = {
    "critical_power": "P_cr = 1.8962 lambda^2/(4 pi n0 n2): G. Fibich and A. L. Gaeta, Opt. "
                      "Lett. 25, 335 (2000); required margin P_cr/P: common practice, no source",
    "ionization": "PPT rate (A. M. Perelomov, V. S. Popov, M. V. Terent'ev, Sov. Phys. JETP 23, "
                  "924 (1966)) integrated over the pulse; fraction limit: common practice, "
                  "no source",
    "bsi": "barrier suppression, S. Augst et al., Phys. Rev. Lett. 63, 2212 (1989)",
    "rating": "the cell maker's rated pressure (cell.rated_pressure_bar)",
    "window": "circular plate under uniform load, W. C. Young and R. G. Budynas, Roark's "
              "Formulas for Stress and Strain, 7th ed. (2002), Table 11.2 cases 10a/10b; "
              "safety factor: common practice, no source",
    "b_integral": "B = (2 pi/lambda) n2 I L (R. W. Boyd, Nonlinear Optics, 3rd ed. (2008)); "
                  "limit: common practice, no source",
    "oxygen": "worst-case release into the room, EIGA Doc. 44/09 [from memory]; 19.5 % "
              "oxygen-deficiency level of 29 CFR 1910.134(b) [from memory]",
    "resonance": "anti-resonance wavelengths lambda_m = (2d/m) sqrt(n_glass^2 - n_gas^2)",
}


# ---------------------------------------------------------------------------------------------
# shared helpers (also used by hcfplan.planning.envelope)


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
    from ..materials import gases

    if len(medium.components) == 1:
        return gases.number_density(medium.components[0].table, pressure, gas_spec.temperature,
                                    gas_spec.equation_of_state)
    return build_medium(dataclasses.replace(gas_spec, pressure=pressure)).number_density


def gas_at(gas_spec, medium, pressure: float) -> ScaledGas:
    """The configured gas at another pressure (see :class:`ScaledGas`)."""
    return ScaledGas(medium, gas_density_at(gas_spec, medium, pressure))


def condensation_ceiling(medium, temperature: float, upper: float) -> float:
    """Highest pressure <= ``upper`` [Pa] at which no component (at its partial pressure) would
    be liquid or two-phase by the CoolProp EOS (bisection in ln p to 1e-6)."""
    from ..materials import gases

    def gas_like(p: float) -> bool:
        try:
            return all(gases.fill_phase(k.table, k.mole_fraction * p, temperature)
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
    """Tabulated rate (pure function of scalars, cached; the table arrays are read-only)."""
    from ..ionization import tabulate_rate

    return tabulate_rate(model, wavelength, ip, l, m, charge, *RATE_TABLE_RANGE, points=41,
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
    from ..ionization import barrier_suppression_intensity

    return min(barrier_suppression_intensity(k.table.ionization.potential, k.table.ionization.charge)
               for k in medium.components)


# ---------------------------------------------------------------------------------------------
# checks


def _finite(x):
    if x is None or isinstance(x, bool):
        return x
    if isinstance(x, (float, int, np.floating, np.integer)):
        return float(x) if math.isfinite(x) else None
    return x


def _check(name: str, value, limit, *, unit: str, source: str, assumption: str,
           kind: str = "maximum", severity: str = "limit") -> dict:
    """One entry of ``limits.checks`` (see the module docstring)."""
    value, limit = _finite(value), _finite(limit)
    margin = status = None
    if value is None or limit is None:
        status = "not checked"
    else:
        top, bottom = (limit, value) if kind == "maximum" else (value, limit)
        margin = top / bottom if bottom > 0 else math.inf
        status = "within" if margin >= 1 else "exceeds"
    return {"name": name, "value": value, "limit": limit, "unit": unit, "limit_kind": kind,
            "margin": _finite(margin), "status": status, "severity": severity,
            "source": source, "assumption": assumption}


def _not_checked(name: str, unit: str, why: str, source: str = "",
                 severity: str = "limit") -> dict:
    return _check(name, None, None, unit=unit, source=source, assumption=why, severity=severity)


@dataclass(frozen=True)
class _Setup:
    """The configured setup, built once for every section."""

    config: Any
    omega0: float
    medium: Any
    waveguide: Any
    efficiency: float
    beam_waist: float | None
    optimum_waist: float | None
    peak_power_full: float  #: before coupling [W]
    peak_power_coupled: float  #: in the fiber mode [W]
    transmission: float
    rates: list | None
    critical_power: float | None  #: [W]
    n0: float | None


def _setup(config) -> _Setup:
    from .. import limits, pulse

    laser = config.laser
    omega0 = pump_omega(laser)
    medium = build_medium(config.gas) if config.gas is not None else None
    waveguide = build_waveguide(config.fiber, medium, omega0)
    efficiency, waist, optimum = coupling(config)
    full = pulse.peak_power_from_energy(laser.energy, laser.duration_fwhm, laser.shape)
    alpha = float(waveguide.attenuation(np.array([omega0]))[0])
    critical = n0 = rates = None
    if medium is not None:
        n0 = float(medium.refractive_index(np.array([omega0]))[0])
        critical = float(limits.self_focusing_power(laser.wavelength, n0, medium.n2))
        rates = weighted_rates(medium, laser.wavelength, config.gas.ionization_model)
    return _Setup(config, omega0, medium, waveguide, efficiency, waist, optimum, full,
                  full * efficiency, math.exp(-2 * alpha * config.fiber.length), rates,
                  critical, n0)


def _run_value(run, name: str):
    value = getattr(run, name, None) if run is not None else None
    return None if value is None else float(value)
