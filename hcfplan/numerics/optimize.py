"""Root finding and minimisation without derivatives: Brent, Chandrupatla and Nelder-Mead.

Small pure functions for the searches of the main command (zero-dispersion wavelengths and
pressures, the compressor's GDD and TOD, the optimum launch waist, the ionisation and
self-focusing limits). They are written from the published algorithms so that the command
needs no import of a general optimisation library (``scipy.optimize`` cost about 0.1 s of CPU
per fresh process, measured); the tests check each of them against ``scipy.optimize`` as the
reference library.

* :func:`root_bracketed`: Brent's method for one root in a bracket [1].
* :func:`roots_bracketed`: Chandrupatla's method for many brackets at once, one evaluation of
  the function on an array per step [2].
* :func:`minimize_bounded`: Brent's bounded minimiser, golden section plus parabolic
  interpolation [1].
* :func:`nelder_mead`: the simplex method of Nelder and Mead [3] with the standard
  coefficients and tie rules of Lagarias et al. [4].

Nothing here is a physical model.

References
----------
.. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall, 1973,
       ch. 4 (zero) and ch. 5 (localmin).
.. [2] T. R. Chandrupatla, "A new hybrid quadratic/bisection algorithm for finding the zero of
       a nonlinear function without using derivatives," Advances in Engineering Software 28,
       145-149 (1997) [volume and pages from memory].
.. [3] J. A. Nelder and R. Mead, "A simplex method for function minimization," Computer
       Journal 7, 308-313 (1965).
.. [4] J. C. Lagarias, J. A. Reeds, M. H. Wright and P. E. Wright, "Convergence properties of
       the Nelder-Mead simplex method in low dimensions," SIAM J. Optim. 9, 112-147 (1998).
"""

from __future__ import annotations

import math
import sys
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

#: Machine epsilon of float64.
EPS = sys.float_info.epsilon
#: Smallest relative tolerance a root search can honour (4 eps, as in Brent's zero).
MIN_RTOL = 4.0 * EPS
#: 0.5 (3 - sqrt 5): the golden-section fraction of Brent's minimiser.
GOLDEN = 0.5 * (3.0 - math.sqrt(5.0))
#: Relative tolerance of Brent's minimiser, sqrt(eps) with eps rounded to 2.2e-16 as in
#: ``scipy.optimize.minimize_scalar(method="bounded")``, so that both visit the same points.
BOUNDED_RTOL = math.sqrt(2.2e-16)


