"""Parts of the limits report for the lab hardware: the entrance window (GDD on the input
pulse, B-integral) and, with ``laser.repetition_khz``, the average powers through the optics,
the heat each pulse leaves in the gas and whether the gas relaxes between pulses.

Each part takes the report's set-up object (duck-typed: ``config``, ``medium``, ``waveguide``,
``rates``, ``beam_waist``, ``efficiency``, ``peak_power_full``, ``peak_power_coupled``,
``transmission``, ``omega0``) and returns ``(values, checks, notes)`` like the parts of
:mod:`hcfplan.planning.reports.limits`.
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.planning.reports.limits_checks import check_entry, not_checked

SOURCES = {
    "b_integral": "B = (2 pi/lambda) n2 I L (R. W. Boyd, Nonlinear Optics, 3rd ed. (2008)); "
                  "limit: common practice, no source",
    "relaxation": "slowest radial heat-diffusion mode a^2/(j01^2 D) (H. S. Carslaw and J. C. "
                  "Jaeger, Conduction of Heat in Solids, 2nd ed. (1959), Sec. 7.6 [from "
                  "memory]), D from CoolProp (I. H. Bell et al., Ind. Eng. Chem. Res. 53, 2498 "
                  "(2014)); long-lived index changes at high repetition rates: J. R. Koehler "
                  "et al. (2018) [from memory]; spacing >= 3 relaxation times: common "
                  "practice, no source",
}


#: Entrance window to fiber entrance distance when limits.entrance_gas_path_m is not given: the
#: exit window's default distance (common practice, no source). [m]
DEFAULT_ENTRANCE_WINDOW_DISTANCE = 0.3


def _stretch_factor(gdd: float, duration_fwhm: float) -> float:
    """FWHM after a GDD over the transform-limited FWHM of a Gaussian pulse,
    sqrt(1 + (4 ln2 GDD / tau^2)^2) (G. P. Agrawal, Nonlinear Fiber Optics, ch. 3 [from
    memory]; a sech^2 pulse stretches slightly differently)."""
    return math.sqrt(1 + (4 * math.log(2) * gdd / duration_fwhm**2) ** 2)


def entrance_window_part(s) -> tuple[dict, list, list]:
    """Entrance window: GDD on the input pulse and B-integral (none without a window)."""
    from hcfplan.limits import beam as limits
    from hcfplan.materials import solids
    from hcfplan.planning.hardware import entrance_window_gdd, entrance_window_transmission

    cell, lim, laser = s.config.cell, s.config.limits, s.config.laser
    name = "entrance_window.b_integral"
    if not cell.entrance_window_thickness:
        return {}, [], []
    gdd = entrance_window_gdd(s.config)
    transmission = entrance_window_transmission(s.config)
    values = {"limits.entrance_window.material": cell.entrance_window_material,
              "limits.entrance_window.thickness_m": cell.entrance_window_thickness,
              "limits.entrance_window.gdd_s2": gdd,
              "limits.entrance_window.stretch_factor": _stretch_factor(gdd, laser.duration_fwhm),
              "limits.entrance_window.transmission": transmission}
    if s.beam_waist is None:
        why = "no launch model (Taylor fiber): the beam size at the entrance window is unknown"
        return values, [not_checked(name, "rad", why, SOURCES["b_integral"], ratio="limit/B")], []
    w0 = s.beam_waist
    # the window sits at the start of the entrance gas path; without that key the distance of
    # the exit window's default (a window millimetres from a focus would not be built)
    path = (lim.entrance_gas_path if lim.entrance_gas_path is not None
            else DEFAULT_ENTRANCE_WINDOW_DISTANCE)
    radius = limits.gaussian_beam_radius(w0, laser.wavelength, path)
    power = s.peak_power_full / transmission  # before the window's loss
    intensity = limits.gaussian_peak_intensity(power, radius)
    n2 = solids.load_material(cell.entrance_window_material).n2.value
    b = limits.b_integral(intensity, n2, cell.entrance_window_thickness, laser.wavelength)
    values.update({"limits.entrance_window.distance_m": path,
                   "limits.entrance_window.beam_radius_m": radius,
                   "limits.entrance_window.peak_power_w": power,
                   "limits.entrance_window.peak_intensity_w_per_m2": intensity,
                   "limits.entrance_window.n2_m2_per_w": n2,
                   "limits.entrance_window.b_integral_rad": b})
    default = ("" if lim.entrance_gas_path is not None
               else " (default; set limits.entrance_gas_path_m for the cell's distance)")
    assumption = (f"Gaussian beam converging to the waist {w0 * 1e6:.4g} um at the fiber "
                  f"entrance, window {path:.4g} m before it{default}; transform-limited input "
                  "peak power before the window")
    notes = []
    if values["limits.entrance_window.stretch_factor"] > 1.1:
        notes.append(f"entrance window: its GDD {gdd * 1e30:.4g} fs^2 stretches the input pulse "
                     f"by about {values['limits.entrance_window.stretch_factor']:.3g}x (Gaussian "
                     "estimate); the run includes it, the analytic limits use the unstretched "
                     "pulse (an upper estimate of its peak power)")
    return values, [check_entry(name, b, lim.b_integral_limit, unit="rad", ratio="limit/B",
                                source=SOURCES["b_integral"], assumption=assumption)], notes


def _run_energy(run, name: str) -> float | None:
    value = getattr(run, name, None) if run is not None else None
    return None if value is None else float(value)


def _power_values(s, run) -> dict:
    from hcfplan.limits.thermal import average_power
    from hcfplan.planning.hardware import entrance_window_transmission, exit_window_transmission

    config = s.config
    laser, rate = config.laser, config.laser.repetition_rate
    out_energy = _run_energy(run, "output_energy")
    if out_energy is None:
        out_energy = laser.energy * s.efficiency * s.transmission
    values = {
        "limits.power.repetition_rate_hz": rate,
        "limits.power.entrance_window_incident_w": average_power(
            laser.energy / entrance_window_transmission(config), rate),
        "limits.power.entrance_w": average_power(laser.energy, rate),
        "limits.power.fiber_exit_w": average_power(out_energy, rate),
        "limits.power.exit_window_w": average_power(out_energy, rate),
    }
    compressed = _run_energy(run, "compressed_energy")
    after = (average_power(compressed, rate) if compressed is not None else
             average_power(out_energy * exit_window_transmission(config), rate))
    values["limits.power.after_compressor_w"] = after
    if "thz" in config.present_sections:
        values["limits.power.thz_crystal_w"] = after
    return values


def heat_per_pulse(s, run) -> tuple[float, float, bool]:
    """(ionisation heat, rotational Raman heat) one pulse leaves in the gas of the fiber [J],
    and whether the ionisation estimate was capped at the energy the pulse can give up (the
    launched energy, or launched minus output energy of a run; the Raman part gets what the
    ionisation leaves)."""
    from hcfplan.ionization.fraction import pulse_ionization_fraction
    from hcfplan.limits.rotational import raman_records
    from hcfplan.limits.thermal import ionization_heat, rotational_heat_per_length

    laser, fiber = s.config.laser, s.config.fiber
    area = s.waveguide.peak_intensity_area
    peak = _run_energy(run, "max_peak_intensity")
    intensity = peak if peak is not None else s.peak_power_coupled / area
    fractions = [pulse_ionization_fraction(intensity, laser.duration_fwhm, laser.shape, [rate])
                 for rate in s.rates]
    potentials = [k.table.ionization.potential for k in s.medium.components]
    ion = ionization_heat(potentials, s.medium.number_density, fractions, area * fiber.length)
    launched = laser.energy * s.efficiency
    out_energy = _run_energy(run, "output_energy")
    available = launched if out_energy is None else max(launched - out_energy, 0.0)
    capped = ion > available
    ion = min(ion, available)
    alpha = float(s.waveguide.attenuation(np.array([s.omega0]))[0])
    length = fiber.length if alpha * fiber.length < 1e-9 else (
        -math.expm1(-4 * alpha * fiber.length) / (4 * alpha))  # P^2 decays as exp(-4 alpha z)
    a_eff = float(s.waveguide.effective_area(np.array([s.omega0]))[0])
    raman = rotational_heat_per_length(raman_records(s.medium), s.medium.fill.temperature,
                                       s.peak_power_coupled, laser.duration_fwhm, laser.shape,
                                       a_eff) * length
    capped = capped or raman > available - ion
    return ion, min(raman, available - ion), capped


def power_part(s, run) -> tuple[dict, list, list]:
    """Average powers, heat per pulse and thermal relaxation (only with a repetition rate)."""
    from hcfplan.limits import thermal
    from hcfplan.materials.gas_transport import thermal_diffusivity

    config = s.config
    rate = config.laser.repetition_rate
    if not rate:
        return {}, [], []
    values = _power_values(s, run)
    notes = [f"average power {values['limits.power.entrance_w']:.4g} W at the fiber entrance, "
             f"{values['limits.power.exit_window_w']:.4g} W on the exit window: check the "
             "windows', mirrors' and crystal's ratings for average power and thermal lensing "
             "with their makers"]
    name, ratio = "gas.thermal_relaxation", "spacing/(3 t_relax)"
    if s.medium is None or config.fiber.core_radius is None:
        why = "no gas fill or no core radius (Taylor fiber)"
        return values, [not_checked(name, "s", why, SOURCES["relaxation"], severity="warning",
                                    ratio=ratio)], notes
    ion, raman, capped = heat_per_pulse(s, run)
    if capped:
        notes.append("gas: the heat estimate (ionisation at the peak intensity over the whole "
                     "fiber, and rotational Raman) exceeds the energy the pulse can give up; it "
                     "is capped there, and the single-pulse picture does not hold")
    values.update({"limits.gas.heat_per_pulse_j": ion + raman,
                   "limits.gas.ionization_heat_per_pulse_j": ion,
                   "limits.gas.raman_heat_per_pulse_j": raman,
                   "limits.gas.heating_power_w": (ion + raman) * rate,
                   "limits.gas.pulse_spacing_s": 1.0 / rate})
    diffusivity = thermal_diffusivity(s.medium)
    if diffusivity is None:
        why = ("no thermal-conductivity model for this fill in CoolProp (Ne, Kr, Xe and "
               "mixtures): relaxation between pulses not estimated")
        values.update({"limits.gas.thermal_relaxation_time_s": None,
                       "limits.gas.relaxes_between_pulses": None})
        return values, [not_checked(name, "s", why, SOURCES["relaxation"], severity="warning",
                                    ratio=ratio)], notes
    tau = thermal.thermal_relaxation_time(config.fiber.core_radius, diffusivity)
    relaxes = thermal.relaxes_between_pulses(tau, rate)
    values.update({"limits.gas.thermal_diffusivity_m2_per_s": diffusivity,
                   "limits.gas.thermal_relaxation_time_s": tau,
                   "limits.gas.relaxes_between_pulses": relaxes})
    if not relaxes:
        notes.append(
            f"gas: the thermal relaxation time across the core ({tau * 1e6:.3g} us) is not "
            f"small against the pulse spacing ({1e6 / rate:.3g} us): heat and the index change "
            "it causes build up from pulse to pulse, as observed in gas-filled hollow-core "
            "fibers at high repetition rates (J. R. Koehler et al. 2018, from memory); the "
            "single-pulse model does not include this")
    spacing_limit = 1.0 / (thermal.RELAXATION_TIMES_BETWEEN_PULSES * rate)
    assumption = ("conduction to a wall at fixed temperature, slowest mode; heat from "
                  "ionisation (I_p per electron at the peak intensity over the whole fiber: an "
                  "upper estimate) and rotational Raman (input pulse)")
    return values, [check_entry(name, tau, spacing_limit, unit="s", ratio=ratio,
                                severity="warning", source=SOURCES["relaxation"],
                                assumption=assumption)], notes
