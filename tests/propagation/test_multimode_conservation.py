"""Conservation laws of the multimode GNLSE (hcfplan.propagation.multimode).

Kind: published physics (conservation laws of the equation). Without loss (test double with
alpha = 0) and without ionisation:

* Kerr with self-steepening and no delayed response conserves the energy of the whole beam:
  the Kerr polarisation projected on the modes gives sum_p A_p^* N_p = i gamma int |E|^4 dA
  (real integrand), with the shock term d/dt(|E|^2 E) whose overlap with E^* integrates to
  zero over t (Poletti & Horak, J. Opt. Soc. Am. B 25, 1645 (2008), multimode form; the
  single-mode statement: Blow & Wood, IEEE J. Quantum Electron. 25, 2665 (1989)).
* With a delayed (Raman) response and the shock term the photon number
  sum_m int |A~_m|^2 / omega d nu is conserved while the energy is not (Blow & Wood, 1989, for
  one mode; the multimode form of Poletti & Horak, 2008).

The energy moves between the modes in both cases (the checks are not void).
"""

from __future__ import annotations

import numpy as np
from multimode_cases import LosslessCapillary, gas, grid, modes, quiet

from hcfplan.propagation.multimode import propagate_modes
from hcfplan.propagation.options import SolverOptions
from hcfplan.pulse.fields import pulse_field


def _run(species: str, pressure: float, energy: float, duration: float, length: float):
    medium = gas(species, pressure)
    fiber = LosslessCapillary(core_radius=50e-6, length=length, gas=medium)
    g = grid(points=2**11, dt=2.5e-15)
    field = pulse_field(g, "gaussian", duration, energy)
    fields0 = np.array([np.sqrt(0.8) * field, np.sqrt(0.2) * field, 0 * field])
    result = quiet(propagate_modes, fields0, g, modes(fiber, 3), gas=medium,
                   options=SolverOptions(rtol=1e-8, z_samples=6, ionization_model=None))
    assert result.success and not result.warnings, result.warnings
    return result


def _photons(result) -> np.ndarray:
    """sum over the spectrum of the whole-beam density / omega (up to the constant h-bar)."""
    return np.sum(result.spectrum_z.astype(float) / result.grid.omega[None, :], axis=1)


def test_energy_is_conserved_without_loss_and_ionisation():
    result = _run("Ar", 1e5, 400e-6, 80e-15, 0.02)  # peak ~ 0.45 P_cr of argon
    np.testing.assert_allclose(result.energy_z, result.energy_z[0], rtol=1e-7)
    moved = np.max(np.abs(result.mode_energy_z - result.mode_energy_z[0]), axis=0)
    assert moved[2] > 1e-4 * result.energy_z[0]  # EH13 was empty at the input
    assert result.bandwidth_z[-1] > 1.5 * result.bandwidth_z[0]  # the spectrum broadened


def test_photon_number_is_conserved_with_raman():
    result = _run("N2", 3e5, 300e-6, 60e-15, 0.03)
    photons = _photons(result)
    np.testing.assert_allclose(photons, photons[0], rtol=1e-6)
    energy_change = abs(result.energy_z[-1] / result.energy_z[0] - 1)
    photon_change = abs(photons[-1] / photons[0] - 1)
    assert energy_change > 1e-4  # the Raman red shift takes energy (the check is not void)
    assert photon_change < 0.01 * energy_change
