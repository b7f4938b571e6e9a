"""THz estimate from a measured (broadened) optical spectrum, without a fiber model.

The measured spectrum is put on an envelope grid of its own (window 2.5 x the measured span, so
the autocorrelation does not alias, and a sample spacing equal to the wanted THz resolution) and
handed to :func:`hcfplan.thz.generation.thz_estimate` with the given set-up. The resampling is
that of :func:`hcfplan.pulse.fields.field_from_measured_spectrum`; the spectral phase, when it is
measured, multiplies the spectrum as exp(i phi) (convention 4 of :mod:`hcfplan.numerics.grid`).

References
----------
.. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation of
       terahertz pulses through optical rectification in organic DAST crystals: theory and
       experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not retrieved].
"""

from __future__ import annotations

from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid, fft_friendly_size
from hcfplan.thz.generation import ThzResult, thz_estimate
from hcfplan.thz.setup import ThzSetup

#: Largest envelope grid made for a measured spectrum (points).
MAX_POINTS = 1 << 17


def _grid_from_measured(wavelength, intensity, pulse_energy, phase, density, frequency_step):
    """Grid for the THz correlation, and the measured spectrum on it.

    The window is 2.5 x the measured span (aliasing-free autocorrelation, below zero frequency)
    and the sample spacing is ``frequency_step`` (THz resolution); resampling is done by
    :func:`hcfplan.pulse.fields.field_from_measured_spectrum`.
    """
    from hcfplan.pulse.fields import field_from_measured_spectrum

    wavelength, intensity = np.asarray(wavelength, float), np.asarray(intensity, float)
    if wavelength.shape != intensity.shape or wavelength.size < 3 or np.any(wavelength <= 0):
        raise ConfigError(f"measured spectrum: wavelength ({wavelength.size}) and intensity "
                          f"({intensity.size}) must be equal-length arrays, >= 3 points, > 0 m")
    if density not in ("wavelength", "frequency"):
        raise ConfigError(f"density = {density!r}: valid: wavelength, frequency")
    order = np.argsort(wavelength)
    wavelength = wavelength[order]
    per_wavelength = np.clip(intensity[order], 0, None)  # negative noise -> 0
    if density == "frequency":
        per_wavelength = per_wavelength * c / wavelength**2  # S_lambda = S_nu c / lambda^2
    nu_lo, nu_hi = c / wavelength[-1], c / wavelength[0]
    window = min(2.5 * (nu_hi - nu_lo), 1.9 * 0.5 * (nu_lo + nu_hi))
    if window < 1.1 * (nu_hi - nu_lo):
        raise ConfigError(f"measured spectrum {nu_lo * 1e-12:.0f}-{nu_hi * 1e-12:.0f} THz is too "
                          "wide for one envelope grid")
    points = min(fft_friendly_size(int(np.ceil(window / frequency_step))), MAX_POINTS)
    grid = Grid(points=points, dt=1.0 / window, omega0=np.pi * (nu_lo + nu_hi))
    field = field_from_measured_spectrum(grid, wavelength, per_wavelength, pulse_energy)
    spectrum = grid.to_spectrum(field)
    if phase is not None:  # exp(i phi), grid.py convention 4; |exp(i phi)| = 1 keeps the energy
        phi = np.asarray(phase, float)[order]
        spectrum = spectrum * np.exp(1j * np.interp(grid.wavelength, wavelength, phi))
    return grid, spectrum


def thz_from_measured_spectrum(
    wavelength: np.ndarray,
    intensity: np.ndarray,
    pulse_energy: float,
    setup: ThzSetup,
    *,
    phase: np.ndarray | None = None,
    density: Literal["wavelength", "frequency"] = "wavelength",
    frequency_step: float = 20e9,
) -> ThzResult:
    """THz estimate from a measured (broadened) optical spectrum.

    Parameters
    ----------
    wavelength : ndarray
        Vacuum wavelengths of the samples. [m]
    intensity : ndarray
        Measured spectral intensity (arbitrary scale, negative noise clipped to 0); resampled
        by :func:`hcfplan.pulse.fields.field_from_measured_spectrum`. [arb.]
    pulse_energy : float
        Pulse energy on the crystal. [J]
    setup : ThzSetup
        Generation crystal, detector and settings of :func:`hcfplan.thz.generation.thz_estimate`.
    phase : ndarray or None
        Spectral phase at ``wavelength`` (multiplies the spectrum as exp(i phi), grid.py
        convention 4); ``None``: the pulse is assumed compressed to its transform limit. [rad]
    density : {"wavelength", "frequency"}
        Whether ``intensity`` is per unit wavelength (grating spectrometer; converted with
        lambda^2 / c) or per unit frequency.
    frequency_step : float
        Target spectral sample spacing of the grid (THz resolution). [Hz]

    Returns
    -------
    ThzResult

    References
    ----------
    .. [1] A. Schneider, M. Neis, M. Stillhart, B. Ruiz, R. U. A. Khan, P. Guenter, "Generation
           of terahertz pulses through optical rectification in organic DAST crystals: theory
           and experiment," J. Opt. Soc. Am. B 23, 1822 (2006) [equations from memory, not
           retrieved]; the model of :func:`hcfplan.thz.generation.thz_estimate`, whose
           docstring lists the other sources. The resampling is a numerical helper.
    """
    if not (np.isfinite(frequency_step) and frequency_step > 0):
        raise ConfigError(f"frequency_step = {frequency_step} Hz: must be > 0")
    grid, spectrum = _grid_from_measured(wavelength, intensity, pulse_energy, phase, density,
                                         frequency_step)
    return thz_estimate(grid, spectrum, setup)
