"""Fused elementwise kernels of the steppers and of the nonlinear terms, compiled (numba).

Each kernel does in one pass over the spectrum what would take numpy three to six passes with
temporaries. The stepper kernels also apply the gain g of the nonlinear term (N = i g raw, g
real, see :class:`~.operators.NonlinearTerms`), so the spectrum that comes out of the inverse
FFT is never scaled in a pass of its own. Complex products are written out in real arithmetic
on flat float views of the complex arrays (:func:`_flat`, no copy), which LLVM vectorises in
the kernels without branches (not the recorder passes; the plasma kernel in its blocks below
the rate tables); the (n, 2) views used before were compiled to scalar code (on a 2-core
AVX-512 machine, N = 2^13: ``stage_middle`` 17 -> 9 us, ``stage_combine`` 29 -> 13 us; on an
earlier AVX2 machine the vectorised variants tried were not faster). The kernels that sum over
the array allow ``reassoc`` (:data:`_SUM_JIT`) so the sum is split into vector lanes; no other
fast-math flag is set, so NaN and Inf propagate and are detected. The arrays must be
C-contiguous (all work arrays of the solver are).

Each kernel has a numpy twin of the same name, signature and in-place semantics in
:mod:`.kernels_numpy`; the solver takes one set or the other from :mod:`.kernel_sets`, as the
process's kernel policy says (:mod:`hcfplan.numerics.kernel_choice`: the compiled set by default,
the twins for a small grid in a one-shot command, which then never imports numba). A new
kernel gets its twin there and a test against it
(``tests/propagation/test_solver_kernels_numpy.py``).

Only :mod:`.kernel_sets` (lazily) and the scan workers' warm-up
(:mod:`hcfplan.planning.scan.warmup`) import this module, so importing :mod:`hcfplan` does not
load numba. Compiled code is cached on disk (``cache=True``): the first run on a machine compiles
(4.0 s on our 2 shared cores, including ``import numba``; ``bench/solver.py`` prints it), later
processes load numba and the cached code in about 0.45 s before the first kernel runs
(``bench/kernels.py`` prints it).
"""

from __future__ import annotations

import numpy as np
from numba import njit

_JIT = {"cache": True, "fastmath": False, "nogil": True}
#: Kernels that sum over the array: ``reassoc`` lets LLVM split the sum into vector lanes (the
#: only fast-math flag; NaN and Inf still propagate, the sum changes at rounding level).
_SUM_JIT = dict(_JIT, fastmath={"reassoc"})


@njit(**_JIT)
def _flat(a):  # pragma: no cover - compiled
    """The complex array ``a`` as a flat float view (re, im, re, im, ...); no copy."""
    return a.view(np.float64)


@njit(**_SUM_JIT)
def stage_first(ui, acc, x, d, u, g, nu, s):  # pragma: no cover - compiled
    """ui = d u;  acc = k1 = d i g nu;  x = ui + s k1.  Returns sum |u|^2.

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    UI, ACC, X, D, U, NU = _flat(ui), _flat(acc), _flat(x), _flat(d), _flat(u), _flat(nu)
    total = 0.0
    for k in range(u.size):
        i, j = 2 * k, 2 * k + 1
        dr, di = D[i], D[j]
        ur, uj = U[i], U[j]
        total += ur * ur + uj * uj
        kr, kj = -g[k] * NU[j], g[k] * NU[i]  # i g nu
        ar, aj = dr * ur - di * uj, dr * uj + di * ur
        br, bj = dr * kr - di * kj, dr * kj + di * kr
        UI[i], UI[j] = ar, aj
        ACC[i], ACC[j] = br, bj
        X[i], X[j] = ar + s * br, aj + s * bj
    return total


@njit(**_JIT)
def stage_middle(x, acc, ui, g, r, s):  # pragma: no cover - compiled
    """k = i g r;  acc += 2 k;  x = ui + s k.

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    X, ACC, UI, R = _flat(x), _flat(acc), _flat(ui), _flat(r)
    for k in range(r.size):
        i, j = 2 * k, 2 * k + 1
        kr, kj = -g[k] * R[j], g[k] * R[i]
        ACC[i] += 2.0 * kr
        ACC[j] += 2.0 * kj
        X[i], X[j] = UI[i] + s * kr, UI[j] + s * kj


