"""Circular-polarisation ionisation rate (hcfplan.ionization.rates.adk_rate_circular)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from hcfplan.constants import au_energy, au_field, au_time, c, e, epsilon_0
from hcfplan.ionization import rates as ion

AR_IP = 15.7596112 * e  # NIST ASD first ionisation energy of Ar


def _static_rate_au(field, ip_au, l, m=0, charge=1):
    """Static ADK rate, Eq. (1) of Ammosov, Delone & Krainov, Sov. Phys. JETP 64, 1191 (1986)
    [from memory], written out again here independently of the package."""
    kappa = math.sqrt(2 * ip_au)
    n = charge / kappa
    ls = n - 1
    c2 = 2 ** (2 * n) / (n * math.gamma(n + ls + 1) * math.gamma(n - ls))
    f_lm = (2 * l + 1) * math.factorial(l + abs(m)) / (
        2 ** abs(m) * math.factorial(abs(m)) * math.factorial(l - abs(m)))
    f0 = kappa**3
    return c2 * f_lm * ip_au * (2 * f0 / field) ** (2 * n - abs(m) - 1) * math.exp(
        -2 * f0 / (3 * field))


@pytest.mark.parametrize("intensity", [1e17, 1e18, 5e18])
def test_hydrogen_circular_is_static_rate(intensity):
    """Published value (Landau & Lifshitz, Quantum Mechanics, Sec. 77 [from memory]): the
    hydrogen tunnelling rate in a static field is (4/F) exp(-2/(3F)) in atomic units; a circular
    wave turns at constant |F| = sqrt(I/(c eps0)), so its rate is that static rate."""
    field = math.sqrt(intensity / (c * epsilon_0)) / au_field
    expected = 4 / field * math.exp(-2 / (3 * field)) / au_time
    got = ion.adk_rate_circular(intensity, 800e-9, 0.5 * au_energy, 0)
    assert got == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("intensity", [5e17, 1e18, 2e18])
def test_linear_to_circular_ratio_tunnelling_limit(intensity):
    """Published formula (ADK 1986 / PPT 1966 as summarised in the project's reference notes,
    part II.7 [from memory]): at equal intensity F_circ = F_lin/sqrt(2) and the cycle-averaging
    factor sqrt(3F/(pi F0)) is absent for circular polarisation, so
    w_lin/w_circ = sqrt(3F_L/(pi F0)) w_st(F_L)/w_st(F_L/sqrt 2)."""
    ip_au = AR_IP / au_energy
    f_lin = math.sqrt(2 * intensity / (c * epsilon_0)) / au_field
    f0 = (2 * ip_au) ** 1.5
    expected = math.sqrt(3 * f_lin / (math.pi * f0)) * _static_rate_au(f_lin, ip_au, 1) / (
        _static_rate_au(f_lin / math.sqrt(2), ip_au, 1))
    ratio = ion.adk_rate(intensity, 800e-9, AR_IP, 1) / ion.adk_rate_circular(
        intensity, 800e-9, AR_IP, 1)
    assert ratio == pytest.approx(expected, rel=1e-10)
    assert ratio > 10  # tunnelling regime: circular ionises far less at equal intensity


def test_circular_zero_intensity_and_array():
    """Invariant: zero intensity gives zero rate; arrays keep their shape."""
    values = ion.adk_rate_circular(np.array([0.0, 1e18]), 800e-9, AR_IP, 1)
    assert values.shape == (2,) and values[0] == 0 and values[1] > 0


def test_circular_models_registry():
    """Contract: both linear models map to the circular tunnelling rate, which is tabulated."""
    from hcfplan.ionization.tables import tabulate_rate

    assert set(ion.CIRCULAR_MODELS) == {"ppt", "adk"}
    assert all(ion.rate_function(v) is ion.adk_rate_circular
               for v in ion.CIRCULAR_MODELS.values())
    table = tabulate_rate("adk_circular", 800e-9, AR_IP, 1, 0, 1, 1e15, 1e20, points=41,
                          rtol=1e-3)
    assert table(1e18) == pytest.approx(float(ion.adk_rate_circular(1e18, 800e-9, AR_IP, 1)),
                                        rel=2e-3)
