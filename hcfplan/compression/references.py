"""Reference compressions of a spectrum: best quadratic phase, best quadratic + cubic phase, and
the transform limit.

The references replace the chirped mirrors and the trim by an ideal polynomial phase
:math:`\\tfrac12\\,\\mathrm{GDD}\\,\\Delta\\omega^2 + \\tfrac16\\,\\mathrm{TOD}\\,\\Delta\\omega^3`
(the Taylor expansion of the spectral phase about the pump, [1]); the fixed phase (window, air)
and the band clipping stay. Their reported GDD/TOD are the totals of the applied phase
(fixed + ideal) at the pump. The searches are numerical (coarse scan and bounded Brent for
the GDD, then Nelder-Mead for GDD and TOD together; :mod:`hcfplan.compression.scoring`).

References
----------
.. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
       Press, 2006, ch. 1 [from memory].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.compression.elements import phase_derivatives_at
from hcfplan.compression.scoring import Scorer, polynomial_phase, scan_then_refine
from hcfplan.numerics.grid import Grid
from hcfplan.numerics.optimize import nelder_mead
from hcfplan.pulse import metrics
from hcfplan.pulse.metrics import PulseMetrics, pulse_metrics


@dataclass(frozen=True, eq=False)
class ReferencePulse:
    """A reference compression: ideal polynomial phase, or the transform limit.

    Attributes
    ----------
    name : str
        ``"quadratic"``, ``"quadratic_cubic"`` or ``"transform_limit"``.
    total_gdd, total_tod : float
        GDD and TOD of the applied phase (fixed + ideal) at the pump; nan for the transform
        limit. [s^2], [s^3]
    field_t : ndarray
        Temporal envelope on ``grid.time``. [sqrt(W)]
    metrics : PulseMetrics
        Metrics of ``field_t``.
    """

    name: str
    total_gdd: float
    total_tod: float
    field_t: np.ndarray
    metrics: PulseMetrics


def _reference(
    grid: Grid, name: str, phase: np.ndarray, spectrum: np.ndarray, peak_in: float | None,
    limit: tuple[float, float],
) -> ReferencePulse:
    """Build a :class:`ReferencePulse` from an applied total phase (``limit``: FWHM [s] and
    peak power [W] of the transform limit of ``spectrum``)."""
    field_t = grid.to_time(spectrum * np.exp(1j * phase))
    _, _, gdd, tod = phase_derivatives_at(grid.omega, grid.omega_pump, phase)
    reference_metrics = pulse_metrics(grid, field_t, input_peak_power=peak_in,
                                      transform_limit=limit)
    return ReferencePulse(name, gdd, tod, field_t, reference_metrics)


def best_quadratic(shaped: Scorer, center: float, span: float) -> float:
    """GDD of the ideal quadratic compressor minimising ``shaped`` on center +- span. [s^2]

    Parameters
    ----------
    shaped : Scorer
        Scorer of the spectrum after the fixed elements.
    center, span : float
        Centre and half-width of the GDD search. [s^2]

    References
    ----------
    None: numerical helper (:func:`hcfplan.compression.scoring.scan_then_refine`).
    """
    gdd, _ = scan_then_refine(
        lambda g: shaped(shaped.polynomial(g, 0.0)), center - span, center + span
    )
    return gdd


def best_cubic(
    shaped: Scorer, gdd0: float, tod_center: float, scale: float
) -> tuple[float, float]:
    """(GDD, TOD) of the ideal quadratic + cubic compressor, starting from ``gdd0``.

    Parameters
    ----------
    shaped : Scorer
        Scorer of the spectrum after the fixed elements.
    gdd0 : float
        GDD of :func:`best_quadratic`, the starting point. [s^2]
    tod_center : float
        Centre of the first TOD scan. [s^3]
    scale : float
        Time scale (the transform-limited FWHM) that makes GDD and TOD dimensionless. [s]

    Returns
    -------
    gdd, tod : float
        ``(gdd0, 0)`` when the joint search does not beat the quadratic phase. [s^2], [s^3]

    References
    ----------
    None: numerical helper (coarse TOD scan, then the Nelder-Mead simplex method,
    :func:`~hcfplan.numerics.optimize.nelder_mead`, in the dimensionless GDD / scale**2 and
    TOD / scale**3: vertices within 1e-4, values within 1e-10 of the best, at most 600 steps).
    """
    s_quadratic = shaped(shaped.polynomial(gdd0, 0.0))
    span = max(20.0 * scale**3, 2.0 * abs(tod_center))
    tod0, _ = scan_then_refine(
        lambda t: shaped(shaped.polynomial(gdd0, t)), tod_center - span, tod_center + span
    )
    norm = abs(s_quadratic) if s_quadratic != 0 else 1.0

    def scaled(x: np.ndarray) -> float:
        return shaped(shaped.polynomial(x[0] * scale**2, x[1] * scale**3)) / norm

    res = nelder_mead(scaled, np.array([gdd0 / scale**2, tod0 / scale**3]),
                      xatol=1e-4, fatol=1e-10, maxiter=600)
    if res.fun * norm > s_quadratic:
        return gdd0, 0.0
    return float(res.x[0] * scale**2), float(res.x[1] * scale**3)


def reference_pulses(
    grid: Grid,
    clipped: np.ndarray,
    fixed: np.ndarray,
    score: Scorer,
    compressor: tuple[float, float, float],
    peak_in: float | None,
) -> tuple[ReferencePulse, ReferencePulse, ReferencePulse]:
    """Quadratic, quadratic + cubic and transform-limit references.

    Parameters
    ----------
    grid : Grid
        The grid of every array.
    clipped : ndarray
        Band-clipped spectrum before the compressor, FFT order. [sqrt(J/Hz)]
    fixed : ndarray
        Phase of the fixed elements on ``grid.omega``. [rad]
    score : Scorer
        Scorer of ``clipped`` with the compressor's objective.
    compressor : (float, float, float)
        (GDD [s^2], TOD [s^3], GDD search half-span [s^2]) of the mirrors + trim at the pump;
        the ideal phases are searched around it.
    peak_in : float or None
        Peak power to which the gains refer. [W]

    Returns
    -------
    quadratic, quadratic_cubic, transform_limit : ReferencePulse

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (Taylor expansion of the spectral phase).
    """
    tl_field = metrics.transform_limit(grid, clipped)
    limit = metrics.transform_limit_metrics(grid, tl_field)
    scale = limit[0] if np.isfinite(limit[0]) else 10.0 * grid.dt
    gdd_center, tod_center, gdd_span = compressor
    shaped = score.with_phase(score.part(fixed))
    gdd_q = best_quadratic(shaped, gdd_center, max(gdd_span, 20.0 * scale**2))
    gdd_c, tod_c = best_cubic(shaped, gdd_q, tod_center, scale)
    tl = ReferencePulse(
        "transform_limit",
        float("nan"),
        float("nan"),
        tl_field,
        pulse_metrics(grid, tl_field, input_peak_power=peak_in, transform_limit=limit),
    )
    return (
        _reference(grid, "quadratic", fixed + polynomial_phase(grid, gdd_q, 0.0), clipped,
                   peak_in, limit),
        _reference(grid, "quadratic_cubic", fixed + polynomial_phase(grid, gdd_c, tod_c),
                   clipped, peak_in, limit),
        tl,
    )
