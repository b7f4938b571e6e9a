"""Resonant dispersive wave of a self-compressing soliton against phase matching from beta(omega).

Scenario (invented, of the kind of Joly et al. 2011 and Travers et al. 2019): a 10 fs, 800 nm
sech^2 pulse of soliton order 2.5 in a 30 um bore capillary with 5 bar argon, 4 cm long, loss
set to zero with the measured-loss key (``MeasuredFiber``), Kerr only. The soliton compresses,
sheds a dispersive wave in the deep UV and recoils to the red.

The check: the dispersive wave's spectral peak lies where the phase-matching condition
beta(omega) - beta(omega_s) - beta1(omega_s)(omega - omega_s) = gamma P / 2 puts it (N. Y.
Joly et al., Phys. Rev. Lett. 106, 203901 (2011); J. C. Travers et al., Nat. Photon. 13, 547
(2019); citations from memory), with beta(omega) computed here independently from the gas
index and the capillary phase constant sqrt((omega n / c)^2 - (u11 / a)^2). The soliton's
frequency omega_s lies between the pump and the centroid of the output soliton band (spectral
recoil) and its power P between 0 and the highest peak power reached; the peak must lie inside
the band of wavelengths these bracket, widened by 2 %. The UV wavelengths involved (about
220-250 nm) lie inside the Bideau-Mehu range of the argon table, so no range warning.
"""

from __future__ import annotations

import warnings

import numpy as np
from scipy import optimize, special

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning
from hcfplan.fibers import CapillaryFiber, MeasuredFiber
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.numerics.grid import choose_grid
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

PUMP = 800e-9
RADIUS = 15e-6
FWHM = 10e-15
ORDER = 2.5


def _phase_matched_wavelength(medium, omega_s: float, power: float, gamma: float) -> float:
    """Independent phase matching: own beta(omega), own derivative, own root search. [m]"""
    u11 = special.jn_zeros(0, 1)[0]

    def beta(omega):
        n = medium.refractive_index(np.atleast_1d(omega))
        return np.sqrt((omega * n / c) ** 2 - (u11 / RADIUS) ** 2)

    h = 1e-4 * omega_s
    beta_s = float(beta(omega_s)[0])
    beta1 = float((beta(omega_s + h) - beta(omega_s - h))[0] / (2 * h))

    def mismatch(omega):
        return float(beta(omega)[0]) - beta_s - beta1 * (omega - omega_s) - gamma * power / 2

    omega = optimize.brentq(mismatch, 1.5 * omega_s, 5.0 * omega_s)
    return 2 * np.pi * c / omega


def test_dispersive_wave_lies_where_phase_matching_puts_it():
    omega0 = 2 * np.pi * c / PUMP
    medium = gas_medium(GasFill((("Ar", 1.0),), 5e5, 293.15))
    fiber = MeasuredFiber(CapillaryFiber(core_radius=RADIUS, length=0.04, gas=medium), omega0,
                          flat_loss=0.0)
    w = np.array([omega0 * (1 - 1e-3), omega0, omega0 * (1 + 1e-3)])
    beta = fiber.propagation_constant(w)
    beta2 = (beta[2] - 2 * beta[1] + beta[0]) / (omega0 * 1e-3) ** 2
    gamma = float(fiber.nonlinear_coefficient(np.array([omega0]))[0])
    t0 = FWHM / (2 * np.log(1 + np.sqrt(2)))
    power = ORDER**2 * abs(beta2) / (gamma * t0**2)  # N^2 = gamma P T0^2 / |beta2|
    grid = choose_grid(omega0, FWHM, band=(0.3 * omega0, 5.5 * omega0), points=2**13)
    field = pulse_field(grid, "sech2", FWHM, 2 * power * t0)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)  # the grid reaches far beyond the light
        result = propagate(field, grid, fiber, options=SolverOptions(
            rtol=1e-5, z_samples=8, ionization_model=None))
    assert result.success
    spectrum = np.abs(result.field_out_spectrum) ** 2
    omega = grid.omega
    soliton = (omega > 0.6 * omega0) & (omega < 2.0 * omega0)
    centroid = float(np.sum(omega[soliton] * spectrum[soliton]) / np.sum(spectrum[soliton]))
    peak_max = float(np.max(result.peak_power_z))
    assert peak_max > 2.5 * power  # the soliton did compress
    predicted = [_phase_matched_wavelength(medium, omega_s, p, gamma)
                 for omega_s in (omega0, centroid) for p in (0.0, peak_max)]
    uv = omega > 2.2 * omega0
    k = int(np.argmax(np.where(uv, spectrum, 0.0)))
    peak = 2 * np.pi * c / omega[k]
    assert spectrum[k] > 1e-3 * spectrum.max()  # a real dispersive wave, not noise
    assert min(predicted) * 0.98 <= peak <= max(predicted) * 1.02, (peak, predicted)
    # the band lies inside the argon table's combined fits (140-2059 nm), not extrapolated
    lo, hi = medium.components[0].table.dispersion.valid_wavelength
    assert lo < min(predicted) and max(predicted) < hi

