"""Optical rectification with a tilted pulse front (velocity matching by a pulse-front tilt).

In a crystal whose THz index is far above the optical group index (LiNbO3: n_THz ~ 5,
n_g ~ 2.2) collinear optical rectification is not velocity matched. Tilting the pump's
intensity front by an angle gamma makes the THz, which leaves the front along its normal,
see the front moving along that normal with the velocity v_g cos(gamma); velocity matching
then reads

.. math:: v_{g,\\mathrm{opt}} \\cos\\gamma = v_{\\mathrm{THz}} \\quad\\Longleftrightarrow\\quad
          \\cos\\gamma = n_{g,\\mathrm{opt}} / n_{\\mathrm{THz}}

([1]; the statement of the condition is from memory, the paper's text was not retrieved). The
tilt is chosen for the THz index at :data:`DESIGN_FREQUENCY`.

Model used here (the geometry of the estimate, all else as in :mod:`hcfplan.thz.generation`):
along the THz direction the pump front moves with the effective group index n_g / cos(gamma),
so the mixing sum is that of the group-velocity approximation with n_g replaced by
n_g / cos(gamma); the phase mismatch that remains is the dispersion of n_THz about the design
frequency. The THz path in the crystal, ``thickness``, is cut to the length over which a THz
ray crosses the pump beam, 2 w / sin(gamma) (w the pump 1/e^2 radius; derived from the
geometry, no source), and the THz absorption acts over that path. NOT modelled: the grating
and the imaging that make the tilt, the angular dispersion and the pulse lengthening away
from the image plane that come with it, the crystal's prism shape and its exit-face
reflections beyond the Fresnel factor, and cascaded (pump-red-shift) effects.

References
----------
.. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, "Velocity matching by pulse front tilting
       for large-area THz-pulse generation," Opt. Express 10, 1161-1166 (2002).
.. [2] J. Hebling, K.-L. Yeh, M. C. Hoffmann, B. Bartal, K. A. Nelson, "Generation of
       high-power terahertz pulses by tilted-pulse-front excitation and their application
       possibilities," J. Opt. Soc. Am. B 25, B6 (2008) [from memory, not retrieved].
"""

from __future__ import annotations

from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.materials.crystals import CrystalTable, optical_group_index, thz_index
from hcfplan.thz.detection import (
    PhaseMatchingMap,
    phase_matching_integral,
    spectral_autocorrelation,
)

GeometryName = Literal["collinear", "tilted_front"]
#: The generation geometries of the estimate.
GEOMETRIES: tuple[str, ...] = ("collinear", "tilted_front")
#: THz frequency at which the tilt gives velocity matching (about 1 THz is the usual design
#: point of tilted-front LiNbO3 sources; common practice, no source). [Hz]
DESIGN_FREQUENCY = 1.0e12


def tilt_angle(crystal: CrystalTable, omega_pump: float,
               design_frequency: float = DESIGN_FREQUENCY) -> float:
    """Pulse-front tilt angle inside the crystal, cos(gamma) = n_g,opt / n_THz.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    omega_pump : float
        Pump centre angular frequency (sets the optical group index). [rad/s]
    design_frequency : float
        THz frequency at which velocity matching is wanted. [Hz]

    Returns
    -------
    float
        Tilt angle gamma. [rad]

    Raises
    ------
    ConfigError
        When n_g >= n_THz: a tilt cannot slow the front down (collinear matching or none).

    References
    ----------
    .. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, Opt. Express 10, 1161 (2002).
    """
    n_g = float(optical_group_index(crystal, omega_pump))
    n_thz = float(thz_index(crystal, 2 * np.pi * design_frequency).real)
    if not n_g < n_thz:
        raise ConfigError(f"thz.geometry = 'tilted_front': {crystal.name} has n_g = {n_g:.3f} "
                          f">= n_THz = {n_thz:.3f} at {design_frequency * 1e-12:g} THz; a tilted "
                          "front cannot match it (use 'collinear')")
    return float(np.arccos(n_g / n_thz))  # Hebling et al. 2002 [1]


def interaction_length(thickness: float, tilt: float, beam_radius: float | None) -> float:
    """THz path over which a tilted front drives one THz ray: min(L, 2 w / sin(gamma)).

    Parameters
    ----------
    thickness : float
        Crystal length along the THz direction. [m]
    tilt : float
        Tilt angle gamma. [rad]
    beam_radius : float or None
        Pump 1/e^2 radius; ``None``: the crystal length. [m]

    Returns
    -------
    float
        Interaction length. [m]

    References
    ----------
    None: geometry of a ray crossing a beam of width 2 w at the angle gamma (derived, no
    source).
    """
    if beam_radius is None:
        return float(thickness)
    return float(min(thickness, 2.0 * beam_radius / np.sin(tilt)))


