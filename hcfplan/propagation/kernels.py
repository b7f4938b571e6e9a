"""Fused elementwise kernels of the steppers (numba).

Each kernel does in one pass over the spectrum what would take numpy three to six passes with
temporaries; at N = 2^13 this lowers the non-FFT work of a step by about a factor of three
(``bench/solver.py``). Only the solver imports this module (lazily), so importing
:mod:`hcfplan` does not load numba. Compiled results are cached on disk.
"""

from __future__ import annotations

import numpy as np
from numba import njit


@njit(cache=True)
def start_stage(ui, acc, tmp, d, u, nu, s):  # pragma: no cover - compiled
    """ui = d u;  acc = d nu (k1);  tmp = ui + s acc."""
    for i in range(u.size):
        ui[i] = d[i] * u[i]
        acc[i] = d[i] * nu[i]
        tmp[i] = ui[i] + s * acc[i]


@njit(cache=True)
def middle_stage(tmp, ui, k, s, acc):  # pragma: no cover - compiled
    """tmp = ui + s k;  acc += 2 k."""
    for i in range(k.size):
        tmp[i] = ui[i] + s * k[i]
        acc[i] += 2.0 * k[i]


@njit(cache=True)
def last_stage(tmp, ui, k, s, acc, d):  # pragma: no cover - compiled
    """tmp = d (ui + s k);  acc += 2 k."""
    for i in range(k.size):
        tmp[i] = d[i] * (ui[i] + s * k[i])
        acc[i] += 2.0 * k[i]


@njit(cache=True)
def combine(u4, d, ui, acc, k4, s):  # pragma: no cover - compiled
    """u4 = d (ui + s acc) + s k4  (RK4 weights 1/6 folded into s)."""
    for i in range(k4.size):
        u4[i] = d[i] * (ui[i] + s * acc[i]) + s * k4[i]


@njit(cache=True)
def scaled_rms(k4, k5, u4, u, s, rtol, atol):  # pragma: no cover - compiled
    """RMS of s (k4 - k5) / (atol + rtol max(|u4|, |u|))."""
    total = 0.0
    for i in range(k4.size):
        big = max(u4[i].real ** 2 + u4[i].imag ** 2, u[i].real ** 2 + u[i].imag ** 2)
        scale = atol + rtol * np.sqrt(big)
        dr = k4[i].real - k5[i].real
        di = k4[i].imag - k5[i].imag
        total += (dr * dr + di * di) / (scale * scale)
    return abs(s) * np.sqrt(total / k4.size)


@njit(cache=True)
def kerr_product(a, out):  # pragma: no cover - compiled
    """out = a |a|^2."""
    for i in range(a.size):
        out[i] = a[i] * (a[i].real ** 2 + a[i].imag ** 2)


@njit(cache=True)
def power_of(a, power):  # pragma: no cover - compiled
    """power = |a|^2."""
    for i in range(a.size):
        power[i] = a[i].real ** 2 + a[i].imag ** 2


@njit(cache=True)
def raman_product(a, power, delayed, instantaneous, out):  # pragma: no cover - compiled
    """out = a (f_i |a|^2 + delayed)."""
    for i in range(a.size):
        out[i] = a[i] * (instantaneous * power[i] + delayed[i])
