"""Time/frequency grid and the Fourier conventions of hcfplan, stated once, here.

Conventions (every other module refers to this docstring)
---------------------------------------------------------
1. **Field, envelope, reference and pump.** The real optical field is
   :math:`E(z,t) = \\mathrm{Re}[A(z,t)\\, e^{i(\\beta_0 z - \\omega_0 t)}]`, i.e. a plane wave varies as
   :math:`e^{i(\\beta z-\\omega t)}`. :math:`\\omega_0` (``Grid.omega0``) is the *reference*
   frequency: the centre of the frequency window and the carrier the envelope is written about.
   It need not be the pump frequency :math:`\\omega_p` (``Grid.omega_pump``, by default equal to
   :math:`\\omega_0`): the window is centred on the band the run needs (:func:`choose_grid`),
   and a pump at :math:`\\omega_p \\ne \\omega_0` enters as an envelope carrying
   :math:`e^{-i(\\omega_p-\\omega_0)t}`. Everything that belongs to the pump uses
   :math:`\\omega_p`: the group-velocity frame (:math:`\\beta_0, \\beta_1` in convention 4),
   the GDD/TOD of pulses and compressors (Taylor expansions in :math:`\\omega-\\omega_p`), the
   plasma phase and the wavelength of the ionisation rates. The shock (self-steepening) factor
   uses the true optical frequency :math:`\\omega = \\omega_0 + \\Delta\\omega` of each sample,
   so the equation does not depend on the choice of :math:`\\omega_0`: the envelope frame is a
   choice, not physics. The envelope ``A`` is scaled so that :math:`|A|^2` is the
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
   :math:`\\partial_z \\tilde A = [i(\\beta(\\omega) - \\beta_0 - \\beta_1(\\omega-\\omega_p)) - \\alpha(\\omega)]\\tilde A`
   with :math:`\\beta_n = d^n\\beta/d\\omega^n` at the pump :math:`\\omega_p`. **Positive β2 is normal dispersion.**
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

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning


@dataclass(frozen=True)
class Grid:
    """Uniform time grid of ``points`` samples spaced ``dt``; frequency window centred on ``omega0``.

    Parameters
    ----------
    points : int
        Number of samples N (an FFT-friendly size).
    dt : float
        Time step. [s]
    omega0 : float
        Reference angular frequency: the centre of the frequency window and the envelope's
        carrier (convention 1). [rad/s]
    omega_pump : float, optional
        Pump angular frequency (group-velocity frame, GDD references, plasma phase; convention
        1). Default: ``omega0``. Must lie inside the frequency window. [rad/s]

    Raises
    ------
    ConfigError
        Fewer than 16 points, a non-positive ``dt`` or ``omega0``, a frequency window that
        reaches zero frequency, or a pump outside the window. Configs are checked before a grid
        is made (:mod:`hcfplan.io.crosschecks`), so these name the grid's own parameters.
    """

    points: int
    dt: float
    omega0: float
    omega_pump: float = None  # type: ignore[assignment]  # None -> omega0 (set below)

    def __post_init__(self) -> None:
        if self.omega_pump is None:
            object.__setattr__(self, "omega_pump", self.omega0)
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
        if not abs(self.omega_pump - self.omega0) < np.pi / self.dt:
            raise ConfigError(
                f"grid omega_pump = {self.omega_pump:.3e} rad/s lies outside the frequency "
                f"window {self.omega0 - np.pi / self.dt:.3e}-{self.omega0 + np.pi / self.dt:.3e}"
                " rad/s"
            )

    @property
    def time_window(self) -> float:
        """Total time window N dt. [s]"""
        return self.points * self.dt

    @property
    def half_window(self) -> float:
        """Half width of the angular-frequency window, pi / dt. [rad/s]"""
        return np.pi / self.dt

    @property
    def omega_low(self) -> float:
        """Lower edge of the angular-frequency window. [rad/s]"""
        return self.omega0 - np.pi / self.dt

    @property
    def omega_high(self) -> float:
        """Upper edge of the angular-frequency window. [rad/s]"""
        return self.omega0 + np.pi / self.dt

    @cached_property
    def time(self) -> np.ndarray:
        """Retarded time, centred: t_k = (k - N/2) dt. [s]"""
        return (np.arange(self.points) - self.points // 2) * self.dt

    @cached_property
    def domega(self) -> np.ndarray:
        """Angular-frequency offsets from the reference ``omega0`` in FFT order. [rad/s]"""
        return 2 * np.pi * np.fft.fftfreq(self.points, self.dt)

    @cached_property
    def domega_pump(self) -> np.ndarray:
        """Angular-frequency offsets from the pump ``omega_pump`` in FFT order. [rad/s]"""
        return self.omega - self.omega_pump

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

    def carrier(self) -> np.ndarray:
        """exp(-i (omega_pump - omega0) t): the pump's carrier in the envelope (convention 1)."""
        offset = self.omega_pump - self.omega0
        if offset == 0.0:
            return np.ones(self.points, dtype=complex)
        return np.exp(-1j * offset * self.time)

    def to_spectrum(self, field_t: np.ndarray, *, workers: int | None = None) -> np.ndarray:
        """Spectral amplitude from the temporal envelope (convention 2); abs()**2 is in J/Hz.

        ``workers`` > 1: scipy.fft with that many threads (numpy.fft otherwise, which keeps
        scipy out of a command that needs no other part of it)."""
        return _transform("ifft", field_t, workers) * (self.points * self.dt)

    def to_time(self, spectrum: np.ndarray, *, workers: int | None = None) -> np.ndarray:
        """Temporal envelope from the spectral amplitude (convention 2). [sqrt(W)]

        ``workers``: as in :meth:`to_spectrum`."""
        return _transform("fft", spectrum, workers) / (self.points * self.dt)

    def energy_t(self, field_t: np.ndarray) -> float:
        """Pulse energy from the temporal envelope, sum |A|^2 dt. [J]"""
        return float(np.sum(np.abs(field_t) ** 2) * self.dt)

    def energy_w(self, spectrum: np.ndarray) -> float:
        """Pulse energy from the spectral amplitude, sum |A~|^2 dnu. [J]"""
        return float(np.sum(np.abs(spectrum) ** 2) * self.dnu)

    def shifted(self, array: np.ndarray) -> np.ndarray:
        """Spectral array reordered from FFT order to ascending frequency."""
        return np.fft.fftshift(array, axes=-1)


