"""The multimode solver with one mode against the single-mode solver (hcfplan.propagation).

Kind: consistency. With N = 1 the multimode equation of Poletti & Horak (J. Opt. Soc. Am. B 25,
1645 (2008)) reduces to the single-mode GNLSE: the radial-grid Kerr term to gamma |A|^2 A with
gamma = n2 omega / (c A_eff) (int F^4 dA = 1 / A_eff), the delayed (Raman) term likewise. The
plasma of the single-mode solver uses the on-axis intensity for the whole mode; the multimode
solver's ``plasma_profile="on_axis"`` is that approximation and must agree, the default
``"radial"`` (local intensity) must ionise less of the cross-section (derived: the rates grow
steeply with the intensity, which falls off axis). Agreement is asked to the solver tolerance
(rtol = 1e-8 here; the two differ only in rounding, the sums over the radial nodes).
"""

from __future__ import annotations

import numpy as np
import pytest
from multimode_cases import gas, grid, quiet

from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.propagation.multimode import MultimodeResult, propagate_modes
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.result import PropagationResult
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

TOLERANCE = 1e-6  # relative, against the largest value (100 x rtol)
FIELDS = ("energy_z", "peak_power_z", "peak_intensity_z", "ionization_fraction_z",
          "electron_line_density_z", "bandwidth_z")


def _pair(species: str, energy: float, model, profile="on_axis", length=0.2):
    medium = gas(species)
    fiber = CapillaryFiber(core_radius=75e-6, length=length, gas=medium)
    g = grid()
    field = pulse_field(g, "gaussian", 30e-15, energy)
    options = SolverOptions(rtol=1e-8, z_samples=8, ionization_model=model)
    single = quiet(propagate, field, g, fiber, gas=medium, options=options)
    multi = quiet(propagate_modes, field[None, :], g, [fiber], gas=medium, options=options,
                  plasma_profile=profile)
    return single, multi


def _relative(a, b) -> float:
    scale = max(float(np.max(np.abs(a))), 1e-300)
    return float(np.max(np.abs(np.asarray(a) - np.asarray(b)))) / scale


@pytest.mark.parametrize(("species", "energy", "model"), [
    ("Ar", 60e-6, None),  # Kerr and self-steepening
    ("N2", 60e-6, None),  # Kerr and rotational Raman
    ("Ar", 100e-6, "ppt"),  # Kerr and photoionisation (peak ionisation ~1e-4)
], ids=["kerr", "raman_n2", "ionising"])
def test_one_mode_reproduces_the_single_mode_solver(species, energy, model):
    single, multi = _pair(species, energy, model)
    assert isinstance(multi, MultimodeResult) and isinstance(multi, PropagationResult)
    assert single.success and multi.success
    assert _relative(single.field_out_spectrum, multi.field_out_spectrum) < TOLERANCE
    assert _relative(single.field_out_t, multi.field_out_t) < TOLERANCE
    assert _relative(single.spectrum_z, multi.spectrum_z) < TOLERANCE
    for name in FIELDS:
        assert _relative(getattr(single, name), getattr(multi, name)) < TOLERANCE, name
    np.testing.assert_allclose(multi.mode_energy_z[:, 0], multi.energy_z, rtol=1e-12)
    assert multi.mode_spectra_out.shape == (1, multi.grid.points)
    np.testing.assert_array_equal(multi.mode_spectra_out[0], multi.field_out_spectrum)
    np.testing.assert_array_equal(multi.mode_fields_out_t[0], multi.field_out_t)
    if model is not None:  # the case does ionise (the check is not void)
        assert single.ionization_fraction_z[-1] > 1e-5
    if species == "N2":  # the delayed response is on (a note would say if it were dropped)
        assert not any("Raman" in w for w in multi.warnings)


def test_radial_plasma_ionises_less_of_the_cross_section():
    # derived: for one mode the radial model integrates rho(I(r)) over the core, the
    # single-mode approximation takes rho(I(0)) times A_I; rho grows steeply with I
    single, radial = _pair("Ar", 100e-6, "ppt", profile="radial")
    assert radial.success
    # the same input: the same on-axis ionisation (both from the on-axis intensity) ...
    assert radial.ionization_fraction_z[0] == pytest.approx(single.ionization_fraction_z[0],
                                                            rel=1e-9)
    assert single.ionization_fraction_z[0] > 1e-5
    # ... but fewer electrons over the cross-section, and less plasma loss
    assert radial.electron_line_density_z[0] < 0.9 * single.electron_line_density_z[0]
    assert radial.energy_z[-1] > single.energy_z[-1]
