"""Pulse metrics: widths, transform limit, peak power, main lobe and time-bandwidth product.

All functions are pure and SI. Sampled curves ``(x, y)`` may be given in any order of ``x``
(spectral arrays in FFT order are sorted internally); ``y`` is a non-negative intensity-like
quantity (power [W], spectral energy density [J/Hz], ...). Fields and spectra follow the
conventions in :mod:`hcfplan.numerics.grid`.

Two ways of measuring a width at a level are used, and each function says which:

* **contiguous** -- the width of the main (highest) peak: walk outward from the maximum to the
  first sample below the level on each side. A side lobe above the level does not count.
  :func:`fwhm` and :func:`width_at_level` (default) use it.
* **outermost** -- the distance between the outermost samples above the level anywhere in the
  array, so side lobes above the level widen it. :func:`spectral_width` uses it, because a
  compressor must accept every spectral component above the level.

In both, the level is relative to the peak of the parabola through the highest sample and its
neighbours, and each crossing is located by linear interpolation between the last sample above
and the first sample below the level. If the curve is still above the level at an array end,
the width is not resolved by the sampling and ``nan`` is returned (no exception).

**Envelopes are measured band-limited.** The functions that take a field on a grid
(:func:`envelope_fwhm`, :func:`transform_limited_fwhm`, :func:`peak_power`,
:func:`time_bandwidth_product_of`, :func:`pulse_metrics`) measure |A(t)|^2 of the band-limited
interpolant of the complex envelope (:mod:`hcfplan.pulse.bandlimited`), not the sampled |A|^2,
so a pulse sampled by only 2-3 points per FWHM gets its own FWHM and peak power (to 1e-3 when
its spectrum fits in the grid's window). The generic :func:`fwhm` and :func:`width_at_level`
work on whatever curve they are given.

**A FWHM below the transform limit's is not a measurement error.** A spectral phase can make
the main peak narrower than the transform-limited pulse by moving energy out of it (e.g. a
phase of pi over the centre of a flat spectrum; tested), so neither width definition bounds
the FWHM by the transform limit's: the contiguous one fails for such phases, and the
outermost one failed too for an SPM-broadened spectrum under its best GDD + TOD (3.48 fs
against 3.75 fs, at 46 % of the transform-limited peak power). What no phase can beat is the
transform limit's peak power (Cauchy-Schwarz) and its rms duration (a linear phase minimises
it); both are tested. ``PulseMetrics.fwhm`` is the contiguous width of the main peak,
``PulseMetrics.outermost_fwhm`` the outermost one; the compressor adds a caution when the
former is below the transform limit's.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid
from hcfplan.pulse import bandlimited
from hcfplan.pulse.lobes import main_lobe, pre_post_pulse_energy

Extent = Literal["contiguous", "outermost"]

def _ascending(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Return ``(x, y)`` as float arrays sorted by ascending ``x``."""
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    if x.shape != y.shape or x.ndim != 1:
        raise ConfigError(f"x and y must be 1-D of equal length, got {x.shape} and {y.shape}")
    if x.size > 1 and np.any(np.diff(x) < 0):
        order = np.argsort(x, kind="stable")
        x, y = x[order], y[order]
    return x, y


def _crossing(x: np.ndarray, y: np.ndarray, i_out: int, i_in: int, threshold: float) -> float:
    """Linear interpolation of the abscissa where ``y`` crosses ``threshold`` between samples
    ``i_out`` (below the threshold) and ``i_in`` (at or above it)."""
    y_out, y_in = y[i_out], y[i_in]
    return float(x[i_out] + (threshold - y_out) / (y_in - y_out) * (x[i_in] - x[i_out]))


def _refined_peak(y: np.ndarray) -> float:
    """Peak value from the parabola through the highest sample and its two neighbours.

    A sampled peak lies below the true maximum by about ``y'' dx^2 / 8``, which shifts every
    level crossing; the vertex of the three-point parabola removes that error to higher order.
    At an array end, or for a flat top, the highest sample is returned. The vertex is never
    below it and at most 1/8 of the sample step above it. Common practice, no source.
    """
    i = int(np.argmax(y))
    if i == 0 or i == y.size - 1:
        return float(y[i])
    left, mid, right = float(y[i - 1]), float(y[i]), float(y[i + 1])
    curvature = 2.0 * mid - left - right
    if not curvature > 0:
        return mid
    return mid + (right - left) ** 2 / (8.0 * curvature)


