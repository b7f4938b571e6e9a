"""Dispersive elements of the compressor after the fiber, as pure spectral-phase functions.

Every function returns a spectral phase :math:`\\phi(\\omega)` [rad] that multiplies the spectrum
as :math:`e^{i\\phi}` (convention 4 of :mod:`hcfplan.numerics.grid`): a material of thickness L adds
:math:`k(\\omega)L` (positive GDD for normal dispersion), a chirped mirror adds its (negative)
GDD. Arrays may be in any order of ``omega`` (the grid's FFT order is the usual one); results
keep the order of ``omega``.

Refractive indices are arrays evaluated on ``omega`` by the caller (the planning layer), so this
module does not depend on the material tables.

The elements are phase-only; the mirror reflection band is the only loss (:func:`clip_to_band`).

References
----------
.. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
       Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid

#: Number of samples on each side of omega0 used by the local polynomial fit in
#: :func:`phase_derivatives_at` (degree 4 over 2 * 4 + 1 samples).
_FIT_HALF_WIDTH = 4
_FIT_DEGREE = 4


def _sorted_view(omega: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Return ``(order, omega[order])`` with ``omega`` ascending."""
    omega = np.asarray(omega, dtype=float)
    order = np.argsort(omega, kind="stable")
    return order, omega[order]


def phase_derivatives_at(
    omega: np.ndarray, omega0: float, phase: np.ndarray
) -> tuple[float, float, float, float]:
    """Value and first three derivatives of a sampled phase at ``omega0``.

    Parameters
    ----------
    omega : ndarray
        Angular frequency samples (any order, uniformly spaced near ``omega0``). [rad/s]
    omega0 : float
        Expansion frequency, inside the sampled range. [rad/s]
    phase : ndarray
        Spectral phase on ``omega``; must be finite near ``omega0``. [rad]

    Returns
    -------
    phi0, delay, gdd, tod : float
        :math:`\\phi(\\omega_0)` [rad], :math:`\\phi'` [s], :math:`\\phi''` [s^2],
        :math:`\\phi'''` [s^3].

    Notes
    -----
    A degree-4 least-squares polynomial in :math:`\\Delta\\omega` over the nine samples nearest to
    ``omega0``; exact for polynomial phases up to degree 4. Common practice, no source.

    References
    ----------
    None: numerical helper (local least-squares polynomial fit).
    """
    order, w = _sorted_view(omega)
    p = np.asarray(phase, dtype=float)[order]
    i0 = int(np.searchsorted(w, omega0))
    lo = max(0, min(i0 - _FIT_HALF_WIDTH, w.size - 2 * _FIT_HALF_WIDTH - 1))
    sel = slice(lo, lo + 2 * _FIT_HALF_WIDTH + 1)
    step = float(w[1] - w[0])
    coef = np.polynomial.polynomial.polyfit((w[sel] - omega0) / step, p[sel], _FIT_DEGREE)
    return (
        float(coef[0]),
        float(coef[1] / step),
        float(2.0 * coef[2] / step**2),
        float(6.0 * coef[3] / step**3),
    )


def _remove_value_and_slope(omega: np.ndarray, omega0: float, phase: np.ndarray) -> np.ndarray:
    """Subtract the value and slope of ``phase`` at ``omega0`` (constant phase and delay)."""
    phi0, delay, _, _ = phase_derivatives_at(omega, omega0, phase)
    return phase - phi0 - delay * (np.asarray(omega, dtype=float) - omega0)


def material_phase(
    omega: np.ndarray, omega0: float, refractive_index: np.ndarray, thickness: float
) -> np.ndarray:
    """Spectral phase of a pass through a transparent material, without constant phase and delay.

    Parameters
    ----------
    omega : ndarray
        Angular frequency (e.g. ``grid.omega``). [rad/s]
    omega0 : float
        Reference (pump) angular frequency. [rad/s]
    refractive_index : ndarray
        Phase index n(omega) of the material evaluated on ``omega`` by the caller. [1]
    thickness : float
        Geometric path length in the material (>= 0). [m]

    Returns
    -------
    ndarray
        :math:`\\phi(\\omega) = k(\\omega)L - k(\\omega_0)L - k'(\\omega_0)L\\,\\Delta\\omega` on
        ``omega``. [rad]

    Notes
    -----
    :math:`k(\\omega) = n(\\omega)\\,\\omega/c`. Removing the value and slope at
    :math:`\\omega_0` removes the constant phase and the group delay, so the pulse stays centred
    in the retarded-time window; GDD and higher orders are unchanged. The slope is taken from
    the local fit of :func:`phase_derivatives_at`, so ``refractive_index`` must be finite near
    ``omega0``; non-finite values elsewhere stay non-finite in the result.

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
    """
    if not thickness >= 0:
        raise ConfigError(f"thickness = {thickness} m: must be >= 0")
    omega = np.asarray(omega, dtype=float)
    raw = np.asarray(refractive_index, dtype=float) * omega / c * thickness
    return _remove_value_and_slope(omega, omega0, raw)


def stack_phase(
    omega: np.ndarray, omega0: float, layers: Sequence[tuple[np.ndarray, float]]
) -> np.ndarray:
    """Summed :func:`material_phase` of several passes, e.g. the exit window and the air path.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    omega0 : float
        Reference angular frequency. [rad/s]
    layers : sequence of (ndarray, float)
        ``(refractive_index on omega [1], thickness [m])`` per pass.

    Returns
    -------
    ndarray
        Total phase. [rad]

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
    """
    total = np.zeros(np.shape(omega))
    for refractive_index, thickness in layers:
        total = total + material_phase(omega, omega0, refractive_index, thickness)
    return total


