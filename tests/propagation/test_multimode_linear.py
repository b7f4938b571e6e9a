"""Linear multimode propagation in a capillary (hcfplan.propagation.multimode).

Kind: published physics. With the nonlinearity off (a fill of n2 = 0, no ionisation):

* each mode keeps its energy up to its own attenuation, P_m(z) = P_m(0) exp(-2 alpha_m z)
  with alpha_m the field attenuation of EH1m at the pump (Marcatili & Schmeltzer, Bell Syst.
  Tech. J. 43, 1783 (1964)); a narrow-band (1 ps) pulse, so alpha varies little over the
  spectrum;
* the on-axis intensity of an EH11 + EH12 launch beats with the period 2 pi / (beta11 - beta12)
  of Marcatili's propagation constants, beta_1m = k [1 - (u_1m / (k a))^2 / 2] to first order
  (same source; k = n_gas omega / c), measured from the recorded ``peak_intensity_z``.
"""

from __future__ import annotations

import numpy as np
import pytest
from multimode_cases import OMEGA_800, LosslessCapillary, NoKerrGas, gas, grid, modes, quiet
from scipy import optimize, special

from hcfplan.constants import c
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.propagation.multimode import propagate_modes
from hcfplan.propagation.options import SolverOptions
from hcfplan.pulse.fields import pulse_field


def _launch(g, fractions, energy=1e-6, duration=1e-12):
    field = pulse_field(g, "gaussian", duration, energy)
    return np.array([np.sqrt(f) * field for f in fractions], dtype=complex)


def test_mode_energies_fall_by_their_own_attenuation():
    medium = NoKerrGas(gas("Ar"))
    fiber = CapillaryFiber(core_radius=50e-6, length=0.5, gas=medium)
    guides = modes(fiber, 3)
    g = grid(points=2**9, dt=20e-15)
    fields0 = _launch(g, (0.6, 0.3, 0.1))
    result = quiet(propagate_modes, fields0, g, guides,
                   options=SolverOptions(rtol=1e-8, z_samples=6, ionization_model=None))
    assert result.success
    alpha = np.array([quiet(wg.attenuation, np.array([OMEGA_800]))[0] for wg in guides])
    expected = result.mode_energy_z[0][None, :] * np.exp(-2 * alpha[None, :] * result.z[:, None])
    np.testing.assert_allclose(result.mode_energy_z, expected, rtol=2e-4)
    # the losses differ strongly (alpha ~ u_1m^2): the check is not void
    assert result.mode_energy_z[-1, 2] / result.mode_energy_z[0, 2] < 0.5
    np.testing.assert_allclose(result.energy_z, result.mode_energy_z.sum(axis=1), rtol=1e-6)


def test_on_axis_intensity_beats_with_the_marcatili_period():
    medium = NoKerrGas(gas("Ar"))
    a, length = 100e-6, 0.3
    fiber = LosslessCapillary(core_radius=a, length=length, gas=medium)
    g = grid(points=2**9, dt=20e-15)
    result = quiet(propagate_modes, _launch(g, (0.7, 0.3)), g, modes(fiber, 2),
                   options=SolverOptions(rtol=1e-9, z_samples=241, ionization_model=None))
    assert result.success
    # Marcatili & Schmeltzer to first order in (u/ka)^2
    k = float(np.real(medium.refractive_index(np.array([OMEGA_800]))[0])) * OMEGA_800 / c
    u11, u12 = special.jn_zeros(0, 2)
    delta_beta = (u12**2 - u11**2) / (2 * k * a**2)
    z, signal = result.z, result.peak_intensity_z

    def model(z, mean, amplitude, wavenumber, phase):
        return mean + amplitude * np.cos(wavenumber * z + phase)

    # starting guess from the FFT of the record, not from the expected value
    spectrum = np.abs(np.fft.rfft(signal - signal.mean()))
    guess = 2 * np.pi * np.fft.rfftfreq(z.size, z[1] - z[0])[np.argmax(spectrum)]
    fit, _ = optimize.curve_fit(model, z, signal, p0=(signal.mean(), np.ptp(signal) / 2, guess,
                                                      0.0))
    assert length * delta_beta / (2 * np.pi) > 3  # several beats in the fiber
    assert abs(fit[2]) == pytest.approx(delta_beta, rel=2e-3)
    # the whole-beam energy stays (no loss, no nonlinearity) while the axis beats
    np.testing.assert_allclose(result.energy_z, result.energy_z[0], rtol=1e-7)
    assert np.ptp(signal) > 0.5 * signal.mean()
