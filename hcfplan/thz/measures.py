"""Measures of a THz power spectrum: cutoff, peak and width around the peak.

These are definitions of this package, used for the generated and the detected spectrum of
:func:`hcfplan.thz.generation.thz_estimate` and by the cutoff contours of the envelope map. They
are numerical measures of a sampled spectrum, not physical models; the cutoff level and the
spectrum it applies to (power or field) are stated in every result (common practice, no source).

References
----------
None: numerical measures of a sampled spectrum (common practice, no source).
"""

from __future__ import annotations

from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.errors import ConfigError

CutoffLevelName = Literal["power", "field"]


def _power_threshold(level_db: float) -> tuple[float, str]:
    return 10.0 ** (level_db / 10.0), f"power spectrum >= {level_db:g} dB of peak"


def _field_threshold(level_db: float) -> tuple[float, str]:
    ratio = 10.0 ** (level_db / 10.0)  # applied to the field amplitude
    return ratio**2, (
        f"field amplitude >= 10^({level_db:g}/10) = {ratio:.3g} of peak "
        f"({2 * level_db:g} dB in power)"
    )


#: Cutoff level definitions: key -> function(level_db) -> (power-ratio threshold, description).
CUTOFF_LEVELS: dict[str, Callable[[float], tuple[float, str]]] = {
    "power": _power_threshold,
    "field": _field_threshold,
}


def _log_crossing(f0: float, f1: float, p0: float, p1: float, ratio: float) -> float:
    """Frequency between f0 and f1 where the power, linear in log between them, is ``ratio``."""
    lp0, lp1 = np.log(max(p0, 1e-300)), np.log(max(p1, 1e-300))
    if lp0 == lp1:
        return f0
    return f0 + (f1 - f0) * (lp0 - np.log(ratio)) / (lp0 - lp1)


def thz_cutoff(
    frequency: np.ndarray,
    power: np.ndarray,
    cutoff_db: float = -20.0,
    level: CutoffLevelName = "power",
) -> tuple[float, str]:
    """Highest frequency at which the spectrum is above a level relative to its peak.

    Parameters
    ----------
    frequency : ndarray
        Ascending frequency axis. [Hz]
    power : ndarray
        Power spectrum (any scale). [arb.]
    cutoff_db : float
        Level relative to the peak (negative). [dB]
    level : {"power", "field"}
        ``"power"``: power >= 10^(cutoff_db/10) of peak. ``"field"``: field amplitude >=
        10^(cutoff_db/10) of peak (e.g. -20 -> 1 % of the peak amplitude, -40 dB in power).

    Returns
    -------
    cutoff : float
        Cutoff frequency, interpolated linearly in log(power) between samples. [Hz]
    definition : str
        Text of the definition used.

    References
    ----------
    None: a definition of this package (level relative to the peak), common practice, no
    source.
    """
    if level not in CUTOFF_LEVELS:
        raise ConfigError(f"cutoff level = {level!r}: valid: {', '.join(CUTOFF_LEVELS)}")
    if not cutoff_db < 0:
        raise ConfigError(f"cutoff_db = {cutoff_db} dB: must be < 0")
    ratio, text = CUTOFF_LEVELS[level](cutoff_db)
    p = np.asarray(power, dtype=float) / np.max(power)
    i = int(np.nonzero(p >= ratio)[0][-1])
    if i == len(p) - 1:
        return float(frequency[-1]), f"highest frequency with {text} (at the end of the axis)"
    cut = _log_crossing(frequency[i], frequency[i + 1], p[i], p[i + 1], ratio)
    return float(cut), f"highest frequency with {text}"


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
        Width, edges interpolated linearly in log(power); an edge beyond the axis is taken at
        the end of the axis. [Hz]

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
    return float(hi - lo)
