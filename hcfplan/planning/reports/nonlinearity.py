"""A hint for plausible but wrong magnitudes: a fill and energy that give no nonlinearity.

A config can pass every range check and still describe a run in which nothing happens: an
energy in uJ where mJ was meant, a fill of 1 mbar, a fiber of a few mm. The peak nonlinear
phase gamma P0 L_eff tells this at the cost of one index and one loss evaluation, before any
run; :func:`low_nonlinearity_notes` turns a small value into a warning (not an error: a linear
run is a valid request).
"""

from __future__ import annotations

import math

import numpy as np

from hcfplan.planning.build import build_medium, build_waveguide, coupling, pump_omega

#: Peak nonlinear phase below which the spectrum is taken not to broaden: the rms SPM
#: broadening factor sqrt(1 + 0.77 phi^2) is then below 1.004 (S. C. Pinault and
#: M. J. Potasek, J. Opt. Soc. Am. B 2, 1318 (1985) [from memory]); the threshold itself is
#: common practice, no source. [rad]
LOW_NONLINEAR_PHASE = 0.1
#: Ratio of mJ to uJ, for the unit-slip hint.
_MJ_PER_UJ = 1000.0


def nonlinear_phase_estimate(config) -> float:
    """Peak nonlinear phase gamma P0 L_eff of the configured fiber at the pump. [rad]

    Parameters
    ----------
    config : PlanConfig
        The validated config.

    Returns
    -------
    float
        gamma(omega0) x coupled peak power x effective length (power loss of exp(-2 alpha z));
        dispersion, steepening and plasma neglected. [rad]

    References
    ----------
    G. P. Agrawal, Nonlinear Fiber Optics, 6th ed., Academic Press (2019), ch. 4 (SPM, peak
    phase gamma P0 L_eff) [from memory].
    """
    from hcfplan.fibers import derived
    from hcfplan.planning.validity import quiet_validity
    from hcfplan.pulse import fields as pulse

    laser = config.laser
    omega0 = pump_omega(laser)
    with quiet_validity():
        medium = build_medium(config.gas) if config.gas is not None else None
        waveguide = build_waveguide(config.fiber, medium, omega0)
        w0 = np.array([omega0])
        gamma = float(waveguide.nonlinear_coefficient(w0)[0])
        alpha = float(waveguide.attenuation(w0)[0])
    efficiency = coupling(config)[0]
    peak = pulse.peak_power_from_energy(laser.energy * efficiency, laser.duration_fwhm,
                                        laser.shape)
    return float(derived.nonlinear_phase(gamma, peak,
                                         derived.effective_length(config.fiber.length, alpha)))


def low_nonlinearity_notes(config, phi: float) -> list[str]:
    """A warning when the peak nonlinear phase ``phi`` [rad] is below
    :data:`LOW_NONLINEAR_PHASE`, naming the keys that set it; empty otherwise.

    A NaN phase gives no note here (the config checks refuse what makes it NaN).
    """
    if not phi < LOW_NONLINEAR_PHASE:
        return []
    energy_uj = config.resolved["laser"]["energy_uj"]
    keys = [f"laser.energy_uj = {energy_uj:g}", f"fiber.length_m = {config.fiber.length:g}"]
    if config.gas is not None:
        keys.insert(1, f"gas.pressure_bar = {config.gas.pressure / 1e5:g}")
    else:
        keys.insert(1, f"fiber.gamma_per_w_per_m = {config.fiber.gamma:g}")
    note = (f"peak nonlinear phase gamma P0 L_eff = {phi:.3g} rad: below "
            f"{LOW_NONLINEAR_PHASE:g} rad nothing will broaden (SPM-only estimate); the keys "
            f"that set it: {', '.join(keys)}")
    if LOW_NONLINEAR_PHASE <= phi * _MJ_PER_UJ and math.isfinite(phi):
        note += f"; did you mean mJ (laser.energy_uj = {energy_uj * _MJ_PER_UJ:g})?"
    return [note]
