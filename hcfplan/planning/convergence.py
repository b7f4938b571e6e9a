"""Is a run converged on its grid? The checks, and the grid refinement that follows a failed one.

A planner's numbers are only as good as the grid they were computed on. After a chain run
(:func:`hcfplan.planning.chain.run_chain`) :func:`assess_run` checks what a converged run needs:

* ``time_edge_energy`` (code ``window_edge_energy``): the largest energy fraction, over the
  records along z, in the outer ``EDGE_ZONE`` (5 %) of the time window is at most
  :data:`EDGE_ENERGY_LIMIT` (1e-4) of the pulse energy;
* ``frequency_edge_energy`` (code ``window_edge_energy``): the same for the outer 5 % of the
  frequency window;
* ``spectrum_edge_level`` (code ``window_edge_energy``): the spectral density in those outer 5 %
  of the frequency window stays below :data:`EDGE_LEVEL_DB` (-45 dB) of the spectral peak at
  every record, i.e. the spectrum has fallen off before the window ends;
* ``pulse_sampling`` (code ``unresolved_pulse``): the shortest pulse of interest (the
  compressed pulse, its transform limit, the transform limit of the fiber output) spans at
  least :data:`MIN_POINTS_PER_FWHM` (4) time steps of the raw grid. The metrics interpolate
  band-limited, so this is about how well the envelope itself is sampled.

When a check fails and the grid was not fixed by the user (``[grid]`` ``points`` and
``time_window_fs`` not given), :func:`refine_until_converged` runs again on a larger grid: a
time window twice as long for energy at the time edges, a frequency window widened on the side
where the spectrum reaches the edge (by half of the current window; the lower edge at least
``RED_STEP_FRACTION`` of where it was, i.e. of the lowest frequency the light reached, the upper
edge below ``UPPER_EDGE_MULTIPLE`` times the pump), a finer step for an under-sampled pulse
(the window widened to the blue, and to the red only down to ``LOWER_EDGE_FRACTION`` of the
pump); at most
:data:`MAX_REFINEMENTS` times and up to :data:`MAX_POINTS` points. A grid the user fixed is
kept; the failed checks stay in the :class:`Convergence` record.

The limits are common practice, no source.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

import numpy as np

from hcfplan.numerics.grid import LOWER_EDGE_FRACTION, UPPER_EDGE_MULTIPLE, Grid, window_grid

#: Outer part of the time and frequency windows (each side) that the checks look at. [1]
EDGE_ZONE = 0.05
#: Largest energy fraction allowed in the edge zones (common practice, no source). [1]
EDGE_ENERGY_LIMIT = 1e-4
#: Highest spectral level allowed in the edge zones of the frequency window, relative to the
#: spectral peak (common practice, no source). [dB]
EDGE_LEVEL_DB = -45.0
#: Fewest raw time steps per FWHM of the shortest pulse of interest (common practice, no
#: source). [1]
MIN_POINTS_PER_FWHM = 4.0
#: A refinement for light at the red edge lowers the window's lower edge by half the window,
#: but to no less than this fraction of where it was (the window never reaches zero
#: frequency; common practice, no source). [1]
RED_STEP_FRACTION = 0.5
#: Reported level when the edge zones hold no light at all. [dB]
LEVEL_FLOOR_DB = -300.0
#: Most refinements of a grid the user did not fix.
MAX_REFINEMENTS = 3
#: Largest grid a refinement makes (beyond it the run keeps its failed checks).
MAX_POINTS = 2**16
#: Soliton order from which the window holds the estimated dispersive wave (fission, and so
#: dispersive-wave emission, needs N > 1; common practice, no source). [1]
DISPERSIVE_WAVE_MIN_ORDER = 1.5
#: Extra band beyond the estimated dispersive-wave frequency (its own width). [1]
DISPERSIVE_WAVE_MARGIN = 0.15

#: Verdict code of each check.
CHECK_CODES = {
    "time_edge_energy": "window_edge_energy",
    "frequency_edge_energy": "window_edge_energy",
    "spectrum_edge_level": "window_edge_energy",
    "pulse_sampling": "unresolved_pulse",
}


@dataclass(frozen=True)
class Check:
    """One convergence check of a run."""

    name: str  #: a key of :data:`CHECK_CODES`
    code: str  #: verdict code: ``window_edge_energy`` or ``unresolved_pulse``
    passed: bool
    value: float  #: the measured number (fraction, dB or points per FWHM)
    limit: float  #: the limit it is compared with
    reason: str  #: one line: what was measured, e.g. "energy at the frequency-window edge 3e-3"

    def as_dict(self) -> dict:
        """Plain-value form for the summary."""
        return {"name": self.name, "code": self.code, "passed": self.passed,
                "value": self.value, "limit": self.limit, "reason": self.reason}


@dataclass(frozen=True)
class Assessment:
    """The checks of one run and where the spectrum reaches the frequency-window edges."""

    checks: tuple[Check, ...]
    red_edge: bool  #: the lower frequency edge fails (energy or level)
    blue_edge: bool  #: the upper frequency edge fails
    shortest_fwhm: float  #: shortest pulse of interest [s] (nan if none)

    def failed(self, name: str) -> bool:
        """Whether the check ``name`` failed."""
        return any(c.name == name and not c.passed for c in self.checks)

    @property
    def passed(self) -> bool:
        return all(c.passed for c in self.checks)


@dataclass(frozen=True)
class Convergence:
    """What the convergence checks found for the final run, and how the grid got there.

    Attributes
    ----------
    checks : tuple of Check
        The checks of the final run (passed or not).
    refinements : int
        Runs repeated on a larger grid.
    reasons : tuple of str
        Why each refinement was made (one line each, in order).
    grid_fixed : bool
        The user fixed the grid in ``[grid]``; it was not refined.
    """

    checks: tuple[Check, ...]
    refinements: int
    reasons: tuple[str, ...]
    grid_fixed: bool

    @property
    def converged(self) -> bool:
        """Every check passed."""
        return all(c.passed for c in self.checks)

    @property
    def failed(self) -> tuple[Check, ...]:
        """The checks that failed."""
        return tuple(c for c in self.checks if not c.passed)

    @property
    def failed_codes(self) -> tuple[str, ...]:
        """Verdict codes of the failed checks, each once, in check order."""
        return tuple(dict.fromkeys(c.code for c in self.failed))


def _edge_zones(grid: Grid) -> tuple[np.ndarray, np.ndarray]:
    """Masks (FFT order) of the lower and upper outer ``EDGE_ZONE`` of the frequency window."""
    x = grid.domega / grid.half_window
    inner = 1 - 2 * EDGE_ZONE
    return x < -inner, x > inner


def _as_slice(mask: np.ndarray):
    """``mask`` as a slice when its True entries are one contiguous run (a view instead of a
    copy), else the mask itself."""
    where = np.flatnonzero(mask)
    if where.size and where[-1] - where[0] + 1 == where.size:
        return slice(int(where[0]), int(where[-1]) + 1)
    return mask


def _edge_levels(grid: Grid, spectra: np.ndarray) -> tuple[float, float, float, float]:
    """Largest (over records) energy fraction and peak-relative level [dB] in the lower and
    upper edge zones: (fraction_low, fraction_high, level_low_db, level_high_db)."""
    low, high = (_as_slice(zone) for zone in _edge_zones(grid))
    s = np.asarray(spectra)  # float32 rows of the records: summed in float64, not copied
    s = s.reshape(-1, grid.points)
    total = s.sum(axis=1, dtype=float)
    peak = s.max(axis=1).astype(float)
    ok = (total > 0) & (peak > 0)
    if not np.any(ok):
        return 0.0, 0.0, LEVEL_FLOOR_DB, LEVEL_FLOOR_DB
    if not np.all(ok):
        s, total, peak = s[ok], total[ok], peak[ok]
    with np.errstate(divide="ignore"):
        frac_lo = float(np.max(s[:, low].sum(axis=1, dtype=float) / total))
        frac_hi = float(np.max(s[:, high].sum(axis=1, dtype=float) / total))
        lvl_lo = float(10 * np.log10(np.max(s[:, low].max(axis=1) / peak)))
        lvl_hi = float(10 * np.log10(np.max(s[:, high].max(axis=1) / peak)))
    return frac_lo, frac_hi, max(lvl_lo, LEVEL_FLOOR_DB), max(lvl_hi, LEVEL_FLOOR_DB)


def _shortest_pulse(grid: Grid, propagation, compression) -> float:
    """Shortest FWHM of interest: compressed pulse, its transform limit, the output's. [s]"""
    from hcfplan.pulse.metrics import transform_limited_fwhm

    found = []
    if compression is not None:
        found += [compression.metrics.fwhm, compression.metrics.transform_limited_fwhm]
    if propagation.success:
        found.append(transform_limited_fwhm(grid, propagation.field_out_spectrum))
    finite = [float(f) for f in found if f is not None and np.isfinite(f) and f > 0]
    return min(finite) if finite else float("nan")


