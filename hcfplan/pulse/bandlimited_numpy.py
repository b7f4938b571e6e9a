"""The numpy twin of the compiled band-limited peak search.

The twin of :mod:`hcfplan.pulse.bandlimited_compiled`: the same functions with the same
signatures, the same search and the same formulas, in Python and numpy (the dot products of
:func:`fine_power` summed in another order: results equal to rounding).
:func:`hcfplan.pulse.bandlimited.peak_location` runs it where
:mod:`hcfplan.numerics.kernel_choice` says so (a short process on a small grid, which then
never imports numba).

References
----------
.. [1] C. E. Shannon, "Communication in the presence of noise," Proc. IRE, vol. 37, no. 1,
       pp. 10-21, 1949, doi:10.1109/JRPROC.1949.232969 (sampling theorem, sinc interpolation).
"""

from __future__ import annotations

import numpy as np

#: Longest dot product given to BLAS (np.dot): beyond about 10^4 terms BLAS splits it over
#: threads, which on a busy machine costs milliseconds a call; longer ones are summed by einsum
#: on this thread.
BLAS_DOT_LIMIT = 8192


def _dot(a: np.ndarray, b: np.ndarray) -> complex:
    """sum a b (no conjugate) on this thread."""
    return np.dot(a, b) if a.size <= BLAS_DOT_LIMIT else np.einsum("i,i->", a, b)


def fine_power(field, centre, row):
    """|sum_p row[p] field[(centre + p) mod N]|^2: the interpolant at one fine offset.

    References
    ----------
    none: numerical helper
    """
    head = field.size - centre
    acc = _dot(row[:head], field[centre:]) + _dot(row[head:], field[:centre])
    return acc.real * acc.real + acc.imag * acc.imag


def parabola_vertex(left, mid, right):
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


def peak_candidates(power, level, most):
    """Indices of the coarse local maxima (at least ``level`` times the highest sample, the
    ``most`` highest of them; circular) that may hide the highest band-limited peak.

    References
    ----------
    none: numerical helper
    """
    n = power.size
    high = np.flatnonzero(power >= level * power.max())  # a few samples
    value = power[high]
    picked = high[(value >= power[high - 1]) & (value >= power[(high + 1) % n])]
    if picked.size > most:
        picked = picked[np.argsort(-power[picked])[:most]]
    return picked


def refine_peak(field, power, kernels, factor, level, most):
    """The search of :func:`hcfplan.pulse.bandlimited.peak_location` (the compiled kernel of
    the same name, step for step). Returns (peak, position in grid steps).

    References
    ----------
    none: numerical helper
    """
    n = field.size
    fine = np.empty(2 * factor + 1)  # fine[m]: the interpolant at centre + (m - factor) / factor
    i_top = int(np.argmax(power))
    best, where = power[i_top], float(i_top)
    for start in peak_candidates(power, level, most).tolist():
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


def field_peak(field, kernels, factor, level, most):
    """:func:`refine_peak` of the samples ``field`` (at least 3), their power |field|^2 formed
    here: (nan, nan) when a sample is not finite, (0, index of the first highest sample) when
    every sample is 0.

    References
    ----------
    none: numerical helper
    """
    power = np.square(field.real)
    power += np.square(field.imag)
    top = power.max()  # a nan anywhere gives nan, an inf inf: all finite iff top is finite
    if not np.isfinite(top):
        return np.nan, np.nan
    if not top > 0:
        return 0.0, float(np.argmax(power))
    return refine_peak(field, power, kernels, factor, level, most)
