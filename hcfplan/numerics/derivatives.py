"""Accurate derivatives of a smooth real function of angular frequency (beta(omega), k(omega)).

Method
------
The function is sampled at the ``degree + 1`` Chebyshev points (first kind) of the interval
:math:`[\\omega_0 - h, \\omega_0 + h]`, the interpolating Chebyshev series is differentiated
analytically and evaluated at the centre. Because the sampling and the differentiation are linear,
each derivative is a fixed weighted sum of the samples; the weights depend only on the degree and
are computed once (:func:`_centre_weights`). Many points are handled at once: the samples form an
array of shape ``(points, degree + 1)`` and one matrix product gives all derivatives.

The half-width ``h`` trades truncation error (large ``h``, worse near a singularity of the function
such as an anti-resonance of a fiber wall) against rounding noise (small ``h``: the derivative of
order k amplifies the rounding error of the samples by about ``(degree / h)**k``). By default the
estimate is made for a ladder of half-widths ``h = w omega_0`` with ``w`` in :data:`WIDTH_LADDER`
(16 rungs from 0.4 down to 9e-4, ratio 1.5; 15 samples each) and, separately for every point
and every order, the rung whose estimate agrees best with both of its neighbours is kept (a
three-rung consistency rule). A fixed relative half-width can be given
instead. ValidityWarnings raised by ``func`` at the outer sampling nodes are suppressed; ``func``
is evaluated once more at the requested points so that their own warnings are issued.

Measured accuracy (degree 14, 400-3000 nm, ``tests/numerics/test_derivatives.py``): for a
Sellmeier-like
:math:`\\beta = \\omega\\,\\varepsilon(\\omega)/c` with the fused-silica poles of Malitson 1965
the worst relative errors were 1e-11 (order 2), 2e-9 (order 3), 3e-8 (order 4), 2e-7 (order 5),
2e-6 (order 6); for a sine plus a large linear term below 1e-9 up to order 4. For an empty
capillary, beta = sqrt(omega^2/c^2 - (u/a)^2) with a = 50 um, whose dispersive part is only
~4e-5 of beta, rounding limits the result to 1e-8 (order 2), 1e-7 (order 3), 4e-6 (order 4).
Within 1 % of an anti-resonance of :class:`~hcfplan.fibers.antiresonant.AntiresonantFiber`
the rule falls back to the narrow rungs and agrees with a fixed 1e-3 half-width to 1e-9.
The tests require 1e-7 for order 2 and 1e-5 for order 3.

References
----------
.. [1] L. N. Trefethen, *Approximation Theory and Approximation Practice*, SIAM, 2013, ch. 8
       (convergence of Chebyshev interpolants of analytic functions) [chapter from memory].
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from functools import lru_cache

import numpy as np
from numpy.polynomial import chebyshev as cheb

from hcfplan.errors import ConfigError, ValidityWarning

#: Default polynomial degree of the local Chebyshev interpolant.
DEFAULT_DEGREE = 14
#: Relative half-widths h / omega0 tried by the adaptive rule (largest first).
WIDTH_LADDER = tuple(0.4 / 1.5**k for k in range(16))  # 0.4 ... 9e-4
#: Highest derivative order supported.
MAX_ORDER = 6


@lru_cache(maxsize=16)
def _centre_weights(degree: int, max_order: int) -> tuple[np.ndarray, np.ndarray]:
    """Chebyshev nodes x_j in [-1, 1] and weights W[k, j] with f^(k)(0) = sum_j W[k, j] f(x_j)."""
    j = np.arange(degree + 1)
    nodes = np.cos(np.pi * (j + 0.5) / (degree + 1))
    inverse_vandermonde = np.linalg.inv(cheb.chebvander(nodes, degree))
    identity = np.eye(degree + 1)
    rows = np.empty((max_order + 1, degree + 1))
    for k in range(max_order + 1):
        rows[k] = [cheb.chebval(0.0, cheb.chebder(identity[n], k)) for n in range(degree + 1)]
    weights = rows @ inverse_vandermonde
    nodes.setflags(write=False)
    weights.setflags(write=False)
    return nodes, weights


def _check_order(max_order: int) -> None:
    if not (isinstance(max_order, (int, np.integer)) and 0 <= max_order <= MAX_ORDER):
        raise ConfigError(f"derivative order = {max_order!r}: must be an integer 0..{MAX_ORDER}")


def _from_samples(samples: np.ndarray, half_width: np.ndarray, weights: np.ndarray) -> np.ndarray:
    """Derivatives 0..K-1 (K rows of ``weights``) from ``samples`` (n, nodes), C-contiguous, of
    the intervals of ``half_width`` (n,); shape (K, n)."""
    scale = half_width[None, :] ** np.arange(weights.shape[0])[:, None]
    return (samples @ weights.T).T / scale


def _estimates(func: Callable, omega: np.ndarray, rel_width: float, max_order: int, degree: int):
    """Derivatives 0..max_order at each omega for one half-width; shape (max_order+1, n)."""
    nodes, weights = _centre_weights(degree, max_order)
    half_width = rel_width * omega
    samples = np.asarray(func(omega[:, None] + half_width[:, None] * nodes[None, :]), dtype=float)
    return _from_samples(samples, half_width, weights)


def derivative_table(
    func: Callable[[np.ndarray], np.ndarray],
    omega: float | np.ndarray,
    max_order: int,
    *,
    rel_width: float | None = None,
    degree: int = DEFAULT_DEGREE,
) -> np.ndarray:
    """Derivatives of orders 0..``max_order`` of ``func`` at each ``omega``.

    Parameters
    ----------
    func : callable
        Vectorised real function of angular frequency (accepts a 2-D array). [rad/s -> any]
    omega : float or ndarray
        Points at which to differentiate; must be > 0. [rad/s]
    max_order : int
        Highest order, 0..6.
    rel_width : float, optional
        Fixed relative half-width h/omega of the sampling interval. Default: adaptive ladder
        (see module docstring).
    degree : int
        Degree of the Chebyshev interpolant (samples per point = degree + 1).

    Returns
    -------
    ndarray
        Shape ``(max_order + 1,) + shape(omega)``; entry k is d^k func / d omega^k.
        [unit of func / (rad/s)^k]

    References
    ----------
    L. N. Trefethen, Approximation Theory and Approximation Practice, SIAM (2013), ch. 8 [chapter
    from memory].
    """
    _check_order(max_order)
    omega_arr = np.asarray(omega, dtype=float)
    flat = omega_arr.reshape(-1)
    if not np.all(flat > 0):
        raise ConfigError(f"omega = {flat.min():.4g} rad/s: must be > 0 to differentiate")
    if rel_width is not None and not 0 < rel_width < 0.5:
        raise ConfigError(f"rel_width = {rel_width}: must be in (0, 0.5)")
    with warnings.catch_warnings():
        # the outer sampling nodes may leave a model's fitted range; that is a numerical detail
        warnings.simplefilter("ignore", ValidityWarning)
        if rel_width is None:
            table = _adaptive(func, flat, max_order, degree)
        else:
            table = _estimates(func, flat, rel_width, max_order, degree)
    func(flat)  # evaluated at the points themselves so that their own validity warnings show
    return table.reshape((max_order + 1,) + omega_arr.shape)


#: Samples per call of ``func`` in the adaptive rule: the rungs of as many points as fit are
#: sampled in one call (a call of a fiber model costs about 0.25 ms of Python before its
#: arithmetic, and the rule made 16 of them per derivative); 1 MB per array of samples.
_SAMPLES_PER_CALL = 1 << 17


def _ladder_estimates(func: Callable, omega: np.ndarray, max_order: int,
                      degree: int) -> np.ndarray:
    """:func:`_estimates` for every rung of :data:`WIDTH_LADDER`, shape (rungs, orders, n):
    the same samples and weights, all rungs of a block of points in one call of ``func``."""
    nodes, weights = _centre_weights(degree, max_order)
    widths = np.asarray(WIDTH_LADDER)
    block = max(1, _SAMPLES_PER_CALL // (widths.size * nodes.size))
    out = np.empty((widths.size, max_order + 1, omega.size))
    for start in range(0, omega.size, block):
        part = omega[start:start + block]
        half_width = widths[:, None] * part[None, :]  # (rungs, points)
        where = part[None, :, None] + half_width[:, :, None] * nodes[None, None, :]
        flat = where.transpose(1, 0, 2).reshape(part.size, -1)  # one row per point
        samples = np.asarray(func(flat), dtype=float).reshape(part.size, widths.size, -1)
        for r in range(widths.size):
            rung = np.ascontiguousarray(samples[:, r, :])  # as in _estimates: same rounding
            out[r, :, start:start + part.size] = _from_samples(rung, half_width[r], weights)
    return out


def _adaptive(func: Callable, omega: np.ndarray, max_order: int, degree: int) -> np.ndarray:
    """Three-rung consistency rule over :data:`WIDTH_LADDER` (per point and per order)."""
    rungs = _ladder_estimates(func, omega, max_order, degree)
    step = np.abs(np.diff(rungs, axis=0))  # (rungs-1, orders, points)
    spread = np.maximum(step[:-1], step[1:])  # for the interior rungs 1..R-2
    best = np.argmin(spread, axis=0) + 1
    return np.take_along_axis(rungs, best[None], axis=0)[0]


def derivative(
    func: Callable[[np.ndarray], np.ndarray],
    omega: float | np.ndarray,
    order: int,
    *,
    rel_width: float | None = None,
    degree: int = DEFAULT_DEGREE,
) -> np.ndarray | float:
    """The ``order``-th derivative of ``func`` at ``omega`` (float in, float out).

    Parameters
    ----------
    func : callable
        Vectorised real function of angular frequency. [rad/s -> any]
    omega : float or ndarray
        Evaluation points, > 0. [rad/s]
    order : int
        Derivative order 1..6 (0 returns the interpolated value).
    rel_width, degree :
        See :func:`derivative_table`.

    Returns
    -------
    float or ndarray
        d^order func / d omega^order, same shape as ``omega``. [unit of func / (rad/s)^order]

    References
    ----------
    L. N. Trefethen, Approximation Theory and Approximation Practice, SIAM (2013), ch. 8 [chapter
    from memory].
    """
    value = derivative_table(func, omega, order, rel_width=rel_width, degree=degree)[order]
    return float(value) if np.ndim(value) == 0 else value
