"""Tests of hcfplan.limits.cell: cell rating, window plate, oxygen depletion."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.polynomial import Polynomial

from hcfplan.constants import N_A, P_1ATM
from hcfplan.errors import ConfigError
from hcfplan.limits import cell as lc
from hcfplan.materials.gas_density import number_density
from hcfplan.materials.gases import load_gas_table


# ----------------------------------------------------------------------------- window formula
def test_window_worked_example_by_hand():
    """Analytic (no published worked example at hand): fused silica (sigma_f = 49 MPa, the
    usual datasheet value, from memory), clear aperture 25 mm (r = 12.5 mm), dP = 4e5 Pa,
    SF = 4. By hand, clamped (K = 0.75): t = 0.0125 sqrt(0.75 * 4e5 * 4 / 49e6)
    = 0.0125 sqrt(0.0244898) = 0.0125 * 0.156492 = 1.95615 mm; unclamped (K = 1.125):
    0.0125 sqrt(0.0367347) = 0.0125 * 0.191663 = 2.39579 mm."""
    clamped = lc.window_min_thickness(4e5, 25e-3, 49e6, safety_factor=4, mounting="clamped")
    unclamped = lc.window_min_thickness(4e5, 25e-3, 49e6, safety_factor=4, mounting="unclamped")
    assert clamped == pytest.approx(1.95615e-3, rel=1e-5)
    assert unclamped == pytest.approx(2.39579e-3, rel=1e-5)


def _over_r(poly: Polynomial) -> Polynomial:
    """P'(r) / r for a polynomial in even powers of r (exact)."""
    return Polynomial(poly.deriv().coef[1:])


def _laplacian(poly: Polynomial) -> Polynomial:
    """Axisymmetric Laplacian w'' + w'/r."""
    return poly.deriv(2) + _over_r(poly)


@pytest.mark.parametrize("nu", [0.0, 0.17, 0.3])
def test_stress_coefficients_from_plate_theory(nu):
    """Analytic: the uniformly loaded circular plate of Timoshenko & Woinowsky-Krieger, Theory
    of Plates and Shells, 2nd ed. (1959), Secs. 15-16: clamped w = q (a^2 - r^2)^2 / (64 D),
    simply supported w = q (a^2 - r^2) ((5 + nu)/(1 + nu) a^2 - r^2) / (64 D). Checked here
    (exact polynomial algebra) to solve D nabla^4 w = q with their edge conditions; the
    moments M_r = -D (w'' + nu w'/r), M_t = -D (w'/r + nu w'') then give sigma_max = 6 M / t^2
    = K q a^2 / t^2 with K = 3/4 (clamped, at the edge) and 3(3 + nu)/8 (simply supported, at
    the centre), the K of Roark's Table 11.2 cases 10b/10a; nu = 0 gives the tabulated 1.125.
    The centre deflections equal window_center_deflection."""
    a, q, stiffness = 1.0, 1.0, 1.0  # D = 1, so the moments come out in units of q a^2
    ring = Polynomial([a**2, 0, -1])  # a^2 - r^2
    plates = {"clamped": ring**2 / (64 * stiffness),
              "unclamped": ring * Polynomial([(5 + nu) / (1 + nu) * a**2, 0, -1])
              / (64 * stiffness)}
    r = np.linspace(0.0, a, 1001)
    for w in plates.values():
        assert np.allclose(_laplacian(_laplacian(w))(r), q / stiffness, rtol=1e-12)
        assert abs(w(a)) < 1e-15
    assert abs(plates["clamped"].deriv()(a)) < 1e-15  # fixed edge: no slope
    k = {}
    for mounting, w in plates.items():
        m_r = -stiffness * (w.deriv(2) + nu * _over_r(w))
        m_t = -stiffness * (_over_r(w) + nu * w.deriv(2))
        k[mounting] = 6 * max(np.max(np.abs(m_r(r))), np.max(np.abs(m_t(r)))) / (q * a**2)
        if mounting == "unclamped":
            assert abs(m_r(a)) < 1e-15  # simply supported: no edge moment
    assert k["clamped"] == pytest.approx(lc.WINDOW_STRESS_COEFFICIENTS["clamped"], rel=1e-12)
    assert k["unclamped"] == pytest.approx(lc.simply_supported_stress_coefficient(nu), rel=1e-12)
    if nu == 0.0:
        assert k["unclamped"] == pytest.approx(lc.WINDOW_STRESS_COEFFICIENTS["unclamped"],
                                               rel=1e-12)
    modulus, t = 12 * (1 - nu**2), 1.0  # so that D = E t^3 / (12 (1 - nu^2)) = 1
    for mounting, w in plates.items():
        sag = lc.window_center_deflection(q, 2 * a, t, modulus, nu, mounting)
        assert sag == pytest.approx(w(0.0), rel=1e-12)


@pytest.mark.parametrize("mounting", ["clamped", "unclamped"])
def test_thickness_monotonic_and_inverse(mounting):
    """Invariant: t_min grows with pressure and aperture (as sqrt(dP) and D); the largest load
    of the resulting plate is the load it was sized for."""
    loads = np.array([1e4, 1e5, 5e5, 2e6])
    apertures = np.array([5e-3, 10e-3, 25e-3])
    t = lc.window_min_thickness(loads[:, None], apertures[None, :], 49e6, mounting=mounting)
    assert np.all(np.diff(t, axis=0) > 0) and np.all(np.diff(t, axis=1) > 0)
    ratio = np.sqrt(loads[1:] / loads[:-1])[:, None]
    np.testing.assert_allclose(t[1:] / t[:-1], np.broadcast_to(ratio, (3, 3)), rtol=1e-12)
    back = lc.window_max_pressure_difference(float(t[2, 1]), 10e-3, 49e6, mounting=mounting)
    assert back == pytest.approx(5e5, rel=1e-12)


