"""Measures of a THz power spectrum: cutoff, peak, width around the peak, the model's range.

These are definitions of this package, used for the generated and the detected spectrum of
:func:`hcfplan.thz.generation.thz_estimate`, by the thin-crystal estimate of the envelope map
(:func:`gaussian_pulse_cutoff`) and by the checks of a crystal model's range. They are numerical
measures of a sampled spectrum, not physical models; the definition of the cutoff is stated in
every result (common practice, no source).

The cutoff
----------
The cutoff is the frequency below which all but a stated fraction of the THz energy lies: with
``cutoff_db`` = -20 dB, 99 % of the energy of the power spectrum lies below it and 1 % above.
It is read from the cumulative integral of the spectrum, not from a level crossing, because a
level crossing is not a continuous function of the spectrum: phase mismatch makes the spectrum
of a thick crystal a row of sinc^2 lobes with zeros between them, and "the highest frequency at
-20 dB of the peak" hops from one lobe to the next (or to a weak far tail) when a lobe's top
passes the level, so a small change of pressure or energy moved it by several THz. The
cumulative integral changes continuously with the spectrum and increases monotonically with
frequency, so its quantile moves continuously; it can only jump across a band where the
spectrum is zero over a finite width (e.g. the reststrahlen band between a crystal's TO and LO
phonons, where the crystal absorbs and reflects), and then by the width of that empty band.
Integrals over the sampled spectrum are trapezoidal; with a spectrum sampled finely enough to
resolve it the quantile does not depend on the sampling (checked in tests/thz/test_thz_cutoff.py).

References
----------
None: numerical measures of a sampled spectrum (common practice, no source).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.errors import ConfigError

CutoffLevelName = Literal["power", "field"]


def _power(power: np.ndarray) -> np.ndarray:
    return power


def _field(power: np.ndarray) -> np.ndarray:
    return np.sqrt(power)


#: Spectrum whose integral the cutoff divides: key -> (function of the power spectrum, the
#: exponent p of |E| it stands for, text).
CUTOFF_LEVELS: dict[str, tuple[Callable[[np.ndarray], np.ndarray], int, str]] = {
    "power": (_power, 2, "of the THz energy (power spectrum |E|^2)"),
    "field": (_field, 1, "of the integral of the field amplitude spectrum |E|"),
}


def _check_level(cutoff_db: float, level: str) -> None:
    if level not in CUTOFF_LEVELS:
        raise ConfigError(f"cutoff level = {level!r}: valid: {', '.join(CUTOFF_LEVELS)}")
    if not (math.isfinite(cutoff_db) and cutoff_db < 0):
        raise ConfigError(f"cutoff_db = {cutoff_db} dB: must be < 0")


def cutoff_definition(cutoff_db: float = -20.0, level: CutoffLevelName = "power") -> str:
    """Text of the cutoff definition of :func:`thz_cutoff`, e.g. for -20 dB and "power"
    "99 % of the THz energy (power spectrum |E|^2) lies below it (-20 dB above)".

    Parameters
    ----------
    cutoff_db : float
        Share of the integral above the cutoff, in dB (< 0). [dB]
    level : {"power", "field"}
        Spectrum whose integral is divided.

    Returns
    -------
    str

    References
    ----------
    None: a definition of this package (common practice, no source).
    """
    _check_level(cutoff_db, level)
    below = 100.0 * (1.0 - 10.0 ** (cutoff_db / 10.0))
    return (f"{below:.4g} % {CUTOFF_LEVELS[level][2]} lies below it "
            f"({cutoff_db:g} dB above)")


def thz_cutoff(
    frequency: np.ndarray,
    power: np.ndarray,
    cutoff_db: float = -20.0,
    level: CutoffLevelName = "power",
) -> tuple[float, str]:
    """Frequency above which only the share 10^(cutoff_db/10) of the spectrum's integral lies.

    Parameters
    ----------
    frequency : ndarray
        Ascending frequency axis starting at (or near) zero. [Hz]
    power : ndarray
        Power spectrum (any scale, >= 0). [arb.]
    cutoff_db : float
        Share of the integral above the cutoff, in dB (negative): -20 dB = 1 %. [dB]
    level : {"power", "field"}
        ``"power"``: the integral of the power spectrum (the THz energy). ``"field"``: the
        integral of the field amplitude spectrum sqrt(power), which weighs a weak tail more.

    Returns
    -------
    cutoff : float
        The frequency at which the trapezoidal cumulative integral reaches the share
        1 - 10^(cutoff_db/10) of the total, interpolated linearly between samples. [Hz]
    definition : str
        Text of the definition (:func:`cutoff_definition`).

    Notes
    -----
    Why a quantile of the integral and not a level crossing: see the module docstring. The
    quantile moves continuously with the spectrum, and jumps only across a band of zero power.

    References
    ----------
    None: a definition of this package (a quantile of the cumulative spectrum), common
    practice, no source.
    """
    _check_level(cutoff_db, level)
    frequency = np.asarray(frequency, dtype=float)
    weight = CUTOFF_LEVELS[level][0](np.clip(np.asarray(power, dtype=float), 0.0, None))
    cumulative = np.concatenate(
        [[0.0], np.cumsum(0.5 * (weight[1:] + weight[:-1]) * np.diff(frequency))])
    if not cumulative[-1] > 0:
        raise ConfigError("THz spectrum: all zero, no cutoff")
    share = 1.0 - 10.0 ** (cutoff_db / 10.0)
    target = share * cumulative[-1]
    i = int(np.searchsorted(cumulative, target, side="left"))  # cumulative[i - 1] < target
    i = min(max(i, 1), len(cumulative) - 1)
    step = cumulative[i] - cumulative[i - 1]
    fraction = (target - cumulative[i - 1]) / step if step > 0 else 0.0
    cut = frequency[i - 1] + fraction * (frequency[i] - frequency[i - 1])
    return float(cut), cutoff_definition(cutoff_db, level)


def gaussian_pulse_cutoff(duration_fwhm, cutoff_db: float = -20.0,
                          level: CutoffLevelName = "power"):
    """Cutoff (definition of :func:`thz_cutoff`) of a Gaussian pulse in a thin crystal.

    Parameters
    ----------
    duration_fwhm : float or ndarray
        Intensity FWHM tau of the pump pulse. [s]
    cutoff_db : float
        Share of the integral above the cutoff, in dB (< 0). [dB]
    level : {"power", "field"}
        As in :func:`thz_cutoff`.

    Returns
    -------
    float or ndarray
        The cutoff. [Hz]

    Notes
    -----
    In a crystal much thinner than the coherence length, without absorption or dispersion,
    the radiated field is proportional to dI/dt, |E(Omega)| ~ Omega exp(-a Omega^2 / 2) with
    a = tau^2 / (8 ln 2) for I = exp(-4 ln2 t^2 / tau^2). The integral of |E|^p (p = 2 for
    "power", 1 for "field") above W is, with u = p a Omega^2 / 2, the regularised upper
    incomplete gamma function Q((p + 1)/2, p a W^2 / 2) of the whole, so
    W^2 = 2 Q^-1((p + 1)/2, 10^(cutoff_db/10)) / (p a) and f = W / (2 pi); for -20 dB of the
    energy f = 0.8926 / tau. An optimistic estimate: perfect compression, no phase mismatch,
    no phonon band, no detector.

    References
    ----------
    None: Gaussian integrals of a thin-crystal spectrum (common practice, no source).
    """
    from scipy.special import gammainccinv

    _check_level(cutoff_db, level)
    p = CUTOFF_LEVELS[level][1]
    u = float(gammainccinv((p + 1) / 2.0, 10.0 ** (cutoff_db / 10.0)))
    tau = np.asarray(duration_fwhm, dtype=float)
    value = np.sqrt(2.0 * u * 8.0 * math.log(2.0) / p) / (2.0 * math.pi * tau)
    return float(value) if value.ndim == 0 else value


def model_limit(crystal, detector_crystal=None) -> float:
    """Upper end of the THz range where the crystal model(s) hold: generation ∩ detection.

    Parameters
    ----------
    crystal : CrystalTable
        Generation crystal; its table states ``thz_permittivity.valid_max_thz``.
    detector_crystal : CrystalTable or None
        EO detection crystal, if any.

    Returns
    -------
    float
        The smaller of the tables' stated upper limits. [Hz]

    References
    ----------
    None: the ranges are those stated (with their sources) in the crystal tables.
    """
    limits = [crystal.thz.frequency_max]
    if detector_crystal is not None:
        limits.append(detector_crystal.thz.frequency_max)
    return float(min(limits))


def _log_crossing(f0: float, f1: float, p0: float, p1: float, ratio: float) -> float:
    """Frequency between f0 and f1 where the power, linear in log between them, is ``ratio``."""
    lp0, lp1 = np.log(max(p0, 1e-300)), np.log(max(p1, 1e-300))
    if lp0 == lp1:
        return f0
    return f0 + (f1 - f0) * (lp0 - np.log(ratio)) / (lp0 - lp1)


def spectral_peak(frequency: np.ndarray, power: np.ndarray) -> float:
    """Frequency of the spectral peak, refined by a parabola through the three highest samples.

    Parameters
    ----------
    frequency : ndarray
        Ascending, uniformly spaced frequency axis. [Hz]
    power : ndarray
        Power spectrum (any scale). [arb.]

    Returns
    -------
    float
        Peak frequency; the sample itself at either end of the axis. [Hz]

    References
    ----------
    None: numerical helper (three-point parabolic interpolation).
    """
    i = int(np.argmax(power))
    if i == 0 or i == len(power) - 1:
        return float(frequency[i])
    y0, y1, y2 = power[i - 1 : i + 2]
    denom = y0 - 2 * y1 + y2
    shift = 0.5 * (y0 - y2) / denom if denom != 0 else 0.0
    return float(frequency[i] + shift * (frequency[i + 1] - frequency[i]))


def band_above_level(frequency: np.ndarray, power: np.ndarray,
                     level_db: float) -> tuple[float, float]:
    """Edges of the contiguous region around the peak with power >= ``level_db`` of the peak.

    Parameters
    ----------
    frequency : ndarray
        Ascending frequency axis. [Hz]
    power : ndarray
        Power spectrum (any scale). [arb.]
    level_db : float
        Level relative to the peak, e.g. -3 or -10. [dB]

    Returns
    -------
    (float, float)
        Lower and upper edge, interpolated linearly in log(power); an edge beyond the axis is
        taken at the end of the axis. [Hz]

    References
    ----------
    None: numerical helper (level crossings of a sampled spectrum).
    """
    p = power / np.max(power)
    ratio = 10.0 ** (level_db / 10.0)
    i = int(np.argmax(p))
    below = np.nonzero(p < ratio)[0]
    left, right = below[below < i], below[below > i]
    lo = frequency[0] if left.size == 0 else _log_crossing(
        frequency[left[-1] + 1], frequency[left[-1]], p[left[-1] + 1], p[left[-1]], ratio)
    hi = frequency[-1] if right.size == 0 else _log_crossing(
        frequency[right[0] - 1], frequency[right[0]], p[right[0] - 1], p[right[0]], ratio)
    return float(lo), float(hi)


def width_above_level(frequency: np.ndarray, power: np.ndarray, level_db: float) -> float:
    """Width of the contiguous region around the peak with power >= ``level_db`` of the peak.

    Parameters
    ----------
    frequency : ndarray
        Ascending frequency axis. [Hz]
    power : ndarray
        Power spectrum (any scale). [arb.]
    level_db : float
        Level relative to the peak, e.g. -3 or -10. [dB]

    Returns
    -------
    float
        Width between the edges of :func:`band_above_level`. [Hz]

    References
    ----------
    None: numerical helper (level crossings of a sampled spectrum).
    """
    lo, hi = band_above_level(frequency, power, level_db)
    return hi - lo
