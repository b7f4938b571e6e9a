"""Rotational Raman of N2 and air: the delayed Kerr strength against published measurements,
and its signature in a propagation run.

Kinds: published value (the long-pulse rotational n2 of N2 and the electronic share of the
long-pulse n2), invariant/physics (a delayed response red-shifts the spectrum).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from hcfplan.constants import k_B
from hcfplan.materials import gases
from hcfplan.propagation.raman import rotational_kerr_n2

ATM = 101325.0
ROOM = 293.15


def _rotational_n2(name: str) -> float:
    table = gases.load_gas_table(name)
    density = ATM / (k_B * ROOM)
    return sum(rotational_kerr_n2(s, density * s.mole_fraction, ROOM) for s in table.raman)


def test_n2_rotational_kerr_matches_measurement():
    # published value: n2,rot = 24e-24 m^2/W for N2 at 1 atm (S. Zahedpour, J. K. Wahlstrand,
    # H. M. Milchberg, Opt. Lett. 40, 5794 (2015)); two printed digits, and the polarisability
    # anisotropy in gases/N2.toml is from memory, so 10 % tolerance
    assert _rotational_n2("N2") == pytest.approx(24e-24, rel=0.10)


def test_n2_electronic_share_of_long_pulse_kerr():
    # published value: the instantaneous part is 0.23 of the long-pulse n2 of N2
    # (J. K. Wahlstrand, Y.-H. Cheng, H. M. Milchberg, Phys. Rev. A 85, 043820 (2012))
    electronic = gases.load_gas_table("N2").kerr.n2
    share = electronic / (electronic + _rotational_n2("N2"))
    assert share == pytest.approx(0.23, abs=0.02)


def test_air_long_pulse_kerr_in_published_range():
    # published values: effective n2 of air 3.0e-23 (Geints et al., Appl. Phys. Lett. 99,
    # 181114 (2011)) to 4.2e-23 m^2/W (Pennington, Henesian, Hellwarth, Phys. Rev. A 39, 3003
    # (1989)) for pulses long against the rotational response
    total = gases.load_gas_table("air").kerr.n2 + _rotational_n2("air")
    assert 2.7e-23 < total < 4.6e-23


def test_rotational_raman_red_shifts_a_long_pulse():
    # physics invariant: a delayed (Raman) response shifts energy to the red; the same run
    # without the gas's delayed response (gas=None: Kerr only) keeps the centroid near the pump
    from hcfplan.fibers import CapillaryFiber
    from hcfplan.materials.gases import GasFill, gas_medium
    from hcfplan.numerics.grid import choose_grid
    from hcfplan.propagation.options import SolverOptions
    from hcfplan.propagation.solve import propagate
    from hcfplan.pulse.fields import pulse_field

    medium = gas_medium(GasFill(components=(("N2", 1.0),), pressure=2e5, temperature=ROOM))
    fiber = CapillaryFiber(core_radius=100e-6, length=0.5, gas=medium)
    omega0 = 2 * math.pi * 299792458.0 / 800e-9
    grid = choose_grid(omega0, 150e-15, broadening_factor=6.0, points=4096)
    field = pulse_field(grid, "gaussian", 150e-15, 400e-6)

    def centroid(gas):
        result = propagate(field, grid, fiber, gas=gas,
                           options=SolverOptions(rtol=1e-6, z_samples=5, ionization_model=None))
        power = np.abs(result.field_out_spectrum) ** 2
        return float(np.sum(grid.omega * power) / np.sum(power)), result

    with_raman, run = centroid(medium)
    without, _ = centroid(None)
    assert run.success
    shift = (with_raman - omega0) / omega0
    assert shift < -1e-2  # red shift of more than 1 % of the pump frequency (measured 5 %)
    assert with_raman < without - 1e-2 * omega0  # Kerr only: +0.07 % (self-steepening)
