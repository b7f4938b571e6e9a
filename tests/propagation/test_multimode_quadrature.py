"""The radial quadrature of the multimode terms (hcfplan.propagation.multimode_terms).

Kind: numerical, against independent integrals. The overlap integrals
S_plmn = int F_p F_l F_m F_n dA of the EH1m profiles F_m = J0(u_1m r / a) / sqrt(pi a^2
J1(u_1m)^2) (Marcatili & Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964); overlaps as in Poletti
& Horak, J. Opt. Soc. Am. B 25, 1645 (2008)) from the solver's radial nodes are compared with
scipy.integrate.quad (adaptive, independent of our nodes), and the single-mode limit
int F^4 dA = 1 / A_eff with A_eff = 1.4972 a^2 of EH11 (the value
:func:`hcfplan.fibers.modes.effective_area_j0` documents; "about 1.5 a^2", commonly quoted, no
source) and with that function itself.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import integrate, special

from hcfplan.fibers.modes import effective_area_j0
from hcfplan.propagation.multimode_terms import (
    mode_profiles,
    overlap_integral,
    radial_nodes,
)

A = 60e-6


def _quad_overlap(indices, eigenvalues) -> float:
    u = np.asarray(eigenvalues)

    def integrand(x):  # x = r / a; dA = 2 pi a^2 x dx
        profile = special.j0(u[list(indices)] * x) / np.sqrt(np.pi * A**2
                                                             * special.j1(u[list(indices)])**2)
        return float(np.prod(profile)) * 2 * np.pi * A**2 * x

    value, _ = integrate.quad(integrand, 0.0, 1.0, epsabs=0, epsrel=1e-13, limit=400)
    return value


@pytest.mark.parametrize(("n_modes", "indices"), [
    (1, (0, 0, 0, 0)), (2, (0, 0, 0, 1)), (2, (0, 1, 0, 1)), (4, (0, 1, 2, 3)),
    (4, (3, 3, 3, 3)), (6, (5, 5, 5, 5)), (6, (0, 2, 4, 5)), (6, (1, 1, 5, 5)),
])
def test_overlaps_match_adaptive_quadrature(n_modes, indices):
    u = special.jn_zeros(0, n_modes)
    largest = _quad_overlap((0, 0, 0, 0), u)  # S_1111, the largest overlap
    assert abs(overlap_integral(indices, u, A) - _quad_overlap(indices, u)) < 1e-7 * largest


def test_single_mode_limit_is_the_inverse_effective_area():
    u11 = special.jn_zeros(0, 1)
    s = overlap_integral((0, 0, 0, 0), u11, A)
    assert 1.0 / s == pytest.approx(1.4972 * A**2, rel=1e-4)
    assert 1.0 / s == pytest.approx(effective_area_j0(A), rel=1e-12)


@pytest.mark.parametrize("n_modes", [1, 2, 4, 6])
def test_profiles_are_orthonormal_on_the_nodes(n_modes):
    # int F_m F_n dA = delta_mn (J0 zeros: orthogonal Bessel functions; standard integral)
    u = special.jn_zeros(0, n_modes)
    x, w = radial_nodes(u)
    f = mode_profiles(x, u, A)
    gram = A**2 * (f * w[:, None]).T @ f
    np.testing.assert_allclose(gram, np.eye(n_modes), atol=1e-12)
