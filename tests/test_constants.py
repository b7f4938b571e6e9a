"""The physical constants of hcfplan.constants against scipy.constants (reference library).

Source: scipy.constants (CODATA recommended values; CODATA 2022 in scipy >= 1.15), the
general-purpose reference the module's values were written from. The defining constants of the
SI (BIPM, The International System of Units, 9th ed., 2019) must agree exactly; the measured
ones to 5e-9, a few times the shift between the 2018 and 2022 adjustments, so that a larger
change in a later CODATA adjustment shows up here as a failure to look at rather than a drift.
"""

import math

import pytest
from scipy import constants as sc

from hcfplan import constants

EXACT = {
    "c": sc.c,
    "h": sc.h,
    "hbar": sc.hbar,
    "e": sc.e,
    "k_B": sc.k,
    "N_A": sc.N_A,
    "R_gas": sc.R,
    "eV": sc.electron_volt,
    "P_1ATM": sc.atm,
}

MEASURED = {
    "epsilon_0": sc.epsilon_0,
    "mu_0": sc.mu_0,
    "m_e": sc.m_e,
    "au_energy": sc.physical_constants["atomic unit of energy"][0],
    "au_time": sc.physical_constants["atomic unit of time"][0],
    "au_field": sc.physical_constants["atomic unit of electric field"][0],
}


@pytest.mark.parametrize("name", sorted(EXACT))
def test_defining_constants_agree_exactly(name):
    # scipy.constants (exact SI values, BIPM 2019)
    assert getattr(constants, name) == pytest.approx(EXACT[name], rel=1e-15)


@pytest.mark.parametrize("name", sorted(MEASURED))
def test_measured_constants_agree(name):
    # scipy.constants (CODATA 2022 from scipy 1.15 on, CODATA 2018 before: the two adjustments
    # differ by up to 1.4e-9 relative, m_e; their relative uncertainties are 1e-10 to 3e-10)
    assert getattr(constants, name) == pytest.approx(MEASURED[name], rel=5e-9)


def test_atomic_units_are_consistent():
    # Hartree energy E_h = m_e e^4 / ((4 pi eps0)^2 hbar^2), atomic time hbar / E_h and field
    # E_h / (e a_0) with a_0 = 4 pi eps0 hbar^2 / (m_e e^2) (CODATA 2022 definitions of the
    # atomic units, Mohr et al., Rev. Mod. Phys. 97, 025002 (2025) [from memory])
    k = 4 * math.pi * constants.epsilon_0
    hartree = constants.m_e * constants.e**4 / (k**2 * constants.hbar**2)
    bohr = k * constants.hbar**2 / (constants.m_e * constants.e**2)
    assert constants.au_energy == pytest.approx(hartree, rel=1e-9)
    assert constants.au_time == pytest.approx(constants.hbar / hartree, rel=1e-9)
    assert constants.au_field == pytest.approx(hartree / (constants.e * bohr), rel=1e-9)
    # mu_0 eps0 c^2 = 1 (Maxwell); exact before 2019, to the uncertainty of alpha since
    assert constants.mu_0 * constants.epsilon_0 * constants.c**2 == pytest.approx(1.0, rel=1e-9)