def _transform(name: str, array: np.ndarray, workers: int | None) -> np.ndarray:
    """``fft`` or ``ifft`` (with 1/N) along the last axis: numpy.fft, or scipy.fft for
    ``workers`` > 1 (threads)."""
    if workers is not None and workers != 1:
        from scipy import fft as sfft

        return getattr(sfft, name)(array, axis=-1, workers=workers)
    return getattr(np.fft, name)(array, axis=-1)


def fft_friendly_size(n_min: int) -> int:
    """Smallest power of two >= ``n_min`` (at least 16)."""
    n = 16
    while n < n_min:
        n *= 2
    return n


def smooth_fft_size(n_min: int) -> int:
    """Smallest even 2^a 3^b 5^c >= ``n_min`` (at least 2).

    An FFT of a length with a large prime factor takes Bluestein's algorithm in pocketfft,
    many times slower than one of a 5-smooth length: numpy's inverse real FFT took 0.94 ms at
    9816 = 2^3 3 409 points against 0.05 ms at 10000 (measured).

    References
    ----------
    none: numerical helper (mixed-radix FFT: J. W. Cooley and J. W. Tukey, Math. Comp. 19,
    297-301, 1965)
    """
    n = max(2, int(n_min))
    best = 2 * n  # a power of two >= n is below this
    power5 = 1
    while power5 < best:
        power3 = power5
        while power3 < best:
            size = power3
            while size < n or size % 2:
                size *= 2
            best = min(best, size)
            power3 *= 3
        power5 *= 5
    return best


#: Default time window in units of the input FWHM duration (common practice, no source).
TIME_WINDOW_PER_FWHM = 40.0
#: Full frequency window in units of the (broadened) spectral FWHM (common practice, no source).
FREQUENCY_WINDOW_PER_BANDWIDTH = 16.0
#: Transform-limited FWHM time-bandwidth product used to estimate the spectral width
#: (Gaussian, 2 ln2 / pi = 0.4413).
_TBP_ESTIMATE = 2.0 * np.log(2.0) / np.pi
#: The window's lower edge stays above this fraction of the lowest frequency the run needs (the
#: pump, or the lower end of a requested band): an envelope grid never reaches zero frequency,
#: and the mid-infrared/THz difference frequencies are not part of the optical grid
#: (common practice, no source).
LOWER_EDGE_FRACTION = 0.25
#: The window's upper edge stays below this multiple of the pump frequency (the gas and glass
#: index fits end in the vacuum ultraviolet; common practice, no source).
UPPER_EDGE_MULTIPLE = 6.0