def test_pressure_difference_and_rating():
    """Analytic: load = |p - p_out|; rating status words are neutral."""
    assert lc.window_pressure_difference(3e5) == pytest.approx(3e5 - P_1ATM)
    assert lc.window_pressure_difference(0.2e5) == pytest.approx(P_1ATM - 0.2e5)
    assert lc.window_pressure_difference(3e5, outside_pressure=0.0) == 3e5
    assert lc.pressure_rating_status(3e5, 4e5) == "within rating"
    assert lc.pressure_rating_status(5e5, 4e5) == "exceeds rating"
    assert lc.pressure_rating_status(5e5, None) == "not checked"


def test_window_bad_input():
    with pytest.raises(ConfigError, match=r"'glued'"):
        lc.window_min_thickness(1e5, 1e-2, 49e6, mounting="glued")
    with pytest.raises(ConfigError, match=r"safety factor = 0\.5"):
        lc.window_min_thickness(1e5, 1e-2, 49e6, safety_factor=0.5)


# ----------------------------------------------------------------------------- oxygen
def test_oxygen_closed_form():
    """Analytic: 3 m^3 of inert gas into a 30 m^3 room, instant mixing:
    0.2095 * 30 / 33 = 0.190455, below the 19.5 % level of 29 CFR 1910.134 (from memory)."""
    o2 = lc.oxygen_fraction_after_release(30.0, 3.0)
    assert o2 == pytest.approx(0.2095 * 30 / 33, rel=1e-14)
    assert o2 == pytest.approx(0.190455, abs=1e-6)
    assert o2 < lc.OXYGEN_ACTION_LEVEL


def test_oxygen_threshold_behaviour():
    """Analytic: at the largest release V (0.2095/0.195 - 1) the fraction is exactly 19.5 %;
    1 % less gas stays above, 1 % more falls below. Air released into air changes nothing."""
    v_max = lc.max_release_for_oxygen_level(30.0)
    assert v_max == pytest.approx(30.0 * (0.2095 / 0.195 - 1), rel=1e-14)
    assert lc.oxygen_fraction_after_release(30.0, v_max) == pytest.approx(0.195, rel=1e-13)
    assert lc.oxygen_fraction_after_release(30.0, 0.99 * v_max) > lc.OXYGEN_ACTION_LEVEL
    assert lc.oxygen_fraction_after_release(30.0, 1.01 * v_max) < lc.OXYGEN_ACTION_LEVEL
    same = lc.oxygen_fraction_after_release(30.0, 10.0, released_oxygen_fraction=0.2095)
    assert same == pytest.approx(0.2095, rel=1e-14)


@pytest.mark.parametrize("x", [0.01, 0.1, 0.5])
def test_oxygen_models_ordered(x):
    """Analytic: 1 - x <= exp(-x) <= 1/(1 + x): displacement <= continuous <= instant."""
    o2 = {m: lc.oxygen_fraction_after_release(10.0, 10.0 * x, model=m)
          for m in lc.OXYGEN_DEPLETION_MODELS}
    assert o2["displacement"] < o2["continuous_mixing"] < o2["instant_mixing"]
    assert o2["continuous_mixing"] == pytest.approx(0.2095 * math.exp(-x), rel=1e-14)


def test_released_volume_real_gas():
    """Analytic/invariant: 50 L of argon at 200 bar, 20 degC, expands to V N(200 bar)/N(1 atm)
    with CoolProp densities (Tegeler et al. 1999 EOS), about 6 % more than the ideal-gas
    200/1.01325 * 50 L = 9.87 m^3 (argon is denser than ideal at 200 bar)."""
    from CoolProp.CoolProp import PropsSI

    table = load_gas_table("Ar")
    inside = number_density(table, 200e5, 293.15)
    outside = number_density(table, P_1ATM, 293.15)
    volume = lc.released_gas_volume(0.05, inside, outside)
    direct = 0.05 * PropsSI("Dmolar", "T", 293.15, "P", 200e5, "Argon") / PropsSI(
        "Dmolar", "T", 293.15, "P", P_1ATM, "Argon")
    assert volume == pytest.approx(direct, rel=1e-12)
    assert inside == pytest.approx(PropsSI("Dmolar", "T", 293.15, "P", 200e5, "Argon") * N_A,
                                   rel=1e-12)
    assert 1.03 < volume / (0.05 * 200e5 / P_1ATM) < 1.10


# ----------------------------------------------------------------------------- docstrings
def test_public_functions_name_their_source():
    # house rule: every public function of hcfplan.limits.cell has a References section in its
    # own docstring (a published source, or "None: ..." where there is no published model)
    import inspect

    missing = [name for name, obj in vars(lc).items()
               if not name.startswith("_") and inspect.isfunction(obj)
               and obj.__module__ == lc.__name__
               and "\nReferences\n----------\n" not in (inspect.getdoc(obj) or "")]
    assert not missing, f"no References section in {missing}"