def _contiguous_edges(y: np.ndarray, threshold: float) -> tuple[int, int] | None:
    """Indices of the first samples below ``threshold`` left and right of the maximum."""
    i_peak = int(np.argmax(y))
    below_left = np.flatnonzero(y[:i_peak] < threshold)
    below_right = np.flatnonzero(y[i_peak + 1 :] < threshold)
    if below_left.size == 0 or below_right.size == 0:
        return None
    return int(below_left[-1]), int(i_peak + 1 + below_right[0])


def _outermost_edges(y: np.ndarray, threshold: float) -> tuple[int, int] | None:
    """Indices of the samples just outside the outermost samples at or above ``threshold``."""
    above = np.flatnonzero(y >= threshold)
    if above[0] == 0 or above[-1] == y.size - 1:
        return None
    return int(above[0] - 1), int(above[-1] + 1)


_EDGE_FINDERS: dict[str, Callable[[np.ndarray, float], tuple[int, int] | None]] = {
    "contiguous": _contiguous_edges,
    "outermost": _outermost_edges,
}


def width_at_level(
    x: np.ndarray, y: np.ndarray, level: float, *, extent: Extent = "contiguous"
) -> float:
    """Full width of ``y(x)`` at ``level`` times its maximum, with interpolated crossings.

    Parameters
    ----------
    x : ndarray
        Abscissa (any order, sorted internally). [any unit, e.g. s or Hz]
    y : ndarray
        Non-negative samples on ``x``. [any unit]
    level : float
        Level relative to the maximum, 0 < level < 1. [1]
    extent : {"contiguous", "outermost"}
        Main peak only, or outermost samples above the level (see the module docstring).

    Returns
    -------
    float
        Width in the unit of ``x``; ``nan`` if ``y`` has no positive maximum or is above the
        level at an array end.

    Notes
    -----
    The level refers to the peak of the parabola through the three highest samples (the
    sampled maximum underestimates the true one). Crossings are then interpolated linearly,
    which for a Gaussian overestimates the FWHM by at most :math:`0.193\\,(\\Delta x/\\tau)^2`
    relative (about 5e-4 at 20 samples per FWHM, 1e-4 at 44).

    References
    ----------
    none: numerical helper.
    """
    if not 0.0 < level < 1.0:
        raise ConfigError(f"level = {level}: must be between 0 and 1 (relative to the peak)")
    if extent not in _EDGE_FINDERS:
        raise ConfigError(f"extent = {extent!r}: allowed are {sorted(_EDGE_FINDERS)}")
    x, y = _ascending(x, y)
    if x.size < 3 or not np.max(y) > 0:
        return float("nan")
    threshold = level * _refined_peak(y)
    edges = _EDGE_FINDERS[extent](y, threshold)
    if edges is None:
        return float("nan")
    i_lo, i_hi = edges
    x_lo = _crossing(x, y, i_lo, i_lo + 1, threshold)
    x_hi = _crossing(x, y, i_hi, i_hi - 1, threshold)
    return x_hi - x_lo


def fwhm(x: np.ndarray, y: np.ndarray) -> float:
    """Full width at half maximum of the main peak of ``y(x)`` (contiguous, interpolated).

    Parameters
    ----------
    x : ndarray
        Abscissa (any order). [any unit]
    y : ndarray
        Non-negative samples, e.g. power |A|^2 [W] or spectral density [J/Hz].

    Returns
    -------
    float
        FWHM in the unit of ``x``; ``nan`` when the peak touches an array end.

    References
    ----------
    none: numerical helper.
    """
    return width_at_level(x, y, 0.5, extent="contiguous")


