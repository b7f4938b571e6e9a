"""Compiled kernel of the THz estimate's exact phase-matching sum (:mod:`hcfplan.thz.mixing`).

Kept apart so that importing :mod:`hcfplan.thz.mixing` and :mod:`hcfplan.thz.generation` does not
import numba; :func:`hcfplan.thz.mixing.mixing_sum_full` imports it where the sum is done on the
compiled kernels, else its numpy twin :mod:`hcfplan.thz.kernels_numpy`, as
:mod:`hcfplan.numerics.kernel_choice` says.

References
----------
The model and its sources are those of :mod:`hcfplan.thz.generation` (frequency-domain difference-
frequency model of optical rectification).
"""

from __future__ import annotations

import cmath

import numba
import numpy as np

from hcfplan.thz.detection import SERIES_LIMIT
from hcfplan.thz.kernels_numpy import PRODUCT_LIMIT


@numba.njit(cache=True, nogil=True)
def mixing_sums(band, k_opt, k_thz, thickness, count, out):  # pragma: no cover - compiled
    """out[m] = sum_k band[k + m] conj(band[k]) L_k,m for m < count, with L the slab integral of
    :func:`~hcfplan.thz.detection.phase_matching_integral` for delta_k = q - k_thz[m], k_out =
    k_thz[m] and q = k_opt[k + m] - k_opt[k] (same closed form and series branch).

    ``k_opt`` is real (no optical absorption), so exp(i q L) = P[k + m] conj(P[k]) with P =
    exp(i k_opt L) computed once, and exp(i k_out L) is the same for every k: no exponential
    in the double loop where |delta_k L| >= :data:`PRODUCT_LIMIT`. Below that the product form
    would lose eps k_opt L / |delta_k L| of relative accuracy (2.6e-8 at the series limit for
    1 mm of GaP), so exp(i delta_k L) - 1 is taken from delta_k itself. The numpy form, with two
    exponentials and temporaries per term, took 64 % of a scan point (profile of
    bench/scan.py's config, 8192 points). Checked against :func:`phase_matching_integral` in
    tests/thz/test_thz.py.

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved] (the model; the evaluation order is a numerical choice).
    """
    size = band.size
    # real and imaginary parts in arrays of their own, complex products written out in real
    # arithmetic in the branch nearly every term takes (numba's complex multiply and its
    # division, Smith's algorithm with branches, made the sum 2.1x slower on a scan point)
    b_re, b_im = band.real.copy(), band.imag.copy()
    c_re, c_im = np.empty(size), np.empty(size)  # band * exp(i k_opt L)
    for k in range(size):
        cos, sin = np.cos(k_opt[k] * thickness), np.sin(k_opt[k] * thickness)
        c_re[k] = b_re[k] * cos - b_im[k] * sin
        c_im[k] = b_re[k] * sin + b_im[k] * cos
    series2 = (SERIES_LIMIT / thickness) ** 2  # the limits on |delta_k|^2
    product2 = (PRODUCT_LIMIT / thickness) ** 2
    for m in range(count):
        k_out = k_thz[m]
        exit_phase = cmath.exp(1j * k_out * thickness)
        e_re, e_im = exit_phase.real, exit_phase.imag
        d_im = -k_out.imag  # imaginary part of delta_k, the same for every k
        t_re, t_im = 0.0, 0.0
        for k in range(size - m):
            d_re = (k_opt[k + m] - k_opt[k]) - k_out.real
            d2 = d_re * d_re + d_im * d_im
            # pair = band[k + m] conj(band[k])
            p_re = b_re[k + m] * b_re[k] + b_im[k + m] * b_im[k]
            p_im = b_im[k + m] * b_re[k] - b_re[k + m] * b_im[k]
            if d2 >= product2:
                # (carried[k + m] conj(carried[k]) - pair exit_phase) / (i delta_k)
                n_re = c_re[k + m] * c_re[k] + c_im[k + m] * c_im[k] - (p_re * e_re - p_im * e_im)
                n_im = c_im[k + m] * c_re[k] - c_re[k + m] * c_im[k] - (p_re * e_im + p_im * e_re)
                inverse = 1.0 / d2  # 1 / (i delta_k) = (-d_im - i d_re) / |delta_k|^2
                v_re, v_im = -d_im * inverse, -d_re * inverse
                t_re += n_re * v_re - n_im * v_im
                t_im += n_re * v_im + n_im * v_re
                continue
            pair, delta_k = complex(p_re, p_im), complex(d_re, d_im)
            x = 1j * delta_k * thickness
            if d2 < series2:
                term = pair * thickness * exit_phase * (1.0 + x / 2.0 + x * x / 6.0)
            else:  # exp(i q L) from q itself: no cancellation of k L
                term = pair * exit_phase * (cmath.exp(x) - 1.0) / (1j * delta_k)
            t_re += term.real
            t_im += term.imag
        out[m] = complex(t_re, t_im)


def warm_kernels() -> None:
    """Call the compiled kernel once on tiny arrays (loads its machine code from numba's cache;
    used by :mod:`hcfplan.planning.scan.warmup`).

    References
    ----------
    None: numerical helper.
    """
    mixing_sums(np.ones(4, complex), np.arange(4.0), np.zeros(4, complex), 1e-3, 4,
                np.zeros(4, complex))