def assess_run(grid: Grid, propagation, compression=None) -> Assessment:
    """The convergence checks of one run (module docstring).

    Parameters
    ----------
    grid : Grid
        The run's grid.
    propagation : PropagationResult
        The fiber run (its records along z and the edge fractions the solver tracked).
    compression : CompressionResult, optional
        The compressed pulse, if any.

    Returns
    -------
    Assessment

    References
    ----------
    none: numerical checks (common practice, no source)
    """
    frac_lo, frac_hi, lvl_lo, lvl_hi = _edge_levels(grid, propagation.spectrum_z)
    time_frac = float(propagation.edge_time_fraction)
    freq_frac = max(float(propagation.edge_frequency_fraction), frac_lo + frac_hi)
    level = max(lvl_lo, lvl_hi)
    shortest = _shortest_pulse(grid, propagation, compression)
    per_fwhm = shortest / grid.dt if np.isfinite(shortest) else float("inf")
    checks = (
        Check("time_edge_energy", CHECK_CODES["time_edge_energy"],
              time_frac <= EDGE_ENERGY_LIMIT, time_frac, EDGE_ENERGY_LIMIT,
              f"energy at the time-window edge {time_frac:.1e}"),
        Check("frequency_edge_energy", CHECK_CODES["frequency_edge_energy"],
              freq_frac <= EDGE_ENERGY_LIMIT, freq_frac, EDGE_ENERGY_LIMIT,
              f"energy at the frequency-window edge {freq_frac:.1e}"),
        Check("spectrum_edge_level", CHECK_CODES["spectrum_edge_level"],
              level <= EDGE_LEVEL_DB, level, EDGE_LEVEL_DB,
              f"spectrum at the frequency-window edge {level:.0f} dB of its peak"),
        Check("pulse_sampling", CHECK_CODES["pulse_sampling"],
              per_fwhm >= MIN_POINTS_PER_FWHM, per_fwhm, MIN_POINTS_PER_FWHM,
              f"shortest pulse {shortest * 1e15:.3g} fs sampled by {per_fwhm:.2g} points "
              "per FWHM"),
    )
    red = frac_lo > 0.5 * EDGE_ENERGY_LIMIT or lvl_lo > EDGE_LEVEL_DB
    blue = frac_hi > 0.5 * EDGE_ENERGY_LIMIT or lvl_hi > EDGE_LEVEL_DB
    return Assessment(checks, red, blue, shortest)


