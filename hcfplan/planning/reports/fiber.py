"""First-look numbers for a configured fiber, gas and laser (the ``fiber`` command).

Everything here is analytic: no GNLSE run. The report is a flat dict of SI values whose keys
carry their SI unit (``gvd_s2_per_m``), ready for ``--json``. The ``estimate.*`` keys are
SPM-only estimates (``estimate.kind = "spm_only"``, explained by ``estimate.note``).
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.constants import c
from hcfplan.planning.build import build_medium, build_waveguide, coupling, pump_omega
from hcfplan.planning.reports.nonlinearity import low_nonlinearity_notes
from hcfplan.planning.validity import quiet_validity, range_notes

#: Wavelength range searched for zero-dispersion points. [m]
ZDW_SEARCH_RANGE = (200e-9, 3000e-9)
#: What the ``estimate.*`` keys are.
ESTIMATE_KIND = "spm_only"
ESTIMATE_NOTE = ("SPM-only estimate: peak nonlinear phase over the effective length and the "
                 "Gaussian rms SPM broadening of the input spectrum; dispersion, soliton "
                 "dynamics, self-steepening and plasma are neglected, so a run can broaden far "
                 "less (normal dispersion, wave breaking; anomalous beyond the fission length) "
                 "or compress further (soliton self-compression)")


def _launch_part(config, waist) -> dict:
    """``coupling.mode_fractions`` and ``coupling.lost_fraction`` of a multimode config
    (``fiber.modes`` > 1): the launched beam's share in EH11...EH1N and outside them."""
    count = getattr(config.fiber, "modes", 1)
    if count <= 1:
        return {}
    from hcfplan.fibers.capillary_modes import eh_launch_amplitudes

    shares = eh_launch_amplitudes(waist, config.fiber.core_radius, count) ** 2
    return {"coupling.mode_fractions": [float(f) for f in shares],
            "coupling.lost_fraction": float(max(1.0 - shares.sum(), 0.0))}


def _zdw_range(waveguide, config):
    """Search range for the ZDW, limited to where the fiber model is meaningful."""
    lo, hi = ZDW_SEARCH_RANGE
    wall = getattr(waveguide, "wall_thickness", None)
    if wall is not None and hasattr(waveguide, "resonance_wavelengths"):
        # keep the search inside the anti-resonant window that contains the pump
        lam0 = config.laser.wavelength
        res = sorted(waveguide.resonance_wavelengths(8))
        below = [r for r in res if r < lam0]
        above = [r for r in res if r > lam0]
        lo = max(lo, below[-1] * 1.02) if below else lo
        hi = min(hi, above[0] * 0.98) if above else hi
    return lo, hi


#: What the first-look numbers of a gradient fill stand for.
GRADIENT_NOTE = ("gradient fill: the first-look numbers (gas, beta2, gamma, soliton order, "
                 "estimates) are those of a static fill at the mean pressure of the profile "
                 "p(z) = sqrt(p0^2 + (pL^2 - p0^2) z/L); a run follows the profile")


def fill_part(gas) -> dict:
    """``gas.fill`` ("static" or "gradient") and its pressures [Pa]: the static pressure, or
    the entrance, exit and mean pressure of a gradient (``gas.pressure_pa`` is then the mean).
    """
    if gas is None:
        return {}
    out = {"gas.fill": "gradient" if gas.is_gradient else "static",
           "gas.pressure_pa": gas.pressure}
    if gas.is_gradient:
        out.update({"gas.entrance_pressure_pa": gas.entrance_pressure,
                    "gas.exit_pressure_pa": gas.exit_pressure,
                    "gas.mean_pressure_pa": gas.pressure,
                    "gas.profile": "viscous flow, p(z) = sqrt(p0^2 + (pL^2 - p0^2) z/L)"})
    return out


def _gas_part(medium, config) -> dict:
    gas = config.gas
    return {
        "gas.components": [[name, frac] for name, frac in gas.components],
        **fill_part(gas),
        "gas.temperature_k": gas.temperature,
        "gas.equation_of_state": gas.equation_of_state,
        "gas.number_density_per_m3": medium.number_density,
        "gas.n2_m2_per_w": medium.n2,
        "gas.refractive_index_at_pump": float(
            medium.refractive_index(np.array([pump_omega(config.laser)]))[0]),
    }