def root_bracketed(
    f: Callable[[float], float],
    a: float,
    b: float,
    xtol: float = 2e-12,
    rtol: float = MIN_RTOL,
    maxiter: int = 100,
) -> float:
    """Root of ``f`` in [a, b] by Brent's method (inverse quadratic, secant or bisection).

    Parameters
    ----------
    f : callable
        Scalar function of one float; continuous on [a, b].
    a, b : float
        Bracket ends; ``f(a)`` and ``f(b)`` must differ in sign (or one of them be zero).
    xtol, rtol : float
        The root is returned within ``xtol + rtol |x|`` of a sign change of ``f``
        (``rtol >= 4 eps``).
    maxiter : int
        Largest number of steps.

    Returns
    -------
    float
        The root (``a`` or ``b`` itself when ``f`` is zero there).

    Raises
    ------
    ValueError
        ``f(a)`` and ``f(b)`` have the same sign, ``f`` returns nan, or a bad tolerance.
    RuntimeError
        Not converged in ``maxiter`` steps.

    Notes
    -----
    Procedure *zero* of [1]: the bracket [b, c] always holds a sign change with ``|f(b)| <=
    |f(c)|``; a step by inverse quadratic interpolation (three distinct points) or the secant
    (two) is taken when it stays inside the bracket and shrinks fast enough, else a bisection,
    so at most about the square of the bisection count is needed and usually far fewer. The
    stopping half-width is ``(xtol + rtol |b|) / 2``. An infinite ``f`` at a bracket end is
    allowed (only its sign is used: bisection until both values are finite).

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall,
           1973, ch. 4.
    """
    if not xtol > 0 or not rtol >= MIN_RTOL:
        raise ValueError(f"root_bracketed: xtol = {xtol} must be > 0 and rtol = {rtol} >= 4 eps")
    a, b = float(a), float(b)
    fa, fb = float(f(a)), float(f(b))
    if math.isnan(fa) or math.isnan(fb):
        raise ValueError(f"root_bracketed: f is nan at a bracket end (f({a}) = {fa}, "
                         f"f({b}) = {fb})")
    if fa == 0.0:
        return a
    if fb == 0.0:
        return b
    if (fa > 0.0) == (fb > 0.0):
        raise ValueError(f"root_bracketed: f({a}) = {fa} and f({b}) = {fb} have the same sign")
    c, fc = a, fa
    d = e = b - a
    for _ in range(maxiter):
        if (fb > 0.0) == (fc > 0.0):  # the sign change is between a and b: restart c at a
            c, fc = a, fa
            d = e = b - a
        if abs(fc) < abs(fb):  # b is the best estimate so far
            a, b, c = b, c, b
            fa, fb, fc = fb, fc, fb
        tol = 0.5 * (xtol + rtol * abs(b))
        m = 0.5 * (c - b)
        if abs(m) <= tol or fb == 0.0:
            return b
        if abs(e) < tol or abs(fa) <= abs(fb) or math.isinf(fa) or math.isinf(fc):
            d = e = m  # bisection
        else:
            s = fb / fa
            if a == c:  # secant
                p, q = 2.0 * m * s, 1.0 - s
            else:  # inverse quadratic interpolation through a, b, c
                q, r = fa / fc, fb / fc
                p = s * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0))
                q = (q - 1.0) * (r - 1.0) * (s - 1.0)
            if p > 0.0:
                q = -q
            else:
                p = -p
            if 2.0 * p < 3.0 * m * q - abs(tol * q) and p < abs(0.5 * e * q):
                e, d = d, p / q  # accept the interpolation
            else:
                d = e = m
        a, fa = b, fb
        b += d if abs(d) > tol else math.copysign(tol, m)
        fb = float(f(b))
        if math.isnan(fb):
            raise ValueError(f"root_bracketed: f({b}) is nan inside the bracket")
    raise RuntimeError(f"root_bracketed: no convergence in {maxiter} steps (bracket "
                       f"[{min(b, c)}, {max(b, c)}], xtol = {xtol}, rtol = {rtol})")