def refined_grid(grid: Grid, found: Assessment) -> Grid | None:
    """A larger grid that answers the failed checks of ``found`` (module docstring), or None
    when none can be made (nothing to change, or more than :data:`MAX_POINTS` points).

    References
    ----------
    none: numerical helper (common practice, no source)
    """
    lo, hi, window = grid.omega_low, grid.omega_high, grid.time_window
    half, pump = grid.half_window, grid.omega_pump
    ceiling = UPPER_EDGE_MULTIPLE * pump
    if found.failed("time_edge_energy"):
        window *= 2
    if found.failed("frequency_edge_energy") or found.failed("spectrum_edge_level"):
        red, blue = found.red_edge, found.blue_edge
        if not (red or blue):
            red = blue = True
        if red:
            lo = max(lo - half, RED_STEP_FRACTION * lo)
        if blue:
            hi = min(hi + half, ceiling)
    if found.failed("pulse_sampling") and np.isfinite(found.shortest_fwhm):
        needed = 1.25 * MIN_POINTS_PER_FWHM * np.pi / found.shortest_fwhm  # half window
        extra = 2 * max(needed - 0.5 * (hi - lo), 0.0)  # to the blue first, then the red
        hi_new = min(hi + extra, ceiling)
        lo = max(lo - (extra - (hi_new - hi)), min(lo, LOWER_EDGE_FRACTION * pump))
        hi = hi_new
    if np.isclose(lo, grid.omega_low) and np.isclose(hi, grid.omega_high) and \
            window <= grid.time_window:
        return None
    new = window_grid(pump, lo, hi, window)
    return new if new.points <= MAX_POINTS else None