def effective_group_index(crystal: CrystalTable, omega_pump: float, tilt: float) -> float:
    """Group index of the tilted front along the THz direction, n_g / cos(gamma).

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    omega_pump : float
        Pump centre angular frequency. [rad/s]
    tilt : float
        Tilt angle gamma. [rad]

    Returns
    -------
    float
        Effective group index. [-]

    References
    ----------
    .. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, Opt. Express 10, 1161 (2002).
    """
    return float(optical_group_index(crystal, omega_pump)) / np.cos(tilt)


def tilted_coherence_length(crystal: CrystalTable, omega_pump: float, tilt: float,
                            Omega: np.ndarray) -> np.ndarray:
    """Coherence length c / (2 nu |n_g / cos(gamma) - n_THz(nu)|) of the tilted front.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    omega_pump : float
        Pump centre angular frequency. [rad/s]
    tilt : float
        Tilt angle gamma. [rad]
    Omega : ndarray
        THz angular frequencies. [rad/s]

    Returns
    -------
    ndarray
        Coherence length; ``inf`` where matched exactly. [m]

    References
    ----------
    .. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, Opt. Express 10, 1161 (2002).
    """
    Omega = np.asarray(Omega, dtype=float)
    mismatch = np.abs(effective_group_index(crystal, omega_pump, tilt)
                      - thz_index(crystal, Omega).real)
    nu = Omega / (2 * np.pi)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(mismatch * nu > 0, c / (2.0 * nu * mismatch), np.inf)


def tilted_phase_matching_map(crystal: CrystalTable, pump_wavelength: np.ndarray,
                              frequency: np.ndarray, tilt: float) -> PhaseMatchingMap:
    """Coherence length of a tilted front of fixed tilt over pump wavelength and THz frequency.

    c / (2 nu |n_g(lambda) / cos(gamma) - n_THz(nu)|) for each pump wavelength lambda and THz
    frequency nu, with the tilt gamma held at the run's value (chosen for the pump centroid,
    :func:`tilt_angle`): the map shows how far from the design wavelength and frequency a
    given tilt stays velocity matched. (Re-choosing the tilt for each wavelength would match
    every wavelength at :data:`DESIGN_FREQUENCY` and says nothing.)

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal.
    pump_wavelength : ndarray
        Pump vacuum wavelengths. [m]
    frequency : ndarray
        THz frequencies. [Hz]
    tilt : float
        Tilt angle gamma. [rad]

    Returns
    -------
    PhaseMatchingMap
        ``geometry = "tilted_front"``, ``tilt``; ``coherence_length`` of shape
        (len(pump_wavelength), len(frequency)), ``inf`` where matched exactly. [m]

    References
    ----------
    .. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, Opt. Express 10, 1161 (2002).
    """
    pump_wavelength = np.asarray(pump_wavelength, dtype=float)
    frequency = np.asarray(frequency, dtype=float)
    Omega = 2 * np.pi * frequency
    rows = [tilted_coherence_length(crystal, 2 * np.pi * c / lam, tilt, Omega)
            for lam in pump_wavelength]
    return PhaseMatchingMap(crystal.name, pump_wavelength, frequency, np.array(rows),
                            geometry="tilted_front", tilt=float(tilt))


def mixing_sum_tilted_front(band: np.ndarray, dnu: float, Omega: np.ndarray,
                            crystal: CrystalTable, length: float, omega_c: float,
                            tilt: float) -> np.ndarray:
    """Mixing sum of :mod:`hcfplan.thz.mixing` for a tilted front (module docstring).

    Parameters
    ----------
    band : ndarray of complex
        Optical spectral amplitude on consecutive grid samples, ascending. [sqrt(J/Hz)]
    dnu : float
        Sample spacing. [Hz]
    Omega : ndarray
        THz angular frequencies m d_omega. [rad/s]
    crystal : CrystalTable
        Generation crystal.
    length : float
        Interaction length (:func:`interaction_length`). [m]
    omega_c : float
        Pump centroid. [rad/s]
    tilt : float
        Tilt angle gamma. [rad]

    Returns
    -------
    ndarray of complex
        The mixing sum on ``Omega``, phase in the frame of the tilted front. [J m]

    References
    ----------
    .. [1] J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl, Opt. Express 10, 1161 (2002).
    .. [2] N. C. J. van der Valk, P. C. M. Planken, A. N. Buijserd, H. J. Bakker, J. Opt. Soc.
           Am. B 22, 1714 (2005) (the collinear group-velocity form this generalises).
    """
    k_thz = thz_index(crystal, Omega) * Omega / c
    q = effective_group_index(crystal, omega_c, tilt) * Omega / c
    factor = phase_matching_integral(q - k_thz, length, k_thz) * np.exp(-1j * q * length)
    return spectral_autocorrelation(band, len(Omega)) * factor * dnu
