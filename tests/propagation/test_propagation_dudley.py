"""Supercontinuum benchmark of J. M. Dudley, G. Genty and S. Coen, "Supercontinuum generation in
photonic crystal fiber," Rev. Mod. Phys. 78, 1135 (2006), doi:10.1103/RevModPhys.78.1135.

All parameters are FROM MEMORY (not checked against the paper): 835 nm, 50 fs FWHM sech^2,
P0 = 10 kW, L = 15 cm, gamma = 0.11 /(W m), beta2..beta10 below (ps^n/km), f_R = 0.18,
tau1 = 12.2 fs, tau2 = 32 fs, self-steepening with tau_shock = 1/omega0, no loss.

Kinds: invariant (photon number; Blow & Wood 1989) and published value (spectral extent).
What we compare (from memory): their Fig. 3 shows the output spectrum at 15 cm spanning about
500-1300 nm at the -40 dB level, with dispersive waves near 500-550 nm and Raman solitons beyond
1100 nm. We require the outermost -40 dB points to lie in 430-600 nm and 1150-1450 nm; the
wide bands reflect that the figure is remembered, not read.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

BETAS_PS_KM = (-11.830, 8.1038e-2, -9.5205e-5, 2.0737e-7, -5.3943e-10, 1.3486e-12,
               -2.5495e-15, 3.0524e-18, -1.7140e-21)  # beta2..beta10 [ps^n/km], from memory


@pytest.fixture(scope="module")
def run():
    omega0 = 2 * np.pi * c / 835e-9
    betas = [b * 1e-12 ** (n + 2) / 1e3 for n, b in enumerate(BETAS_PS_KM)]  # -> s^n/m
    # 2^13 points over 12.5 ps: dt = 1.53 fs reaches 430 nm and stays above zero frequency
    grid = Grid(points=2**13, dt=12.5e-12 / 2**13, omega0=omega0)
    fiber = TaylorFiber(omega0=omega0, betas=betas, gamma=0.11, length=0.15,
                        self_steepening=True, raman_fraction=0.18)
    t0 = 50e-15 / 1.7627
    field0 = pulse_field(grid, "sech2", 50e-15, 2 * 10e3 * t0)  # E = 2 P0 T0
    return grid, propagate(field0, grid, fiber, options=SolverOptions(rtol=1e-6, z_samples=16))


def test_benchmark_completes_without_window_warnings(run):
    _, result = run
    assert result.success, result.message
    assert result.warnings == ()


def test_benchmark_conserves_photon_number(run):
    # tolerance 1e-4: ~5e3 relative-L2 local errors <= rtol = 1e-6 add up to sqrt(n) rtol ~ 7e-5
    # as a random walk
    grid, result = run
    photons = (result.spectrum_z.astype(float) / grid.omega).sum(axis=1)
    assert abs(photons[-1] / photons[0] - 1) < 1e-4
    assert result.energy_z[-1] / result.energy_z[0] < 0.98  # Raman loses energy: not trivial


def test_benchmark_spectral_extent(run):
    grid, result = run
    density = np.abs(result.field_out_spectrum) ** 2
    above = grid.wavelength[density >= 1e-4 * density.max()]  # -40 dB
    assert 430e-9 < above.min() < 600e-9
    assert 1150e-9 < above.max() < 1450e-9
