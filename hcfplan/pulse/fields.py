"""Input pulses on a :class:`~hcfplan.numerics.grid.Grid`: analytic shapes and measured spectra.

The analytic shapes and their constants are those of the registry
:data:`hcfplan.pulse.shapes.PULSE_SHAPES`.

All fields follow the conventions of :mod:`hcfplan.numerics.grid`: ``|A|^2`` is power [W], the
spectrum is ``grid.to_spectrum(A)`` with ``|A~|^2`` in J/Hz, and a spectral phase multiplies the
spectrum as ``exp(i phi)``. A group-delay dispersion ``gdd`` is the phase ``phi = gdd * dw**2 / 2``,
so a positive ``gdd`` is the chirp a normally dispersive material gives (red leading).

Note on the spectral phase of the grid: ``grid.time`` is centred (``t_k = (k - N/2) dt``) while
the discrete transform counts time from sample 0, so the grid spectrum of a pulse centred at
``t = 0`` carries the linear phase ``exp(-i dw t_0)`` with ``t_0 = grid.time[0]`` (i.e. a
factor ``(-1)^j``). |A~|^2 and every diagonal spectral operator are unaffected;
:func:`field_from_measured_spectrum` applies the factor so that its pulse sits at ``t = 0``.

References
----------
.. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
       (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
"""

from __future__ import annotations

import warnings

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.numerics.grid import Grid
from hcfplan.pulse.shapes import PulseShape, pulse_shape

#: Fraction of the measured spectral energy allowed outside the grid before a warning.
SPECTRUM_CUT_TOLERANCE = 1e-3


def shape_t0_factor(shape: PulseShape) -> float:
    """Ratio of the intensity FWHM to the shape parameter T0.

    Parameters
    ----------
    shape : {"sech2", "gaussian"}
        Intensity profile sech^2(t/T0) or exp(-t^2/T0^2).

    Returns
    -------
    float
        FWHM / T0: ``2 ln(1 + sqrt 2) = 1.7627`` (sech^2), ``2 sqrt(ln 2) = 1.6651`` (Gaussian). [1]

    Notes
    -----
    Read from the shape registry :data:`hcfplan.pulse.shapes.PULSE_SHAPES`.

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
    """
    return pulse_shape(shape).fwhm_per_t0


def peak_power_from_energy(energy: float, duration_fwhm: float, shape: PulseShape) -> float:
    """Peak power of a transform-limited pulse of given energy and intensity FWHM.

    Parameters
    ----------
    energy : float
        Pulse energy. [J]
    duration_fwhm : float
        Intensity FWHM. [s]
    shape : {"sech2", "gaussian"}
        Intensity profile.

    Returns
    -------
    float
        Peak power. [W]

    Notes
    -----
    sech^2: :math:`E = P_0\\int \\mathrm{sech}^2(t/T_0)dt = 2P_0T_0` and
    :math:`T_0 = \\tau/[2\\ln(1+\\sqrt2)]`, so
    :math:`P_0 = \\ln(1+\\sqrt2)\\,E/\\tau = 0.8814\\,E/\\tau`.
    Gaussian: :math:`E = P_0\\int e^{-t^2/T_0^2}dt = \\sqrt\\pi P_0T_0` and
    :math:`T_0 = \\tau/(2\\sqrt{\\ln 2})`, so
    :math:`P_0 = 2\\sqrt{\\ln2/\\pi}\\,E/\\tau = 0.9394\\,E/\\tau` [1]. The constants are
    those of :data:`hcfplan.pulse.shapes.PULSE_SHAPES`.

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
    """
    entry = pulse_shape(shape)
    _check_positive("duration_fwhm", duration_fwhm, "s")
    return energy * entry.fwhm_per_t0 / (entry.energy_per_p0t0 * duration_fwhm)


def _check_positive(name: str, value: float, unit: str) -> None:
    if not (np.isfinite(value) and value > 0):
        raise ConfigError(f"{name} = {value} {unit}: must be > 0")