def roots_bracketed(
    f: Callable[[np.ndarray], np.ndarray],
    a,
    b,
    xatol: float = 2e-12,
    xrtol: float = MIN_RTOL,
    maxiter: int = 100,
) -> tuple[np.ndarray, np.ndarray]:
    """Roots of ``f`` in many brackets [a_i, b_i] at once by Chandrupatla's method.

    Parameters
    ----------
    f : callable
        Maps an array of x to the array of f(x) (elementwise).
    a, b : float or array_like
        Bracket ends (broadcast together).
    xatol, xrtol : float
        Each root is returned within ``xatol + xrtol |x|`` of a sign change of ``f``.
    maxiter : int
        Largest number of steps (each one call of ``f`` on the brackets still open).

    Returns
    -------
    roots : ndarray
        One root per bracket; nan where the search failed.
    success : ndarray of bool
        True where the root meets the tolerance. False where ``f(a_i)`` and ``f(b_i)`` have
        the same sign, ``f`` gave nan in the bracket, or ``maxiter`` was reached.

    Notes
    -----
    Method of [1]: the newest point x1 and x2 bracket the root, x3 is the point dropped last.
    The next point is ``x1 + t (x2 - x1)`` with t from inverse quadratic interpolation through
    the three points when that is safe (``phi^2 < xi`` and ``(1 - phi)^2 < 1 - xi`` with
    ``xi = (x1 - x2) / (x3 - x2)``, ``phi = (f1 - f2) / (f3 - f2)``), else ``t = 1/2``; t is kept
    a tolerance away from both ends. A bracket is done when its width is below twice the
    tolerance ``(xatol + xrtol |x|) / 2`` (the root is then the end with the smaller
    ``|f|``) or ``f`` is exactly zero. Only the open brackets are evaluated at each step.

    References
    ----------
    .. [1] T. R. Chandrupatla, "A new hybrid quadratic/bisection algorithm for finding the zero
           of a nonlinear function without using derivatives," Advances in Engineering
           Software 28, 145-149 (1997) [volume and pages from memory].
    """
    if not xatol > 0 or not xrtol >= 0:
        raise ValueError(f"roots_bracketed: xatol = {xatol} must be > 0 and xrtol = {xrtol} >= 0")
    x1, x2 = (np.array(v, dtype=float) for v in np.broadcast_arrays(a, b))
    shape = x1.shape
    x1, x2 = x1.ravel(), x2.ravel()
    f1 = np.asarray(f(x1), dtype=float).ravel()
    f2 = np.asarray(f(x2), dtype=float).ravel()
    roots = np.full(x1.size, np.nan)
    success = np.zeros(x1.size, dtype=bool)
    at_a, at_b = f1 == 0.0, (f2 == 0.0) & (f1 != 0.0)
    roots[at_a], roots[at_b] = x1[at_a], x2[at_b]
    success[at_a | at_b] = True
    open_ = np.flatnonzero(np.sign(f1) * np.sign(f2) < 0)  # nan and same sign stay failed
    x1, x2, f1, f2 = x1[open_], x2[open_], f1[open_], f2[open_]
    x3, f3 = x2.copy(), f2.copy()
    t = np.full(open_.size, 0.5)
    for step in range(maxiter + 1):
        smaller = np.abs(f1) < np.abs(f2)
        xm = np.where(smaller, x1, x2)
        tol = 0.5 * (xatol + xrtol * np.abs(xm))
        tl = tol / np.abs(x2 - x1)
        done = (tl > 0.5) | (np.where(smaller, f1, f2) == 0.0)
        if done.any():
            roots[open_[done]] = xm[done]
            success[open_[done]] = True
            keep = ~done
            open_, x1, x2, x3 = open_[keep], x1[keep], x2[keep], x3[keep]
            f1, f2, f3, t, tl = f1[keep], f2[keep], f3[keep], t[keep], tl[keep]
        if open_.size == 0 or step == maxiter:
            break
        if step > 0:  # x3 exists: inverse quadratic interpolation where it is safe
            with np.errstate(divide="ignore", invalid="ignore"):
                xi = (x1 - x2) / (x3 - x2)
                phi = (f1 - f2) / (f3 - f2)
                quadratic = (f1 / (f2 - f1) * f3 / (f2 - f3)
                             + (x3 - x1) / (x2 - x1) * f1 / (f3 - f1) * f2 / (f3 - f2))
            safe = (phi * phi < xi) & ((1.0 - phi) ** 2 < 1.0 - xi)
            t = np.where(safe, quadratic, 0.5)
        t = np.clip(t, tl, 1.0 - tl)
        xt = x1 + t * (x2 - x1)
        ft = np.asarray(f(xt), dtype=float).ravel()
        bad = np.isnan(ft)
        if bad.any():  # f is not usable in these brackets: they fail
            keep = ~bad
            open_, x1, x2, x3, xt = open_[keep], x1[keep], x2[keep], x3[keep], xt[keep]
            f1, f2, f3, ft = f1[keep], f2[keep], f3[keep], ft[keep]
        same = np.sign(ft) == np.sign(f1)
        x3 = np.where(same, x1, x2)
        f3 = np.where(same, f1, f2)
        x2 = np.where(same, x2, x1)
        f2 = np.where(same, f2, f1)
        x1, f1 = xt, ft
    return roots.reshape(shape), success.reshape(shape)


