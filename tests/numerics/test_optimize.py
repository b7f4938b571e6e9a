"""Tests of hcfplan.numerics.optimize (Brent's root and minimiser, Chandrupatla, Nelder-Mead).

Reference-library checks: every method is compared with ``scipy.optimize`` as the reference
library (brentq, elementwise.find_root, minimize_scalar(method="bounded"), minimize(method=
"Nelder-Mead")) on smooth functions, a function with a flat region and the Rosenbrock function,
and against analytic roots and minima. Contract checks (end-point roots, brackets without a sign
change, nan values, iteration limits) need no external source.

Methods: R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall, 1973,
ch. 4 (zero) and ch. 5 (localmin); T. R. Chandrupatla, Advances in Engineering Software 28,
145-149 (1997) [volume and pages from memory]; J. A. Nelder and R. Mead, Computer Journal 7,
308-313 (1965); J. C. Lagarias et al., SIAM J. Optim. 9, 112-147 (1998).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import optimize as reference

from hcfplan.numerics.optimize import (
    minimize_bounded,
    nelder_mead,
    root_bracketed,
    roots_bracketed,
)


def _flat_then_linear(x):
    """-0.05 up to x = 0.55, then x - 0.6: a flat region left of the root 0.6."""
    return np.maximum(np.asarray(x, dtype=float) - 0.6, -0.05)


# (f, a, b, exact root): smooth functions and one with a flat region
ROOT_CASES = {
    "cos(x) - x": (lambda x: np.cos(x) - x, 0.0, 1.0, None),
    "x^3 - 2x - 5": (lambda x: x**3 - 2 * x - 5, 2.0, 3.0, None),
    "exp(x) - 2": (lambda x: np.exp(x) - 2.0, 0.0, 1.0, math.log(2.0)),
    "(x - 1/3)^5 (flat at the root)": (lambda x: (x - 1 / 3) ** 5, 0.0, 1.0, 1 / 3),
    "flat then linear": (_flat_then_linear, 0.0, 1.0, 0.6),
    "tanh(50 (x - 0.1)), steep": (lambda x: np.tanh(50 * (x - 0.1)), -1.0, 2.0, 0.1),
    "step at 0.3 (only the sign)": (lambda x: np.where(np.asarray(x) < 0.3, -1.0, 1.0), 0.0,
                                    1.0, 0.3),
}


@pytest.mark.parametrize("case", list(ROOT_CASES))
@pytest.mark.parametrize("xtol", [2e-12, 1e-6])
def test_root_bracketed_agrees_with_brentq(case, xtol):
    # scipy.optimize.brentq as reference library; Brent 1973 ch. 4: both roots lie within
    # xtol + rtol |x| of a sign change, so within twice that of each other (the fivefold root
    # takes both methods about 100 steps at xtol = 2e-12: maxiter 200)
    f, a, b, exact = ROOT_CASES[case]
    ours = root_bracketed(lambda x: float(f(x)), a, b, xtol=xtol, maxiter=200)
    theirs = reference.brentq(lambda x: float(f(x)), a, b, xtol=xtol, maxiter=200)
    tol = xtol + 4 * np.finfo(float).eps * abs(theirs)
    assert abs(ours - theirs) <= 2 * tol
    if exact is not None:
        # the (x - 1/3)^5 case: f is below 1e-16 within 5e-4 of the root, yet the bracket
        # narrows on the sign change itself
        assert abs(ours - exact) <= tol


def test_root_bracketed_few_evaluations_on_a_smooth_function():
    # Brent 1973 ch. 4: superlinear convergence on a smooth simple root; bisection alone
    # would need log2(1 / 2e-12) = 39 steps
    calls = []

    def f(x):
        calls.append(x)
        return math.cos(x) - x

    root_bracketed(f, 0.0, 1.0)
    assert len(calls) <= 12


@pytest.mark.parametrize(("a", "b", "root"), [(1.0, 3.0, 1.0), (-1.0, 1.0, 1.0),
                                              (3.0, 1.0, 1.0)])
def test_root_bracketed_root_at_an_end_point(a, b, root):
    # contract (as brentq): a zero of f at a bracket end is returned exactly
    assert root_bracketed(lambda x: x - 1.0, a, b) == root


def test_root_bracketed_reversed_bracket():
    # contract: a > b is the same bracket
    assert root_bracketed(lambda x: x * x - 2.0, 2.0, 0.0) == pytest.approx(math.sqrt(2), abs=1e-11)


def test_root_bracketed_without_sign_change_raises_value_error():
    # contract (as brentq): f(a) and f(b) of the same sign
    with pytest.raises(ValueError, match="same sign"):
        root_bracketed(lambda x: x * x + 1.0, -1.0, 2.0)
    with pytest.raises(ValueError):
        reference.brentq(lambda x: x * x + 1.0, -1.0, 2.0)


def test_root_bracketed_nan_raises_value_error():
    # contract: nan at an end, or inside the bracket, is an error (no sign to follow)
    with pytest.raises(ValueError, match="nan at a bracket end"):
        root_bracketed(lambda x: math.nan if x > 1.5 else x - 1.0, 0.0, 2.0)
    with pytest.raises(ValueError, match="nan inside"):
        root_bracketed(lambda x: math.nan if 0.3 < x < 0.7 else x - 0.5, 0.0, 1.0)


def test_root_bracketed_infinite_end_value():
    # contract: an infinite f at an end only gives its sign (ln x with ln 0 = -inf); root 1
    root = root_bracketed(lambda x: -math.inf if x == 0 else math.log(x), 0.0, 3.0)
    assert root == pytest.approx(1.0, abs=1e-11)


def test_root_bracketed_not_converged_raises_runtime_error():
    # contract: the step limit is an error that names the bracket
    with pytest.raises(RuntimeError, match="no convergence in 3 steps"):
        root_bracketed(lambda x: math.cos(x) - x, 0.0, 1.0, maxiter=3)
    with pytest.raises(ValueError, match="rtol"):
        root_bracketed(lambda x: x, -1.0, 1.0, rtol=0.0)


def test_roots_bracketed_agrees_with_find_root_and_exact_roots():
    # scipy.optimize.elementwise.find_root (Chandrupatla's method) as reference library, and
    # the exact roots k pi of sin(x) in brackets of different widths and positions
    k = np.arange(1, 11)
    a = k * np.pi - np.linspace(0.2, 1.5, k.size)
    b = k * np.pi + np.linspace(1.4, 0.1, k.size)
    calls = []

    def f(x):
        calls.append(x.size)
        return np.sin(x)

    roots, ok = roots_bracketed(f, a, b, xatol=1e-13, xrtol=0.0)
    assert ok.all()
    np.testing.assert_allclose(roots, k * np.pi, rtol=0, atol=1e-13)
    elementwise = pytest.importorskip("scipy.optimize.elementwise")
    found = elementwise.find_root(np.sin, (a, b), tolerances={
        "xatol": 1e-13, "xrtol": 0.0, "fatol": 0.0, "frtol": 0.0})
    np.testing.assert_allclose(roots, found.x, rtol=0, atol=2e-13)
    # the same method takes as few steps as the reference (bisection alone: 2 + 44 calls)
    assert len(calls) <= np.max(found.nfev)


def test_roots_bracketed_each_bracket_meets_its_tolerance():
    # analytic: every bracket converges to xatol, also the flat one and a steep one, whatever
    # the others do; Chandrupatla 1997: the bracket shrinks to 2 tol around the root
    shifts = np.array([0.6, 0.25, 0.9])

    def f(x):  # one flat-then-linear function per bracket [10 k, 10 k + 1], root 10 k + shift
        k = np.clip(np.floor(x / 10.0), 0, 2)
        return _flat_then_linear(x - 10.0 * k - shifts[k.astype(int)] + 0.6)

    a = np.array([0.0, 10.0, 20.0])
    roots, ok = roots_bracketed(f, a, a + 1.0, xatol=1e-10, xrtol=0.0)
    assert ok.all()
    np.testing.assert_allclose(roots, a + shifts, rtol=0, atol=1e-10)


@pytest.mark.parametrize("case", list(ROOT_CASES))
def test_roots_bracketed_agrees_with_brentq_on_each_case(case):
    # scipy.optimize.brentq as reference library, one bracket as an array of one
    f, a, b, _ = ROOT_CASES[case]
    roots, ok = roots_bracketed(f, [a], [b], xatol=1e-12)
    theirs = reference.brentq(lambda x: float(f(x)), a, b, xtol=1e-12, maxiter=200)
    assert ok.all()
    assert abs(roots[0] - theirs) <= 2 * (1e-12 + 4 * np.finfo(float).eps * abs(theirs))


def test_roots_bracketed_end_points_sign_and_nan():
    # contract: a root at an end is returned exactly; a bracket without a sign change, or
    # with nan inside, fails alone (nan root, success False) and the others are unaffected
    def f(x):
        return np.where((x > 4.2) & (x < 4.8), np.nan, x - np.floor(x) - 0.25)

    a = np.array([0.25, 1.0, 2.0, 4.0, 5.0])
    b = np.array([0.9, 1.25, 2.2, 4.9, 5.9])
    roots, ok = roots_bracketed(f, a, b, xatol=1e-12)
    assert ok.tolist() == [True, True, False, False, True]
    assert roots[0] == 0.25 and roots[1] == 1.25
    assert np.isnan(roots[2]) and np.isnan(roots[3])
    assert roots[4] == pytest.approx(5.25, abs=1e-12)


def test_roots_bracketed_keeps_the_shape_and_reports_the_step_limit():
    # contract: brackets broadcast and keep their shape; maxiter reached -> success False
    a = np.zeros((2, 3))
    b = np.arange(1.0, 7.0).reshape(2, 3)
    roots, ok = roots_bracketed(lambda x: x * x - 0.5, a, b, xatol=1e-12)
    assert roots.shape == ok.shape == (2, 3) and ok.all()
    np.testing.assert_allclose(roots, math.sqrt(0.5), rtol=0, atol=1e-12)
    roots, ok = roots_bracketed(lambda x: x * x - 0.5, a, b, xatol=1e-12, maxiter=2)
    assert not ok.any() and np.isnan(roots).all()


MIN_CASES = {
    "(x - 0.3)^2 + sin 5x": (lambda x: (x - 0.3) ** 2 + math.sin(5 * x), -1.0, 2.0),
    "cosh(x - 1e-3)": (lambda x: math.cosh(x - 1e-3), -4.0, 3.0),
    "|x - 0.7|^1.5, a kink": (lambda x: abs(x - 0.7) ** 1.5, 0.0, 1.0),
    "x^4 - x, flat bottom": (lambda x: x**4 - x, 0.0, 2.0),
    "minimum at the upper end": (lambda x: -x, 0.0, 1.0),
}


@pytest.mark.parametrize("case", list(MIN_CASES))
@pytest.mark.parametrize("xatol", [1e-8, 1e-5])
def test_minimize_bounded_agrees_with_minimize_scalar(case, xatol):
    # scipy.optimize.minimize_scalar(method="bounded") as reference library: Brent 1973 ch. 5
    # in both, with the same tolerances, visits the same points
    f, lo, hi = MIN_CASES[case]
    x, fx, evaluations = minimize_bounded(f, lo, hi, xatol=xatol)
    theirs = reference.minimize_scalar(f, bounds=(lo, hi), method="bounded",
                                       options={"xatol": xatol})
    assert abs(x - theirs.x) <= xatol
    assert fx == f(x)
    assert fx <= theirs.fun + 1e-12 * abs(theirs.fun) + 1e-15
    assert evaluations <= theirs.nfev + 2


def test_minimize_bounded_analytic_minima():
    # analytic: x^4 - x has its minimum at 4^(-1/3); (x - 1e-3)^2 (2 + sin x) at 1e-3 (within
    # about xatol; Brent 1973 ch. 5: the error is at most about 3 tol [from memory])
    x, _, _ = minimize_bounded(lambda x: x**4 - x, 0.0, 2.0, xatol=1e-9)
    assert x == pytest.approx(4.0 ** (-1 / 3), abs=1e-8)
    x, _, _ = minimize_bounded(lambda x: (x - 1e-3) ** 2 * (2 + math.sin(x)), -4.0, 3.0,
                               xatol=1e-9)
    assert x == pytest.approx(1e-3, abs=1e-8)


def test_minimize_bounded_flat_region():
    # contract: on a flat bottom (zero on [0.3, 0.5]) any point of it is a minimum; the
    # reference library stops in the same flat part
    def f(x):
        return max(abs(x - 0.4) - 0.1, 0.0)

    x, fx, _ = minimize_bounded(f, 0.0, 1.0, xatol=1e-6)
    theirs = reference.minimize_scalar(f, bounds=(0.0, 1.0), method="bounded",
                                       options={"xatol": 1e-6})
    assert fx == 0.0 == theirs.fun
    assert 0.3 <= x <= 0.5


def test_minimize_bounded_nan_is_worse_than_any_number():
    # contract: nan counts as +inf, so a search that meets nan (right of 0.8) still finds
    # the minimum at 0.5; only nan values give an infinite result
    x, fx, _ = minimize_bounded(lambda x: math.nan if x > 0.8 else (x - 0.5) ** 2, 0.0, 2.0,
                                xatol=1e-8)
    assert x == pytest.approx(0.5, abs=1e-7)
    assert fx == pytest.approx(0.0, abs=1e-14)
    x, fx, evaluations = minimize_bounded(lambda x: math.nan, 0.0, 1.0, maxfun=40)
    assert fx == math.inf and 0.0 < x < 1.0 and evaluations <= 40


def test_minimize_bounded_limits_and_bad_interval():
    # contract: maxfun bounds the evaluations; lo >= hi is an error
    _, _, evaluations = minimize_bounded(lambda x: math.sin(x), 0.0, 6.0, xatol=1e-12, maxfun=5)
    assert evaluations == 5
    with pytest.raises(ValueError, match="lo < hi"):
        minimize_bounded(lambda x: x, 1.0, 1.0)


def rosenbrock(x):
    """H. H. Rosenbrock, Computer Journal 3, 175-184 (1960): minimum 0 at (1, 1)."""
    return 100.0 * (x[1] - x[0] ** 2) ** 2 + (1.0 - x[0]) ** 2


def test_nelder_mead_rosenbrock_minimum():
    # H. H. Rosenbrock, Computer Journal 3, 175 (1960): minimum 0 at (1, 1), from the
    # classic start (-1.2, 1); scipy.optimize.minimize(method="Nelder-Mead") as reference
    # library (Nelder & Mead 1965 with the coefficients and tie rules of Lagarias et al. 1998)
    res = nelder_mead(rosenbrock, [-1.2, 1.0], xatol=1e-8, fatol=1e-12, maxiter=2000)
    assert res.converged
    np.testing.assert_allclose(res.x, [1.0, 1.0], rtol=0, atol=1e-7)
    assert res.fun < 1e-14
    theirs = reference.minimize(rosenbrock, [-1.2, 1.0], method="Nelder-Mead",
                                options={"xatol": 1e-8, "fatol": 1e-12, "maxiter": 2000})
    # the same steps and tie rules visit the same points
    np.testing.assert_allclose(res.x, theirs.x, rtol=0, atol=1e-12)
    assert res.evaluations == theirs.nfev


@pytest.mark.parametrize("x0", [[0.0, 0.0], [3.0, -2.0], [-0.5, 4.0]])
def test_nelder_mead_agrees_with_scipy_with_the_compressor_options(x0):
    # scipy.optimize.minimize(method="Nelder-Mead") as reference library, with the options of
    # the compressor's quadratic + cubic reference (xatol 1e-4, fatol 1e-10, maxiter 600), on a
    # rotated, shifted bowl with a quartic term (minimum near (0.3, -0.2)) and on Rosenbrock
    def bowl(x):
        u, v = x[0] - 0.3, x[1] + 0.2
        return -1.0 + 2.0 * u * u + u * v + 0.7 * v * v + 0.5 * u**4

    for f in (bowl, rosenbrock):
        res = nelder_mead(f, x0, xatol=1e-4, fatol=1e-10, maxiter=600)
        theirs = reference.minimize(f, x0, method="Nelder-Mead",
                                    options={"xatol": 1e-4, "fatol": 1e-10, "maxiter": 600})
        assert res.converged and theirs.success
        np.testing.assert_allclose(res.x, theirs.x, rtol=0, atol=1e-12)
        assert res.evaluations == theirs.nfev
        assert res.fun <= theirs.fun + 1e-10


@pytest.mark.parametrize("x0", [[1.0, 1.0], [-2.0, 0.5], [0.0, 3.0]])
def test_nelder_mead_ties_on_a_staircase_agree_with_scipy(x0):
    # scipy.optimize.minimize(method="Nelder-Mead") as reference library on a staircase (flat
    # steps: many equal values), where the tie rules of Lagarias et al. 1998 (a new vertex
    # after those of equal value; an inside contraction only when strictly better) decide
    def stairs(x):
        return math.floor(4 * (x[0] ** 2 + x[1] ** 2)) + 0.1 * math.floor(3 * x[0])

    res = nelder_mead(stairs, x0, xatol=1e-6, fatol=1e-10, maxiter=600)
    theirs = reference.minimize(stairs, x0, method="Nelder-Mead",
                                options={"xatol": 1e-6, "fatol": 1e-10, "maxiter": 600})
    assert res.converged
    np.testing.assert_allclose(res.x, theirs.x, rtol=0, atol=1e-12)
    assert res.evaluations == theirs.nfev
    assert res.fun == theirs.fun


def test_nelder_mead_three_variables():
    # analytic: a separable bowl in three variables, minimum at (1, -2, 0.5)
    target = np.array([1.0, -2.0, 0.5])
    res = nelder_mead(lambda x: float(np.sum((np.arange(1, 4) * (x - target)) ** 2)),
                      [0.0, 0.0, 0.0], xatol=1e-9, fatol=1e-14)
    assert res.converged
    np.testing.assert_allclose(res.x, target, rtol=0, atol=1e-8)


def test_nelder_mead_nan_is_worse_than_any_number():
    # contract: nan (here outside the disk of radius 3) counts as +inf; the search stays
    # inside and finds the minimum at (1, 1)
    def f(x):
        return math.nan if x @ x > 9.0 else rosenbrock(x)

    res = nelder_mead(f, [2.0, 2.0], xatol=1e-8, fatol=1e-12, maxiter=2000)
    assert res.converged
    np.testing.assert_allclose(res.x, [1.0, 1.0], rtol=0, atol=1e-6)


def test_nelder_mead_step_limit_and_input_untouched():
    # contract: maxiter reached -> converged False (the best vertex is still returned);
    # the start array and the arrays given to f are not those of the simplex
    x0 = np.array([-1.2, 1.0])
    seen = []

    def f(x):
        seen.append(x)
        value = rosenbrock(x)
        x[:] = 99.0  # a careless objective must not move the simplex
        return value

    res = nelder_mead(f, x0, xatol=1e-8, fatol=1e-12, maxiter=10)
    assert not res.converged
    assert res.evaluations == len(seen)
    assert res.fun < rosenbrock(x0)
    assert res.fun == pytest.approx(rosenbrock(res.x), rel=1e-15)
    assert x0.tolist() == [-1.2, 1.0]
