"""Compiled kernel of the THz estimate's exact phase-matching sum (:mod:`hcfplan.thz`).

Kept apart from :mod:`hcfplan.thz` so that importing that module (its cutoff definitions are
used by the envelope map) does not import numba.

References
----------
The model and its sources are those of :mod:`hcfplan.thz` (frequency-domain difference-
frequency model of optical rectification).
"""

from __future__ import annotations

import cmath

import numba
import numpy as np

from .thz_detection import SERIES_LIMIT

#: |delta_k L| from which :func:`mixing_sums` uses the product form (relative error
#: eps k_opt L / |delta_k L|, 3e-12 for 1 mm of GaP at 800 nm).
_PRODUCT_LIMIT = 1.0


@numba.njit(cache=True, nogil=True)
def mixing_sums(band, k_opt, k_thz, thickness, count, out):  # pragma: no cover - compiled
    """out[m] = sum_k band[k + m] conj(band[k]) L_k,m for m < count, with L the slab integral of
    :func:`~hcfplan.thz_detection.phase_matching_integral` for delta_k = q - k_thz[m], k_out =
    k_thz[m] and q = k_opt[k + m] - k_opt[k] (same closed form and series branch).

    ``k_opt`` is real (no optical absorption), so exp(i q L) = P[k + m] conj(P[k]) with P =
    exp(i k_opt L) computed once, and exp(i k_out L) is the same for every k: no exponential
    in the double loop where |delta_k L| >= :data:`_PRODUCT_LIMIT`. Below that the product form
    would lose eps k_opt L / |delta_k L| of relative accuracy (2.6e-8 at the series limit for
    1 mm of GaP), so exp(i delta_k L) - 1 is taken from delta_k itself. The numpy form, with two
    exponentials and temporaries per term, took 64 % of a scan point (profile of
    bench/scan.py's config, 8192 points). Checked against :func:`phase_matching_integral` in
    tests/test_thz.py.
    """
    size = band.size
    carried = np.empty(size, dtype=np.complex128)  # band * exp(i k_opt L)
    for k in range(size):
        carried[k] = band[k] * cmath.exp(1j * k_opt[k] * thickness)
    for m in range(count):
        k_out = k_thz[m]
        exit_phase = cmath.exp(1j * k_out * thickness)
        total = 0j
        for k in range(size - m):
            delta_k = (k_opt[k + m] - k_opt[k]) - k_out
            x = 1j * delta_k * thickness
            pair = band[k + m] * np.conj(band[k])
            if abs(x) < SERIES_LIMIT:
                total += pair * thickness * exit_phase * (1.0 + x / 2.0 + x * x / 6.0)
            elif abs(x) < _PRODUCT_LIMIT:  # exp(i q L) from q itself: no cancellation of k L
                total += pair * exit_phase * (cmath.exp(x) - 1.0) / (1j * delta_k)
            else:
                total += (carried[k + m] * np.conj(carried[k]) - pair * exit_phase) / (
                    1j * delta_k)
        out[m] = total


def warm_kernels() -> None:
    """Call the compiled kernel once on tiny arrays (loads its machine code from numba's cache;
    used by :mod:`hcfplan.propagation.warmup`)."""
    mixing_sums(np.ones(4, complex), np.arange(4.0), np.zeros(4, complex), 1e-3, 4,
                np.zeros(4, complex))