@njit(**_JIT)
def stage_last(x, acc, ui, g, r, s, d):  # pragma: no cover - compiled
    """k = i g r;  acc += 2 k;  x = d (ui + s k).

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    X, ACC, UI, R, D = _flat(x), _flat(acc), _flat(ui), _flat(r), _flat(d)
    for k in range(r.size):
        i, j = 2 * k, 2 * k + 1
        kr, kj = -g[k] * R[j], g[k] * R[i]
        ACC[i] += 2.0 * kr
        ACC[j] += 2.0 * kj
        yr, yj = UI[i] + s * kr, UI[j] + s * kj
        dr, di = D[i], D[j]
        X[i], X[j] = dr * yr - di * yj, dr * yj + di * yr


@njit(**_SUM_JIT)
def stage_combine(u4, x, d, ui, acc, g, r, s):  # pragma: no cover - compiled
    """u4 = x = d (ui + s acc) + s i g r.  Returns sum |u4|^2 (inf/nan if not finite).

    References
    ----------
    A stage of RK4IP, J. Hult, J. Lightwave Technol. 25, 3770 (2007).
    """
    U4, X, D, UI, ACC, R = _flat(u4), _flat(x), _flat(d), _flat(ui), _flat(acc), _flat(r)
    total = 0.0
    for k in range(r.size):
        i, j = 2 * k, 2 * k + 1
        yr, yj = UI[i] + s * ACC[i], UI[j] + s * ACC[j]
        dr, di = D[i], D[j]
        vr = dr * yr - di * yj + s * (-g[k] * R[j])
        vj = dr * yj + di * yr + s * (g[k] * R[i])
        total += vr * vr + vj * vj
        U4[i], U4[j] = vr, vj
        X[i], X[j] = vr, vj
    return total


@njit(**_SUM_JIT)
def difference_norm2(g, r4, r5):  # pragma: no cover - compiled
    """sum |i g (r4 - r5)|^2.

    References
    ----------
    Local-error estimate of ERK4(3)-IP, S. Balac and F. Mahé, Comput. Phys. Commun. 184, 1211
    (2013).
    """
    R4, R5 = _flat(r4), _flat(r5)
    total = 0.0
    for k in range(g.size):
        i, j = 2 * k, 2 * k + 1
        dr, dj = R4[i] - R5[i], R4[j] - R5[j]
        er, ej = -g[k] * dj, g[k] * dr
        total += er * er + ej * ej
    return total


# numpy error model: no zero-division check per bin (the check kept the loop scalar); 0/0
# gives nan, as control.scaled_rms_norm does
@njit(**_SUM_JIT, error_model="numpy")
def difference_scaled_rms(g, r4, r5, u4, u, s, rtol, atol):  # pragma: no cover - compiled
    """RMS of s i g (r4 - r5) / (atol + rtol max(|u4|, |u|)).

    References
    ----------
    Local-error estimate of ERK4(3)-IP, S. Balac and F. Mahé, Comput. Phys. Commun. 184, 1211
    (2013).
    Scaled RMS norm: E. Hairer, S. P. Nørsett and G. Wanner, Solving Ordinary Differential Equations
    I, 2nd ed., Springer (1993), sec. II.4 [from memory].
    """
    R4, R5, U4, U = _flat(r4), _flat(r5), _flat(u4), _flat(u)
    total = 0.0
    for k in range(g.size):
        i, j = 2 * k, 2 * k + 1
        big = max(U4[i] ** 2 + U4[j] ** 2, U[i] ** 2 + U[j] ** 2)
        scale = atol + rtol * np.sqrt(big)
        dr, dj = R4[i] - R5[i], R4[j] - R5[j]
        er, ej = -g[k] * dj, g[k] * dr
        total += (er * er + ej * ej) / (scale * scale)
    return abs(s) * np.sqrt(total / g.size)


@njit(**_JIT)
def kerr_in_place(a):  # pragma: no cover - compiled
    """a = a |a|^2.

    References
    ----------
    none: numerical helper
    """
    A = _flat(a)
    for k in range(a.size):
        i, j = 2 * k, 2 * k + 1
        ar, aj = A[i], A[j]
        p = ar * ar + aj * aj
        A[i], A[j] = ar * p, aj * p


@njit(**_JIT)
def power_of(a, power):  # pragma: no cover - compiled
    """power = |a|^2; returns its highest value (nan if a value is nan, as ``power.max()``).

    References
    ----------
    none: numerical helper
    """
    A = _flat(a)
    top, nan = 0.0, False
    for k in range(a.size):
        value = A[2 * k] ** 2 + A[2 * k + 1] ** 2
        power[k] = value
        top = max(top, value)
        nan |= value != value
    return np.nan if nan else top


@njit(**_JIT)
def delayed_in_place(a, power, delayed, instantaneous):  # pragma: no cover - compiled
    """a = a (f_i |a|^2 + delayed).

    References
    ----------
    none: numerical helper
    """
    A = _flat(a)
    for k in range(a.size):
        v = instantaneous * power[k] + delayed[k]
        A[2 * k] *= v
        A[2 * k + 1] *= v


@njit(**_JIT)
def table_rate(li, x, y, first, top, slope_top):  # pragma: no cover - compiled
    """Rate [1/s] of the log-log table (x, y)[first:top + 1] at ln(intensity) ``li`` >=
    x[first], extended above the table with the slope ``slope_top`` (RateTable.__call__ for one
    value; also used by the multimode kernels). A call with array arguments costs reference
    counting (about 35 ns): the caller tests li >= x[first] first, and passes indices, not
    slices.

    References
    ----------
    none: numerical helper (linear interpolation in log-log)
    """
    if li > x[top]:
        return np.exp(y[top] + slope_top * (li - x[top]))
    lo, hi = first, top
    while hi - lo > 1:  # x[lo] <= li <= x[hi]
        mid = (lo + hi) // 2
        if x[mid] <= li:
            lo = mid
        else:
            hi = mid
    if li == x[hi]:
        return np.exp(y[hi])
    return np.exp(y[lo] + (y[hi] - y[lo]) / (x[hi] - x[lo]) * (li - x[lo]))


#: Samples per block of :func:`plasma_in_place`: a block with no sample above the rate tables
#: is done in one branch-free (vectorised) loop.
PLASMA_BLOCK = 256


@njit(**_JIT)
def plasma_in_place(a, p, power, delayed, instantaneous, log_i, log_w, starts, slopes,
                    densities, potentials, to_watt, area, dt, refraction):  # pragma: no cover
    """Kerr and plasma terms of the field a = scale A(t) in one pass over time.

    power = scale^2 |A|^2 (given); p = a (-i refraction rho - damping) (the plasma terms);
    a = a (f_i power + delayed) (the Kerr and delayed terms). Species s has the rate table
    (log_i, log_w)[starts[s]:starts[s+1]] with top slope slopes[s], neutral density
    densities[s] [1/m^3] and ionisation potential potentials[s] [J]; to_watt = 1/scale^2.
    rho is the mid-sample electron density of the piecewise-constant-rate solution and the
    damping the ionisation loss over twice the power, as in ``NonlinearTerms._ionization``
    (the numpy reference). Returns the electron density at the window's end [1/m^3].

    Most samples lie below every table's lowest intensity (or are NaN), where all rates are 0:
    there rho and the end density are the sum of the species' densities so far, kept in
    ``settled`` (summed as the general branch sums them, so the results are the same bit for
    bit) and the damping is 0. The samples go in blocks of :data:`PLASMA_BLOCK`: a block with
    no sample above the tables is one loop without branches, which LLVM vectorises; the others
    take the general loop. In the bench's ionising gas case (8192 points, 83 samples above the
    table) the kernel took 86 us per call before the rate-0 branch, 43 us with it (both on an
    earlier machine), and 22 -> 14 us with the blocks (most of what is left are the rates of
    the samples above the tables).

    References
    ----------
    Plasma terms of M. Geissler et al., Phys. Rev. Lett. 83, 2930 (1999).
    in the envelope form of M. F. Saleh et al., Phys. Rev. Lett. 107, 203902 (2011) [from memory].
    """
    A, P = _flat(a), _flat(p)
    count, n = densities.size, a.size
    watt_min = np.inf
    for s in range(count):
        watt_min = min(watt_min, area * np.exp(log_i[starts[s]]) * (1 - 1e-12))
    exposure = np.zeros(count)  # sum of W dt over the samples before this one
    before = np.zeros(count)  # electron density at the start of this sample
    settled = 0.0  # sum over s of before[s] + 0.5 * 0: rho (and the end density) at rate 0
    end = 0.0
    for b0 in range(0, n, PLASMA_BLOCK):
        b1 = min(b0 + PLASMA_BLOCK, n)
        # views of the block, indexed from 0: LLVM vectorises these loops only so (with
        # range(b0, b1) it did not, seen in the assembly; probably numba's handling of
        # negative indices, which it cannot rule out there)
        w_b, d_b = power[b0:b1], delayed[b0:b1]
        above = 0
        for k in range(w_b.size):
            if w_b[k] * to_watt >= watt_min:
                above += 1
        if above == 0:  # rate 0 throughout: rho = settled, damping 0 (the branch below)
            a_b, p_b = A[2 * b0:2 * b1], P[2 * b0:2 * b1]
            cr, ci = -0.0, -refraction * settled
            for k in range(w_b.size):
                i, j = 2 * k, 2 * k + 1
                ar, aj = a_b[i], a_b[j]
                p_b[i], p_b[j] = ar * cr - aj * ci, ar * ci + aj * cr
                v = instantaneous * w_b[k] + d_b[k]
                a_b[i], a_b[j] = ar * v, aj * v
            end = settled
            continue
        for i in range(b0, b1):
            watt = power[i] * to_watt
            if not watt >= watt_min:  # below every table (or NaN): no rate, no logarithm
                rho, end, damping = settled, settled, 0.0
            else:
                li = np.log(watt / area)
                rho, loss, end = 0.0, 0.0, 0.0
                changed = False
                for s in range(count):
                    first, w_dt = starts[s], 0.0
                    if li >= log_i[first]:  # below this table the rate is 0
                        w_dt = table_rate(li, log_i, log_w, first, starts[s + 1] - 1,
                                           slopes[s]) * dt
                    increment = 0.0
                    if w_dt > 0:
                        increment = densities[s] * np.exp(-exposure[s]) * (-np.expm1(-w_dt))
                        exposure[s] += w_dt
                    rho += before[s] + 0.5 * increment
                    loss += potentials[s] * increment
                    end += before[s] + increment
                    if w_dt > 0:
                        before[s] = densities[s] * (-np.expm1(-exposure[s]))
                        changed = True
                if changed:
                    settled = 0.0
                    for s in range(count):
                        settled += before[s] + 0.5 * 0.0
                damping = loss * (area / dt) / (2.0 * watt) if loss > 0 and watt > 0 else 0.0
            ar, aj = A[2 * i], A[2 * i + 1]
            cr, ci = -damping, -refraction * rho
            P[2 * i], P[2 * i + 1] = ar * cr - aj * ci, ar * ci + aj * cr
            v = instantaneous * power[i] + delayed[i]
            A[2 * i], A[2 * i + 1] = ar * v, aj * v
    return end


@njit(**_JIT)
def spectrum_sums(u, rank, ascending, row, far, band, band_wavelength):  # pragma: no cover
    """density = |u|^2 into ``row`` (FFT order, e.g. a float32 row) and into ``ascending`` at
    the positions ``rank`` (ascending frequency). Returns (sum of density, its sum where ``far``
    is True, its sum where ``band`` is True, sum of band_wavelength * density there).

    References
    ----------
    none: numerical helper
    """
    U = _flat(u)
    total, far_sum, band_sum, band_moment = 0.0, 0.0, 0.0, 0.0
    for i in range(u.size):
        d = U[2 * i] * U[2 * i] + U[2 * i + 1] * U[2 * i + 1]
        row[i] = d
        ascending[rank[i]] = d
        total += d
        if far[i]:
            far_sum += d
        if band[i]:
            band_sum += d
            band_moment += band_wavelength[i] * d
    return total, far_sum, band_sum, band_moment


@njit(**_JIT)
def outermost_width(x, y, level):  # pragma: no cover - compiled
    """Width of y(x) between its outermost samples at or above ``level`` times the refined
    peak, crossings interpolated: :func:`hcfplan.pulse.metrics.width_at_level` with
    ``extent="outermost"``, the same arithmetic in the same order, for ascending ``x`` and
    0 < level < 1 (the caller's duty; not checked here). nan where that function gives nan
    (fewer than 3 samples, no positive maximum or a NaN, above the level at an end) and where
    no sample reaches the level (possible only for a level near 1; that function raises).

    The recorder's bandwidth at every record; at 8192 points the numpy function took 27 us
    with warm caches and 150-180 us inside a run, this pass about 12 us inside a run.

    References
    ----------
    none: numerical helper
    """
    n = y.size
    if n < 3:
        return np.nan
    peak, at = y[0], 0
    for i in range(n):
        v = y[i]
        if v != v:  # np.max gives nan, so "not max > 0"
            return np.nan
        if v > peak:
            peak, at = v, i
    if not peak > 0:
        return np.nan
    top = peak  # metrics._refined_peak: vertex of the parabola through the highest sample
    if 0 < at < n - 1:
        left, right = y[at - 1], y[at + 1]
        curvature = 2.0 * peak - left - right
        if curvature > 0:
            top = peak + (right - left) ** 2 / (8.0 * curvature)
    threshold = level * top
    lo = 0
    while lo < n and not y[lo] >= threshold:
        lo += 1
    hi = n - 1
    while hi >= 0 and not y[hi] >= threshold:
        hi -= 1
    if lo >= n or lo == 0 or hi == n - 1:
        return np.nan
    i_out, i_in = lo - 1, lo  # metrics._crossing(x, y, i_out, i_in, threshold)
    x_lo = x[i_out] + (threshold - y[i_out]) / (y[i_in] - y[i_out]) * (x[i_in] - x[i_out])
    i_out, i_in = hi + 1, hi
    x_hi = x[i_out] + (threshold - y[i_out]) / (y[i_in] - y[i_out]) * (x[i_in] - x[i_out])
    return x_hi - x_lo


@njit(**_JIT)
def power_sums(a, power, scale, far):  # pragma: no cover - compiled
    """power = scale |a|^2.  Returns (max of power, nan if any is nan; its sum where ``far``).

    References
    ----------
    none: numerical helper
    """
    A = _flat(a)
    peak, far_sum, seen_nan = -np.inf, 0.0, False
    for i in range(a.size):
        value = scale * (A[2 * i] * A[2 * i] + A[2 * i + 1] * A[2 * i + 1])
        power[i] = value
        if value > peak:
            peak = value
        elif value != value:
            seen_nan = True
        if far[i]:
            far_sum += value
    return (np.nan if seen_nan else peak), far_sum


@njit(**_JIT)
def add_scaled_product(out, factor, extra, weight):  # pragma: no cover - compiled
    """out = factor out - i weight extra (real factor and weight, complex arrays): the raw
    spectrum of the plasma case, where N = i raw (the gain 1 of the steppers' kernels) and
    N = i factor out + weight extra.

    References
    ----------
    none: numerical helper
    """
    O, E = _flat(out), _flat(extra)
    for k in range(out.size):
        i, j = 2 * k, 2 * k + 1
        orr, oj = O[i], O[j]
        f = factor[k]
        O[i] = f * orr + weight * E[j]
        O[j] = f * oj - weight * E[i]


def warm_kernels() -> None:
    """Call every kernel once with 4-point arrays (loads or compiles the machine code; used by
    :mod:`hcfplan.planning.scan.warmup` and ``bench/solver.py``). A new kernel is added here.

    References
    ----------
    none: numerical helper
    """
    a, b, c, d, e, f, g, h = (np.ones(4, complex) for _ in range(8))
    real, zero = np.ones(4), np.zeros(4)
    stage_first(a, b, c, d, e, real, g, 0.1)
    stage_middle(a, b, c, real, e, 0.1)
    stage_last(a, b, c, real, e, 0.1, f)
    stage_combine(a, b, c, d, e, real, g, 0.1)
    difference_norm2(real, b, c)
    difference_scaled_rms(real, b, c, d, e, 0.1, 1e-6, 0.0)
    kerr_in_place(a)
    power_of(a, real)
    delayed_in_place(a, real, zero, 1.0)
    add_scaled_product(a, real, c, 0.5)
    flags, order = np.ones(4, dtype=np.bool_), np.arange(4)
    spectrum_sums(a, order, real.copy(), np.ones(4, np.float32), flags, flags, real)
    power_sums(a, real.copy(), 1.0, flags)
    outermost_width(real, real, 0.5)
    table = (np.array([30.0, 31.0]), np.array([1.0, 2.0]), np.array([0, 2], dtype=np.int64),
             np.array([1.0]), np.array([1e25]), np.array([2.5e-18]))
    plasma_in_place(a, b, real, zero, 1.0, *table, 1.0, 1e-9, 1e-15, 1e-3)