def minimize_bounded(
    f: Callable[[float], float],
    lo: float,
    hi: float,
    xatol: float = 1e-5,
    maxfun: int = 500,
) -> tuple[float, float, int]:
    """Local minimum of ``f`` on [lo, hi] by Brent's method (golden section + parabolas).

    Parameters
    ----------
    f : callable
        Scalar function of one float.
    lo, hi : float
        Search interval, ``lo < hi``; the ends themselves are never evaluated.
    xatol : float
        Absolute tolerance of the minimiser (about ``xatol`` plus ``1.5e-8 |x|``).
    maxfun : int
        Largest number of evaluations; the best point so far is returned when it is reached.

    Returns
    -------
    x, fx : float
        Best point found and ``f(x)``.
    evaluations : int
        Number of calls of ``f``.

    Raises
    ------
    ValueError
        ``lo >= hi`` or a bad tolerance.

    Notes
    -----
    Procedure *localmin* of [1] with ``t = xatol / 3`` and ``eps =`` :data:`BOUNDED_RTOL`: x is
    the best point, w the second best and v the previous w; a parabola through x, w, v gives
    the step when it falls inside the interval and is less than half the step before last,
    else the golden section of the larger part is taken. The search stops when the interval
    around x is within ``2 tol = 2 (1.5e-8 |x| + xatol / 3)`` of x. A nan value of ``f`` is
    taken as +inf (worse than any number). For a unimodal ``f`` the minimum is found; else a
    local minimum.

    References
    ----------
    .. [1] R. P. Brent, *Algorithms for Minimization without Derivatives*, Prentice-Hall,
           1973, ch. 5.
    """
    a, b = float(lo), float(hi)
    if not a < b or not xatol > 0:
        raise ValueError(f"minimize_bounded: need lo < hi (got {lo}, {hi}) and xatol > 0")
    t = xatol / 3.0
    x = w = v = a + GOLDEN * (b - a)
    fx = float(f(x))
    fx = math.inf if math.isnan(fx) else fx
    fw = fv = fx
    d = e = 0.0
    evaluations = 1
    while evaluations < maxfun:
        m = 0.5 * (a + b)
        tol = BOUNDED_RTOL * abs(x) + t
        tol2 = 2.0 * tol
        if abs(x - m) <= tol2 - 0.5 * (b - a):
            break
        p = q = r = 0.0
        if abs(e) > tol:  # trial parabola through x, w, v
            r = (x - w) * (fx - fv)
            q = (x - v) * (fx - fw)
            p = (x - v) * q - (x - w) * r
            q = 2.0 * (q - r)
            if q > 0.0:
                p = -p
            else:
                q = -q
            r, e = e, d
        if abs(p) < abs(0.5 * q * r) and q * (a - x) < p < q * (b - x):
            d = p / q  # parabolic step
            u = x + d
            if u - a < tol2 or b - u < tol2:  # not too close to an end
                d = tol if x < m else -tol
        else:  # golden-section step into the larger part
            e = (b if x < m else a) - x
            d = GOLDEN * e
        u = x + (d if abs(d) >= tol else math.copysign(tol, d))
        fu = float(f(u))
        fu = math.inf if math.isnan(fu) else fu
        evaluations += 1
        if fu <= fx:
            if u < x:
                b = x
            else:
                a = x
            v, fv, w, fw, x, fx = w, fw, x, fx, u, fu
        else:
            if u < x:
                a = u
            else:
                b = u
            if fu <= fw or w == x:
                v, fv, w, fw = w, fw, u, fu
            elif fu <= fv or v == x or v == w:
                v, fv = u, fu
    return x, fx, evaluations


@dataclass(frozen=True, eq=False)
class SimplexResult:
    """Outcome of :func:`nelder_mead`.

    Attributes
    ----------
    x : ndarray
        Best vertex of the last simplex.
    fun : float
        ``f(x)``.
    evaluations : int
        Number of calls of ``f``.
    converged : bool
        True when the stop test was met (else ``maxiter`` steps were taken).
    """

    x: np.ndarray
    fun: float
    evaluations: int
    converged: bool