def spectral_width(frequency: np.ndarray, power: np.ndarray, level_db: float = -20.0) -> float:
    """Full spectral width between the *outermost* points above ``level_db`` below the peak.

    Parameters
    ----------
    frequency : ndarray
        Frequency (any order, e.g. FFT order). [Hz] (or rad/s; the result has the same unit)
    power : ndarray
        Spectral power density on ``frequency``. [J/Hz]
    level_db : float
        Level relative to the peak, negative. [dB] (10 log10 of the power ratio)

    Returns
    -------
    float
        Width in the unit of ``frequency``; ``nan`` if the spectrum is above the level at an
        end of the window.

    Notes
    -----
    "Outermost": side lobes above the level widen the result (see the module docstring).

    References
    ----------
    none: numerical helper.
    """
    if not level_db < 0:
        raise ConfigError(f"level_db = {level_db} dB: must be < 0")
    return width_at_level(frequency, power, 10.0 ** (level_db / 10.0), extent="outermost")


def rms_width(x: np.ndarray, y: np.ndarray) -> float:
    """Root-mean-square width (standard deviation) of ``x`` weighted by ``y``.

    Parameters
    ----------
    x : ndarray
        Abscissa (any order). [any unit]
    y : ndarray
        Non-negative weights (power or spectral density). [any unit]

    Returns
    -------
    float
        :math:`\\sqrt{\\langle x^2\\rangle - \\langle x\\rangle^2}` with trapezoidal moments, in the
        unit of ``x`` (the half-width convention; multiply by 2 for a full rms width).

    References
    ----------
    none: numerical helper.
    """
    x, y = _ascending(x, y)
    norm = np.trapezoid(y, x)
    if not norm > 0:
        return float("nan")
    mean = np.trapezoid(x * y, x) / norm
    variance = np.trapezoid((x - mean) ** 2 * y, x) / norm
    return float(np.sqrt(max(variance, 0.0)))


def transform_limit(grid: Grid, spectrum: np.ndarray) -> np.ndarray:
    """Transform-limited temporal envelope of a spectrum: flat spectral phase, centred on t = 0.

    Parameters
    ----------
    grid : Grid
        The grid of ``spectrum``.
    spectrum : ndarray
        Spectral amplitude in FFT order (conventions of :mod:`hcfplan.numerics.grid`); only its
        modulus is used. [sqrt(J/Hz)]

    Returns
    -------
    ndarray
        Complex envelope on ``grid.time`` with its peak at t = 0 (index ``N // 2``). [sqrt(W)]

    Notes
    -----
    With a flat phase ``fft`` puts the peak at index 0; ``fftshift`` moves it to index
    ``N // 2``, which is t = 0 on ``grid.time``. Energy is unchanged (Parseval).

    References
    ----------
    none: numerical helper.
    """
    return np.fft.fftshift(grid.to_time(np.abs(spectrum).astype(complex)))


def transform_limit_metrics(grid: Grid, limited: np.ndarray) -> tuple[float, float]:
    """FWHM [s] and peak power [W] of a transform-limited envelope (:func:`transform_limit`),
    as :func:`pulse_metrics` reports them for its transform limit.

    References
    ----------
    none: numerical helper.
    """
    return envelope_fwhm(grid, limited), peak_power(limited)


def _own_transform_limit(grid: Grid, field_t: np.ndarray) -> tuple[float, float]:
    """:func:`transform_limit_metrics` of the transform limit of ``field_t``'s own spectrum
    (apart from :func:`pulse_metrics`, whose argument ``transform_limit`` hides the function
    of that name)."""
    return transform_limit_metrics(grid, transform_limit(grid, grid.to_spectrum(field_t)))


def transform_limited_fwhm(grid: Grid, spectrum: np.ndarray) -> float:
    """FWHM of the transform-limited intensity of ``spectrum``. [s]

    Parameters
    ----------
    grid : Grid
        The grid of ``spectrum``.
    spectrum : ndarray
        Spectral amplitude in FFT order. [sqrt(J/Hz)]

    Notes
    -----
    Measured band-limited (:func:`envelope_fwhm`).

    References
    ----------
    none: numerical helper.
    """
    return envelope_fwhm(grid, transform_limit(grid, spectrum))


