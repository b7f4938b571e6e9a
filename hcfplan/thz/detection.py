"""Phase-matching helpers shared by generation and detection, and the electro-optic (EO)
detection response.

The phase-matching integral is shared by generation (:mod:`hcfplan.thz.generation`) and detection.
All fields follow the conventions of :mod:`hcfplan.numerics.grid` (plane waves exp(i(kz - omega t));
a complex THz wavenumber k_T = (n + i kappa) Omega / c with kappa >= 0 describes absorption).

EO sampling model
-----------------
A THz field E_T(Omega) incident on a detection crystal of thickness d is seen by a probe pulse
that travels with its group velocity. The measured (cross-correlation) signal spectrum is

.. math:: S(\\Omega) \\propto E_T(\\Omega)\\, t_{in}(\\Omega)\\, G(\\Omega)\\,
          \\tilde I_p^*(\\Omega),

with the input Fresnel transmission t_in = 2 / (1 + n_T), the velocity-mismatch and absorption
factor G = (1/d) \\int_0^d exp(i (k_T - \\Omega n_{g,probe}/c) z) dz, and the probe
gating function \\tilde I_p(\\Omega)/\\tilde I_p(0), the normalised spectrum of the probe intensity
envelope (= autocorrelation of the probe field spectrum). This is the frequency-domain response of
[1], [2]; the dispersion of r41 near the TO resonance (Faust-Henry term) is NOT included.

References
----------
.. [1] G. Gallot and D. Grischkowsky, "Electro-optic detection of terahertz radiation," J. Opt.
       Soc. Am. B 16, 1204 (1999) [from memory, not retrieved].
.. [2] A. Leitenstorfer, S. Hunsche, J. Shah, M. C. Nuss, W. H. Knox, "Detectors and sources for
       ultrabroadband electro-optic sampling: experiment and theory," Appl. Phys. Lett. 74, 1516
       (1999) [from memory, not retrieved].
.. [3] H. J. Bakker, G. C. Cho, H. Kurz, Q. Wu, X.-C. Zhang, "Distortion of terahertz pulses in
       electro-optic sampling," J. Opt. Soc. Am. B 15, 1795 (1998).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import (
    CrystalTable,
    coherence_length,
    optical_group_index,
    thz_index,
)

#: Below this |Delta k L| the slab integral is evaluated by its Taylor series.
SERIES_LIMIT = 1e-4


def phase_matching_integral(
    delta_k: np.ndarray, thickness: float, k_out: np.ndarray | complex = 0.0
) -> np.ndarray:
    """Slab integral exp(i k_out L) * int_0^L exp(i delta_k z) dz, without overflow.

    Parameters
    ----------
    delta_k : ndarray of complex
        Wavevector mismatch; may be complex (absorption). [1/m]
    thickness : float
        Slab thickness L. [m]
    k_out : complex or ndarray
        Wavenumber of the generated wave between the source point and the exit face; its
        factor exp(i k_out (L - z)) is folded in (``0`` for no propagation factor). [1/m]

    Returns
    -------
    ndarray of complex
        exp(i k_out L) (exp(i delta_k L) - 1) / (i delta_k), equal to L exp(i k_out L) at
        delta_k = 0. [m]

    Notes
    -----
    Written as (exp(i (k_out + delta_k) L) - exp(i k_out L)) / (i delta_k), both exponents of
    which are bounded when Im k_out >= 0 and k_out + delta_k is real (the generation case), so
    a strongly absorbed THz wave does not overflow the intermediate exp(i delta_k L).

    References
    ----------
    .. [1] G. Gallot and D. Grischkowsky, "Electro-optic detection of terahertz radiation," J.
           Opt. Soc. Am. B 16, 1204 (1999) [from memory, not retrieved].
    .. [2] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved].
    """
    delta_k = np.asarray(delta_k, dtype=complex)
    k_out = np.asarray(k_out, dtype=complex)
    x = 1j * delta_k * thickness
    small = np.abs(x) < SERIES_LIMIT
    safe = np.where(small, 1.0, delta_k)
    direct = (np.exp(1j * (k_out + delta_k) * thickness) - np.exp(1j * k_out * thickness)) / (
        1j * safe
    )
    series = thickness * np.exp(1j * k_out * thickness) * (1.0 + x / 2.0 + x * x / 6.0)
    return np.where(small, series, direct)


@dataclass(frozen=True)
class EoDetector:
    """An electro-optic detection crystal.

    Parameters
    ----------
    crystal : CrystalTable
        Detection crystal (e.g. ZnTe, GaP).
    thickness : float
        Crystal thickness d. [m]
    probe_spectrum : ndarray or None
        Probe spectral amplitude on the same grid as the pump (FFT order, |A~|^2 in J/Hz);
        ``None`` uses the generating (compressed) pulse itself as probe.
    """

    crystal: CrystalTable
    thickness: float
    probe_spectrum: np.ndarray | None = None

    def __post_init__(self) -> None:
        if not self.thickness > 0:
            raise ConfigError(f"detector thickness = {self.thickness} m: must be > 0")


def spectral_autocorrelation(spectrum_band: np.ndarray, count: int) -> np.ndarray:
    """Linear autocorrelation r[m] = sum_k a[k+m] a*[k] for 0 <= m < count, by zero-padded FFT.

    Parameters
    ----------
    spectrum_band : ndarray of complex
        Spectral amplitude on consecutive grid samples, ascending frequency. [sqrt(J/Hz)]
    count : int
        Number of lags wanted. [-]

    Returns
    -------
    ndarray of complex
        r[m]; times the sample spacing d_nu it is the spectrum of the intensity envelope,
        int |A(t)|^2 exp(i m d_omega t) dt (grid.py convention 2). [J/Hz]

    References
    ----------
    None: numerical helper (autocorrelation by zero-padded FFT).
    """
    size = 1 << int(np.ceil(np.log2(2 * max(len(spectrum_band), count) + 1)))
    spec = np.fft.fft(spectrum_band, size)
    return np.fft.ifft(np.abs(spec) ** 2)[:count]


def probe_gate(spectrum_band: np.ndarray, count: int) -> np.ndarray:
    """Normalised spectrum of the probe intensity envelope on Omega_m = m d_omega, m < count.

    Parameters
    ----------
    spectrum_band : ndarray of complex
        Probe spectral amplitude on consecutive grid samples, ascending frequency. [sqrt(J/Hz)]
    count : int
        Number of THz samples wanted. [-]

    Returns
    -------
    ndarray of complex
        I~_p(Omega_m) / I~_p(0), from :func:`spectral_autocorrelation`. [-]

    References
    ----------
    .. [1] G. Gallot and D. Grischkowsky, "Electro-optic detection of terahertz radiation," J.
           Opt. Soc. Am. B 16, 1204 (1999) [from memory, not retrieved].
    .. [2] A. Leitenstorfer, S. Hunsche, J. Shah, M. C. Nuss, W. H. Knox, "Detectors and
           sources for ultrabroadband electro-optic sampling: experiment and theory," Appl.
           Phys. Lett. 74, 1516 (1999) [from memory, not retrieved].
    """
    corr = spectral_autocorrelation(spectrum_band, count)
    return corr / corr[0].real


def eo_response(
    crystal: CrystalTable,
    thickness: float,
    Omega: np.ndarray,
    omega_probe: float,
    gate: np.ndarray | None = None,
) -> np.ndarray:
    """Frequency response of EO detection, t_in(Omega) G(Omega) conj(gate(Omega)).

    Parameters
    ----------
    crystal : CrystalTable
        Detection crystal.
    thickness : float
        Detection crystal thickness d. [m]
    Omega : ndarray
        THz angular frequency. [rad/s]
    omega_probe : float
        Probe centre angular frequency (sets the probe group index). [rad/s]
    gate : ndarray of complex or None
        Probe gating function on ``Omega`` (:func:`probe_gate`); ``None`` for a delta probe.

    Returns
    -------
    ndarray of complex
        Response multiplying the incident THz field spectrum. For a thin, matched,
        loss-free crystal and a delta probe G = 1 and the response is the input transmission
        t_in = 2 / (1 + n_T), e.g. 0.5 for n_T = 3, not 1. [-]

    Notes
    -----
    Module docstring; G = (1/d) int_0^d exp(i (k_T - Omega n_g / c) z) dz, Eqs. of [1], [2].

    References
    ----------
    .. [1] G. Gallot and D. Grischkowsky, "Electro-optic detection of terahertz radiation," J.
           Opt. Soc. Am. B 16, 1204 (1999) [from memory, not retrieved].
    .. [2] A. Leitenstorfer, S. Hunsche, J. Shah, M. C. Nuss, W. H. Knox, "Detectors and
           sources for ultrabroadband electro-optic sampling: experiment and theory," Appl.
           Phys. Lett. 74, 1516 (1999) [from memory, not retrieved].
    .. [3] H. J. Bakker, G. C. Cho, H. Kurz, Q. Wu, X.-C. Zhang, "Distortion of terahertz
           pulses in electro-optic sampling," J. Opt. Soc. Am. B 15, 1795 (1998).
    """
    Omega = np.asarray(Omega, dtype=float)
    n_thz = thz_index(crystal, Omega)
    n_g = optical_group_index(crystal, omega_probe)
    delta_k = (n_thz - n_g) * Omega / c
    response = 2.0 / (1.0 + n_thz) * phase_matching_integral(delta_k, thickness) / thickness
    if gate is not None:
        response = response * np.conj(gate)
    return response


@dataclass(frozen=True)
class PhaseMatchingMap:
    """Coherence length [m] on (pump wavelength [m]) x (THz frequency [Hz]) for one crystal.

    ``geometry`` is "collinear" or "tilted_front"; for the tilted front, ``tilt`` [rad] is the
    fixed pulse-front tilt of the map (:func:`hcfplan.thz.tilted.tilted_phase_matching_map`).
    """

    crystal: str
    pump_wavelength: np.ndarray
    frequency: np.ndarray
    coherence_length: np.ndarray
    geometry: str = "collinear"
    tilt: float | None = None


def phase_matching_map(
    crystal: CrystalTable, pump_wavelength: np.ndarray, frequency: np.ndarray
) -> PhaseMatchingMap:
    """Coherence length c / (2 nu |n_g(lambda) - n_T(nu)|) for each pump wavelength and frequency.

    Parameters
    ----------
    crystal : CrystalTable
        Crystal.
    pump_wavelength : ndarray
        Pump vacuum wavelengths. [m]
    frequency : ndarray
        THz frequencies. [Hz]

    Returns
    -------
    PhaseMatchingMap
        ``coherence_length`` has shape (len(pump_wavelength), len(frequency)). [m]

    References
    ----------
    .. [1] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, "Influence of
           pump wavelength and crystal length on the phase matching of optical rectification,"
           J. Opt. Soc. Am. B 22, 1714 (2005).
    """
    pump_wavelength = np.asarray(pump_wavelength, dtype=float)
    frequency = np.asarray(frequency, dtype=float)
    omega = 2 * np.pi * c / pump_wavelength[:, None]
    l_c = coherence_length(crystal, omega, 2 * np.pi * frequency[None, :])
    return PhaseMatchingMap(crystal.name, pump_wavelength, frequency, l_c)