def _antiresonant_part(waveguide, config) -> dict:
    if not hasattr(waveguide, "resonance_wavelengths"):
        return {}
    res = sorted(float(r) for r in waveguide.resonance_wavelengths(6))
    omega0 = np.array([pump_omega(config.laser)])
    inside = bool(np.asarray(waveguide.in_resonance_band(omega0))[0])
    return {"fiber.resonance_wavelengths_m": res, "fiber.pump_in_resonance_band": inside}


#: What each ``fiber.loss_model`` value means (``fiber.loss_model_note`` of the report).
LOSS_MODEL_NOTES = {
    "capillary_marcatili1964": "capillary model: Marcatili & Schmeltzer EH1m leakage loss "
                               "(plus the bend term when fiber.bend_radius_m is given)",
    "antiresonant_single_tube_zeisberger2017": "anti-resonant model: confinement loss of one "
                                               "tube wall (Zeisberger & Schmidt 2017), an "
                                               "upper estimate for real fibers",
    "flat": "taylor fiber: the flat loss fiber.loss_db_per_m (0 when not given)",
    "measured_flat": "measured: the flat loss fiber.loss_db_per_m replaces the model's",
    "measured_curve": "measured: fiber.loss_csv replaces the model's loss inside its range "
                      "(the model's loss outside it)",
}


def _loss_part(waveguide, config) -> tuple[dict, list[str]]:
    """``fiber.loss_model`` and its note, ``fiber.dispersion_model``, and the warning that the
    single-tube anti-resonant loss overstates a real fiber's."""
    from hcfplan.fibers.antiresonant import SINGLE_TUBE_LOSS_NOTE

    model = getattr(waveguide, "loss_model", "model")
    dispersion = getattr(waveguide, "dispersion_model", "model")
    part = {"fiber.loss_model": model,
            "fiber.loss_model_note": LOSS_MODEL_NOTES.get(model, model),
            "fiber.dispersion_model": dispersion}
    if dispersion == "measured_gvd":
        part["fiber.dispersion_model_note"] = (
            f"measured: fiber.gvd_csv ({config.fiber.gvd_curve.source.name}) integrated about "
            "the pump; the model's beta outside its range")
    notes = []
    if model == "antiresonant_single_tube_zeisberger2017":
        notes.append(f"fiber.loss_model = {model}: {SINGLE_TUBE_LOSS_NOTE}")
    return part, notes


def fiber_report(config) -> dict:
    """Analytic summary of the configured fiber at the pump (see module docstring); kept for
    a config met again in this process (:func:`hcfplan.planning.memo.remembered`)."""
    from hcfplan.planning.memo import remembered

    def compute() -> dict:
        with quiet_validity():
            return _fiber_report(config)

    return remembered("fiber_report", config, compute)


