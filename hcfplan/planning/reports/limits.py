"""Limits of a configured setup (the ``limits`` command): every check with value, limit, source.

``limits_report(config, run=None)`` returns a flat dict of SI values whose keys carry their unit
(``limits.self_focusing.critical_power_w``) plus ``limits.checks``, a list of entries

    {name, value, limit, unit, limit_kind, ratio, margin, required, met, status, severity,
     source, assumption}

Margins follow :mod:`hcfplan.limits.margins`: ``limit_kind`` is ``"maximum"`` (value must not
exceed limit; margin = limit / value) or ``"minimum"`` (value must not fall below limit;
margin = value / limit); ``ratio`` says how the margin reads (``"P_cr/P"``), ``required`` is
the margin asked for (``limits.self_focusing_margin`` for the self-focusing checks, where the
limit is the critical power itself; 1 elsewhere) and ``met`` is margin >= required.
``status`` is ``"within"`` (met), ``"exceeds"`` (not met) or ``"not checked"``. ``severity``
is ``"limit"`` (counts for ``limits.acceptable``) or ``"warning"`` (shown, does not count). The
words are neutral on purpose: the report never calls a setup safe. Non-finite numbers become
``None`` (JSON null); an unbounded margin (zero value against a maximum) is null with
``met`` true.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from hcfplan.constants import P_1ATM, T_ROOM
from hcfplan.errors import ConfigError
from hcfplan.planning.build import (
    build_medium,
    build_waveguide,
    coupling,
    pump_omega,
    rate_model,
)
from hcfplan.planning.memo import remembered
from hcfplan.planning.reports.limits_checks import check_entry as _check
from hcfplan.planning.reports.limits_checks import finite_or_none as _finite
from hcfplan.planning.reports.limits_checks import not_checked as _not_checked
from hcfplan.planning.reports.limits_gas import (
    PRESSURE_SEARCH_MAX,
    RATE_TABLE_RANGE,
    condensation_ceiling,
    gas_at,
    gas_density_at,
    lowest_barrier_suppression,
    weighted_rates,
)
from hcfplan.planning.reports.limits_gradient import (
    critical_power_at,
    entrance_gas,
    gradient_self_focusing,
)
from hcfplan.planning.validity import quiet_validity

#: Fiber exit to exit window distance when limits.window_distance_m is not given. [m]
DEFAULT_WINDOW_DISTANCE = 0.3
#: Relative half-width of an anti-resonance band (the fiber model's default band of 5 %).
RESONANCE_HALF_WIDTH = 0.025

ACCEPTABLE_NOTE = ("within the modelled limits (estimates; the maker's rating, local codes and "
                   "licensed practice come first)")
NOT_ACCEPTABLE_NOTE = ("beyond at least one modelled limit (see the margins marked 'not met', "
                       "status 'exceeds'); "
                       "the estimates do not replace the maker's rating, local codes and "
                       "licensed practice")

SOURCES = {
    "critical_power": "P_cr = 1.8962 lambda^2/(4 pi n0 n2): G. Fibich and A. L. Gaeta, Opt. "
                      "Lett. 25, 335 (2000); n2 electronic plus the rotational part at the "
                      "pulse peak (molecular gases), circular polarisation 2/3 and 1/4 of the "
                      "linear values (R. W. Boyd, Nonlinear Optics, Sec. 4.2 [from memory]); "
                      "required margin P_cr/P: common practice, no source",
    "ionization": "PPT rate (A. M. Perelomov, V. S. Popov, M. V. Terent'ev, Sov. Phys. JETP 23, "
                  "924 (1966)) integrated over the pulse (circular polarisation: the ADK "
                  "tunnelling rate at the constant field magnitude); fraction limit: common "
                  "practice, no source",
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
# checks


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
    entrance: Any = None  #: EntranceGas: the fill at the entrance (limits_gradient)
    n2_self_focusing: float | None = None  #: electronic + rotational at the peak [m^2/W]


def _setup(config) -> _Setup:
    from hcfplan.limits import beam as limits
    from hcfplan.pulse import fields as pulse

    laser = config.laser
    omega0 = pump_omega(laser)
    medium = (build_medium(config.gas, laser.polarization) if config.gas is not None
              else None)
    waveguide = build_waveguide(config.fiber, medium, omega0)
    efficiency, waist, optimum = coupling(config)
    full = pulse.peak_power_from_energy(laser.energy, laser.duration_fwhm, laser.shape)
    alpha = float(waveguide.attenuation(np.array([omega0]))[0])
    critical = n0 = rates = entrance = n2_sf = None
    if medium is not None:
        from hcfplan.limits.rotational import self_focusing_n2

        pulse_id = (laser.duration_fwhm, laser.shape)
        entrance = entrance_gas(config.gas, medium, laser.wavelength, omega0, pulse_id)
        n0 = float(medium.refractive_index(np.array([omega0]))[0])
        n2_sf = self_focusing_n2(medium, laser.duration_fwhm, laser.shape)
        critical = float(limits.self_focusing_power(laser.wavelength, n0, n2_sf))
        if config.gas.is_gradient:  # the energy limit of the highest pressure in the fiber
            critical = critical_power_at(config.gas, medium, laser.wavelength, omega0,
                                         config.gas.highest_pressure, pulse_id)
        rates = weighted_rates(medium, laser.wavelength, rate_model(config))
    return _Setup(config, omega0, medium, waveguide, efficiency, waist, optimum, full,
                  full * efficiency, math.exp(-2 * alpha * config.fiber.length), rates,
                  critical, n0, entrance, n2_sf)


def _run_value(run, name: str):
    value = getattr(run, name, None) if run is not None else None
    return None if value is None else float(value)


# ---------------------------------------------------------------------------------------------
# sections: each returns (values, checks, notes)


def _self_focusing_part(s: _Setup, run) -> tuple[dict, list, list]:
    from hcfplan.limits import beam as limits
    from hcfplan.limits.margins import margin as ratio_of

    name, unit = "self_focusing", "W"
    margin = s.config.limits.self_focusing_margin
    in_fiber = _run_value(run, "max_peak_power")
    if s.medium is None:
        why = "no gas (Taylor fiber): the gas self-focusing check does not apply"
        return ({}, [_not_checked(f"{name}.input", unit, why, ratio="P_cr/P")], [])
    laser, gas = s.config.laser, s.config.gas
    ceiling = condensation_ceiling(s.medium, gas.temperature, PRESSURE_SEARCH_MAX)
    sf_ratio = s.n2_self_focusing / s.medium.n2  # rotational part scaled with density too

    def critical_at(p: float) -> float:
        scaled = gas_at(gas, s.medium, p)
        n0 = float(scaled.refractive_index(np.array([s.omega0]))[0])
        return float(limits.self_focusing_power(laser.wavelength, n0, scaled.n2 * sf_ratio))

    # depends on the config only: kept per config (memo.remembered) for a program's next call
    p_max = remembered("limits.self_focusing.max_pressure", s.config, lambda: (
        limits.max_pressure_for_self_focusing(s.peak_power_coupled, critical_at, margin=margin,
                                              pressure_range=(min(1e2, gas.pressure / 10),
                                                              ceiling))))
    at_input = s.entrance.critical_power  # the entrance pressure (a gradient's p0)
    values = {
        "limits.self_focusing.critical_power_w": at_input,
        "limits.self_focusing.polarization": laser.polarization,
        "limits.self_focusing.n2_m2_per_w": s.n2_self_focusing,
        "limits.self_focusing.electronic_n2_m2_per_w": s.medium.n2,
        "limits.self_focusing.required_margin": margin,
        "limits.self_focusing.peak_power_input_w": s.peak_power_coupled,
        "limits.self_focusing.margin_input": ratio_of(at_input, s.peak_power_coupled),
        "limits.self_focusing.max_pressure_pa": p_max,
        "limits.self_focusing.max_energy_j": limits.max_energy_for_self_focusing(
            s.critical_power, laser.duration_fwhm, laser.shape, margin=margin,
            coupling_efficiency=s.efficiency),
    }
    notes = [] if math.isfinite(p_max) else [
        f"self-focusing margin {margin:g} holds up to the search limit "
        f"{ceiling / 1e5:.4g} bar (condensation or 1000 bar)"]
    assumption = (f"coupled input peak power P (coupling {s.efficiency:.3f}) vs the critical "
                  "power P_cr of the fill at the pump wavelength"
                  + (" at the entrance pressure" if gas.is_gradient else ""))
    checks = [_check(f"{name}.input", s.peak_power_coupled, at_input, unit=unit,
                     required=margin, ratio="P_cr/P", source=SOURCES["critical_power"],
                     assumption=assumption) if at_input is not None else
              _not_checked(f"{name}.input", unit, "evacuated entrance (gradient fill): no gas "
                           "at the launch", ratio="P_cr/P")]
    if gas.is_gradient:  # inside the fiber: the local pressure along z
        extra, check = gradient_self_focusing(gas, s.medium, laser, s.omega0, s.config.fiber,
                                              s.peak_power_coupled, run)
        values.update(extra)
        checks.append(_check(**check, unit=unit, required=margin, ratio="P_cr/P",
                             source=SOURCES["critical_power"]))
        return values, checks, notes
    if in_fiber is not None:
        values["limits.self_focusing.peak_power_in_fiber_w"] = in_fiber
        values["limits.self_focusing.margin_in_fiber"] = ratio_of(s.critical_power, in_fiber)
        checks.append(_check(f"{name}.in_fiber", in_fiber, s.critical_power, unit=unit,
                             required=margin, ratio="P_cr/P", source=SOURCES["critical_power"],
                             assumption="highest peak power P along the fiber from the run"))
    return values, checks, notes


def _ionization_part(s: _Setup, run) -> tuple[dict, list, list]:
    from hcfplan.ionization.fraction import peak_intensity_for_fraction, pulse_ionization_fraction
    from hcfplan.limits import beam as limits

    name, unit = "ionization", ""
    if s.medium is None:
        why = "no gas (Taylor fiber): the gas ionisation check does not apply"
        return ({}, [_not_checked(f"{name}.input", unit, why, ratio="limit/fraction")], [])
    laser = s.config.laser
    level = s.config.limits.ionization_fraction_limit
    area = s.waveguide.peak_intensity_area
    intensity = s.peak_power_coupled / area
    # barrier suppression is set by the field: a circular wave of intensity I has the field
    # magnitude sqrt(I/(c eps0)), so it reaches the same field at twice the intensity
    bsi = lowest_barrier_suppression(s.medium) * (
        2.0 if laser.polarization == "circular" else 1.0)
    i_lim = remembered("limits.ionization.limit_intensity", s.config, lambda: (  # as p_max
        peak_intensity_for_fraction(level, laser.duration_fwhm, laser.shape, s.rates,
                                    RATE_TABLE_RANGE)))

    def fraction(i: float) -> float:
        return pulse_ionization_fraction(i, laser.duration_fwhm, laser.shape, s.rates)

    values = {
        "limits.ionization.model": rate_model(s.config),
        "limits.ionization.fraction_limit": level,
        "limits.ionization.peak_intensity_input_w_per_m2": intensity,
        "limits.ionization.fraction_input": fraction(intensity),
        "limits.ionization.barrier_suppression_intensity_w_per_m2": bsi,
        "limits.ionization.limit_intensity_w_per_m2": i_lim,
        "limits.ionization.max_energy_j": limits.energy_from_peak_intensity(
            i_lim, area, laser.duration_fwhm, laser.shape, s.efficiency),
        "limits.ionization.max_pressure_pa": None,
    }
    notes = ["ionisation: the ionised fraction per atom at the coupled input intensity does not "
             "depend on the fill pressure, so there is no pressure limit from the input pulse "
             "(limits.ionization.max_pressure_pa = null); pressure enters through "
             "self-compression, which a run checks"]
    assumption = (f"on-axis EH11 intensity I0 = P/A_I (A_I = {area:.4g} m^2) of the coupled "
                  f"input pulse ({laser.shape}, {laser.duration_fwhm * 1e15:.4g} fs), "
                  "fraction left behind the pulse")
    checks = [_check(f"{name}.input", values["limits.ionization.fraction_input"], level,
                     unit=unit, ratio="limit/fraction", source=SOURCES["ionization"],
                     assumption=assumption),
              _check(f"{name}.barrier_suppression", intensity, bsi, unit="W/m^2",
                     ratio="I_BSI/I", source=SOURCES["bsi"], severity="warning",
                     assumption="rate model validity: tunnelling rates overestimate above "
                                "barrier suppression")]
    peak = _run_value(run, "max_peak_intensity")
    if peak is not None:
        values["limits.ionization.peak_intensity_in_fiber_w_per_m2"] = peak
        values["limits.ionization.fraction_in_fiber"] = fraction(peak)
        checks.append(_check(f"{name}.in_fiber", fraction(peak), level, unit=unit,
                             ratio="limit/fraction", source=SOURCES["ionization"],
                             assumption="highest peak intensity along the fiber from the run, "
                                        "with the input duration (a shorter compressed pulse "
                                        "ionises less: an upper estimate)"))
    return values, checks, notes


def _cell_part(s: _Setup) -> tuple[dict, list, list]:
    from hcfplan.limits.cell import pressure_rating_status
    from hcfplan.limits.margins import margin as ratio_of

    rated = s.config.cell.rated_pressure
    if s.config.gas is None:
        return ({"limits.cell.status": "not checked"},
                [_not_checked("cell.rating", "Pa", "no gas fill", ratio="rating/pressure")], [])
    pressure = s.config.gas.highest_pressure  # a gradient's higher end
    status = pressure_rating_status(pressure, rated)
    values = {"limits.cell.pressure_pa": pressure, "limits.cell.rated_pressure_pa": rated,
              "limits.cell.status": status,
              "limits.cell.rating_margin": ratio_of(rated, pressure)}
    notes = [] if rated is not None else [
        "cell rating not given (cell.rated_pressure_bar): the fill pressure is not checked "
        "against the cell"]
    check = _check("cell.rating", pressure, rated, unit="Pa", ratio="rating/pressure",
                   source=SOURCES["rating"],
                   assumption="absolute fill pressure vs the lowest rating of cell, windows, "
                              "fittings and regulator (give that lowest value)")
    return values, [check], notes


def _window_pressure(s: _Setup) -> tuple[dict, list, list]:
    from hcfplan.limits import cell as lc
    from hcfplan.materials import solids

    cell, lim = s.config.cell, s.config.limits
    name = "window.pressure"
    if s.config.gas is None:
        return {}, [_not_checked(name, "m", "no gas fill", ratio="t/t_min", kind="minimum")], []
    material = solids.load_material(cell.window_material)
    strength = material.modulus_of_rupture.value
    load = lc.window_pressure_difference(s.config.gas.highest_pressure, P_1ATM)
    values = {"limits.window.material": material.name,
              "limits.window.pressure_difference_pa": load,
              "limits.window.outside_pressure_pa": P_1ATM,
              "limits.window.modulus_of_rupture_pa": strength,
              "limits.window.safety_factor": lim.window_safety_factor,
              "limits.window.mounting": lim.window_mounting,
              "limits.window.stress_coefficient": lc.WINDOW_STRESS_COEFFICIENTS[
                  lim.window_mounting]}
    if cell.window_clear_aperture is None:
        why = "window clear aperture not given (cell.window_clear_aperture_mm)"
        return values, [_not_checked(name, "m", why, SOURCES["window"], ratio="t/t_min",
                                         kind="minimum")], [why]
    t_min = lc.window_min_thickness(load, cell.window_clear_aperture, strength,
                                    safety_factor=lim.window_safety_factor,
                                    mounting=lim.window_mounting)
    values.update({"limits.window.clear_aperture_m": cell.window_clear_aperture,
                   "limits.window.min_thickness_m": t_min,
                   "limits.window.thickness_m": cell.window_thickness})
    notes = []
    if cell.window_thickness and material.name in lc.WINDOW_ELASTIC_CONSTANTS:
        modulus, nu = lc.WINDOW_ELASTIC_CONSTANTS[material.name]
        sag = lc.window_center_deflection(load, cell.window_clear_aperture, cell.window_thickness,
                                          modulus, nu, lim.window_mounting)
        values["limits.window.center_deflection_m"] = sag
        if sag > lc.SMALL_DEFLECTION_RATIO * cell.window_thickness:
            notes.append("window: centre deflection above half the thickness; the plate "
                         "formula (small deflection) is outside its range")
    k = values["limits.window.stress_coefficient"]
    strength_source = material.modulus_of_rupture.source + (
        " [from memory]" if material.modulus_of_rupture.from_memory else "")
    top = s.config.gas.highest_pressure  # a gradient's higher end
    assumption = (f"outside at 1 atm (lab side; a window onto vacuum carries the full "
                  f"{top / 1e5:.4g} bar), K = {k:g} ({lim.window_mounting}; "
                  "Roark's simply supported 3(3+nu)/8 gives 1.19-1.24 for nu = 0.16-0.3), "
                  f"SF = {lim.window_safety_factor:g}, strength: {strength_source}")
    check = _check(name, cell.window_thickness, t_min, unit="m", kind="minimum", ratio="t/t_min",
                   source=SOURCES["window"], assumption=assumption)
    return values, [check], notes


def _window_b_integral(s: _Setup, run) -> tuple[dict, list, list]:
    from hcfplan.limits import beam as limits
    from hcfplan.materials import solids

    cell, lim, laser = s.config.cell, s.config.limits, s.config.laser
    name = "window.b_integral"
    if s.optimum_waist is None or not cell.window_thickness:
        why = ("no core radius (Taylor fiber)" if s.optimum_waist is None
               else "window thickness not given (cell.window_thickness_mm)")
        return {}, [_not_checked(name, "rad", why, SOURCES["b_integral"], ratio="limit/B")], []
    distance = lim.window_distance or DEFAULT_WINDOW_DISTANCE
    radius = limits.gaussian_beam_radius(s.optimum_waist, laser.wavelength, distance)
    out = _run_value(run, "output_peak_power")
    power = out if out is not None else s.transmission * s.peak_power_coupled
    intensity = limits.gaussian_peak_intensity(power, radius)
    n2 = solids.load_material(cell.window_material).n2.value
    b = limits.b_integral(intensity, n2, cell.window_thickness, laser.wavelength)
    values = {"limits.window.distance_m": distance, "limits.window.beam_radius_m": radius,
              "limits.window.peak_power_w": power,
              "limits.window.peak_intensity_w_per_m2": intensity,
              "limits.window.n2_m2_per_w": n2, "limits.window.b_integral_rad": b,
              "limits.window.b_integral_limit_rad": lim.b_integral_limit}
    origin = ("the run's output peak power" if out is not None else
              f"input peak power x fiber transmission {s.transmission:.3f} (duration unchanged)")
    assumption = (f"Gaussian beam from the EH11-matched waist 0.64 a diverging over "
                  f"{distance:g} m{'' if lim.window_distance else ' (default)'}; {origin}")
    return values, [_check(name, b, lim.b_integral_limit, unit="rad", ratio="limit/B",
                           source=SOURCES["b_integral"], assumption=assumption)], []


def _static_fill_part(s: _Setup) -> tuple[dict, list, list]:
    from hcfplan.ionization.fraction import pulse_ionization_fraction
    from hcfplan.limits import beam as limits
    from hcfplan.limits.margins import margin as ratio_of

    if s.medium is None or s.beam_waist is None or s.entrance.critical_power is None:
        why = ("no gas before the fiber entrance (Taylor fiber)" if s.medium is None
               or s.beam_waist is None else "no gas before the fiber entrance (gradient fill "
               "with an evacuated entrance)")
        return ({}, [_not_checked("static_fill.self_focusing", "W", why, ratio="P_cr/P"),
                     _not_checked("static_fill.ionization", "", why, ratio="limit/fraction")],
                [])
    laser, lim = s.config.laser, s.config.limits
    w0 = s.beam_waist
    intensity = limits.gaussian_peak_intensity(s.peak_power_full, w0)
    rayleigh = math.pi * w0**2 / laser.wavelength
    path = lim.entrance_gas_path if lim.entrance_gas_path is not None else 2 * rayleigh
    fraction = pulse_ionization_fraction(intensity, laser.duration_fwhm, laser.shape, s.rates)
    values = {"limits.static_fill.beam_waist_m": w0,
              "limits.static_fill.peak_power_w": s.peak_power_full,
              "limits.static_fill.peak_intensity_w_per_m2": intensity,
              "limits.static_fill.pressure_pa": s.entrance.pressure,
              "limits.static_fill.self_focusing_margin": ratio_of(s.entrance.critical_power,
                                                                  s.peak_power_full),
              "limits.static_fill.ionization_fraction": fraction,
              "limits.static_fill.gas_path_m": path}
    notes = []
    if path > 0:
        radius = limits.gaussian_beam_radius(w0, laser.wavelength, path)
        curvature = path * (1 + (rayleigh / path) ** 2)
        z_f = limits.self_focusing_distance_marburger1975(
            s.peak_power_full, laser.wavelength, s.entrance.n0, s.entrance.n2, radius, curvature)
        values["limits.static_fill.self_focusing_distance_m"] = z_f
        if z_f < path:
            notes.append(f"static fill: Kerr collapse estimated {z_f * 100:.3g} cm after the "
                         f"entrance window, before the fiber ({path * 100:.3g} cm)")
    where = f"focus at the fiber entrance (w0 = {w0 * 1e6:.4g} um), full pulse energy in the gas"
    checks = [
        _check("static_fill.self_focusing", s.peak_power_full, s.entrance.critical_power, unit="W",
               required=lim.self_focusing_margin, ratio="P_cr/P",
               source=SOURCES["critical_power"], assumption=where),
        _check("static_fill.ionization", fraction, lim.ionization_fraction_limit, unit="",
               ratio="limit/fraction", source=SOURCES["ionization"],
               assumption=where + "; free-space Gaussian peak 2P/(pi w0^2)")]
    return values, checks, notes


def _gas_handling_part(s: _Setup) -> tuple[dict, list, list]:
    from hcfplan.limits import cell as lc

    lim, name = s.config.limits, "gas_handling.oxygen"
    missing = [k for k, v in (("room_volume_m3", lim.room_volume),
                              ("cylinder_volume_l", lim.cylinder_volume),
                              ("cylinder_pressure_bar", lim.cylinder_pressure)) if v is None]
    if s.medium is None or missing:
        why = ("no gas fill" if s.medium is None else
               "give limits." + ", limits.".join(missing) + " for the oxygen-depletion estimate")
        return {}, [_not_checked(name, "", why, SOURCES["oxygen"], ratio="O2/action level",
                                 kind="minimum")], []
    gas = s.config.gas
    room_gas = dataclasses.replace(gas, temperature=T_ROOM, equation_of_state="coolprop")
    try:
        inside = gas_density_at(room_gas, s.medium, lim.cylinder_pressure)
        outside = gas_density_at(room_gas, s.medium, P_1ATM)
    except ConfigError as exc:  # e.g. a mixture component that would condense in the cylinder
        return {}, [_not_checked(name, "", f"cylinder density not available: {exc}",
                                 SOURCES["oxygen"], ratio="O2/action level",
                                 kind="minimum")], []
    released = lc.released_gas_volume(lim.cylinder_volume, inside, outside)
    own_o2 = sum(k.mole_fraction * lc.AIR_OXYGEN_FRACTION for k in s.medium.components
                 if k.table.name.lower() == "air")
    o2 = lc.oxygen_fraction_after_release(lim.room_volume, released,
                                          released_oxygen_fraction=own_o2)
    values = {
        "limits.gas_handling.room_volume_m3": lim.room_volume,
        "limits.gas_handling.released_volume_m3": released,
        "limits.gas_handling.oxygen_fraction": o2,
        "limits.gas_handling.oxygen_fraction_displacement": lc.oxygen_fraction_after_release(
            lim.room_volume, released, model="displacement", released_oxygen_fraction=own_o2),
        "limits.gas_handling.oxygen_action_level": lc.OXYGEN_ACTION_LEVEL,
        "limits.gas_handling.max_release_m3": lc.max_release_for_oxygen_level(lim.room_volume),
    }
    assumption = ("whole cylinder released (real-gas amount at room temperature), perfect "
                  "mixing in the closed room, the excess leaves as mixture; no ventilation; "
                  "heavy gases pool low, so local values can be lower")
    return values, [_check(name, o2, lc.OXYGEN_ACTION_LEVEL, unit="", kind="minimum",
                           ratio="O2/action level", source=SOURCES["oxygen"],
                           assumption=assumption)], []


def _damage_fluence(config) -> tuple[float | None, str]:
    from hcfplan.materials import solids

    if config.limits.cladding_damage_fluence is not None:
        return config.limits.cladding_damage_fluence, "limits.cladding_damage_fluence_j_per_cm2"
    record = solids.load_material(config.fiber.cladding).damage_fluence
    if record is None:
        return None, ""
    return record.value, record.source + (" [from memory]" if record.from_memory else "")


def _entrance_part(s: _Setup) -> tuple[dict, list, list]:
    from hcfplan.limits import beam as limits

    if s.beam_waist is None:
        why = "no core radius / launch model (Taylor fiber)"
        return {}, [_not_checked("entrance.core_edge_fluence", "J/m^2", why,
                                 severity="warning", ratio="damage/fluence")], []
    laser, a, w = s.config.laser, s.config.fiber.core_radius, s.beam_waist
    edge = limits.gaussian_fluence(laser.energy, w, a)
    axis = limits.gaussian_fluence(laser.energy, w, 0.0)
    damage, source = _damage_fluence(s.config)
    clipped = math.exp(-2 * a**2 / w**2)  # power fraction of the Gaussian outside r = a
    values = {"limits.entrance.beam_waist_m": w, "limits.entrance.core_radius_m": a,
              "limits.entrance.fluence_at_core_edge_j_per_m2": edge,
              "limits.entrance.fluence_on_axis_j_per_m2": axis,
              "limits.entrance.damage_fluence_j_per_m2": damage,
              "limits.entrance.energy_fraction_outside_core": clipped}
    if laser.repetition_rate is not None:
        values["limits.entrance.power_outside_core_w"] = (laser.energy * laser.repetition_rate
                                                          * clipped)
    note = "; damage fluence depends on pulse duration, surface and shot number"
    checks = [
        _check("entrance.core_edge_fluence", edge, damage, unit="J/m^2", severity="warning",
               ratio="damage/fluence", source=source,
               assumption="centred Gaussian focus: its fluence at r = a on the facet around "
                          "the bore" + note),
        _check("entrance.misaligned_fluence", axis, damage, unit="J/m^2", severity="warning",
               ratio="damage/fluence", source=source,
               assumption="beam fully off the bore: the on-axis fluence on the cladding "
                          "glass" + note)]
    if hasattr(s.waveguide, "resonance_wavelengths"):
        values.update(_resonance_values(s))
        checks.append(_check("fiber.resonance_band",
                             values["limits.fiber.relative_distance_to_resonance"],
                             RESONANCE_HALF_WIDTH, unit="", kind="minimum", severity="warning",
                             ratio="distance/half-width", source=SOURCES["resonance"],
                             assumption="pump outside the +-2.5 % band around each wall "
                                        "resonance (high loss and strong dispersion inside)"))
    return values, checks, []


def _resonance_values(s: _Setup) -> dict:
    wg, lam = s.waveguide, s.config.laser.wavelength
    orders = int(math.ceil(4 * wg.wall_thickness / lam)) + 2
    res = np.asarray(wg.resonance_wavelengths(orders))
    return {"limits.fiber.resonance_wavelengths_m": sorted(float(r) for r in res),
            "limits.fiber.relative_distance_to_resonance": float(np.min(np.abs(lam / res - 1))),
            "limits.fiber.pump_in_resonance_band": bool(
                np.asarray(wg.in_resonance_band(np.array([s.omega0])))[0])}


# ---------------------------------------------------------------------------------------------
# report


def _json_safe(value):
    if isinstance(value, dict):
        return {k: _json_safe(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_json_safe(v) for v in value]
    return _finite(value)


def limits_report(config, run=None) -> dict:
    """Every limit check of a configured setup (see the module docstring for the entries).

    Parameters
    ----------
    config : PlanConfig
        A validated config (:func:`hcfplan.io.config.load_config`).
    run : object, optional
        Numbers from a GNLSE run, duck-typed: ``max_peak_power`` [W], ``max_peak_intensity``
        [W/m^2] and ``output_peak_power`` [W] (each may be missing or None).

    Returns
    -------
    dict
        Flat keys ``limits.<section>.<name>_<unit>`` (SI), ``limits.checks`` (list of dicts),
        ``limits.acceptable`` (bool) with ``limits.acceptable_note``, ``limits.warnings`` and
        ``limits.cautions`` (the texts of :mod:`hcfplan.limits.cautions`).
    """
    with quiet_validity():
        return _limits_report(config, run)


def _limits_report(config, run) -> dict:
    from hcfplan.limits.cautions import caution_lines

    s = _setup(config)
    from hcfplan.planning.reports.limits_power import entrance_window_part, power_part

    parts = [_self_focusing_part(s, run), _ionization_part(s, run), _cell_part(s),
             _window_pressure(s), _window_b_integral(s, run), _static_fill_part(s),
             _gas_handling_part(s), _entrance_part(s), entrance_window_part(s),
             power_part(s, run)]
    report: dict = {}
    checks: list = []
    notes: list = list(s.medium.warnings) if s.medium is not None else []
    for values, part_checks, part_notes in parts:
        report.update(values)
        checks += part_checks
        notes += part_notes
    beyond = [c["name"] for c in checks if c["severity"] == "limit" and c["status"] == "exceeds"]
    unchecked = [c["name"] for c in checks if c["status"] == "not checked"]
    report["limits.checks"] = checks
    report["limits.acceptable"] = not beyond
    note = NOT_ACCEPTABLE_NOTE if beyond else ACCEPTABLE_NOTE
    if unchecked:
        note += "; not checked: " + ", ".join(unchecked)
    report["limits.acceptable_note"] = note
    report["limits.warnings"] = notes
    report["limits.cautions"] = caution_lines()
    return _json_safe(report)