def window_grid(omega_pump: float, omega_low: float, omega_high: float,
                time_window: float) -> Grid:
    """Grid whose frequency window spans ``omega_low``-``omega_high`` and whose time window is
    at least ``time_window`` (rounded up to a power-of-two number of points at dt = pi / half).

    Parameters
    ----------
    omega_pump : float
        Pump angular frequency (inside the window). [rad/s]
    omega_low, omega_high : float
        Edges of the angular-frequency window, 0 < low < pump < high. [rad/s]
    time_window : float
        Shortest total time window. [s]

    Returns
    -------
    Grid
        ``omega0`` the window centre, ``omega_pump`` the pump.

    References
    ----------
    none: numerical helper (sampling theorem, dt = pi / half window; common practice, no source)
    """
    if not 0 < omega_low < omega_pump < omega_high:
        raise ConfigError(f"grid window {omega_low:.3e}-{omega_high:.3e} rad/s: must be > 0 and "
                          f"contain the pump {omega_pump:.3e} rad/s")
    half = 0.5 * (omega_high - omega_low)
    dt = np.pi / half
    n = fft_friendly_size(int(np.ceil(time_window / dt * (1 - 1e-12))))
    return Grid(points=int(n), dt=float(dt), omega0=float(0.5 * (omega_low + omega_high)),
                omega_pump=float(omega_pump))


def estimated_band(omega_pump: float, duration_fwhm: float,
                   broadening_factor: float = 1.0) -> tuple[float, float]:
    """Frequency band an input pulse broadened ``broadening_factor`` times needs, before limits.

    Parameters
    ----------
    omega_pump : float
        Pump angular frequency. [rad/s]
    duration_fwhm : float
        Intensity FWHM of the input pulse. [s]
    broadening_factor : float
        Expected ratio of output to input spectral width (>= 1). [1]

    Returns
    -------
    (float, float)
        ``omega_pump -+ 0.5 FREQUENCY_WINDOW_PER_BANDWIDTH F dw`` with ``dw = 2 pi 0.4413 /
        duration_fwhm`` (Gaussian transform limit); the lower end may be negative. [rad/s]

    References
    ----------
    none: estimate (Gaussian time-bandwidth product and a margin; common practice, no source)
    """
    half = 0.5 * FREQUENCY_WINDOW_PER_BANDWIDTH * broadening_factor * (
        2 * np.pi * _TBP_ESTIMATE / duration_fwhm)
    return omega_pump - half, omega_pump + half


def _centred_grid(omega_pump: float, center: float, half: float, time_window: float,
                  points: int | None = None) -> Grid:
    """Grid centred on ``center`` with the half window ``half`` (``points`` samples, or enough
    for ``time_window``); its window must stay above zero frequency and hold the pump."""
    if not (center - half > 0 and center - half < omega_pump < center + half):
        raise ConfigError(
            f"grid centre {center:.4e} rad/s with a half window of {half:.4e} rad/s: the window "
            f"must stay above zero frequency and hold the pump ({omega_pump:.4e} rad/s); move "
            "grid.center_wavelength_nm or change grid.points / grid.time_window_fs")
    if points is None:
        dt = np.pi / half
        points = fft_friendly_size(int(np.ceil(time_window / dt * (1 - 1e-12))))
    return Grid(points=int(points), dt=float(np.pi / half), omega0=float(center),
                omega_pump=float(omega_pump))


