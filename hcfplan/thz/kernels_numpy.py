"""The numpy twin of the THz estimate's compiled mixing kernel (:mod:`hcfplan.thz.kernels`).

:func:`mixing_sums` has the signature, the in-place semantics and the formulas of the compiled
kernel (the product form, the series branch and the exponential branch of the slab integral,
chosen per term by the same limits), as whole-array operations over k for each m; the sums run
in another order (results equal to rounding). :func:`hcfplan.thz.mixing.mixing_sum_full` runs it
where :mod:`hcfplan.numerics.kernel_choice` says so.

References
----------
The model and its sources are those of :mod:`hcfplan.thz.generation` (frequency-domain difference-
frequency model of optical rectification).
"""

from __future__ import annotations

import numpy as np

from hcfplan.pulse.bandlimited_numpy import BLAS_DOT_LIMIT
from hcfplan.thz.detection import SERIES_LIMIT

#: |delta_k L| from which :func:`mixing_sums` (and its compiled twin) uses the product form
#: (relative error eps k_opt L / |delta_k L|, 3e-12 for 1 mm of GaP at 800 nm).
PRODUCT_LIMIT = 1.0
#: Largest sum (terms: THz samples times optical samples) that the ``"auto"`` kernel policy
#: gives to :func:`mixing_sums` (:mod:`hcfplan.numerics.kernel_choice`). Measured on the demo
#: config's sum (1227 x 1227 terms, one process, warm): 18-20 ms here against 4 ms compiled,
#: about 10 ns more per term, so the numba start-up (0.4 s) pays only beyond ~40 million terms.
AUTO_NUMPY_TERMS = 30_000_000


def _dot(a: np.ndarray, b: np.ndarray) -> complex:
    """sum a b (no conjugate) on this thread (BLAS splits a long one over threads, slow on a
    busy machine: see :data:`hcfplan.pulse.bandlimited_numpy.BLAS_DOT_LIMIT`)."""
    return np.dot(a, b) if a.size <= BLAS_DOT_LIMIT else np.einsum("i,i->", a, b)


@np.errstate(all="ignore")  # the compiled kernel never warns
def mixing_sums(band, k_opt, k_thz, thickness, count, out):
    """out[m] = sum_k band[k + m] conj(band[k]) L_k,m for m < count: the compiled kernel
    :func:`hcfplan.thz.kernels.mixing_sums` (see there), term by term the same arithmetic.

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved] (the model; the evaluation order is a numerical choice).
    """
    size = band.size
    b_re, b_im = band.real, band.imag
    phase = k_opt * thickness
    cos, sin = np.cos(phase), np.sin(phase)
    carried = np.empty(size, complex)  # band * exp(i k_opt L), as the compiled kernel forms it
    carried.real = b_re * cos - b_im * sin
    carried.imag = b_re * sin + b_im * cos
    band_conj, carried_conj = np.conj(band), np.conj(carried)
    series2 = (SERIES_LIMIT / thickness) ** 2  # the limits on |delta_k|^2
    product2 = (PRODUCT_LIMIT / thickness) ** 2
    for m in range(count):
        k_out = complex(k_thz[m])
        exit_phase = np.exp(1j * k_out * thickness)
        d_im = -k_out.imag  # imaginary part of delta_k, the same for every k
        d_re = k_opt[m:] - k_opt[:size - m]
        d_re -= k_out.real
        d2 = d_re * d_re
        d2 += d_im * d_im
        pair = band[m:] * band_conj[:size - m]  # band[k + m] conj(band[k])
        # the product form: (carried[k + m] conj(carried[k]) - pair exit_phase) / (i delta_k)
        numerator = carried[m:] * carried_conj[:size - m]
        numerator -= pair * exit_phase
        inverse = np.empty(size - m, complex)  # 1 / (i delta_k) = (-d_im - i d_re) / |delta_k|^2
        np.divide(-d_im, d2, out=inverse.real)
        np.divide(d_re, d2, out=inverse.imag)
        np.negative(inverse.imag, out=inverse.imag)
        near = np.flatnonzero(~(d2 >= product2))
        if near.size:  # the series and exponential forms, from delta_k itself
            numerator[near] = inverse[near] = 0.0
            delta_k = d_re[near] + 1j * d_im
            x = 1j * delta_k * thickness
            p = pair[near]
            term = np.where(d2[near] < series2,
                            p * thickness * exit_phase * (1.0 + x / 2.0 + x * x / 6.0),
                            p * exit_phase * (np.exp(x) - 1.0) / (1j * delta_k))
            out[m] = _dot(numerator, inverse) + term.sum()
        else:
            out[m] = _dot(numerator, inverse)
