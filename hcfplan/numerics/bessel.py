"""Bessel functions of the first kind J_n(x) of integer order and their positive zeros.

Method
------
Bessel's integral (A&S [1], eq. 9.1.21) for integer n,

.. math:: J_n(x) = \\frac{1}{\\pi} \\int_0^\\pi \\cos(n\\theta - x \\sin\\theta)\\, d\\theta,

has a 2 pi-periodic, entire integrand. The trapezoidal rule with M equispaced nodes on a
period converges geometrically for such integrands (Trefethen & Weideman [2], sec. 3); for this
one the error is known exactly: by the Jacobi-Anger expansion
exp(i x sin t) = sum_k J_k(x) exp(i k t) the M-node rule returns
sum_j J_{n + jM}(x) over all integers j, i.e. J_n(x) plus the aliased terms J_{n +- M}(x), ...
(the example of Bessel's integral is worked in [2], sec. 3). With M a multiple of 4 the rule
folds onto the quarter period [0, pi/2]: by the symmetries t -> -t and t -> pi - t,

.. math:: J_n(x) = \\frac{2}{\\pi} \\int_0^{\\pi/2} \\cos(n\\theta)
   \\cos(x \\sin\\theta)\\, d\\theta \\quad (n \\text{ even}), \\qquad
   J_n(x) = \\frac{2}{\\pi} \\int_0^{\\pi/2} \\sin(n\\theta)
   \\sin(x \\sin\\theta)\\, d\\theta \\quad (n \\text{ odd}),

and the M-node rule becomes M/4 + 1 nodes on [0, pi/2] (half weight at both ends), one cosine or
sine per node and point, and one matrix-vector product with fixed weights.

Node count: the leading aliased term is J_{M-n}(x) (and the smaller J_{M+n}(x)); M is the
smallest multiple of 4 with M - n >= nu, nu the smallest order for which the bound
|J_nu(x)| <= |x/2|^nu / Gamma(nu + 1) (A&S [1], eq. 9.1.62 [from memory]) is below
:data:`ALIAS_BOUND`. For |x| <= 3 (the EH11 profile) this gives M = 24 (7 nodes), for
|x| <= 25 (u_18 = 24.35, the EH18 profile of the multimode runs) M = 64 (17 nodes), for
|x| <= 60 M = 116 (30 nodes). What remains is rounding: the argument x sin(theta) carries an
absolute error of about |x| eps, so the absolute error grows slowly with |x|; it was measured
below 1.5e-15 for |x| <= 60 against scipy.special.jv (tests/numerics/test_bessel.py).
Arguments beyond :data:`MAX_ARGUMENT` raise.

Zeros: Newton's iteration from McMahon's asymptotic expansion (A&S [1], eq. 9.5.12), with
J_n'(x) = (J_{n-1}(x) - J_{n+1}(x)) / 2 (A&S [1], eq. 9.1.27), until the step is below
rounding. A scan of the sign of J_n on a grid of step 0.25 (consecutive zeros of J_n are more
than 3.1 apart: 3.115 for the first two zeros of J_0, larger for every other pair with
n <= 100 among the first 60 zeros, checked against scipy.special.jn_zeros) checks that no zero
was skipped or found twice; if one was, the zeros are bracketed from that scan instead and
polished by the same iteration.

References
----------
.. [1] M. Abramowitz and I. A. Stegun (eds.), *Handbook of Mathematical Functions*, National
       Bureau of Standards, Applied Mathematics Series 55, 1964, ch. 9 (eqs. 9.1.21, 9.1.27,
       9.1.62, 9.5.12; Table 9.5) [equation numbers from memory].
.. [2] L. N. Trefethen and J. A. C. Weideman, "The exponentially convergent trapezoidal rule,"
       SIAM Review, vol. 56, no. 3, pp. 385-458, 2014, doi:10.1137/130932132.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

#: Bound on the leading aliased term |J_{M-n}(x)| of the trapezoidal rule (far below rounding).
ALIAS_BOUND = 1e-18
#: Largest |x| accepted by :func:`bessel_j` (the node count grows like 1.4 |x|). [-]
MAX_ARGUMENT = 1000.0
#: Elements of one (points x nodes) block of the quadrature (bounds the work memory).
_BLOCK = 1 << 15


def _check_order(n) -> int:
    if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or n < 0:
        raise ValueError(f"Bessel order n = {n!r}: must be an integer >= 0")
    return int(n)


@lru_cache(maxsize=256)
def _alias_order(bound: int) -> int:
    """Smallest nu >= 1 with (bound/2)^nu / nu! <= ALIAS_BOUND (A&S 9.1.62), bound = ceil|x|."""
    if bound == 0:
        return 1
    log_half = math.log(0.5 * bound)
    log_tol = math.log(ALIAS_BOUND)
    nu = max(1, int(bound))  # the bound only falls once nu > |x|/2; start where it is < 1
    while nu * log_half - math.lgamma(nu + 1.0) > log_tol:
        nu += 1
    return nu


@lru_cache(maxsize=256)
def _nodes(n: int, bound: int) -> tuple[np.ndarray, np.ndarray]:
    """sin(theta_k) at the nodes on [0, pi/2] of the rule of order n for |x| <= bound, and the
    weights (read-only): M = 4 Q the smallest multiple of 4 with M - n >= the alias order."""
    quarter = max(1, -(-(n + _alias_order(bound)) // 4))
    theta = 0.5 * math.pi * np.arange(quarter + 1) / quarter
    weights = np.full(quarter + 1, 1.0 / quarter)
    weights[0] = weights[-1] = 0.5 / quarter
    weights *= np.cos(n * theta) if n % 2 == 0 else np.sin(n * theta)
    sines = np.sin(theta)
    sines.flags.writeable = False
    weights.flags.writeable = False
    return sines, weights


def bessel_j(n: int, x):
    """Bessel function of the first kind J_n(x), integer order n >= 0, real x.

    Parameters
    ----------
    n : int
        Order, >= 0. [-]
    x : float or array_like
        Argument, any shape, |x| <= :data:`MAX_ARGUMENT`; NaN gives NaN. [-]

    Returns
    -------
    numpy.float64 or ndarray
        J_n(x), of the shape of ``x`` (a numpy scalar for a scalar). [-]

    Raises
    ------
    ValueError
        If n is not an integer >= 0 or some |x| exceeds :data:`MAX_ARGUMENT` (or is infinite).

    Notes
    -----
    Trapezoidal rule on Bessel's integral (eq. 9.1.21 of [1]) folded onto [0, pi/2], with as many
    nodes as make the aliased terms (error J_{M-n}(x) of the M-node rule, [2]) smaller than
    1e-18 (module docstring). Absolute error measured below 1.5e-15 for |x| <= 60.

    References
    ----------
    .. [1] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, NBS 1964,
           eq. 9.1.21 [from memory].
    .. [2] L. N. Trefethen and J. A. C. Weideman, SIAM Review 56, 385-458 (2014),
           doi:10.1137/130932132.
    """
    order = _check_order(n)
    values = np.asarray(x, dtype=float)
    if values.size == 0:
        return np.empty(values.shape)
    flat = values.reshape(-1)
    largest = float(np.max(np.abs(flat)))
    if largest != largest:  # NaN arguments give NaN; the nodes follow the other arguments
        largest = float(np.nanmax(np.abs(flat), initial=0.0))
    if not largest <= MAX_ARGUMENT:
        raise ValueError(f"Bessel argument |x| = {largest:g}: must be <= {MAX_ARGUMENT:g}")
    sines, weights = _nodes(order, math.ceil(largest))
    trig = np.cos if order % 2 == 0 else np.sin
    step = max(1, _BLOCK // sines.size)
    if flat.size <= step:
        phase = np.multiply.outer(flat, sines)
        out = trig(phase, out=phase) @ weights
    else:
        out = np.empty(flat.shape)
        for start in range(0, flat.size, step):
            phase = np.multiply.outer(flat[start:start + step], sines)
            np.dot(trig(phase, out=phase), weights, out=out[start:start + step])
    return out[0] if values.ndim == 0 else out.reshape(values.shape)


def _mcmahon(n: int, count: int) -> np.ndarray:
    """McMahon's asymptotic expansion of the zeros j_{n,s}, s = 1...count (A&S 9.5.12)."""
    beta = (np.arange(1, count + 1) + 0.5 * n - 0.25) * math.pi
    mu = 4.0 * n * n
    b8 = 8.0 * beta
    return (beta - (mu - 1.0) / b8
            - 4.0 * (mu - 1.0) * (7.0 * mu - 31.0) / (3.0 * b8**3)
            - 32.0 * (mu - 1.0) * (83.0 * mu**2 - 982.0 * mu + 3779.0) / (15.0 * b8**5))