def _apply_gdd(grid: Grid, spectrum: np.ndarray, gdd: float) -> np.ndarray:
    """Multiply by exp(i gdd dw^2 / 2), dw = omega - omega_pump (conventions 1 and 4 of
    :mod:`hcfplan.numerics.grid`)."""
    if not np.isfinite(gdd):
        raise ConfigError(f"gdd = {gdd} s^2: must be finite")
    if gdd == 0.0:
        return spectrum
    return spectrum * np.exp(0.5j * gdd * grid.domega_pump**2)


def pulse_field(
    grid: Grid, shape: PulseShape, duration_fwhm: float, energy: float, gdd: float = 0.0
) -> np.ndarray:
    """Temporal envelope of a sech^2 or Gaussian pulse, centred at t = 0.

    Parameters
    ----------
    grid : Grid
        Time/frequency grid.
    shape : {"sech2", "gaussian"}
        Intensity profile (see :func:`shape_t0_factor`).
    duration_fwhm : float
        Intensity FWHM of the transform-limited pulse. [s]
    energy : float
        Pulse energy; the discrete energy on the grid is set to it exactly. [J]
    gdd : float
        Group-delay dispersion applied as the spectral phase exp(i gdd dw^2/2), dw = omega -
        ``grid.omega_pump``. [s^2]

    Returns
    -------
    ndarray of complex
        A(t) with |A|^2 in W, on ``grid.time``. [sqrt(W)]

    Notes
    -----
    The amplitude a(t/T0) comes from :func:`hcfplan.pulse.shapes.pulse_shape`, with
    T0 = FWHM / (FWHM/T0) [1]; the pulse's carrier is the grid's pump, i.e. the envelope about
    the grid's reference frequency carries exp(-i (omega_pump - omega0) t) (convention 1 of
    :mod:`hcfplan.numerics.grid`).

    References
    ----------
    .. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 3
           (Gaussian and sech pulse shapes, T0 and the FWHM). [from memory]
    """
    entry = pulse_shape(shape)
    _check_positive("duration_fwhm", duration_fwhm, "s")
    _check_positive("energy", energy, "J")
    t0 = duration_fwhm / entry.fwhm_per_t0
    field = entry.amplitude(grid.time / t0) * grid.carrier()  # carrier at the pump (conv. 1)
    if gdd != 0.0:
        field = grid.to_time(_apply_gdd(grid, grid.to_spectrum(field), gdd))
    return field * np.sqrt(energy / grid.energy_t(field))


