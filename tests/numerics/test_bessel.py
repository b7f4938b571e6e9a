"""J_n(x) and the zeros of J_n (hcfplan.numerics.bessel) against a reference library and a table.

Kinds of check: reference library (scipy.special.jv / jn_zeros, scipy 1.x: Cephes/AMOS-based
implementations), handbook table (Abramowitz & Stegun, Table 9.5) and exact identities of the
Bessel functions (A&S ch. 9).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import special

from hcfplan.numerics.bessel import MAX_ARGUMENT, bessel_j, bessel_j_zeros


@pytest.mark.parametrize("n", [0, 1, 2, 3, 5, 8])
def test_against_scipy_jv_up_to_60(n):
    """Reference library: scipy.special.jv (SciPy, Virtanen et al., Nature Methods 17, 261
    (2020)). Absolute agreement 1.5e-15 on |x| <= 60 (the functions are O(1) there)."""
    x = np.linspace(-60.0, 60.0, 4001)
    assert np.max(np.abs(bessel_j(n, x) - special.jv(n, x))) < 1.5e-15


@pytest.mark.parametrize("n", [0, 1])
def test_against_scipy_on_the_multimode_range(n):
    """Reference library: scipy.special.jv; arguments u_1m r / a of the mode profiles for
    m <= 18 (up to 55.7, beyond the EH18 of the multimode terms, u_18 = 24.35), relative
    agreement where |J_n| > 1e-3."""
    x = np.outer(np.linspace(0.0, 1.0, 97), special.jn_zeros(0, 18)).ravel()
    ours, ref = bessel_j(n, x), special.jv(n, x)
    assert np.max(np.abs(ours - ref)) < 1.5e-15
    big = np.abs(ref) > 1e-3
    assert np.max(np.abs(ours[big] / ref[big] - 1.0)) < 2e-12


@pytest.mark.parametrize("n", [0, 4])
def test_large_arguments_near_the_cap(n):
    """Reference library: scipy.special.jv near |x| = MAX_ARGUMENT; rounding of x sin(theta)
    grows like |x| eps, so the bound is looser (1e-14) there."""
    x = np.linspace(MAX_ARGUMENT - 50.0, MAX_ARGUMENT, 501)
    assert np.max(np.abs(bessel_j(n, x) - special.jv(n, x))) < 1e-14
    assert np.max(np.abs(bessel_j(n, -x) - special.jv(n, -x))) < 1e-14


def test_beyond_the_cap_raises():
    with pytest.raises(ValueError, match="Bessel argument"):
        bessel_j(0, np.array([1.0, 2.0 * MAX_ARGUMENT]))
    with pytest.raises(ValueError, match="Bessel argument"):
        bessel_j(1, np.inf)


@pytest.mark.parametrize("n", [-1, 1.5, True, "2"])
def test_bad_order_raises(n):
    with pytest.raises(ValueError, match="Bessel order"):
        bessel_j(n, 1.0)


@pytest.mark.parametrize("n", [0, 1, 2, 7])
def test_value_at_zero(n):
    """Exact: J_0(0) = 1, J_n(0) = 0 for n >= 1 (A&S eq. 9.1.10, series)."""
    assert bessel_j(n, 0.0) == pytest.approx(1.0 if n == 0 else 0.0, abs=1e-16)


@pytest.mark.parametrize("n", [0, 1, 2, 3, 6])
def test_parity(n):
    """Exact identity: J_n(-x) = (-1)^n J_n(x) (A&S eq. 9.1.35 [from memory])."""
    x = np.linspace(0.1, 40.0, 257)
    assert np.allclose(bessel_j(n, -x), (-1) ** n * bessel_j(n, x), rtol=0, atol=1e-15)


def test_recurrence():
    """Exact identity: J_{n-1}(x) + J_{n+1}(x) = (2n/x) J_n(x) (A&S eq. 9.1.27)."""
    x = np.linspace(0.5, 30.0, 300)
    for n in (1, 2, 5):
        lhs = bessel_j(n - 1, x) + bessel_j(n + 1, x)
        assert np.max(np.abs(lhs - 2 * n / x * bessel_j(n, x))) < 1e-14


def test_shapes_and_types():
    """Output of the argument's shape; a numpy scalar for a scalar, NaN passes through."""
    assert isinstance(bessel_j(0, 1.0), np.float64)
    assert bessel_j(1, np.zeros((3, 4, 2))).shape == (3, 4, 2)
    assert bessel_j(2, np.empty((0, 5))).shape == (0, 5)
    assert bessel_j(0, [1.0, 2.0]).shape == (2,)
    values = bessel_j(0, np.array([np.nan, 1.0]))
    assert np.isnan(values[0]) and values[1] == pytest.approx(special.j0(1.0), abs=3e-16)


def test_long_arrays_in_blocks():
    """More points than one work block: the same values as point by point (scipy.special.j0 as
    the reference library)."""
    x = np.linspace(0.0, 25.0, 20001)
    assert np.max(np.abs(bessel_j(0, x) - special.j0(x))) < 1.5e-15


# A&S Table 9.5, first zeros of J0 to 10 decimals [from memory; they agree with
# scipy.special.jn_zeros to the 10 decimals]
TABLE_J0_ZEROS = [2.4048255577, 5.5200781103, 8.6537279129]


@pytest.mark.parametrize("s,value", list(enumerate(TABLE_J0_ZEROS, start=1)))
def test_zeros_of_j0_table(s, value):
    """Handbook table: Abramowitz & Stegun (NBS 1964), Table 9.5, j_{0,s} [from memory]."""
    assert bessel_j_zeros(0, s)[-1] == pytest.approx(value, abs=5e-11)


@pytest.mark.parametrize("n", [0, 1, 2, 5, 10, 30, 60])
def test_zeros_against_scipy(n):
    """Reference library: scipy.special.jn_zeros; relative agreement to 2 ulp, and J_n at the
    zeros at rounding level (arguments up to 161 for n = 60). For n = 60 the McMahon start
    fails and the zeros come from the sign scan."""
    ours = bessel_j_zeros(n, 25)
    ref = special.jn_zeros(n, 25)
    assert np.max(np.abs(ours / ref - 1.0)) <= 4.5e-16
    assert np.max(np.abs(bessel_j(n, ours))) < 3e-15


def test_zeros_return_new_arrays():
    first = bessel_j_zeros(0, 3)
    first[0] = -1.0
    assert bessel_j_zeros(0, 3)[0] == pytest.approx(2.4048255577, abs=1e-10)


@pytest.mark.parametrize("n,count", [(-1, 2), (0, 0), (1, 1.0), (0, True)])
def test_zeros_bad_input(n, count):
    with pytest.raises(ValueError):
        bessel_j_zeros(n, count)