def _derivative(n: int, x: np.ndarray) -> np.ndarray:
    """J_n'(x) = (J_{n-1}(x) - J_{n+1}(x)) / 2 (A&S 9.1.27), J_{-1} = -J_1."""
    below = -bessel_j(1, x) if n == 0 else bessel_j(n - 1, x)
    return 0.5 * (below - bessel_j(n + 1, x))


def _polish(n: int, guess: np.ndarray) -> tuple[np.ndarray, bool]:
    """Newton's iteration on J_n from ``guess`` until the step is below rounding; the zeros and
    whether the iteration converged."""
    x = np.array(guess, dtype=float)
    step = np.full(x.shape, np.inf)
    for _ in range(40):
        step = bessel_j(n, x) / _derivative(n, x)
        x = x - step
        if np.all(np.abs(step) <= 4.0 * np.finfo(float).eps * x):
            break
    return x, bool(np.all(np.abs(step) <= 1e-12 * x))


def _sign_changes(n: int, upper: float) -> np.ndarray:
    """Left ends of the grid cells (step 0.25 on [max(n, 0.25), upper]) where J_n changes sign.

    The scan starts at x = n: j_{n,1} > n (A&S 9.5.2 [from memory]), and below n J_n falls
    towards 0 like (x/2)^n / n! (A&S 9.1.7), where rounding would fake sign changes."""
    grid = np.arange(max(float(n), 0.25), upper + 0.25, 0.25)
    values = bessel_j(n, grid)
    cells = np.nonzero(np.signbit(values[:-1]) != np.signbit(values[1:]))[0]
    return grid[cells]


