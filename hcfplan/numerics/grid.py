"""Time/frequency grid and the Fourier conventions of hcfplan, stated once, here.

Conventions (every other module refers to this docstring)
---------------------------------------------------------
1. **Field and envelope.** The real optical field is
   :math:`E(z,t) = \\mathrm{Re}[A(z,t)\\, e^{i(\\beta_0 z - \\omega_0 t)}]`, i.e. a plane wave varies as
   :math:`e^{i(\\beta z-\\omega t)}`. The envelope ``A`` is scaled so that :math:`|A|^2` is the
   instantaneous power in watts. Its time axis is the retarded time (moving with the group
   velocity at the pump), centred on zero.
2. **Spectrum.** With that phase sign the spectral amplitude is
   :math:`\\tilde A(\\Delta\\omega) = \\int A(t)\\, e^{+i\\Delta\\omega t}\\, dt` and
   :math:`A(t) = \\frac{1}{2\\pi}\\int \\tilde A\\, e^{-i\\Delta\\omega t}\\, d\\Delta\\omega`, where
   :math:`\\Delta\\omega = \\omega - \\omega_0`. Numerically ``spectrum = N * dt * ifft(A)`` and
   ``A = fft(spectrum) / (N * dt)`` (numpy ordering, unshifted). A positive frequency offset
   means a bluer (higher-frequency) component. Because the time axis is centred
   (t_k = (k - N/2) dt), the grid spectrum equals the continuous transform times (-1)^j
   (a delay of half a window); this drops out of |A~|^2 and of every operator diagonal in
   frequency, and code that needs the absolute spectral phase (measured spectra, residual
   phase) multiplies by (-1)^j.
3. **Energy.** Parseval: :math:`\\int |A|^2 dt = \\int |\\tilde A|^2 d\\nu`, so :math:`|\\tilde A|^2`
   is the spectral energy density in J/Hz (ν in Hz).
4. **Dispersion.** The linear operator in the frequency domain is
   :math:`\\partial_z \\tilde A = [i(\\beta(\\omega) - \\beta_0 - \\beta_1\\Delta\\omega) - \\alpha(\\omega)]\\tilde A`
   with :math:`\\beta_n = d^n\\beta/d\\omega^n` at the pump. **Positive β2 is normal dispersion.**
   A spectral phase :math:`\\phi(\\omega)` multiplies the spectrum as :math:`e^{i\\phi}`; a
   material of length L adds :math:`\\phi = k(\\omega) L`, so its GDD = :math:`d^2\\phi/d\\omega^2` is
   positive for normal dispersion, and a chirped mirror of negative GDD compensates it.
5. **Loss.** ``alpha`` everywhere is the *field* attenuation: power falls as :math:`e^{-2\\alpha z}`.

References
----------
.. [1] G. P. Agrawal, *Nonlinear Fiber Optics*, 6th ed., Academic Press, 2019, ch. 2
       (envelope equation; we use the physics sign convention exp(i(beta z - omega t))).
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass
from functools import cached_property

import numpy as np
from scipy import fft as sfft

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning


@dataclass(frozen=True)
class Grid:
    """Uniform time grid of ``points`` samples spaced ``dt`` around the pump ``omega0``.

    Parameters
    ----------
    points : int
        Number of samples N (an FFT-friendly size).
    dt : float
        Time step. [s]
    omega0 : float
        Pump (reference) angular frequency. [rad/s]

    Raises
    ------
    ConfigError
        Fewer than 16 points, a non-positive ``dt`` or ``omega0``, or a frequency window that
        reaches zero frequency. Configs are checked before a grid is made
        (:mod:`hcfplan.io.crosschecks`), so these name the grid's own parameters.
    """

    points: int
    dt: float
    omega0: float

    def __post_init__(self) -> None:
        if self.points < 16:
            raise ConfigError(f"grid points = {self.points}: must be >= 16")
        if not self.dt > 0:
            raise ConfigError(f"grid dt = {self.dt} s: must be > 0")
        if not self.omega0 > 0:
            raise ConfigError(f"grid omega0 = {self.omega0} rad/s: must be > 0")
        if self.omega0 - np.pi / self.dt <= 0:
            raise ConfigError(
                f"grid frequency window reaches zero frequency (omega0 = {self.omega0:.3e}, "
                f"half window = {np.pi / self.dt:.3e} rad/s): use a larger dt"
            )

    @property
    def time_window(self) -> float:
        """Total time window N dt. [s]"""
        return self.points * self.dt

    @cached_property
    def time(self) -> np.ndarray:
        """Retarded time, centred: t_k = (k - N/2) dt. [s]"""
        return (np.arange(self.points) - self.points // 2) * self.dt

    @cached_property
    def domega(self) -> np.ndarray:
        """Angular-frequency offsets from ``omega0`` in FFT order. [rad/s]"""
        return 2 * np.pi * sfft.fftfreq(self.points, self.dt)

    @cached_property
    def omega(self) -> np.ndarray:
        """Absolute angular frequency of each spectral sample, FFT order. [rad/s]"""
        return self.omega0 + self.domega

    @property
    def frequency(self) -> np.ndarray:
        """Absolute optical frequency, FFT order. [Hz]"""
        return self.omega / (2 * np.pi)

    @property
    def wavelength(self) -> np.ndarray:
        """Vacuum wavelength of each spectral sample, FFT order. [m]"""
        return 2 * np.pi * c / self.omega

    @property
    def dnu(self) -> float:
        """Spectral sample spacing. [Hz]"""
        return 1.0 / (self.points * self.dt)

    def to_spectrum(self, field_t: np.ndarray, *, workers: int | None = None) -> np.ndarray:
        """Spectral amplitude from the temporal envelope (convention 2); abs()**2 is in J/Hz."""
        return sfft.ifft(field_t, axis=-1, workers=workers) * (self.points * self.dt)

    def to_time(self, spectrum: np.ndarray, *, workers: int | None = None) -> np.ndarray:
        """Temporal envelope from the spectral amplitude (convention 2). [sqrt(W)]"""
        return sfft.fft(spectrum, axis=-1, workers=workers) / (self.points * self.dt)

    def energy_t(self, field_t: np.ndarray) -> float:
        """Pulse energy from the temporal envelope, sum |A|^2 dt. [J]"""
        return float(np.sum(np.abs(field_t) ** 2) * self.dt)

    def energy_w(self, spectrum: np.ndarray) -> float:
        """Pulse energy from the spectral amplitude, sum |A~|^2 dnu. [J]"""
        return float(np.sum(np.abs(spectrum) ** 2) * self.dnu)

    def shifted(self, array: np.ndarray) -> np.ndarray:
        """Spectral array reordered from FFT order to ascending frequency."""
        return sfft.fftshift(array, axes=-1)


def fft_friendly_size(n_min: int) -> int:
    """Smallest power of two >= ``n_min`` (at least 16)."""
    n = 16
    while n < n_min:
        n *= 2
    return n


#: Default time window in units of the input FWHM duration (common practice, no source).
TIME_WINDOW_PER_FWHM = 40.0
#: Full frequency window in units of the (broadened) spectral FWHM (common practice, no source).
FREQUENCY_WINDOW_PER_BANDWIDTH = 16.0
#: Transform-limited FWHM time-bandwidth product used to estimate the spectral width
#: (Gaussian, 2 ln2 / pi = 0.4413).
_TBP_ESTIMATE = 2.0 * np.log(2.0) / np.pi
#: The half frequency window stays below this fraction of omega0 (never reaches zero frequency).
MAX_HALF_WINDOW_FRACTION = 0.9


def choose_grid(
    omega0: float,
    duration_fwhm: float,
    *,
    broadening_factor: float = 1.0,
    points: int | None = None,
    time_window: float | None = None,
) -> Grid:
    """Time/frequency grid sized for a pulse and its expected spectral broadening.

    Parameters
    ----------
    omega0 : float
        Pump angular frequency. [rad/s]
    duration_fwhm : float
        Intensity FWHM of the input pulse. [s]
    broadening_factor : float
        Expected ratio of output to input spectral width (>= 1); the caller estimates it, e.g.
        from the peak nonlinear phase as ``sqrt(1 + 0.77 phi_max**2)``. [1]
    points : int, optional
        Number of samples (even, >= 16). Default: the smallest power of two that spans the
        time window at the sampling the spectrum needs.
    time_window : float, optional
        Total time window. Default ``TIME_WINDOW_PER_FWHM * duration_fwhm``; when neither
        override is given the window is rounded *up* to ``points * dt``. [s]

    Returns
    -------
    Grid

    Raises
    ------
    ConfigError
        For non-positive inputs, odd ``points`` or an override whose frequency window would
        reach zero frequency.

    Notes
    -----
    The needed full frequency window is ``FREQUENCY_WINDOW_PER_BANDWIDTH * F * dw`` with
    ``dw = 2 pi 0.4413 / duration_fwhm`` (Gaussian transform limit), capped at
    ``2 * MAX_HALF_WINDOW_FRACTION * omega0`` so that the window never reaches zero frequency
    (a ``ValidityWarning`` says when the cap applies); ``dt = pi / half_window``.
    """
    for name, value, unit in (("omega0", omega0, "rad/s"), ("duration_fwhm", duration_fwhm, "s")):
        if not (np.isfinite(value) and value > 0):
            raise ConfigError(f"{name} = {value} {unit}: must be > 0")
    if not broadening_factor >= 1.0:
        raise ConfigError(f"broadening_factor = {broadening_factor}: must be >= 1")
    if points is not None and (points < 16 or points % 2):
        raise ConfigError(f"grid points = {points}: must be an even number >= 16")
    if time_window is not None and not time_window > 0:
        raise ConfigError(f"grid time_window = {time_window} s: must be > 0")
    half_needed = 0.5 * FREQUENCY_WINDOW_PER_BANDWIDTH * broadening_factor * (
        2 * np.pi * _TBP_ESTIMATE / duration_fwhm
    )
    half_cap = MAX_HALF_WINDOW_FRACTION * omega0
    if half_needed > half_cap:
        warnings.warn(
            f"grid: the expected spectrum (half width {half_needed:.3e} rad/s) does not fit "
            f"below zero frequency; the window is capped at {half_cap:.3e} rad/s",
            ValidityWarning,
            stacklevel=2,
        )
    dt = np.pi / min(half_needed, half_cap)
    window = TIME_WINDOW_PER_FWHM * duration_fwhm if time_window is None else time_window
    if points is not None and time_window is not None:
        n, dt = points, time_window / points
    elif points is not None:
        n = points
    elif time_window is not None:
        n = fft_friendly_size(int(np.ceil(window / dt)))
        while np.pi * n / window > half_cap and n > 16:
            n //= 2
        dt = window / n
    else:
        n = fft_friendly_size(int(np.ceil(window / dt)))
    if np.pi / dt >= omega0:
        raise ConfigError(
            f"grid points = {n}, time_window = {n * dt:.4g} s: the frequency window "
            f"(half width {np.pi / dt:.3e} rad/s) reaches zero frequency (omega0 = "
            f"{omega0:.3e} rad/s); use fewer points or a longer time window"
        )
    return Grid(points=int(n), dt=float(dt), omega0=float(omega0))
