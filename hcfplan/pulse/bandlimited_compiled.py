"""The compiled (numba) part of the band-limited peak search of :mod:`hcfplan.pulse.bandlimited`.

Kept apart so that importing :mod:`hcfplan.pulse.bandlimited` (and the metrics) does not import
numba: :func:`hcfplan.pulse.bandlimited.peak_location` imports this module where the search
runs on the compiled kernels (:mod:`hcfplan.numerics.kernel_choice`); its numpy twin is
:mod:`hcfplan.pulse.bandlimited_numpy`.

References
----------
.. [1] C. E. Shannon, "Communication in the presence of noise," Proc. IRE, vol. 37, no. 1,
       pp. 10-21, 1949, doi:10.1109/JRPROC.1949.232969 (sampling theorem, sinc interpolation).
"""

from __future__ import annotations

import numpy as np
from numba import njit


@njit(cache=True, nogil=True, fastmath={"reassoc", "contract"})
def fine_power(field, centre, row):  # pragma: no cover - compiled
    """|sum_p row[p] field[(centre + p) mod N]|^2: the interpolant at one fine offset.

    Two loops over contiguous slices, the complex products written out in real arithmetic,
    which LLVM vectorises: 1.1 us per call at N = 2048 against 1.8 us with complex
    accumulation and indices into the whole arrays (measured).

    References
    ----------
    none: numerical helper
    """
    n = field.size
    head = n - centre
    re, im = 0.0, 0.0
    a, r = field[centre:], row[:head]
    for p in range(head):
        x, y = a[p], r[p]
        re += y.real * x.real - y.imag * x.imag
        im += y.real * x.imag + y.imag * x.real
    a, r = field[:centre], row[head:]
    for p in range(centre):
        x, y = a[p], r[p]
        re += y.real * x.real - y.imag * x.imag
        im += y.real * x.imag + y.imag * x.real
    return re * re + im * im


@njit(cache=True, nogil=True)
def parabola_vertex(left, mid, right):  # pragma: no cover - compiled
    """Peak of the parabola through three equally spaced values (``mid`` the highest) and its
    offset from ``mid`` in units of the spacing.

    References
    ----------
    none: numerical helper
    """
    curvature = 2.0 * mid - left - right
    if not curvature > 0:
        return mid, 0.0
    return mid + (right - left) ** 2 / (8.0 * curvature), 0.5 * (right - left) / curvature


@njit(cache=True, nogil=True)
def peak_candidates(power, level, most):  # pragma: no cover - compiled
    """Indices of the coarse local maxima (at least ``level`` times the highest sample, the
    ``most`` highest of them; circular) that may hide the highest band-limited peak.

    References
    ----------
    none: numerical helper
    """
    n = power.size
    top = power.max()
    found = np.empty(n, np.int64)
    count = 0
    for k in range(n):
        value = power[k]
        if value >= level * top and value >= power[k - 1] and value >= power[(k + 1) % n]:
            found[count] = k
            count += 1
    picked = found[:count].copy()
    if picked.size > most:
        picked = picked[np.argsort(-power[picked])[:most]]
    return picked


@njit(cache=True, nogil=True)
def refine_peak(field, power, kernels, factor, level, most):  # pragma: no cover - compiled
    """The search of :func:`hcfplan.pulse.bandlimited.peak_location` (numba: a handful of short
    loops per call, which as numpy operations cost several times more in call overhead,
    measured). Returns (peak, position in grid steps).

    References
    ----------
    none: numerical helper
    """
    n = field.size
    fine = np.empty(2 * factor + 1)  # fine[m]: the interpolant at centre + (m - factor) / factor
    i_top = int(np.argmax(power))
    best, where = power[i_top], float(i_top)
    for start in peak_candidates(power, level, most):
        if power[start] < level * best:  # cannot rise above the best found (CANDIDATE_LEVEL)
            continue
        centre, i, h = start, factor, factor // 2
        for _ in range(4):  # moves on at most a few steps from a coarse local maximum
            fine[0] = power[(centre - 1) % n]
            fine[factor] = power[centre % n]
            fine[2 * factor] = power[(centre + 1) % n]
            fine[h] = fine_power(field, centre % n, kernels[h])
            fine[factor + h] = fine_power(field, centre % n, kernels[factor + h])
            i = factor + h * (int(np.argmax(fine[::h])) - 2)
            if 0 < i < 2 * factor:
                break
            centre += 1 if i > 0 else -1
        if not 0 < i < 2 * factor:
            continue
        while h > 1:  # halve the spacing around the best fine sample
            h //= 2
            fine[i - h] = fine_power(field, centre % n, kernels[i - h])
            fine[i + h] = fine_power(field, centre % n, kernels[i + h])
            if fine[i - h] > fine[i] and fine[i - h] >= fine[i + h]:
                i -= h
            elif fine[i + h] > fine[i]:
                i += h
            if h > 1 and not h <= i <= 2 * factor - h:
                break
        j = min(max(i, 1), 2 * factor - 1)
        value, shift = parabola_vertex(fine[j - 1], fine[j], fine[j + 1])
        if value > best:
            best, where = value, centre + (j - factor + shift) / factor
    return best, where


@njit(cache=True, nogil=True)
def field_peak(field, kernels, factor, level, most):  # pragma: no cover - compiled
    """:func:`refine_peak` of the samples ``field`` (at least 3), their power |field|^2 formed
    here: (nan, nan) when a sample is not finite, (0, index of the first highest sample) when
    every sample is 0. One call instead of the numpy passes of the power, its check and its
    maximum (about 10 us per call at 2048 points, measured).

    References
    ----------
    none: numerical helper
    """
    n = field.size
    power = np.empty(n)
    top, finite = 0.0, True
    for k in range(n):
        re, im = field[k].real, field[k].imag
        value = re * re + im * im
        power[k] = value
        if not np.isfinite(value):
            finite = False
        elif value > top:
            top = value
    if not finite:
        return np.nan, np.nan
    if not top > 0:
        return 0.0, float(np.argmax(power))
    return refine_peak(field, power, kernels, factor, level, most)


def warm_kernels() -> None:
    """Call the compiled search once on a tiny field (loads its machine code from numba's cache;
    used by :mod:`hcfplan.planning.scan.warmup`).

    References
    ----------
    none: numerical helper
    """
    field = np.exp(-((np.arange(16.0) - 7.3) ** 2) / 4.0) + 0j
    field_peak(field, np.full((33, 16), 1.0 / 16, complex), 16, 0.4, 4)  # and refine_peak
