"""Fused elementwise kernels of the steppers and of the nonlinear terms (numba).

Each kernel does in one pass over the spectrum what would take numpy three to six passes with
temporaries. The stepper kernels also apply the gain g of the nonlinear term (N = g * raw, see
:class:`~.operators.NonlinearTerms`), so the spectrum that comes out of the inverse FFT is never
scaled in a pass of its own. Complex products are written out in real arithmetic (numba's
complex multiply does not vectorise); ``fastmath`` stays off so NaN and Inf propagate and are
detected.

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
def stage_first(ui, acc, x, d, u, g, nu, s):  # pragma: no cover - compiled
    """ui = d u;  acc = k1 = d g nu;  x = ui + s k1.  Returns sum |u|^2."""
    total = 0.0
    for i in range(u.size):
        dr, di = d[i].real, d[i].imag
        ur, uj = u[i].real, u[i].imag
        total += ur * ur + uj * uj
        gr, gi = g[i].real, g[i].imag
        nr, nj = nu[i].real, nu[i].imag
        kr, kj = gr * nr - gi * nj, gr * nj + gi * nr
        ar, aj = dr * ur - di * uj, dr * uj + di * ur
        br, bj = dr * kr - di * kj, dr * kj + di * kr
        ui[i] = complex(ar, aj)
        acc[i] = complex(br, bj)
        x[i] = complex(ar + s * br, aj + s * bj)
    return total


@njit(**_JIT)
def stage_middle(x, acc, ui, g, r, s):  # pragma: no cover - compiled
    """k = g r;  acc += 2 k;  x = ui + s k."""
    for i in range(r.size):
        gr, gi = g[i].real, g[i].imag
        rr, rj = r[i].real, r[i].imag
        kr, kj = gr * rr - gi * rj, gr * rj + gi * rr
        acc[i] += complex(2.0 * kr, 2.0 * kj)
        x[i] = complex(ui[i].real + s * kr, ui[i].imag + s * kj)


@njit(**_JIT)
def stage_last(x, acc, ui, g, r, s, d):  # pragma: no cover - compiled
    """k = g r;  acc += 2 k;  x = d (ui + s k)."""
    for i in range(r.size):
        gr, gi = g[i].real, g[i].imag
        rr, rj = r[i].real, r[i].imag
        kr, kj = gr * rr - gi * rj, gr * rj + gi * rr
        acc[i] += complex(2.0 * kr, 2.0 * kj)
        yr, yj = ui[i].real + s * kr, ui[i].imag + s * kj
        dr, di = d[i].real, d[i].imag
        x[i] = complex(dr * yr - di * yj, dr * yj + di * yr)


@njit(**_JIT)
def stage_combine(u4, x, r4, d, ui, acc, g, r, s):  # pragma: no cover - compiled
    """u4 = x = d (ui + s acc) + s g r;  r4 = r.  Returns sum |u4|^2 (inf/nan if not finite)."""
    total = 0.0
    for i in range(r.size):
        gr, gi = g[i].real, g[i].imag
        rr, rj = r[i].real, r[i].imag
        r4[i] = r[i]
        yr, yj = ui[i].real + s * acc[i].real, ui[i].imag + s * acc[i].imag
        dr, di = d[i].real, d[i].imag
        vr = dr * yr - di * yj + s * (gr * rr - gi * rj)
        vj = dr * yj + di * yr + s * (gr * rj + gi * rr)
        total += vr * vr + vj * vj
        u4[i] = complex(vr, vj)
        x[i] = complex(vr, vj)
    return total


@njit(**_JIT)
def difference_norm2(g, r4, r5):  # pragma: no cover - compiled
    """sum |g (r4 - r5)|^2."""
    total = 0.0
    for i in range(g.size):
        dr, dj = r4[i].real - r5[i].real, r4[i].imag - r5[i].imag
        gr, gi = g[i].real, g[i].imag
        er, ej = gr * dr - gi * dj, gr * dj + gi * dr
        total += er * er + ej * ej
    return total


@njit(**_JIT)
def difference_scaled_rms(g, r4, r5, u4, u, s, rtol, atol):  # pragma: no cover - compiled
    """RMS of s g (r4 - r5) / (atol + rtol max(|u4|, |u|))."""
    total = 0.0
    for i in range(g.size):
        big = max(u4[i].real ** 2 + u4[i].imag ** 2, u[i].real ** 2 + u[i].imag ** 2)
        scale = atol + rtol * np.sqrt(big)
        dr, dj = r4[i].real - r5[i].real, r4[i].imag - r5[i].imag
        gr, gi = g[i].real, g[i].imag
        er, ej = gr * dr - gi * dj, gr * dj + gi * dr
        total += (er * er + ej * ej) / (scale * scale)
    return abs(s) * np.sqrt(total / g.size)


@njit(**_JIT)
def kerr_in_place(a):  # pragma: no cover - compiled
    """a = a |a|^2."""
    for i in range(a.size):
        ar, aj = a[i].real, a[i].imag
        p = ar * ar + aj * aj
        a[i] = complex(ar * p, aj * p)


@njit(**_JIT)
def power_of(a, power):  # pragma: no cover - compiled
    """power = |a|^2."""
    for i in range(a.size):
        power[i] = a[i].real ** 2 + a[i].imag ** 2


@njit(**_JIT)
def delayed_in_place(a, power, delayed, instantaneous):  # pragma: no cover - compiled
    """a = a (f_i |a|^2 + delayed)."""
    for i in range(a.size):
        v = instantaneous * power[i] + delayed[i]
        a[i] = complex(a[i].real * v, a[i].imag * v)


@njit(**_JIT)
def multiply_in_place(x, y):  # pragma: no cover - compiled
    """x = x y (complex)."""
    for i in range(x.size):
        xr, xj = x[i].real, x[i].imag
        yr, yj = y[i].real, y[i].imag
        x[i] = complex(xr * yr - xj * yj, xr * yj + xj * yr)