def field_from_measured_spectrum(
    grid: Grid,
    wavelength: np.ndarray,
    intensity: np.ndarray,
    energy: float,
    gdd: float = 0.0,
    phase: np.ndarray | None = None,
) -> np.ndarray:
    """Temporal envelope from a measured spectrum with a flat (or GDD) or measured phase.

    Parameters
    ----------
    grid : Grid
        Time/frequency grid.
    wavelength : ndarray
        Measured vacuum wavelengths, strictly increasing. [m]
    intensity : ndarray
        Spectral intensity per unit wavelength, >= 0 (any scale). [arb./m]
    energy : float
        Pulse energy the field is scaled to. [J]
    gdd : float
        Group-delay dispersion added as a spectral phase about ``grid.omega_pump``. [s^2]
    phase : ndarray, optional
        Measured spectral phase at ``wavelength``, multiplying the spectrum as
        ``exp(i phase)`` (module docstring: positive curvature in omega is a positive GDD);
        interpolated linearly in frequency. None: flat. [rad]

    Returns
    -------
    ndarray of complex
        A(t) on ``grid.time``, centred at t = 0 for a flat phase and ``gdd = 0``. [sqrt(W)]

    Notes
    -----
    The density per unit frequency is :math:`S_\\nu = S_\\lambda\\,|d\\lambda/d\\nu| =
    S_\\lambda\\,\\lambda^2/c`; it is interpolated linearly in frequency onto the grid
    (zero outside the measured range). A ``ValidityWarning`` is issued if more than
    ``SPECTRUM_CUT_TOLERANCE`` of the measured energy lies outside the grid's window.

    References
    ----------
    none: change of variables and interpolation, no published model.
    """
    wavelength = np.asarray(wavelength, dtype=float)
    intensity = np.asarray(intensity, dtype=float)
    _check_positive("energy", energy, "J")
    if wavelength.shape != intensity.shape or wavelength.size < 2:
        raise ConfigError(
            f"measured spectrum: {wavelength.size} wavelengths and {intensity.size} "
            "intensities: need two equal-length arrays of >= 2 samples"
        )
    if not np.all(np.diff(wavelength) > 0) or not wavelength[0] > 0:
        raise ConfigError("measured spectrum: wavelengths must be > 0 and strictly increasing")
    if np.any(intensity < 0) or not np.all(np.isfinite(intensity)):
        raise ConfigError("measured spectrum: intensities must be finite and >= 0")
    nu = (c / wavelength)[::-1]
    density = (intensity * wavelength**2 / c)[::-1]  # S_nu = S_lambda lambda^2 / c
    _warn_if_cut(grid, nu, density)
    on_grid = np.interp(grid.frequency, nu, density, left=0.0, right=0.0)
    if not np.any(on_grid > 0):
        raise ConfigError(
            f"measured spectrum ({wavelength[0]:.4g}-{wavelength[-1]:.4g} m) lies outside the "
            "grid's frequency window"
        )
    spectrum = np.sqrt(on_grid) * np.exp(-1j * grid.domega * grid.time[0])  # centre at t = 0
    if phase is not None:
        phase = np.asarray(phase, dtype=float)
        if phase.shape != wavelength.shape or not np.all(np.isfinite(phase)):
            raise ConfigError("measured spectrum: the phase needs one finite value per "
                              "wavelength")
        spectrum = spectrum * np.exp(1j * np.interp(grid.frequency, nu, phase[::-1]))
    field = grid.to_time(_apply_gdd(grid, spectrum.astype(complex), gdd))
    return field * np.sqrt(energy / grid.energy_t(field))


def _warn_if_cut(grid: Grid, nu: np.ndarray, density: np.ndarray) -> None:
    """Warn when a noticeable part of the measured spectrum falls outside the grid."""
    total = np.trapezoid(density, nu)
    inside = (nu >= grid.frequency.min()) & (nu <= grid.frequency.max())
    outside = total - np.trapezoid(np.where(inside, density, 0.0), nu)
    if total > 0 and outside > SPECTRUM_CUT_TOLERANCE * total:
        warnings.warn(
            f"measured spectrum: {outside / total:.2%} of its energy lies outside the grid "
            f"window {grid.frequency.min():.4g}-{grid.frequency.max():.4g} Hz and is cut; "
            "use a finer time step (more points)",
            ValidityWarning,
            stacklevel=3,
        )


