"""Config specs -> physics objects (gas medium, waveguide, input pulse numbers).

The only place where the SI specs of :mod:`hcfplan.io.config` meet the physics modules; every
function here is a thin composition of pure functions.
"""

from __future__ import annotations

import math

from hcfplan.constants import c
from hcfplan.errors import ConfigError, GasPhaseError


def pump_omega(laser) -> float:
    """Angular frequency of the pump. [rad/s]"""
    return 2 * math.pi * c / laser.wavelength


def build_medium(gas_spec):
    """GasMedium for the configured fill; a refused phase becomes a ConfigError on the key."""
    from hcfplan.materials import gases

    fill = gases.GasFill(components=gas_spec.components, pressure=gas_spec.pressure,
                         temperature=gas_spec.temperature, eos=gas_spec.equation_of_state)
    try:
        return gases.gas_medium(fill, search_dirs=gas_spec.table_dirs)
    except GasPhaseError as exc:
        raise ConfigError(f"gas.pressure_bar = {gas_spec.pressure / 1e5:g}: {exc}") from None


def build_waveguide(fiber, medium, omega0: float):
    """Waveguide model for the configured fiber (see :mod:`hcfplan.fibers.base`)."""
    from hcfplan import fibers

    if fiber.kind == "capillary":
        return fibers.CapillaryFiber(core_radius=fiber.core_radius, length=fiber.length,
                                     gas=medium, cladding=fiber.cladding,
                                     mode=(1, fiber.mode_order), bend_radius=fiber.bend_radius)
    if fiber.kind == "antiresonant":
        return fibers.AntiresonantFiber(core_radius=fiber.core_radius,
                                        wall_thickness=fiber.wall_thickness,
                                        length=fiber.length, gas=medium, cladding=fiber.cladding)
    return fibers.TaylorFiber(omega0=omega0, betas=fiber.betas, gamma=fiber.gamma,
                              length=fiber.length, loss=fiber.loss,
                              self_steepening=fiber.self_steepening,
                              raman_fraction=fiber.raman_fraction, raman_tau1=fiber.raman_tau1,
                              raman_tau2=fiber.raman_tau2, mode_area=fiber.effective_area)


def coupling(config) -> tuple[float, float | None, float | None]:
    """(efficiency, beam waist used [m], optimum waist [m]) of the launch into the fundamental mode.

    Taylor fibers have no coupling model: efficiency 1 and no waist.
    """
    fiber = config.fiber
    if fiber.kind == "taylor":
        return 1.0, None, None
    from hcfplan.fibers import modes

    optimum = modes.optimum_beam_waist(fiber.core_radius)
    waist = config.laser.beam_waist or optimum
    return float(modes.gaussian_coupling_efficiency(waist, fiber.core_radius)), waist, optimum
