"""The sum over optical frequencies of the THz estimate (difference-frequency mixing).

Both functions of the registry :data:`PHASE_MATCHING` return, for the THz samples
Omega_m = m d_omega (m < ``len(Omega)``),

.. math:: \\sum_k \\tilde A(\\omega_k + \\Omega_m)\\, \\tilde A^*(\\omega_k)\\,
    \\mathcal{L}(\\omega_k, \\Omega_m)\\, d\\nu \\quad [\\mathrm{J\\,m}],

with the slab factor L of :mod:`hcfplan.thz.generation` (module docstring), and the phase
referenced to a frame moving with the pump group velocity:

* ``"full"``: L(omega, Omega) with the exact optical k(omega) of the Sellmeier; a compiled sum over
  omega on the band-limited part of the grid for every THz sample
  (:func:`hcfplan.thz.kernels.mixing_sums`, or its numpy twin
  :func:`hcfplan.thz.kernels_numpy.mixing_sums` where :mod:`hcfplan.numerics.kernel_choice`
  says so).
* ``"group_velocity"``: k(omega + Omega) - k(omega) ~ Omega n_g(omega_c) / c, so L depends on
  Omega only and the sum is an autocorrelation done by FFT. Exact for a dispersion-free crystal;
  a good approximation when the group-velocity dispersion over the band times L is small.

References
----------
.. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation of
       terahertz pulses through optical rectification in organic DAST crystals: theory and
       experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not retrieved].
.. [2] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, "Influence of pump
       wavelength and crystal length on the phase matching of optical rectification," J. Opt.
       Soc. Am. B 22, 1714 (2005).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import (
    CrystalTable,
    optical_group_index,
    optical_index,
    thz_index,
)
from hcfplan.numerics.kernel_choice import compiled
from hcfplan.thz.detection import phase_matching_integral, spectral_autocorrelation
from hcfplan.thz.kernels_numpy import AUTO_NUMPY_TERMS

PhaseMatchingName = Literal["full", "group_velocity"]


def mixing_sum_group_velocity(
    band: np.ndarray,
    omega: np.ndarray,
    dnu: float,
    Omega: np.ndarray,
    crystal: CrystalTable,
    thickness: float,
    omega_c: float,
) -> np.ndarray:
    """Mixing sum in the group-velocity approximation: L depends on Omega only; FFT correlation.

    Parameters
    ----------
    band : ndarray of complex
        Optical spectral amplitude on consecutive grid samples, ascending frequency.
        [sqrt(J/Hz)]
    omega : ndarray
        Angular frequencies of ``band`` (unused here; the same signature as
        :func:`mixing_sum_full`). [rad/s]
    dnu : float
        Sample spacing of the grid. [Hz]
    Omega : ndarray
        THz angular frequencies m d_omega, m = 0, 1, ... [rad/s]
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Crystal thickness L. [m]
    omega_c : float
        Pump centroid, where the optical group index is taken. [rad/s]

    Returns
    -------
    ndarray of complex
        The sum of the module docstring on ``Omega``. [J m]

    Notes
    -----
    k(omega + Omega) - k(omega) ~ Omega n_g(omega_c) / c; exact for a dispersion-free crystal.

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved].
    .. [2] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, "Influence of
           pump wavelength and crystal length on the phase matching of optical rectification,"
           J. Opt. Soc. Am. B 22, 1714 (2005).
    """
    k_thz = thz_index(crystal, Omega) * Omega / c
    q = optical_group_index(crystal, omega_c) * Omega / c  # k(w + W) - k(w) ~ W n_g / c
    factor = phase_matching_integral(q - k_thz, thickness, k_thz) * np.exp(-1j * q * thickness)
    return spectral_autocorrelation(band, len(Omega)) * factor * dnu


def mixing_sum_full(
    band: np.ndarray,
    omega: np.ndarray,
    dnu: float,
    Omega: np.ndarray,
    crystal: CrystalTable,
    thickness: float,
    omega_c: float,
) -> np.ndarray:
    """Mixing sum with the exact optical k(omega) for every THz sample.

    Parameters
    ----------
    band : ndarray of complex
        Optical spectral amplitude on consecutive grid samples, ascending frequency.
        [sqrt(J/Hz)]
    omega : ndarray
        Angular frequencies of ``band``. [rad/s]
    dnu : float
        Sample spacing of the grid. [Hz]
    Omega : ndarray
        THz angular frequencies m d_omega, m = 0, 1, ... [rad/s]
    crystal : CrystalTable
        Generation crystal.
    thickness : float
        Crystal thickness L. [m]
    omega_c : float
        Pump centroid; its group index sets the reference frame of the phase. [rad/s]

    Returns
    -------
    ndarray of complex
        The sum of the module docstring on ``Omega``. [J m]

    Raises
    ------
    ConfigError
        If the optical index is not finite over ``omega`` (outside its Sellmeier range).

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved].
    """
    k_opt = optical_index(crystal, omega) * omega / c
    if not np.all(np.isfinite(k_opt)):
        raise ConfigError(
            f"{crystal.name}: optical index not finite over the spectrum "
            f"{2e9 * np.pi * c / omega[-1]:.0f}-{2e9 * np.pi * c / omega[0]:.0f} nm: raise "
            "band_floor_db or trim the spectrum"
        )
    k_thz = np.asarray(thz_index(crystal, Omega) * Omega / c, dtype=complex)
    frame = np.exp(-1j * optical_group_index(crystal, omega_c) * Omega / c * thickness)
    out = np.zeros(len(Omega), dtype=complex)
    count = min(len(Omega), len(band))
    if compiled(count * len(band), AUTO_NUMPY_TERMS):
        from hcfplan.thz.kernels import mixing_sums  # numba: imported where the sum is done
    else:
        from hcfplan.thz.kernels_numpy import mixing_sums
    mixing_sums(np.ascontiguousarray(band, dtype=complex), np.asarray(k_opt, dtype=float),
                k_thz, thickness, count, out)
    return out * frame * dnu


#: Phase-matching method name -> mixing sum (see the module docstring).
PHASE_MATCHING: dict[str, Callable[..., np.ndarray]] = {
    "full": mixing_sum_full,
    "group_velocity": mixing_sum_group_velocity,
}