def field_from_measured_time(
    grid: Grid,
    time: np.ndarray,
    intensity: np.ndarray,
    phase: np.ndarray,
    energy: float,
    gdd: float = 0.0,
) -> np.ndarray:
    """Temporal envelope from a measured temporal intensity and phase.

    Parameters
    ----------
    grid : Grid
        Time/frequency grid.
    time : ndarray
        Measured times, strictly increasing (t = 0 is kept as the grid's t = 0). [s]
    intensity : ndarray
        Temporal intensity, >= 0 (any scale). [arb.]
    phase : ndarray
        Temporal phase of the envelope about the pump carrier: the field is
        ``sqrt(I) exp(i phase)`` times the pump carrier, so under the exp(-i omega t)
        convention of :mod:`hcfplan.numerics.grid` the instantaneous angular frequency is
        ``omega_pump - d(phase)/dt``. [rad]
    energy : float
        Pulse energy the field is scaled to. [J]
    gdd : float
        Group-delay dispersion added as a spectral phase about ``grid.omega_pump``. [s^2]

    Returns
    -------
    ndarray of complex
        A(t) on ``grid.time``. [sqrt(W)]

    Notes
    -----
    Intensity and phase are interpolated linearly onto ``grid.time`` (intensity zero outside
    the measured range). A ``ValidityWarning`` is issued if more than
    ``SPECTRUM_CUT_TOLERANCE`` of the measured energy lies outside the grid's time window.

    References
    ----------
    none: interpolation, no published model.
    """
    time, intensity, phase = (np.asarray(a, dtype=float) for a in (time, intensity, phase))
    _check_positive("energy", energy, "J")
    if not (time.shape == intensity.shape == phase.shape) or time.size < 2:
        raise ConfigError("measured field: need equal-length time, intensity and phase arrays "
                          "of >= 2 samples")
    if not np.all(np.diff(time) > 0):
        raise ConfigError("measured field: times must increase strictly")
    if np.any(intensity < 0) or not np.all(np.isfinite(intensity) & np.isfinite(phase)):
        raise ConfigError("measured field: intensities must be finite and >= 0, phases finite")
    total = np.trapezoid(intensity, time)
    inside = (time >= grid.time[0]) & (time <= grid.time[-1])
    cut = total - np.trapezoid(np.where(inside, intensity, 0.0), time)
    if total > 0 and cut > SPECTRUM_CUT_TOLERANCE * total:
        warnings.warn(f"measured field: {cut / total:.2%} of its energy lies outside the grid's "
                      f"time window {grid.time[0]:.4g}-{grid.time[-1]:.4g} s and is cut; "
                      "use a longer window", ValidityWarning, stacklevel=2)
    on_grid = np.interp(grid.time, time, intensity, left=0.0, right=0.0)
    if not np.any(on_grid > 0):
        raise ConfigError(f"measured field ({time[0]:.4g}-{time[-1]:.4g} s) lies outside the "
                          "grid's time window")
    field = np.sqrt(on_grid) * np.exp(1j * np.interp(grid.time, time, phase)) * grid.carrier()
    field = grid.to_time(_apply_gdd(grid, grid.to_spectrum(field), gdd))
    return field * np.sqrt(energy / grid.energy_t(field))


#: Samples of the uniform frequency axis on which a measured spectrum's pulse is built for its
#: FWHM (:func:`measured_field_fwhm`), and the padding of that axis (times the measured span).
FWHM_POINTS = 8192
FWHM_PADDING = 8.0


def measured_field_fwhm(axis: str, x: np.ndarray, intensity: np.ndarray,
                        phase: np.ndarray) -> float:
    """Intensity FWHM of a measured pulse given versus time or wavelength.

    Parameters
    ----------
    axis : {"time", "wavelength"}
        What ``x`` is.
    x : ndarray
        Times [s] or vacuum wavelengths [m], strictly increasing.
    intensity : ndarray
        Temporal intensity, or spectral intensity per unit wavelength. [arb.]
    phase : ndarray
        Temporal or spectral phase. [rad]

    Returns
    -------
    float
        FWHM of the temporal intensity (nan when it has no contiguous half maximum). [s]

    Notes
    -----
    A spectrum is put on a uniform frequency axis (:data:`FWHM_POINTS` samples over
    :data:`FWHM_PADDING` times its span, S_nu = S_lambda lambda^2 / c, phase interpolated
    linearly) and transformed to time.

    References
    ----------
    none: change of variables and discrete Fourier transform, no published model.
    """
    from hcfplan.pulse.metrics import fwhm

    x, intensity, phase = (np.asarray(a, dtype=float) for a in (x, intensity, phase))
    if axis == "time":
        return float(fwhm(x, intensity))
    nu, density = (c / x)[::-1], (intensity * x**2 / c)[::-1]
    centre, span = 0.5 * (nu[0] + nu[-1]), (nu[-1] - nu[0]) * FWHM_PADDING
    axis_nu = centre + span * (np.arange(FWHM_POINTS) / FWHM_POINTS - 0.5)
    amplitude = np.sqrt(np.interp(axis_nu, nu, density, left=0.0, right=0.0))
    spectrum = amplitude * np.exp(1j * np.interp(axis_nu, nu, phase[::-1]))
    power = np.abs(np.fft.fftshift(np.fft.fft(np.fft.ifftshift(spectrum)))) ** 2
    time = (np.arange(FWHM_POINTS) - FWHM_POINTS // 2) / span
    return float(fwhm(time, power))