def _fiber_report(config) -> dict:
    from hcfplan.fibers import derived
    from hcfplan.pulse import fields as pulse

    laser = config.laser
    omega0 = pump_omega(laser)
    medium = build_medium(config.gas, laser.polarization) if config.gas is not None else None
    waveguide = build_waveguide(config.fiber, medium, omega0)
    w0 = np.array([omega0])
    betas = derived.dispersion_coefficients(waveguide, omega0, order=3)
    beta2, beta3 = float(betas[2]), float(betas[3])
    alpha = float(waveguide.attenuation(w0)[0])
    gamma = float(waveguide.nonlinear_coefficient(w0)[0])
    length = config.fiber.length
    efficiency, waist, optimum = coupling(config)
    energy = laser.energy * efficiency
    peak_power = pulse.peak_power_from_energy(energy, laser.duration_fwhm, laser.shape)
    t0 = derived.t0_from_fwhm(laser.duration_fwhm, laser.shape)
    ld = derived.dispersion_length(t0, beta2)
    lnl = derived.nonlinear_length(gamma, peak_power)
    order = derived.soliton_order(t0, beta2, gamma, peak_power)
    leff = derived.effective_length(length, alpha)
    phi = derived.nonlinear_phase(gamma, peak_power, leff)
    zdws = derived.zero_dispersion_wavelengths(waveguide, _zdw_range(waveguide, config))
    report = {
        "laser.wavelength_m": laser.wavelength,
        "laser.energy_j": laser.energy,
        "laser.fwhm_s": laser.duration_fwhm,
        "fiber.kind": config.fiber.kind,
        "fiber.length_m": length,
        "fiber.field_attenuation_per_m": alpha,
        "fiber.power_loss_db_per_m": 20 * alpha / math.log(10),
        "fiber.transmission": float(math.exp(-2 * alpha * length)),
        "fiber.loss_convention": "alpha is the field attenuation; power falls as exp(-2 alpha z)",
        "fiber.beta2_s2_per_m": beta2,
        "fiber.beta3_s3_per_m": beta3,
        "fiber.regime": "anomalous" if beta2 < 0 else "normal",
        "fiber.zdw_m": [float(z) for z in zdws],
        "fiber.gamma_per_w_per_m": gamma,
        "fiber.effective_area_m2": float(waveguide.effective_area(w0)[0]),
        "coupling.efficiency": efficiency,
        "coupling.beam_waist_m": waist,
        "coupling.optimum_beam_waist_m": optimum,
        "input.coupled_energy_j": energy,
        "input.peak_power_w": peak_power,
        "fiber.dispersion_length_m": ld,
        "fiber.nonlinear_length_m": lnl,
        "fiber.soliton_order": order,
        "fiber.fission_length_m": (derived.fission_length(t0, beta2, gamma, peak_power)
                                   if beta2 < 0 else None),
        "estimate.kind": ESTIMATE_KIND,
        "estimate.note": ESTIMATE_NOTE,
        "estimate.nonlinear_phase_rad": phi,
        "estimate.spm_broadening_factor": derived.spm_broadening_factor(phi),
        "estimate.output_bandwidth_hz": _bandwidth_estimate(laser, phi),
        "estimate.dispersive_wave_m": _dispersive_wave(waveguide, omega0, peak_power, gamma),
    }
    report.update(_launch_part(config, waist))
    report.update(_antiresonant_part(waveguide, config))
    loss_part, loss_notes = _loss_part(waveguide, config)
    report.update(loss_part)
    notes = range_notes(config, medium, (laser.wavelength, laser.wavelength), "the pump")
    notes += loss_notes
    if medium is not None:
        report.update(_gas_part(medium, config))
        notes = list(medium.warnings) + notes
        if config.gas.is_gradient:
            notes.append(GRADIENT_NOTE)
    report["warnings"] = notes + low_nonlinearity_notes(config, phi)
    return report


def _dispersive_wave(waveguide, omega0: float, peak_power: float, gamma: float) -> float | None:
    """Wavelength of the resonant dispersive wave phase-matched with a soliton of the input
    peak power (:func:`hcfplan.fibers.derived.dispersive_wave_frequency`), None when the pump
    is not anomalous or none lies below ``UPPER_EDGE_MULTIPLE`` times the pump. [m]"""
    from hcfplan.fibers import derived
    from hcfplan.numerics.grid import UPPER_EDGE_MULTIPLE

    omega = derived.dispersive_wave_frequency(waveguide, omega0, peak_power, gamma,
                                              UPPER_EDGE_MULTIPLE * omega0)
    return None if omega is None else float(2 * math.pi * c / omega)


def _bandwidth_estimate(laser, phi: float) -> float:
    """Input transform-limited FWHM bandwidth times the Gaussian SPM rms broadening factor. [Hz]

    The time-bandwidth products 0.441 (Gaussian) and 0.315 (sech^2) are the standard values
    (J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., 2006, Table 1.1).
    """
    from hcfplan.fibers import derived

    tbp = {"gaussian": 0.4413, "sech2": 0.3148}[laser.shape]
    return tbp / laser.duration_fwhm * derived.spm_broadening_factor(phi)


def dispersion_curves(config, wavelengths: np.ndarray) -> dict:
    """beta2 and power loss of the configured fiber over ``wavelengths`` [m], for the figure."""
    from hcfplan.fibers import derived

    omega0 = pump_omega(config.laser)
    with quiet_validity():
        medium = build_medium(config.gas) if config.gas is not None else None
        waveguide = build_waveguide(config.fiber, medium, omega0)
        omega = 2 * math.pi * c / wavelengths
        gvd = derived.group_velocity_dispersion(waveguide, omega)
        alpha = waveguide.attenuation(omega)
    resonances = (sorted(waveguide.resonance_wavelengths(6))
                  if hasattr(waveguide, "resonance_wavelengths") else [])
    return {"wavelength_m": wavelengths, "beta2_s2_per_m": gvd,
            "power_loss_db_per_m": 20 * alpha / math.log(10),
            "pump_wavelength_m": config.laser.wavelength, "resonance_wavelengths_m": resonances}
