"""Fused elementwise kernels of the steppers and of the nonlinear terms (numba).

Each kernel does in one pass over the spectrum what would take numpy three to six passes with
temporaries. The stepper kernels also apply the gain g of the nonlinear term (N = g * raw, see
:class:`~.operators.NonlinearTerms`), so the spectrum that comes out of the inverse FFT is never
scaled in a pass of its own. Complex products are written out in real arithmetic on (n, 2)
float views of the complex arrays (:func:`_pairs`, no copy): numba's complex element access and
multiply compile to slower code (a pass of ``stage_middle`` at N = 2^13 took 47 us with complex
access and 34 us on the views on our test machine). ``fastmath`` stays off so NaN and Inf
propagate and are detected. The arrays must be C-contiguous (all work arrays of the solver are).

Only the solver imports this module (lazily), so importing :mod:`hcfplan` does not load numba.
Compiled code is cached on disk (``cache=True``): the first run on a machine compiles (4.0 s on
our 2 shared cores, including ``import numba``; ``bench/solver.py`` prints it), later runs load
the cache in 0.9 s (most of it the numba import).
"""

from __future__ import annotations

import numpy as np
from numba import njit

_JIT = {"cache": True, "fastmath": False, "nogil": True}


@njit(**_JIT)
def _pairs(a):  # pragma: no cover - compiled
    """The complex array ``a`` as an (n, 2) float view (real, imaginary parts); no copy."""
    return a.view(np.float64).reshape((a.size, 2))


@njit(**_JIT)
def stage_first(ui, acc, x, d, u, g, nu, s):  # pragma: no cover - compiled
    """ui = d u;  acc = k1 = d g nu;  x = ui + s k1.  Returns sum |u|^2."""
    UI, ACC, X, D, U, G, NU = _pairs(ui), _pairs(acc), _pairs(x), _pairs(d), _pairs(u), \
        _pairs(g), _pairs(nu)
    total = 0.0
    for i in range(U.shape[0]):
        dr, di = D[i, 0], D[i, 1]
        ur, uj = U[i, 0], U[i, 1]
        total += ur * ur + uj * uj
        gr, gi = G[i, 0], G[i, 1]
        nr, nj = NU[i, 0], NU[i, 1]
        kr, kj = gr * nr - gi * nj, gr * nj + gi * nr
        ar, aj = dr * ur - di * uj, dr * uj + di * ur
        br, bj = dr * kr - di * kj, dr * kj + di * kr
        UI[i, 0], UI[i, 1] = ar, aj
        ACC[i, 0], ACC[i, 1] = br, bj
        X[i, 0], X[i, 1] = ar + s * br, aj + s * bj
    return total


@njit(**_JIT)
def stage_middle(x, acc, ui, g, r, s):  # pragma: no cover - compiled
    """k = g r;  acc += 2 k;  x = ui + s k."""
    X, ACC, UI, G, R = _pairs(x), _pairs(acc), _pairs(ui), _pairs(g), _pairs(r)
    for i in range(R.shape[0]):
        gr, gi = G[i, 0], G[i, 1]
        rr, rj = R[i, 0], R[i, 1]
        kr, kj = gr * rr - gi * rj, gr * rj + gi * rr
        ACC[i, 0] += 2.0 * kr
        ACC[i, 1] += 2.0 * kj
        X[i, 0], X[i, 1] = UI[i, 0] + s * kr, UI[i, 1] + s * kj


@njit(**_JIT)
def stage_last(x, acc, ui, g, r, s, d):  # pragma: no cover - compiled
    """k = g r;  acc += 2 k;  x = d (ui + s k)."""
    X, ACC, UI, G, R, D = _pairs(x), _pairs(acc), _pairs(ui), _pairs(g), _pairs(r), _pairs(d)
    for i in range(R.shape[0]):
        gr, gi = G[i, 0], G[i, 1]
        rr, rj = R[i, 0], R[i, 1]
        kr, kj = gr * rr - gi * rj, gr * rj + gi * rr
        ACC[i, 0] += 2.0 * kr
        ACC[i, 1] += 2.0 * kj
        yr, yj = UI[i, 0] + s * kr, UI[i, 1] + s * kj
        dr, di = D[i, 0], D[i, 1]
        X[i, 0], X[i, 1] = dr * yr - di * yj, dr * yj + di * yr


