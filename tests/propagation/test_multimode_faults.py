"""Inputs, gradient fills and faults of the multimode solver (hcfplan.propagation.multimode).

Kind: contract (what the solver returns or raises; behaviour shared with the single-mode
solver, :mod:`hcfplan.propagation.solve`). No number from a source is checked here.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from multimode_cases import gas, grid, modes, quiet

from hcfplan.errors import ConfigError
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.propagation.multimode import ModeSegment, propagate_modes
from hcfplan.propagation.options import SolverOptions
from hcfplan.pulse.fields import pulse_field


@pytest.fixture(scope="module")
def case():
    medium = gas("Ar")
    fiber = CapillaryFiber(core_radius=75e-6, length=0.1, gas=medium)
    g = grid(points=2**10)
    field = pulse_field(g, "gaussian", 30e-15, 80e-6)
    fields0 = np.array([np.sqrt(0.9) * field, np.sqrt(0.1) * field])
    return medium, fiber, g, fields0


def test_a_fill_split_into_equal_stretches_gives_the_same_result(case):
    medium, fiber, g, fields0 = case
    # Kerr only: the PPT rate has kinks at the channel closings (hcfplan.ionization.tables),
    # which make the step-size sequence matter at the 1e-5 level with plasma
    options = SolverOptions(rtol=1e-8, z_samples=5, ionization_model=None)
    guides = tuple(modes(fiber, 2))
    plain = quiet(propagate_modes, fields0, g, guides, gas=medium, options=options)
    split = [ModeSegment(0.0, 0.037, guides, medium), ModeSegment(0.037, 0.1, guides, medium)]
    stretched = quiet(propagate_modes, fields0, g, guides, gas=medium, options=options,
                      segments=split)
    assert plain.success and stretched.success
    scale = np.max(np.abs(plain.mode_spectra_out))
    assert np.max(np.abs(plain.mode_spectra_out - stretched.mode_spectra_out)) < 1e-6 * scale
    np.testing.assert_array_equal(plain.z, stretched.z)


def test_a_gradient_changes_the_result(case):
    medium, fiber, g, fields0 = case
    options = SolverOptions(rtol=1e-7, z_samples=3, ionization_model=None)
    dense = gas("Ar", 2e5)
    guides = tuple(modes(fiber, 2))
    dense_guides = tuple(dataclasses.replace(wg, gas=dense) for wg in guides)
    plain = quiet(propagate_modes, fields0, g, guides, options=options)
    graded = quiet(propagate_modes, fields0, g, guides, options=options, segments=[
        ModeSegment(0.0, 0.05, guides, medium), ModeSegment(0.05, 0.1, dense_guides, dense)])
    assert graded.success
    assert graded.bandwidth_z[-1] > 1.05 * plain.bandwidth_z[-1]  # more Kerr in the 2nd half


@pytest.mark.parametrize(("change", "pattern"), [
    ({"fields0": np.zeros((2, 1024))}, "fields0: must be finite and not all zero"),
    ({"fields0": np.ones((3, 1024))}, r"fields0 shape = \(3, 1024\): must be \(2, 1024\)"),
    ({"waveguides": []}, "waveguides: must be a non-empty sequence"),
    ({"plasma_profile": "flat"}, "plasma_profile = 'flat'"),
    ({"segments": [ModeSegment(0.0, 0.05, (), None)]}, "segments: must be ModeSegments"),
])
def test_bad_inputs_raise_config_errors(case, change, pattern):
    medium, fiber, g, fields0 = case
    kw = {"fields0": fields0, "waveguides": modes(fiber, 2)}
    kw.update(change)
    with pytest.raises(ConfigError, match=pattern):
        propagate_modes(kw.pop("fields0"), g, kw.pop("waveguides"), **kw)


def test_modes_of_different_capillaries_are_refused(case):
    medium, fiber, g, fields0 = case
    other = dataclasses.replace(fiber, core_radius=50e-6, mode=(1, 2))
    with pytest.raises(ConfigError, match=r"waveguides\[1\]: length and core_radius"):
        propagate_modes(fields0, g, [fiber, other])


def test_step_budget_ends_the_run_with_a_message(case):
    medium, fiber, g, fields0 = case
    result = quiet(propagate_modes, fields0, g, modes(fiber, 2), gas=medium,
                   options=SolverOptions(max_steps=3, z_samples=4))
    assert not result.success and result.status == "step_budget"
    assert "max_steps = 3" in result.message and "z = " in result.message
    assert result.z[-1] > 0 and result.mode_energy_z.shape == (result.z.size, 2)


def test_ionisation_stop_ends_the_run_with_a_message(case):
    medium, fiber, g, fields0 = case
    result = quiet(propagate_modes, fields0, g, modes(fiber, 2), gas=medium,
                   options=SolverOptions(stop_ionization_fraction=1e-6, z_samples=4))
    assert not result.success and result.status == "ionization_stop"
    assert "ionisation fraction" in result.message and "remedy" in result.message
    assert result.ionization_fraction_z[-1] > 1e-6


def test_overflow_with_a_fixed_step_ends_the_run_as_non_finite(case):
    medium, fiber, g, fields0 = case
    result = quiet(propagate_modes, fields0 * 1e9, g, modes(fiber, 2), gas=medium,
                   options=SolverOptions(stepper="rk4ip", step=0.05, z_samples=2,
                                         ionization_model=None))
    assert not result.success and result.status == "nonfinite"
    assert "non-finite" in result.message and "z = 0 m" in result.message
    assert np.all(np.isfinite(result.mode_spectra_out))  # the last good field is kept


def test_mode_spectra_along_z_are_kept_when_asked(case):
    medium, fiber, g, fields0 = case
    result = quiet(propagate_modes, fields0, g, modes(fiber, 2), gas=medium,
                   options=SolverOptions(z_samples=3, ionization_model=None),
                   mode_spectra_z=True)
    assert result.mode_spectrum_z.shape == (3, 2, g.points)
    assert result.mode_spectrum_z.dtype == np.float32
    np.testing.assert_allclose(result.mode_spectrum_z.sum(axis=1), result.spectrum_z,
                               rtol=1e-6, atol=1e-7 * result.spectrum_z.max())
    np.testing.assert_allclose(result.mode_spectrum_z.sum(axis=2) * g.dnu, result.mode_energy_z,
                               rtol=1e-5)
