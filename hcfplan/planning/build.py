"""Config specs -> physics objects (gas medium, waveguide, input pulse numbers).

The only place where the SI specs of :mod:`hcfplan.io.config` meet the physics modules; every
function here is a thin composition of pure functions.
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, GasPhaseError


def pump_omega(laser) -> float:
    """Angular frequency of the pump. [rad/s]"""
    return 2 * math.pi * c / laser.wavelength


#: Longest reason quoted from a physics error in a one-line message. [characters]
MAX_REASON = 240


def _reason(exc: Exception) -> str:
    """The error's text on one line, shortened (equation-of-state libraries can print long
    solver dumps)."""
    text = " ".join(str(exc).split())
    return text if len(text) <= MAX_REASON else text[:MAX_REASON] + "..."


def build_medium(gas_spec, polarization: str = "linear"):
    """GasMedium for the configured fill as a pump of ``polarization`` sees it (circular: the
    Kerr data of :func:`hcfplan.materials.kerr_polarization.polarized_medium`); a refused phase
    becomes a ConfigError naming the pressure and temperature keys (in the config's units)."""
    from hcfplan.materials import gases
    from hcfplan.materials.kerr_polarization import polarized_medium

    fill = gases.GasFill(components=gas_spec.components, pressure=gas_spec.pressure,
                         temperature=gas_spec.temperature, eos=gas_spec.equation_of_state)
    try:
        medium = gases.gas_medium(fill, search_dirs=gas_spec.table_dirs)
    except GasPhaseError as exc:
        raise ConfigError(f"gas.pressure_bar = {gas_spec.pressure / 1e5:.10g}, "
                          f"gas.temperature_k = {gas_spec.temperature:.10g}: {_reason(exc)}"
                          ) from None
    return polarized_medium(calibrated_medium(medium, gas_spec.density_scale,
                                              gas_spec.n2_scale), polarization)


def calibrated_medium(medium, density_scale: float = 1.0, n2_scale: float = 1.0):
    """The medium with the calibration factors ``gas.density_scale`` and ``gas.n2_scale``.

    ``density_scale`` multiplies every number density (and so the index, n2 and ionisation,
    which follow the density); ``n2_scale`` multiplies the electronic Kerr coefficient only.
    Both are 1 unless a calibration against measured spectra set them
    (:mod:`hcfplan.planning.calibrate`).
    """
    if density_scale == 1.0 and n2_scale == 1.0:
        return medium
    import dataclasses

    components = tuple(dataclasses.replace(k, number_density=k.number_density * density_scale)
                       for k in medium.components)
    return dataclasses.replace(medium, components=components,
                               number_density=medium.number_density * density_scale,
                               n2=medium.n2 * density_scale * n2_scale)


def rate_model(config) -> str:
    """Ionisation rate key (:data:`hcfplan.ionization.rates.RATE_MODELS`) for the configured
    gas and pump polarisation (circular: :data:`~hcfplan.ionization.rates.CIRCULAR_MODELS`)."""
    from hcfplan.ionization.rates import CIRCULAR_MODELS

    model = config.gas.ionization_model
    return CIRCULAR_MODELS[model] if config.laser.polarization == "circular" else model


def build_waveguide(fiber, medium, omega0: float):
    """Waveguide model for the configured fiber (see :mod:`hcfplan.fibers.base`), with the
    measured loss and GVD of ``fiber.loss_db_per_m``, ``fiber.loss_csv`` and ``fiber.gvd_csv``
    laid over it (:class:`hcfplan.fibers.measured.MeasuredFiber`)."""
    from hcfplan import fibers

    model = _model_waveguide(fiber, medium, omega0)
    flat = fiber.flat_loss if fiber.kind != "taylor" else None  # taylor: its own flat loss
    loss, gvd = fiber.loss_curve, fiber.gvd_curve
    if flat is None and loss is None and gvd is None:
        return model
    return fibers.MeasuredFiber(
        base=model, omega0=omega0, flat_loss=flat,
        loss_wavelength=None if loss is None else loss.wavelength,
        loss=None if loss is None else loss.values,
        gvd_wavelength=None if gvd is None else gvd.wavelength,
        gvd=None if gvd is None else gvd.values)


def _model_waveguide(fiber, medium, omega0: float):
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


def build_fill_segments(config, omega0: float, step: float | None = None):
    """The stretches of uniform fill of a gradient (None for a static fill or no gas).

    Each stretch of :func:`hcfplan.propagation.profile.pressure_segments` gets the real gas at
    its mean pressure (:func:`build_medium`) and a waveguide filled with it.

    Parameters
    ----------
    config : PlanConfig
        The validated config.
    omega0 : float
        Pump angular frequency. [rad/s]
    step : float, optional
        Largest pressure change per stretch as a share of the highest pressure; None: the
        default :data:`hcfplan.propagation.profile.SEGMENT_PRESSURE_STEP`.

    Returns
    -------
    tuple of FillSegment or None
    """
    gas = config.gas
    if gas is None or not gas.is_gradient:
        return None
    import dataclasses

    from hcfplan.propagation.profile import SEGMENT_PRESSURE_STEP, pressure_segments
    from hcfplan.propagation.solve import FillSegment

    parts = pressure_segments(config.fiber.length, gas.entrance_pressure, gas.exit_pressure,
                              SEGMENT_PRESSURE_STEP if step is None else step)
    out = []
    for k, pressure in enumerate(parts.pressures):
        medium = build_medium(dataclasses.replace(gas, pressure=float(pressure)))
        out.append(FillSegment(float(parts.edges[k]), float(parts.edges[k + 1]),
                               build_waveguide(config.fiber, medium, omega0), medium))
    return tuple(out)


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


#: Linear loss of the fiber at the pump above which no light is taken to reach the exit
#: (300 dB, a transmission of 1e-30); beyond it the fields of the later stages leave the
#: floating-point range (common practice, no source). [dB]
MAX_FIBER_LOSS_DB = 300.0
#: Config keys that set the linear loss of each fiber kind.
_LOSS_KEYS = {"capillary": ("core_diameter_um", "mode", "bend_radius_m", "loss_db_per_m",
                            "loss_csv"),
              "antiresonant": ("core_diameter_um", "wall_thickness_um", "loss_db_per_m",
                               "loss_csv"),
              "taylor": ("loss_db_per_m", "loss_csv")}


def check_transmission(config, waveguide, omega0: float) -> float:
    """Linear power transmission of the fiber at the pump; a ConfigError naming the fiber keys
    when the loss over the fiber exceeds :data:`MAX_FIBER_LOSS_DB` (no light would arrive).

    Parameters
    ----------
    config : PlanConfig
        The validated config (its ``resolved`` table gives the keys as the user wrote them).
    waveguide : Waveguide
        From :func:`build_waveguide`.
    omega0 : float
        Pump angular frequency. [rad/s]

    Returns
    -------
    float
        exp(-2 alpha(omega0) L), alpha the field attenuation (grid.py convention 5). [1]
    """
    alpha = float(waveguide.attenuation(np.array([omega0]))[0])
    loss_db_per_m = 20 * math.log10(math.e) * alpha  # power loss of exp(-2 alpha z)
    loss_db = loss_db_per_m * config.fiber.length
    if loss_db <= MAX_FIBER_LOSS_DB:  # False for NaN
        return math.exp(min(-2 * alpha * config.fiber.length, 0.0))
    fiber = config.resolved["fiber"]
    given = ", ".join(f"fiber.{key} = {fiber[key]}" for key in _LOSS_KEYS[config.fiber.kind]
                      if fiber.get(key) is not None)
    raise ConfigError(
        f"fiber.length_m = {fiber['length_m']} with {given}: the linear loss at the pump "
        f"(laser.wavelength_nm = {config.resolved['laser']['wavelength_nm']}) is "
        f"{loss_db_per_m:.4g} dB/m, {loss_db:.4g} dB over the fiber; above "
        f"{MAX_FIBER_LOSS_DB:g} dB no light would reach the exit"
    )