def nelder_mead(
    f: Callable[[np.ndarray], float],
    x0,
    xatol: float = 1e-4,
    fatol: float = 1e-4,
    maxiter: int | None = None,
    initial_step: float = 0.05,
    zero_step: float = 0.00025,
) -> SimplexResult:
    """Unconstrained minimum of ``f`` by the Nelder-Mead simplex method.

    Parameters
    ----------
    f : callable
        Scalar function of a 1-D float array (not modified by the search).
    x0 : array_like
        Starting point, n values.
    xatol : float
        Stop when every vertex is within ``xatol`` (each coordinate) of the best one ...
    fatol : float
        ... and every value within ``fatol`` of the best value.
    maxiter : int, optional
        Largest number of steps (default 200 n).
    initial_step : float
        The starting simplex is x0 and, for each coordinate k, x0 with coordinate k multiplied
        by ``1 + initial_step`` ...
    zero_step : float
        ... or set to ``zero_step`` where it is zero (common practice, no source).

    Returns
    -------
    SimplexResult
        Best vertex, its value, the evaluation count and whether the stop test was met.

    Notes
    -----
    The vertices are kept sorted by value, best first. Each step reflects the worst vertex
    through the centroid of the others (coefficient rho = 1); a reflection better than the
    best is expanded (chi = 2); one no better than the second worst is contracted outside
    (gamma = 1/2, accepted when not worse than the reflection) or, when not better than the
    worst, inside (accepted when better than the worst); else the simplex shrinks towards the
    best vertex (sigma = 1/2). Coefficients of [1], steps and tie rules (a new vertex goes
    after the vertices of equal value) as in [2]. A nan value of ``f`` is taken as +inf.

    References
    ----------
    .. [1] J. A. Nelder and R. Mead, "A simplex method for function minimization," Computer
           Journal 7, 308-313 (1965).
    .. [2] J. C. Lagarias, J. A. Reeds, M. H. Wright and P. E. Wright, "Convergence properties
           of the Nelder-Mead simplex method in low dimensions," SIAM J. Optim. 9, 112-147
           (1998).
    """
    x0 = np.array(x0, dtype=float).ravel()
    n = x0.size
    if n == 0 or not xatol >= 0 or not fatol >= 0:
        raise ValueError("nelder_mead: need at least one variable and xatol, fatol >= 0")
    maxiter = 200 * n if maxiter is None else int(maxiter)
    evaluations = 0

    def value(x: np.ndarray) -> float:
        nonlocal evaluations
        evaluations += 1
        fx = float(f(x.copy()))
        return math.inf if math.isnan(fx) else fx

    sim = np.repeat(x0[None, :], n + 1, axis=0)
    for k in range(n):
        sim[k + 1, k] = x0[k] * (1.0 + initial_step) if x0[k] != 0.0 else zero_step
    fsim = np.array([value(x) for x in sim])
    order = np.argsort(fsim, kind="stable")
    sim, fsim = sim[order], fsim[order]
    converged = False
    for _ in range(maxiter):
        with np.errstate(invalid="ignore"):  # inf - inf where every value is inf: not converged
            spread = np.max(np.abs(fsim[1:] - fsim[0]))
        if np.max(np.abs(sim[1:] - sim[0])) <= xatol and spread <= fatol:
            converged = True
            break
        worst = sim[-1]
        centroid = np.sum(sim[:-1], axis=0) / n
        xr = 2.0 * centroid - worst  # reflection, (1 + rho) c - rho x_worst
        fr = value(xr)
        shrink = False
        if fr < fsim[0]:
            xe = 3.0 * centroid - 2.0 * worst  # expansion, (1 + rho chi) c - rho chi x_worst
            fe = value(xe)
            sim[-1], fsim[-1] = (xe, fe) if fe < fr else (xr, fr)
        elif fr < fsim[-2]:
            sim[-1], fsim[-1] = xr, fr
        elif fr < fsim[-1]:
            xc = 1.5 * centroid - 0.5 * worst  # outside contraction
            fc = value(xc)
            if fc <= fr:
                sim[-1], fsim[-1] = xc, fc
            else:
                shrink = True
        else:
            xcc = 0.5 * centroid + 0.5 * worst  # inside contraction
            fcc = value(xcc)
            if fcc < fsim[-1]:
                sim[-1], fsim[-1] = xcc, fcc
            else:
                shrink = True
        if shrink:
            for j in range(1, n + 1):
                sim[j] = sim[0] + 0.5 * (sim[j] - sim[0])
                fsim[j] = value(sim[j])
        order = np.argsort(fsim, kind="stable")
        sim, fsim = sim[order], fsim[order]
    return SimplexResult(sim[0].copy(), float(fsim[0]), evaluations, converged)