def _bracketed(zeros: np.ndarray, left: np.ndarray) -> bool:
    """Whether the zeros lie one by one in the scan's cells [left, left + 0.25)."""
    return (left.size == zeros.size and bool(np.all(zeros >= left))
            and bool(np.all(zeros < left + 0.25)))


@lru_cache(maxsize=32)
def _zeros(n: int, count: int) -> tuple[float, ...]:
    zeros, converged = _polish(n, _mcmahon(n, count))
    if converged and np.all(np.isfinite(zeros)):
        left = _sign_changes(n, float(zeros[-1]) + 0.5)[:count]
        if _bracketed(zeros, left):
            return tuple(float(z) for z in zeros)
    # McMahon's start led Newton astray (large n, first zeros): bracket from the scan
    left = _sign_changes(n, float(_mcmahon(n, count)[-1]) + 2.0 * n + 10.0)[:count]
    zeros, converged = _polish(n, left + 0.125)
    if not (converged and _bracketed(zeros, left)):
        raise RuntimeError(f"zeros of J_{n}: Newton's iteration did not converge in the "
                           "brackets of the sign scan")
    return tuple(float(z) for z in zeros)


def bessel_j_zeros(n: int, count: int) -> np.ndarray:
    """The first ``count`` positive zeros j_{n,1} < ... < j_{n,count} of J_n.

    Parameters
    ----------
    n : int
        Order, >= 0. [-]
    count : int
        Number of zeros, >= 1. [-]

    Returns
    -------
    ndarray, shape (count,)
        The zeros, ascending, converged to rounding (a new array on every call). [-]

    Raises
    ------
    ValueError
        If n or count is not a valid integer.

    Notes
    -----
    Newton's iteration from McMahon's expansion (eq. 9.5.12 of [1]) with
    J_n' = (J_{n-1} - J_{n+1})/2 (eq. 9.1.27 of [1]), checked against a scan of the sign of J_n
    (module docstring). j_{0,1} = 2.4048255577 (Table 9.5 of [1]).

    References
    ----------
    .. [1] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*, NBS 1964,
           eqs. 9.5.12, 9.1.27 and Table 9.5 [equation numbers from memory].
    """
    order = _check_order(n)
    if isinstance(count, bool) or not isinstance(count, (int, np.integer)) or count < 1:
        raise ValueError(f"number of zeros count = {count!r}: must be an integer >= 1")
    return np.array(_zeros(order, int(count)))