def mirror_phase(omega: np.ndarray, omega0: float, gdd: float, tod: float = 0.0) -> np.ndarray:
    """Spectral phase of one chirped-mirror bounce with constant GDD and TOD.

    Parameters
    ----------
    omega : ndarray
        Angular frequency. [rad/s]
    omega0 : float
        Reference angular frequency. [rad/s]
    gdd : float
        Group-delay dispersion per bounce (negative for a compressing mirror). [s^2]
    tod : float
        Third-order dispersion per bounce. [s^3]

    Returns
    -------
    ndarray
        :math:`\\phi = \\tfrac{1}{2}\\,\\mathrm{GDD}\\,\\Delta\\omega^2 +
        \\tfrac{1}{6}\\,\\mathrm{TOD}\\,\\Delta\\omega^3`. [rad]

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
    """
    domega = np.asarray(omega, dtype=float) - omega0
    return 0.5 * gdd * domega**2 + tod / 6.0 * domega**3


def phase_from_gdd_curve(omega: np.ndarray, omega0: float, gdd_values: np.ndarray) -> np.ndarray:
    """Spectral phase from a GDD curve (e.g. a measured mirror GDD) by double integration.

    Parameters
    ----------
    omega : ndarray
        Angular frequency (any order). [rad/s]
    omega0 : float
        Reference angular frequency, inside the range of ``omega``. [rad/s]
    gdd_values : ndarray
        GDD(omega) on ``omega``; must be finite everywhere (fill the region outside the
        mirror band, which :func:`clip_to_band` removes anyway, e.g. with the edge values). [s^2]

    Returns
    -------
    ndarray
        :math:`\\phi(\\omega)` with :math:`\\phi(\\omega_0) = \\phi'(\\omega_0) = 0` and
        :math:`\\phi'' = \\mathrm{GDD}`, in the order of ``omega``. [rad]

    Notes
    -----
    Two cumulative trapezoidal integrations over ascending ``omega``; the group delay is set to
    zero at ``omega0`` after the first and the phase after the second. Exact for a GDD linear
    in omega when ``omega0`` is a sample (trapezoidal integration of a linear function).

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).

    The integration is a numerical helper.
    """
    gdd_values = np.asarray(gdd_values, dtype=float)
    if not np.all(np.isfinite(gdd_values)):
        raise ConfigError("gdd_values: contains non-finite values; every sample must be finite")
    from scipy.integrate import cumulative_trapezoid  # lazy: 0.06-0.09 s, measured curves only

    order, w = _sorted_view(omega)
    group_delay = cumulative_trapezoid(gdd_values[order], w, initial=0.0)
    group_delay -= np.interp(omega0, w, group_delay)
    phase_sorted = cumulative_trapezoid(group_delay, w, initial=0.0)
    phase_sorted -= np.interp(omega0, w, phase_sorted)
    phase = np.empty_like(phase_sorted)
    phase[order] = phase_sorted
    return phase


def band_from_wavelengths(wavelength_short: float, wavelength_long: float) -> tuple[float, float]:
    """Angular-frequency band ``(omega_lo, omega_hi)`` of a mirror given by its wavelength edges.

    Parameters
    ----------
    wavelength_short : float
        Short-wavelength edge of the reflection band (vacuum). [m]
    wavelength_long : float
        Long-wavelength edge (vacuum). [m]

    Returns
    -------
    omega_lo, omega_hi : float
        :math:`2\\pi c/\\lambda_{long}`, :math:`2\\pi c/\\lambda_{short}`. [rad/s]

    References
    ----------
    None: numerical helper (unit conversion).
    """
    if not 0 < wavelength_short < wavelength_long:
        raise ConfigError(
            f"mirror band = ({wavelength_short}, {wavelength_long}) m: "
            "need 0 < wavelength_short < wavelength_long"
        )
    return 2 * np.pi * c / wavelength_long, 2 * np.pi * c / wavelength_short


def band_mask(omega: np.ndarray, band: tuple[float, float]) -> np.ndarray:
    """Boolean mask of the samples inside ``band = (omega_lo, omega_hi)`` [rad/s], edges in.

    References
    ----------
    None: numerical helper.
    """
    omega_lo, omega_hi = band
    if not 0 < omega_lo < omega_hi:
        raise ConfigError(
            f"band = ({omega_lo:.4e}, {omega_hi:.4e}) rad/s: need 0 < omega_lo < omega_hi"
        )
    omega = np.asarray(omega, dtype=float)
    return (omega >= omega_lo) & (omega <= omega_hi)


def clip_to_band(
    grid: Grid, spectrum: np.ndarray, band: tuple[float, float] | None
) -> tuple[np.ndarray, float]:
    """Remove the light outside the mirror band and report the energy fraction lost.

    Parameters
    ----------
    grid : Grid
        The grid of ``spectrum``.
    spectrum : ndarray
        Spectral amplitude in FFT order. [sqrt(J/Hz)]
    band : (float, float) or None
        Reflection band ``(omega_lo, omega_hi)``; ``None`` means no clipping. [rad/s]

    Returns
    -------
    clipped : ndarray
        Spectrum with zero amplitude outside the band (a new array). [sqrt(J/Hz)]
    loss_fraction : float
        Energy outside the band over the input energy. [1]

    Notes
    -----
    The mirror is modelled with unit reflectivity inside the band and zero outside (hard
    edges). This is the only loss of the compressor.

    References
    ----------
    None: a model assumption of this package (hard-edged band), no published model.
    """
    spectrum = np.asarray(spectrum, dtype=complex)
    if band is None:
        return spectrum.copy(), 0.0
    inside = band_mask(grid.omega, band)
    clipped = np.where(inside, spectrum, 0.0)
    energy = grid.energy_w(spectrum)
    lost = grid.energy_w(spectrum[~inside])
    return clipped, (lost / energy if energy > 0 else 0.0)