def refine_until_converged(run: Callable[[Grid | None], Any], grid_fixed: bool,
                           ) -> tuple[Any, Convergence]:
    """Run ``run(grid)`` (``None``: its own first grid) and again on refined grids until the
    checks pass, at most :data:`MAX_REFINEMENTS` times; a fixed grid is run once.

    Parameters
    ----------
    run : callable
        ``run(grid) -> ChainResult`` (anything with ``grid``, ``propagation`` and
        ``compression`` attributes).
    grid_fixed : bool
        The user fixed the grid: run once, report the checks.

    Returns
    -------
    (result, Convergence)
        The last run and its checks.

    References
    ----------
    none: numerical helper (common practice, no source)
    """
    result = run(None)
    reasons: list[str] = []
    while True:
        found = assess_run(result.grid, result.propagation, result.compression)
        if grid_fixed or found.passed or len(reasons) >= MAX_REFINEMENTS \
                or not result.propagation.success:
            break
        grid = refined_grid(result.grid, found)
        if grid is None:
            break
        reasons.append("; ".join(c.reason for c in found.checks if not c.passed))
        result = run(grid)
    return result, Convergence(found.checks, len(reasons), tuple(reasons), grid_fixed)


def dispersive_wave_band(report: dict, omega_pump: float) -> tuple[float, float] | None:
    """Band a run must hold for the dispersive wave the first-look report expects, or None.

    ``report["estimate.dispersive_wave_m"]`` (:func:`hcfplan.planning.reports.fiber.fiber_report`)
    widened by :data:`DISPERSIVE_WAVE_MARGIN`; the band reaches from the pump up. Only where
    the first look expects soliton fission inside the fiber (soliton order at least
    :data:`DISPERSIVE_WAVE_MIN_ORDER` and fission length below the fiber length); a weakly
    nonlinear pulse emits no dispersive wave worth a wider window.

    References
    ----------
    N. Y. Joly et al., Phys. Rev. Lett. 106, 203901 (2011) [from memory] (the phase matching,
    in :func:`hcfplan.fibers.derived.dispersive_wave_frequency`).
    """
    wavelength = report.get("estimate.dispersive_wave_m")
    order = report.get("fiber.soliton_order") or 0.0
    fission = report.get("fiber.fission_length_m")
    length = report.get("fiber.length_m")
    if not wavelength or order < DISPERSIVE_WAVE_MIN_ORDER:
        return None
    if fission is None or length is None or not fission <= length:
        return None  # no soliton fission within the fiber: no dispersive wave to hold
    from hcfplan.constants import c

    omega = 2 * np.pi * c / float(wavelength)
    return omega_pump, omega * (1 + DISPERSIVE_WAVE_MARGIN)