def choose_grid(
    omega_pump: float,
    duration_fwhm: float,
    *,
    broadening_factor: float = 1.0,
    band: tuple[float, float] | None = None,
    points: int | None = None,
    time_window: float | None = None,
    center: float | None = None,
) -> Grid:
    """Time/frequency grid sized for a pulse and the spectral band the run needs.

    Parameters
    ----------
    omega_pump : float
        Pump angular frequency. [rad/s]
    duration_fwhm : float
        Intensity FWHM of the input pulse. [s]
    broadening_factor : float
        Expected ratio of output to input spectral width (>= 1); the caller estimates it, e.g.
        from the peak nonlinear phase as ``sqrt(1 + 0.77 phi_max**2)``. [1]
    band : (float, float), optional
        Angular frequencies that must lie inside the window besides the broadening estimate
        (e.g. a dispersive wave, or the extent a previous run found). [rad/s]
    points : int, optional
        Number of samples (even, >= 16). Default: the smallest power of two that spans the
        time window at the sampling the spectrum needs.
    time_window : float, optional
        Total time window. Default ``TIME_WINDOW_PER_FWHM * duration_fwhm``; when neither
        override is given the window is rounded *up* to ``points * dt``. [s]
    center : float, optional
        Centre of the frequency window (the reference frequency ``omega0``). Default: placed
        on the needed band (Notes). Given, the window is centred there: with ``points`` and/or
        ``time_window`` as they fix dt, otherwise wide enough to hold the needed band. [rad/s]

    Returns
    -------
    Grid
        ``omega0`` the window centre, ``omega_pump`` the pump.

    Raises
    ------
    ConfigError
        For non-positive inputs, odd ``points`` or overrides whose frequency window cannot be
        placed between ``LOWER_EDGE_FRACTION`` of the lowest needed frequency and
        ``UPPER_EDGE_MULTIPLE`` times the pump.

    Notes
    -----
    The needed band is the union of :func:`estimated_band` and ``band``. Its lower end is
    raised to ``LOWER_EDGE_FRACTION`` of the lowest needed frequency (the pump or the band's
    lower end) and its upper end lowered to ``UPPER_EDGE_MULTIPLE`` times the pump (a
    ``ValidityWarning`` says when); the window is centred on it with ``dt = pi / half_window``.
    With ``points`` and/or ``time_window`` given, dt follows from them; a window at least as
    wide as the band is centred on it, a narrower one on the pump, and either is moved up as far
    as its lower edge needs.

    References
    ----------
    none: numerical helper (sampling theorem, dt = pi / half window; common practice, no source)
    """
    for name, value, unit in (("omega_pump", omega_pump, "rad/s"),
                              ("duration_fwhm", duration_fwhm, "s")):
        if not (np.isfinite(value) and value > 0):
            raise ConfigError(f"{name} = {value} {unit}: must be > 0")
    if not broadening_factor >= 1.0:
        raise ConfigError(f"broadening_factor = {broadening_factor}: must be >= 1")
    if points is not None and (points < 16 or points % 2):
        raise ConfigError(f"grid points = {points}: must be an even number >= 16")
    if time_window is not None and not time_window > 0:
        raise ConfigError(f"grid time_window = {time_window} s: must be > 0")
    lo, hi = estimated_band(omega_pump, duration_fwhm, broadening_factor)
    lowest = omega_pump
    if band is not None:
        lo, hi = min(lo, band[0]), max(hi, band[1])
        lowest = min(omega_pump, max(band[0], 0.0)) or omega_pump
    floor, ceiling = LOWER_EDGE_FRACTION * lowest, UPPER_EDGE_MULTIPLE * omega_pump
    if lo < floor or hi > ceiling:
        if hi > ceiling:
            warnings.warn(
                f"grid: the expected spectrum (up to {hi:.3e} rad/s) reaches beyond "
                f"{UPPER_EDGE_MULTIPLE:g} times the pump frequency; the window ends there",
                ValidityWarning,
                stacklevel=2,
            )
        lo, hi = max(lo, floor), min(hi, ceiling)
    window = TIME_WINDOW_PER_FWHM * duration_fwhm if time_window is None else time_window
    if center is not None and not (np.isfinite(center) and center > 0):
        raise ConfigError(f"grid centre = {center} rad/s: must be > 0")
    if points is None and time_window is None:
        if center is None:
            return window_grid(omega_pump, lo, hi, window)
        half = max(center - lo, hi - center, 1.05 * abs(center - omega_pump))
        return _centred_grid(omega_pump, center, half, window)
    if points is not None and time_window is not None:
        n, dt = points, time_window / points
    elif points is not None:
        n = points
        dt = np.pi / (0.5 * (hi - lo))
    else:
        n = fft_friendly_size(int(np.ceil(window / (np.pi / (0.5 * (hi - lo))))))
        while np.pi * n / window > 0.5 * (ceiling - floor) and n > 16:
            n //= 2
        dt = window / n
    half = np.pi / dt
    if center is not None:
        return _centred_grid(omega_pump, center, half, n * dt, points=n)
    # a window as wide as the band is centred on it, a narrower one on the pump; either moves
    # up as far as its lower edge needs
    centre = max(0.5 * (lo + hi) if half >= 0.5 * (hi - lo) else omega_pump, floor + half)
    if centre + half > ceiling or not centre - half < omega_pump < centre + half:
        raise ConfigError(
            f"grid points = {n}, time_window = {n * dt:.4g} s: the frequency window (half width "
            f"{half:.3e} rad/s) cannot lie between {LOWER_EDGE_FRACTION:g} of the lowest needed "
            f"frequency ({floor:.3e} rad/s) and {UPPER_EDGE_MULTIPLE:g} times the pump "
            f"({ceiling:.3e} rad/s); use fewer points or a longer time window"
        )
    return Grid(points=int(n), dt=float(dt), omega0=float(centre), omega_pump=float(omega_pump))
