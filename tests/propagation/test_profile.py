"""The viscous-flow pressure profile of a gradient fill and its segments of uniform fill.

Profile p(z) = sqrt(p0^2 + (pL^2 - p0^2) z/L): A. Suda, M. Hatayama, K. Nagasaka and
K. Midorikawa, Appl. Phys. Lett. 86, 111116 (2005) [from memory]; derivation from the
Hagen-Poiseuille law in the module docstring of hcfplan.propagation.profile.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.integrate import quad

from hcfplan.errors import ConfigError
from hcfplan.propagation.profile import (
    mean_pressure,
    pressure_segments,
    viscous_pressure_profile,
)


@pytest.mark.parametrize("p0, p1", [(0.0, 3e5), (2e5, 0.0), (1e5, 4e5), (2e5, 2e5)])
def test_profile_meets_the_ends_and_its_square_is_linear(p0, p1):
    """Analytic: p(0) = p0, p(L) = pL and p^2 linear in z (constant molar flow in viscous flow)."""
    z = np.linspace(0.0, 1.5, 31)
    p = viscous_pressure_profile(z, 1.5, p0, p1)
    assert p[0] == pytest.approx(p0, abs=1e-9) and p[-1] == pytest.approx(p1, abs=1e-9)
    np.testing.assert_allclose(np.diff(p**2), (p1**2 - p0**2) / 30, rtol=1e-12, atol=1e-3)


@pytest.mark.parametrize("p0, p1", [(0.0, 3e5), (2e5, 0.0), (1e5, 4e5), (5e4, 5.1e4)])
def test_mean_pressure_is_the_integral_of_the_profile(p0, p1):
    """Analytic: the closed form equals the quadrature of the profile over the length."""
    integral, _ = quad(lambda z: float(viscous_pressure_profile(z, 2.0, p0, p1)), 0.0, 2.0,
                       epsabs=1e-6, epsrel=1e-12)
    assert mean_pressure(p0, p1) == pytest.approx(integral / 2.0, rel=1e-10)


def test_evacuated_entrance_gives_two_thirds_of_the_exit_pressure():
    """Analytic: p0 = 0 gives the mean 2/3 pL (integral of sqrt(z/L) over [0, L] is 2L/3)."""
    assert mean_pressure(0.0, 3e5) == pytest.approx(2e5, rel=1e-14)
    assert mean_pressure(3e5, 0.0) == pytest.approx(2e5, rel=1e-14)


@pytest.mark.parametrize("p0, p1, step", [(0.0, 3e5, 0.05), (4e5, 1e5, 0.1), (1e5, 1.2e5, 0.05)])
def test_segments_keep_the_pressure_integral_and_the_step(p0, p1, step):
    """Invariant: each segment's fill is the profile's mean over it, so sum p_k dz_k is the
    exact integral; boundaries at equal pressure steps of at most ``step`` x the top pressure."""
    length = 0.8
    seg = pressure_segments(length, p0, p1, step)
    assert seg.edges[0] == 0.0 and seg.edges[-1] == length and np.all(np.diff(seg.edges) > 0)
    total = float(np.sum(seg.pressures * np.diff(seg.edges)))
    assert total == pytest.approx(mean_pressure(p0, p1) * length, rel=1e-12)
    ends = viscous_pressure_profile(seg.edges, length, p0, p1)
    assert np.max(np.abs(np.diff(ends))) <= step * max(p0, p1) * (1 + 1e-9)
    assert seg.pressures.size == int(np.ceil(abs(p1 - p0) / (step * max(p0, p1)) - 1e-9))


def test_equal_ends_are_one_segment():
    seg = pressure_segments(0.5, 2e5, 2e5)
    assert seg.pressures.tolist() == [2e5] and seg.edges.tolist() == [0.0, 0.5]


@pytest.mark.parametrize("args, match", [
    ((0.5, 0.0, 0.0), r"entrance_pressure = exit_pressure = 0 Pa"),
    ((0.5, -1.0, 1e5), r"entrance_pressure = -1.0 Pa"),
    ((0.0, 1e5, 2e5), r"length = 0.0 m"),
    ((0.5, 1e5, 2e5, 0.0), r"step = 0.0"),
])
def test_segments_refuse_bad_input(args, match):
    with pytest.raises(ConfigError, match=match):
        pressure_segments(*args)
