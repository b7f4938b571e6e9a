"""The ionising components of a fill as the solver takes them (hcfplan.propagation.ionizing).

Kinds: contract tests (what :func:`ionizing_gas` returns for each kind of input) and error
tests. No number from a source is checked here: the densities are those of the gas medium
(common practice, no source) and the rates are tested in tests/ionization/test_ionization.py.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.materials.gases import GasFill, gas_medium
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.ionizing import IonizingGas, ionizing_gas, rate_table

OMEGA_800 = 2 * np.pi * c / 800e-9


@pytest.fixture(scope="module")
def mixture():
    return gas_medium(GasFill((("He", 0.5), ("Ar", 0.5)), 2e5, 293.15))


@pytest.fixture(scope="module")
def grid():
    return Grid(points=2**8, dt=1.5e-15, omega0=OMEGA_800)


def test_one_species_per_ionising_component(mixture, grid):
    fiber = CapillaryFiber(core_radius=50e-6, length=0.02, gas=mixture)
    plasma = ionizing_gas(grid, fiber, mixture, "ppt")
    assert isinstance(plasma, IonizingGas) and plasma.model == "ppt" and plasma.notes == ()
    ions = [component.table.ionization for component in mixture.components]
    assert len(plasma.species) == len(ions) == 2
    for species, component, ion in zip(plasma.species, mixture.components, ions, strict=True):
        assert species.number_density == component.number_density * ion.mole_fraction
        assert species.potential == ion.potential
        # the table of the pump wavelength, from the (memory) cache of rate_table
        wavelength = 2 * np.pi * c / grid.omega0
        assert species.rate is rate_table("ppt", wavelength, ion.potential, ion.l, ion.m,
                                          ion.charge)


@pytest.mark.parametrize("which", ["no gas", "no model"])
def test_switched_off_gives_an_empty_group(mixture, grid, which):
    fiber = CapillaryFiber(core_radius=50e-6, length=0.02, gas=mixture)
    gas, model = (None, "ppt") if which == "no gas" else (mixture, None)
    assert ionizing_gas(grid, fiber, gas, model) == IonizingGas()


def test_waveguide_without_area_leaves_ionisation_out_with_a_note(mixture, grid):
    fiber = TaylorFiber(omega0=OMEGA_800, betas=(-5e-30,), gamma=1e-6, length=0.02)
    plasma = ionizing_gas(grid, fiber, mixture, "adk")
    assert plasma.species == ()
    assert plasma.notes == ("ionisation ignored: the waveguide has no peak_intensity_area",)


def test_unknown_model_lists_the_models(mixture, grid):
    fiber = CapillaryFiber(core_radius=50e-6, length=0.02, gas=mixture)
    with pytest.raises(ConfigError, match=r"'keldysh'.*\['adk', 'adk_circular', 'ppt'\]"):
        ionizing_gas(grid, fiber, mixture, "keldysh")