def fine_envelope(grid: Grid, field_t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The band-limited interpolant of an envelope, finely enough sampled to measure it.

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t``.
    field_t : ndarray
        Temporal envelope on ``grid.time``. [sqrt(W)]

    Returns
    -------
    time : ndarray
        Fine, ascending time axis starting at ``grid.time[0]``. [s]
    field : ndarray
        The interpolant on ``time`` (:func:`hcfplan.pulse.bandlimited.upsample`). [sqrt(W)]

    Notes
    -----
    The factor comes from the sampled FWHM (:func:`hcfplan.pulse.bandlimited.oversampling_factor`,
    about 32 fine samples per FWHM, at most 16 per grid step): about 1 for a pulse sampled by
    32 points per FWHM or more, 16 at 2 points per FWHM. The whole window is interpolated (one
    FFT of ``factor * N`` points), because the lobe, pre- and post-pulse measures need it;
    the searches, which need only the peak, use :func:`peak_power`.

    References
    ----------
    .. [1] C. E. Shannon, "Communication in the presence of noise," Proc. IRE, vol. 37, no. 1,
           pp. 10-21, 1949, doi:10.1109/JRPROC.1949.232969 (sinc interpolation).
    """
    field_t = np.asarray(field_t)
    if field_t.shape != (grid.points,):
        raise ConfigError(f"field shape {field_t.shape} does not match the grid ({grid.points},)")
    sampled = fwhm(grid.time, np.abs(field_t) ** 2)
    factor = bandlimited.oversampling_factor(sampled / grid.dt)
    fine = bandlimited.upsample(field_t, factor)
    time = grid.time[0] + np.arange(fine.size) * (grid.dt / factor)
    return time, fine


def envelope_fwhm(grid: Grid, field_t: np.ndarray, *, extent: Extent = "contiguous") -> float:
    """FWHM of the band-limited |A(t)|^2 (of the main peak by default, module docstring). [s]

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t``.
    field_t : ndarray
        Temporal envelope on ``grid.time``. [sqrt(W)]
    extent : {"contiguous", "outermost"}
        The main peak only, or every part above half maximum.

    Returns
    -------
    float
        :func:`width_at_level` at 0.5 of |A|^2 on :func:`fine_envelope`; nan when unresolved.

    References
    ----------
    none: numerical helper.
    """
    time, fine = fine_envelope(grid, field_t)
    return width_at_level(time, np.abs(fine) ** 2, 0.5, extent=extent)


def peak_power(field_t: np.ndarray) -> float:
    """Peak instantaneous power of an envelope, max over t of the band-limited |A(t)|^2. [W]

    Parameters
    ----------
    field_t : ndarray
        Temporal envelope with |A|^2 in watts on a grid's time axis. [sqrt(W)]

    Returns
    -------
    float
        :func:`hcfplan.pulse.bandlimited.peak_power`: never below the highest sample, and the
        peak of the pulse even when it falls between samples.

    References
    ----------
    none: numerical helper.
    """
    return bandlimited.peak_power(field_t)


def time_bandwidth_product(duration_fwhm: float, bandwidth_fwhm: float) -> float:
    """Time-bandwidth product of an intensity FWHM duration and a FWHM bandwidth. [1]

    Parameters
    ----------
    duration_fwhm : float
        FWHM of the temporal intensity. [s]
    bandwidth_fwhm : float
        FWHM of the spectral density in ordinary frequency. [Hz]

    Notes
    -----
    Transform-limited values (0.441 Gaussian, 0.315 sech^2) are
    ``hcfplan.pulse.shapes.pulse_shape(shape).time_bandwidth_product``.

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 (table of pulse shapes) [from memory].
    """
    return duration_fwhm * bandwidth_fwhm


def time_bandwidth_product_of(grid: Grid, field_t: np.ndarray) -> float:
    """Time-bandwidth product of an envelope on ``grid`` (both widths FWHM, contiguous; the
    duration band-limited, :func:`envelope_fwhm`). [1]

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t``.
    field_t : ndarray
        Temporal envelope on ``grid.time``. [sqrt(W)]

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 (table of pulse shapes) [from memory].
    """
    duration = envelope_fwhm(grid, field_t)
    bandwidth = fwhm(grid.frequency, np.abs(grid.to_spectrum(field_t)) ** 2)
    return time_bandwidth_product(duration, bandwidth)


@dataclass(frozen=True)
class PulseMetrics:
    """Metrics of one compressed pulse (SI), all measured on the band-limited interpolant of
    the envelope (:func:`fine_envelope`, :func:`peak_power`).

    Attributes
    ----------
    energy : float
        Pulse energy. [J]
    fwhm : float
        FWHM of the main peak of |A|^2 (contiguous; nan if unresolved); may be below the
        transform limit's (module docstring). [s]
    outermost_fwhm : float
        From the first to the last half-maximum crossing of |A|^2, side lobes included. [s]
    transform_limited_fwhm : float
        FWHM (contiguous) of the flat-phase pulse of the same spectrum. [s]
    peak_power : float
        max over t of |A(t)|^2. [W]
    transform_limited_peak_power : float
        Peak power of the flat-phase pulse. [W]
    peak_to_transform_limit : float
        peak_power / transform_limited_peak_power ("temporal Strehl ratio"). [1]
    peak_power_gain : float
        peak_power over the given input peak power (nan if none was given). [1]
    main_lobe_fraction : float
        Energy fraction in the main lobe. [1]
    main_lobe_bounds : (float, float)
        Times bounding the main lobe. [s]
    pre_pulse_energy, post_pulse_energy : float
        Energy before / after the main lobe. [J]

    References
    ----------
    none: result holder of :func:`pulse_metrics`.
    """

    energy: float
    fwhm: float
    outermost_fwhm: float
    transform_limited_fwhm: float
    peak_power: float
    transform_limited_peak_power: float
    peak_to_transform_limit: float
    peak_power_gain: float
    main_lobe_fraction: float
    main_lobe_bounds: tuple[float, float]
    pre_pulse_energy: float
    post_pulse_energy: float


def pulse_metrics(
    grid: Grid, field_t: np.ndarray, *, input_peak_power: float | None = None,
    transform_limit: tuple[float, float] | None = None,
) -> PulseMetrics:
    """All metrics of one pulse; the transform limit is that of its own spectrum (or the one
    the caller gives for the same spectral modulus).

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t``.
    field_t : ndarray
        Temporal envelope on ``grid.time``. [sqrt(W)]
    input_peak_power : float, optional
        Peak power before the fiber or compressor, for the gain. [W]
    transform_limit : (float, float), optional
        FWHM [s] and peak power [W] of the transform limit where the caller has them for the
        same spectral modulus (:func:`transform_limit_metrics`; the compressor's pulses differ
        from their references only in the phase); else they are computed here.

    References
    ----------
    none: numerical helper.
    """
    time, fine = fine_envelope(grid, field_t)
    power = np.abs(fine) ** 2
    peak = peak_power(field_t)
    if transform_limit is None:
        transform_limit = _own_transform_limit(grid, field_t)
    tl_fwhm, tl_peak = transform_limit
    t_lo, t_hi, fraction = main_lobe(time, power)
    pre, post = pre_post_pulse_energy(time, power)
    gain = peak / input_peak_power if input_peak_power else float("nan")
    return PulseMetrics(
        energy=grid.energy_t(field_t),
        fwhm=fwhm(time, power),
        outermost_fwhm=width_at_level(time, power, 0.5, extent="outermost"),
        transform_limited_fwhm=tl_fwhm,
        peak_power=peak,
        transform_limited_peak_power=tl_peak,
        peak_to_transform_limit=peak / tl_peak if tl_peak > 0 else float("nan"),
        peak_power_gain=gain,
        main_lobe_fraction=fraction,
        main_lobe_bounds=(t_lo, t_hi),
        pre_pulse_energy=pre,
        post_pulse_energy=post,
    )
