"""The whole-beam records of the multimode solver (hcfplan.propagation.multimode_record).

Kind: consistency, against quantities computed independently here from the definitions of the
contract (MultimodeResult): the whole-beam peak power max_t sum_m |A_m(t)|^2 of the
band-limited envelopes (reference: each mode upsampled 32 times by zero-padding its spectrum,
the exact interpolant of a band-limited envelope, Shannon, Proc. IRE 37, 10 (1949)); the
on-axis intensity |sum_m A_m(t) F_m(0)|^2 with F_m(0) = 1 / sqrt(pi a^2 J1(u_1m)^2)
(Marcatili & Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964), unit-power normalisation); the
energy as the sum of the mode energies.
"""

from __future__ import annotations

import numpy as np
import pytest
from multimode_cases import NoKerrGas, gas, grid, modes, quiet
from scipy import special

from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.fibers.modes import eh_eigenvalue
from hcfplan.propagation.multimode import propagate_modes
from hcfplan.propagation.options import SolverOptions
from hcfplan.pulse.bandlimited import upsample
from hcfplan.pulse.fields import pulse_field


@pytest.fixture(scope="module")
def launch():
    g = grid(points=2**9, dt=4e-15)
    a = 60e-6
    fiber = CapillaryFiber(core_radius=a, length=0.01, gas=NoKerrGas(gas("Ar")))
    # three modes, short pulses (2.5 samples per FWHM) at different delays and phases, so the
    # whole-beam peak lies between the samples and is not that of one mode
    base = pulse_field(g, "gaussian", 10e-15, 1e-6)

    def delayed(samples: float) -> np.ndarray:  # exact fractional delay (spectral phase)
        return g.to_time(g.to_spectrum(base) * np.exp(1j * g.domega * samples * g.dt))

    fields0 = np.array([0.8 * delayed(0.5), 0.5 * np.exp(0.7j) * delayed(0.9),
                        0.3j * delayed(-0.6)])
    result = quiet(propagate_modes, fields0, g, modes(fiber, 3),
                   options=SolverOptions(z_samples=2, ionization_model=None))
    return g, a, fields0, result


def test_whole_beam_peak_power_is_that_of_the_band_limited_envelopes(launch):
    g, a, fields0, result = launch
    reference = np.max(sum(np.abs(upsample(f, 32)) ** 2 for f in fields0))
    sampled = np.max(np.sum(np.abs(fields0) ** 2, axis=0))
    assert result.peak_power_z[0] == pytest.approx(reference, rel=2e-4)
    assert reference > 1.05 * sampled  # the peak lies between the samples (not void)


def test_peak_intensity_is_on_axis(launch):
    g, a, fields0, result = launch
    u = special.jn_zeros(0, 3)
    axis = (fields0 / np.sqrt(np.pi * a**2 * special.j1(u)[:, None] ** 2)).sum(axis=0)
    reference = np.max(np.abs(upsample(axis, 32)) ** 2)
    assert result.peak_intensity_z[0] == pytest.approx(reference, rel=2e-4)


def test_energy_is_the_sum_of_the_mode_energies(launch):
    g, a, fields0, result = launch
    energies = np.sum(np.abs(fields0) ** 2, axis=1) * g.dt
    np.testing.assert_allclose(result.mode_energy_z[0], energies, rtol=1e-12)
    np.testing.assert_allclose(result.energy_z, result.mode_energy_z.sum(axis=1), rtol=1e-12)
    density = np.sum(np.abs(result.mode_spectra_out) ** 2, axis=0)
    np.testing.assert_allclose(result.spectrum_z[-1], density, rtol=1e-6,
                               atol=1e-7 * density.max())  # float32 records
    # the record holds the solver's eigenvalues; they are the zeros of J0 of the reference
    # library scipy.special.jn_zeros to 1 ulp (its j_01 is 1 ulp below the correctly rounded
    # 2.404825557695773, checked with a 60-digit power series of J0)
    np.testing.assert_array_equal(result.mode_eigenvalues, [eh_eigenvalue(m) for m in (1, 2, 3)])
    np.testing.assert_allclose(result.mode_eigenvalues, special.jn_zeros(0, 3), rtol=4.5e-16,
                               atol=0)
    assert result.mode_spectrum_z is None  # only kept when asked for
