"""Which pressure each limit uses, for static and gradient fills.

A static fill has one pressure. A gradient (``gas.entrance_pressure_bar`` ->
``gas.exit_pressure_bar``, profile of :mod:`hcfplan.propagation.profile`) has three that
matter: the entrance pressure for the gas before the fiber and the launch (self-focusing at the
input, the static-fill path), the local pressure along z for the limits inside the fiber (the
run's peak power against the critical power where it occurs), and the highest pressure for the
cell rating and the window load.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.planning.reports.limits_gas import gas_at


def critical_power_at(gas_spec, medium, wavelength: float, omega0: float,
                      pressure: float, pulse: tuple | None = None) -> float:
    """Self-focusing critical power of the configured gas at ``pressure`` [Pa]; inf for no gas.

    With ``pulse`` = (intensity FWHM [s], shape) the Kerr coefficient includes the delayed
    rotational part a pulse of that duration sees
    (:func:`hcfplan.limits.rotational.self_focusing_n2`); without, the electronic n2 only.

    References
    ----------
    P_cr = 1.8962 lambda^2/(4 pi n0 n2): G. Fibich and A. L. Gaeta, Opt. Lett. 25, 335 (2000)
    (:func:`hcfplan.limits.beam.self_focusing_power`).
    """
    from hcfplan.limits.beam import self_focusing_power

    if pressure <= 0:
        return math.inf
    scaled = gas_at(gas_spec, medium, pressure)
    n0 = float(scaled.refractive_index(np.array([omega0]))[0])
    return float(self_focusing_power(wavelength, n0, _kerr(scaled, medium, pulse)))


def _kerr(scaled, medium, pulse: tuple | None) -> float:
    """The Kerr coefficient for self-focusing of a fill rescaled from ``medium``: electronic,
    plus rotational for a given pulse, the rotational share taken from the configured fill
    (both parts scale with the density; the collisional T2 is the configured fill's). [m^2/W]"""
    if pulse is None or medium.n2 <= 0:
        return float(scaled.n2)
    from hcfplan.limits.rotational import self_focusing_n2

    return float(scaled.n2) * self_focusing_n2(medium, *pulse) / float(medium.n2)


@dataclass(frozen=True)
class EntranceGas:
    """The gas at the fiber entrance and before it (the static-fill path of a gradient)."""

    pressure: float  #: [Pa]
    n0: float | None  #: refractive index at the pump, None when evacuated
    n2: float | None  #: for self-focusing [m^2/W] (with the rotational part), None when evacuated
    critical_power: float | None  #: [W], None when evacuated


def entrance_gas(gas_spec, medium, wavelength: float, omega0: float,
                 pulse: tuple | None = None) -> EntranceGas:
    """The fill at the entrance pressure (``gas_spec.entrance_side_pressure``); ``pulse`` as in
    :func:`critical_power_at`.

    References
    ----------
    none: selects the pressure; the critical power cites its source in
    :func:`critical_power_at`.
    """
    pressure = gas_spec.entrance_side_pressure
    if pressure <= 0:
        return EntranceGas(pressure, None, None, None)
    scaled = gas_at(gas_spec, medium, pressure)
    n0 = float(scaled.refractive_index(np.array([omega0]))[0])
    return EntranceGas(pressure, n0, _kerr(scaled, medium, pulse),
                       critical_power_at(gas_spec, medium, wavelength, omega0, pressure, pulse))


def tightest_point_along_fiber(gas_spec, medium, wavelength: float, omega0: float, length: float,
                               z, peak_power, pulse: tuple | None = None) -> dict:
    """Where along a gradient the run's peak power comes closest to the local critical power.

    Parameters
    ----------
    gas_spec : GasSpec
        A gradient fill.
    medium : GasMedium
        The configured gas (any pressure; rescaled to the local one).
    wavelength, omega0 : float
        Pump wavelength [m] and angular frequency [rad/s].
    length : float
        Fiber length. [m]
    z, peak_power : array_like
        Record positions [m] and peak powers [W] of the run.

    Returns
    -------
    dict
        ``margin`` (smallest P_cr(p(z)) / P(z)), ``z`` [m], ``pressure`` [Pa], ``peak_power`` [W]
        and ``critical_power`` [W] at that record.

    References
    ----------
    Profile of A. Suda et al., Appl. Phys. Lett. 86, 111116 (2005) [from memory]; critical
    power of G. Fibich and A. L. Gaeta, Opt. Lett. 25, 335 (2000).
    """
    from hcfplan.propagation.profile import viscous_pressure_profile

    z = np.asarray(z, dtype=float)
    power = np.asarray(peak_power, dtype=float)
    pressure = viscous_pressure_profile(z, length, gas_spec.entrance_pressure,
                                        gas_spec.exit_pressure)
    critical = np.array([critical_power_at(gas_spec, medium, wavelength, omega0, float(p), pulse)
                         for p in pressure])
    with np.errstate(divide="ignore", invalid="ignore"):
        margins = np.where(power > 0, critical / power, np.inf)
    k = int(np.nanargmin(margins)) if np.any(np.isfinite(margins)) else 0
    return {"margin": float(margins[k]), "z": float(z[k]), "pressure": float(pressure[k]),
            "peak_power": float(power[k]), "critical_power": float(critical[k])}


def gradient_self_focusing(gas_spec, medium, laser, omega0: float, fiber, input_power: float,
                           run) -> tuple[dict, dict]:
    """Self-focusing inside a gradient-filled fiber: values and one check (as the keyword
    arguments name, value, limit, assumption of a ``limits.checks`` entry).

    With a run (``run.z``, ``run.peak_power_z``): the run's peak power against the critical
    power at the local pressure, at the record where they come closest
    (:func:`tightest_point_along_fiber`). Without: the coupled input peak power against the
    critical power at the highest pressure (peak power taken unchanged along the fiber).

    References
    ----------
    Critical power of G. Fibich and A. L. Gaeta, Opt. Lett. 25, 335 (2000); profile of
    A. Suda et al., Appl. Phys. Lett. 86, 111116 (2005) [from memory].
    """
    z, power = getattr(run, "z", None), getattr(run, "peak_power_z", None)
    wavelength = laser.wavelength
    pulse = (laser.duration_fwhm, laser.shape)
    if z is None or power is None:
        top = critical_power_at(gas_spec, medium, wavelength, omega0, gas_spec.highest_pressure,
                                pulse)
        return ({"limits.self_focusing.critical_power_highest_pressure_w": top},
                {"name": "self_focusing.highest_pressure", "value": input_power, "limit": top,
                 "assumption": "coupled input peak power vs P_cr at the highest pressure of the "
                               "gradient (peak power taken unchanged along the fiber)"})
    t = tightest_point_along_fiber(gas_spec, medium, wavelength, omega0, fiber.length, z, power,
                                   pulse)
    values = {"limits.self_focusing.peak_power_in_fiber_w": t["peak_power"],
              "limits.self_focusing.margin_in_fiber": t["margin"],
              "limits.self_focusing.in_fiber_position_m": t["z"],
              "limits.self_focusing.in_fiber_pressure_pa": t["pressure"]}
    return values, {"name": "self_focusing.in_fiber", "value": t["peak_power"],
                    "limit": t["critical_power"],
                    "assumption": "peak power P(z) of the run vs P_cr at the local pressure "
                                  f"p(z) of the gradient; closest at z = {t['z']:.4g} m, "
                                  f"p = {t['pressure'] / 1e5:.4g} bar"}