@njit(**_JIT)
def stage_combine(u4, x, r4, d, ui, acc, g, r, s):  # pragma: no cover - compiled
    """u4 = x = d (ui + s acc) + s g r;  r4 = r.  Returns sum |u4|^2 (inf/nan if not finite)."""
    U4, X, R4, D, UI, ACC, G, R = _pairs(u4), _pairs(x), _pairs(r4), _pairs(d), _pairs(ui), \
        _pairs(acc), _pairs(g), _pairs(r)
    total = 0.0
    for i in range(R.shape[0]):
        gr, gi = G[i, 0], G[i, 1]
        rr, rj = R[i, 0], R[i, 1]
        R4[i, 0], R4[i, 1] = rr, rj
        yr, yj = UI[i, 0] + s * ACC[i, 0], UI[i, 1] + s * ACC[i, 1]
        dr, di = D[i, 0], D[i, 1]
        vr = dr * yr - di * yj + s * (gr * rr - gi * rj)
        vj = dr * yj + di * yr + s * (gr * rj + gi * rr)
        total += vr * vr + vj * vj
        U4[i, 0], U4[i, 1] = vr, vj
        X[i, 0], X[i, 1] = vr, vj
    return total


@njit(**_JIT)
def difference_norm2(g, r4, r5):  # pragma: no cover - compiled
    """sum |g (r4 - r5)|^2."""
    G, R4, R5 = _pairs(g), _pairs(r4), _pairs(r5)
    total = 0.0
    for i in range(G.shape[0]):
        dr, dj = R4[i, 0] - R5[i, 0], R4[i, 1] - R5[i, 1]
        gr, gi = G[i, 0], G[i, 1]
        er, ej = gr * dr - gi * dj, gr * dj + gi * dr
        total += er * er + ej * ej
    return total


@njit(**_JIT)
def difference_scaled_rms(g, r4, r5, u4, u, s, rtol, atol):  # pragma: no cover - compiled
    """RMS of s g (r4 - r5) / (atol + rtol max(|u4|, |u|))."""
    G, R4, R5, U4, U = _pairs(g), _pairs(r4), _pairs(r5), _pairs(u4), _pairs(u)
    total = 0.0
    for i in range(G.shape[0]):
        big = max(U4[i, 0] ** 2 + U4[i, 1] ** 2, U[i, 0] ** 2 + U[i, 1] ** 2)
        scale = atol + rtol * np.sqrt(big)
        dr, dj = R4[i, 0] - R5[i, 0], R4[i, 1] - R5[i, 1]
        gr, gi = G[i, 0], G[i, 1]
        er, ej = gr * dr - gi * dj, gr * dj + gi * dr
        total += (er * er + ej * ej) / (scale * scale)
    return abs(s) * np.sqrt(total / G.shape[0])


@njit(**_JIT)
def kerr_in_place(a):  # pragma: no cover - compiled
    """a = a |a|^2."""
    A = _pairs(a)
    for i in range(A.shape[0]):
        ar, aj = A[i, 0], A[i, 1]
        p = ar * ar + aj * aj
        A[i, 0], A[i, 1] = ar * p, aj * p


@njit(**_JIT)
def power_of(a, power):  # pragma: no cover - compiled
    """power = |a|^2."""
    A = _pairs(a)
    for i in range(A.shape[0]):
        power[i] = A[i, 0] ** 2 + A[i, 1] ** 2


@njit(**_JIT)
def delayed_in_place(a, power, delayed, instantaneous):  # pragma: no cover - compiled
    """a = a (f_i |a|^2 + delayed)."""
    A = _pairs(a)
    for i in range(A.shape[0]):
        v = instantaneous * power[i] + delayed[i]
        A[i, 0] *= v
        A[i, 1] *= v


@njit(**_JIT)
def multiply_in_place(x, y):  # pragma: no cover - compiled
    """x = x y (complex)."""
    X, Y = _pairs(x), _pairs(y)
    for i in range(X.shape[0]):
        xr, xj = X[i, 0], X[i, 1]
        yr, yj = Y[i, 0], Y[i, 1]
        X[i, 0], X[i, 1] = xr * yr - xj * yj, xr * yj + xj * yr
