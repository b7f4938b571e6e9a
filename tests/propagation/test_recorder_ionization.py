"""The recorder's ionisation numbers taken from the nonlinear terms' last evaluation.

Kind: consistency (no external source): the numbers a record takes from the terms when they
evaluated the recorded state last equal, to rounding, those of the plasma kernel's own pass
over the record's power, for both steppers; a state the terms did not evaluate last is computed.
The plasma model itself (Geissler et al., Phys. Rev. Lett. 83, 2930 (1999)) is tested in
test_propagation_conservation.py.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.errors import ValidityWarning
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.result import Recorder
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

OMEGA_800 = 2 * np.pi * c / 800e-9


@pytest.fixture(scope="module")
def argon():
    return gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))


def _run(argon, options):
    grid = Grid(points=2**11, dt=1.5e-15, omega0=OMEGA_800)
    fiber = CapillaryFiber(core_radius=50e-6, length=0.01, gas=argon)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)  # fits extrapolated at window edges
        return propagate(pulse_field(grid, "sech2", 30e-15, 50e-6), grid, fiber, gas=argon,
                         options=options)


@pytest.mark.parametrize("options", [SolverOptions(rtol=1e-6, z_samples=9),
                                     SolverOptions(stepper="rk4ip", step=2.5e-4, z_samples=9)],
                         ids=["erk43ip", "rk4ip"])
def test_taken_ionisation_equals_the_computed_one(argon, options, monkeypatch):
    taken = []
    original = Recorder._evaluated_ionization

    def counting(self, u):
        found = original(self, u)
        taken.append(found is not None)
        return found

    monkeypatch.setattr(Recorder, "_evaluated_ionization", counting)
    fast = _run(argon, options)
    monkeypatch.setattr(Recorder, "_evaluated_ionization", lambda self, u: None)
    computed = _run(argon, options)
    assert fast.success and computed.success
    assert computed.ionization_fraction_z.max() > 1e-6  # the check is not void
    # every record after z = 0 ends an accepted step: the terms evaluated it last
    assert taken[0] is False and all(taken[1:]) and len(taken) == options.z_samples
    for name in ("ionization_fraction_z", "electron_line_density_z"):
        np.testing.assert_allclose(getattr(fast, name), getattr(computed, name), rtol=1e-12,
                                   atol=0, err_msg=name)
    np.testing.assert_array_equal(fast.peak_power_z, computed.peak_power_z)


class _Terms:
    """Stand-in for the plasma terms: an input, stored numbers and a counted computation."""

    def __init__(self, points: int) -> None:
        self.input = np.zeros(points, complex)
        self.ionization_fraction, self.electron_line_density = 0.25, 7.0
        self.computed = 0

    def ionization_of(self, power):
        self.computed += 1
        return 0.5, 9.0


def test_a_state_not_evaluated_last_is_computed():
    grid = Grid(points=64, dt=2e-15, omega0=OMEGA_800)
    terms = _Terms(grid.points)
    recorder = Recorder(grid, 3, 1e-9, terms)
    u = np.exp(-((np.arange(64) - 32.0) / 6.0) ** 2) + 0j
    terms.input[...] = u  # as after the terms evaluated u
    recorder.record(0.0, u)
    assert terms.computed == 0
    changed = u.copy()
    changed[5] = np.nextafter(changed[5].real, 1.0)  # one bit off is another state
    terms.input[...] = changed
    recorder.record(1.0, u)
    assert terms.computed == 1
    assert list(recorder.arrays()["ionization_fraction_z"]) == [0.25, 0.5]
    assert list(recorder.arrays()["electron_line_density_z"]) == [7.0, 9.0]
