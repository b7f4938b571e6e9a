"""Evaluation machinery of the compressor searches: objectives, the scorer and the 1-D search.

The bounce scan, the trim refinement and the reference searches of
:mod:`hcfplan.compression.compressor` and :mod:`hcfplan.compression.references` call an objective
of ``spectrum * exp(i phase)`` (phase convention 4 of :mod:`hcfplan.numerics.grid`) hundreds of
times; :class:`Scorer` keeps the work per call to one complex exponential and one FFT. Nothing
here is a physical model: these are numerical helpers (common practice, no source).
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from typing import Literal

import numpy as np

from hcfplan.numerics.fft import shared_transforms
from hcfplan.numerics.grid import Grid
from hcfplan.numerics.optimize import minimize_bounded
from hcfplan.pulse import metrics

Objective = Literal["peak_power", "fwhm"]

#: Points of the coarse scans that precede each bounded scalar refinement.
SCAN_POINTS = 21


def negative_peak_power(grid: Grid, field_t: np.ndarray) -> float:
    """Objective to minimise: minus the peak power of the band-limited envelope. [W]

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t`` (unused; the signature of every objective).
    field_t : ndarray
        Temporal envelope. [sqrt(W)]

    Notes
    -----
    :func:`hcfplan.pulse.metrics.peak_power`: the maximum between the samples, not the highest
    sample, so that the search does not prefer phases that happen to put the peak on a sample.

    References
    ----------
    None: numerical helper.
    """
    return -metrics.peak_power(field_t)


def main_peak_duration(grid: Grid, field_t: np.ndarray) -> float:
    """Objective to minimise: FWHM of the main peak, the time window if unresolved. [s]

    Parameters
    ----------
    grid : Grid
        The grid of ``field_t``.
    field_t : ndarray
        Temporal envelope. [sqrt(W)]

    Notes
    -----
    The width is that of the sampled |A|^2, a cheap stand-in for the band-limited width that
    is reported (:func:`hcfplan.pulse.metrics.envelope_fwhm` interpolates the whole window with
    one FFT of up to 16 N points, too slow for the hundreds of calls of a search).

    References
    ----------
    None: numerical helper (:func:`hcfplan.pulse.metrics.fwhm`).
    """
    width = metrics.fwhm(grid.time, np.abs(field_t) ** 2)
    return width if np.isfinite(width) else grid.time_window


#: Objective name -> function (grid, field_t) -> score to *minimise*.
OBJECTIVES: dict[str, Callable[[Grid, np.ndarray], float]] = {
    "peak_power": negative_peak_power,
    "fwhm": main_peak_duration,
}


def polynomial_phase(grid: Grid, gdd: float, tod: float) -> np.ndarray:
    """Phase 0.5 gdd dw^2 + tod/6 dw^3 on the grid (FFT order). [rad]

    Parameters
    ----------
    grid : Grid
        The grid; dw = ``grid.domega_pump`` (the offset from the pump). [rad/s]
    gdd : float
        Group-delay dispersion. [s^2]
    tod : float
        Third-order dispersion. [s^3]

    References
    ----------
    None: numerical helper (the Taylor form of :func:`hcfplan.compression.elements.mirror_phase`,
    whose docstring names its source).
    """
    dw = grid.domega_pump
    return 0.5 * gdd * dw**2 + tod / 6.0 * dw**3


def scan_then_refine(fun: Callable[[float], float], lo: float, hi: float) -> tuple[float, float]:
    """Minimise ``fun`` on [lo, hi]: coarse scan, then bounded Brent around the best point.

    Parameters
    ----------
    fun : callable
        Scalar function of one variable.
    lo, hi : float
        Search interval.

    Returns
    -------
    x, value : float
        Best point found and ``fun`` there (the scan's best if the refinement is worse).

    References
    ----------
    None: numerical helper (:data:`SCAN_POINTS` samples, then Brent's bounded minimiser,
    :func:`~hcfplan.numerics.optimize.minimize_bounded`).
    """
    xs = np.linspace(lo, hi, SCAN_POINTS)
    values = np.array([fun(x) for x in xs])
    i = int(np.argmin(values))
    a, b = xs[max(i - 1, 0)], xs[min(i + 1, xs.size - 1)]
    x, value, _ = minimize_bounded(fun, a, b, xatol=(hi - lo) * 1e-6)
    if value <= values[i]:
        return float(x), float(value)
    return float(xs[i]), float(values[i])


class Scorer:
    """Objective score of ``spectrum * exp(i phase)`` for the many phases of the search.

    The searches call the objective 100-1000 times per compressor (each call a complex
    exponential and an FFT over the grid), more than the rest of a scan point's chain after the
    fiber. So the work per call is kept to that exponential and that FFT:

    * Only the samples where ``spectrum`` is nonzero are computed (outside the mirror band the
      clipped spectrum is exactly zero). The phases of the search are given on those samples
      only, as :meth:`part` of the full arrays.
    * A phase common to every call of one search (the fixed elements, the mirrors of one bounce
      count) is folded into the spectrum once (:meth:`with_phase`).
    * The polynomial phases of the references use the precomputed 0.5 dw^2 and dw^3 / 6
      (:func:`polynomial_phase` with unit coefficients).
    * The FFT is the solver's default back end with its buffers
      (:func:`~hcfplan.numerics.fft.shared_transforms`, pyFFTW when it is installed).

    The score is the same function of the phase as ``objective(grid, grid.to_time(spectrum *
    exp(i phase)))``; only rounding differs. A scorer and the copies made by :meth:`with_phase`
    and :meth:`with_objective` share their buffers (the FFT back end of the thread that made the
    scorer, and the array of exp(i phase)): use them from that thread only.
    """

    def __init__(self, grid: Grid, spectrum: np.ndarray,
                 objective: Callable[[Grid, np.ndarray], float]) -> None:
        self.grid, self.objective = grid, objective
        keep = np.flatnonzero(spectrum)
        self._keep = None if keep.size == grid.points else keep
        self._runs = _runs(keep, grid.points)
        self.spectrum = self.part(spectrum)
        self._factor = np.empty(self.spectrum.size, complex)  # exp(i phase), reused
        self.quadratic = self.part(polynomial_phase(grid, 1.0, 0.0))  # 0.5 dw^2
        self.cubic = self.part(polynomial_phase(grid, 0.0, 1.0))  # dw^3 / 6
        self._fft = shared_transforms(grid.points)
        self._scale = 1.0 / (grid.points * grid.dt)  # unnormalised FFT -> envelope

    def part(self, array: np.ndarray) -> np.ndarray:
        """``array`` on the samples the search computes (all when the spectrum has no zeros)."""
        return array if self._keep is None else array[self._keep]

    def with_phase(self, phase: np.ndarray) -> Scorer:
        """A scorer of ``spectrum * exp(i phase)`` (``phase`` given as a :meth:`part`)."""
        other = copy.copy(self)
        other.spectrum = self.spectrum * np.exp(1j * phase)
        return other

    def with_objective(self, objective: Callable[[Grid, np.ndarray], float]) -> Scorer:
        """The same scorer with another objective (shares the spectrum and the buffers)."""
        if objective is self.objective:
            return self
        other = copy.copy(self)
        other.objective = objective
        return other

    def polynomial(self, gdd: float, tod: float) -> np.ndarray:
        """:func:`polynomial_phase` on the searched samples. [rad]"""
        return gdd * self.quadratic + tod * self.cubic

    def __call__(self, phase: np.ndarray) -> float:
        """Objective of ``spectrum * exp(i phase)``, ``phase`` given as a :meth:`part`. [rad]"""
        factor = self._factor
        np.cos(phase, out=factor.real)  # exp(i phase) without the complex temporaries
        np.sin(phase, out=factor.imag)
        target = self._fft.spectrum_in
        if self._keep is None:
            np.multiply(self.spectrum, factor, out=target)
        elif self._runs is not None:  # the FFT may overwrite its input: every sample written
            target.fill(0.0)
            for into, part in self._runs:
                np.multiply(self.spectrum[part], factor[part], out=target[into])
        else:
            target.fill(0.0)
            target[self._keep] = self.spectrum * factor
        field_t = self._fft.forward()
        field_t *= self._scale
        return self.objective(self.grid, field_t)


def _runs(keep: np.ndarray, points: int):
    """``keep`` (ascending indices) as at most two contiguous runs: [(slice of the grid, slice
    of the kept samples)], so that the scorer writes slices instead of scattering; None for
    more runs (or none)."""
    if keep.size == 0 or keep.size == points:
        return None
    breaks = np.flatnonzero(np.diff(keep) != 1) + 1
    if breaks.size > 1:
        return None
    bounds = [0, *breaks.tolist(), keep.size]
    return [(slice(int(keep[a]), int(keep[b - 1]) + 1), slice(a, b))
            for a, b in zip(bounds[:-1], bounds[1:], strict=True)]


def peak_powers(score: Scorer, phases: list[np.ndarray]) -> np.ndarray:
    """Peak power of ``score.spectrum * exp(i phase)`` for each phase (full arrays). [W]

    Parameters
    ----------
    score : Scorer
        Scorer of the spectrum (any objective).
    phases : list of ndarray
        Phases on the whole grid. [rad]

    References
    ----------
    None: numerical helper.
    """
    score = score.with_objective(negative_peak_power)
    return np.array([-score(score.part(p)) for p in phases])
