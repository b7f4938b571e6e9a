"""GNLSE check of the envelope map's SPM-only estimates along the map's sweet spot.

The map's duration and THz contours (:mod:`hcfplan.planning.envelope`) are closed-form,
SPM-only estimates: dispersion, soliton dynamics, self-steepening, plasma and the crystal are
left out. This module runs the real chain (:func:`hcfplan.planning.chain.run_chain`: GNLSE,
chirped-mirror compressor, THz with the configured crystal) at a few points of the map and
compares its compressed FWHM and THz cutoff with the map's values there.

Sweet spot: at every pressure of the map within the cell rating, the highest map energy below
both the self-focusing and the ionisation line. The SPM-only duration estimate falls with
energy, so along this line it is shortest at each pressure; it is where the map points the user
to, and where SPM-only is most likely to fail. The check points are :data:`CHECK_POINTS`
pressures of this line, at the centres of equal parts of its pressure range.

Each point runs on the grid the chain chooses and refines for it (as ``hcfplan run`` does with
no ``[grid]`` keys), so a point costs what a run there costs: under a second to a few seconds
for most points of the demo maps, up to minutes where the spectrum reaches far (the refinement
stops at the convergence module's largest grid). A point whose ratio (chain / estimate) lies
outside [1/:data:`CHECK_FACTOR`, :data:`CHECK_FACTOR`] is flagged. A point whose run failed or
gave no compressed pulse (``run_failed``), whose solver stopped early (``not_converged``) or
that did not pass the convergence checks (``window_edge_energy``, ``unresolved_pulse``) is void,
with the code and wording of :mod:`hcfplan.planning.verdict`.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from hcfplan.errors import HcfplanError

#: Ratio (chain / estimate, or its inverse) beyond which a check point is flagged.
CHECK_FACTOR = 1.5
#: Number of check points along the sweet spot.
CHECK_POINTS = 3
#: Saved z positions of a check run (only the output is compared; the record is not needed).
CHECK_Z_SAMPLES = 16
SWEET_SPOT = ("at each pressure within the cell rating, the highest map energy below both the "
              "self-focusing and the ionisation line (where the SPM-only duration estimate is "
              "shortest at that pressure)")
UNCHECKED_NOTE = ("SPM-only estimates, unchecked: no GNLSE run compared them with the real "
                  "chain (hcfplan envelope --check runs one at a few points of the map)")


@dataclass(frozen=True)
class CheckPoint:
    """One check point: the map's estimates and the chain's values there (SI; nan = void)."""

    energy: float  #: pulse energy before coupling [J]
    pressure: float  #: fill pressure [Pa]
    index: tuple[int, int]  #: (energy index, pressure index) on the map
    estimate_duration: float  #: SPM-only compressed FWHM of the map [s]
    gnlse_duration: float  #: compressed FWHM of the chain [s] (nan if void)
    estimate_cutoff: float  #: THz cutoff estimate of the map [Hz]
    gnlse_cutoff: float  #: THz cutoff of the chain [Hz] (nan if void or no THz result)
    note: str  #: why the point is void, or the first warning of the run; "" if none
    #: verdict code (:mod:`hcfplan.planning.verdict`) that voids the chain's FWHM; "" if none
    void_code: str = ""
    #: verdict code that voids the chain's THz cutoff; "" if none (or no THz result)
    cutoff_void_code: str = ""

    @property
    def ratio(self) -> float:
        """Chain FWHM / SPM-only estimate (nan if void)."""
        return self.gnlse_duration / self.estimate_duration

    @property
    def cutoff_ratio(self) -> float:
        """Chain THz cutoff / estimate (nan if void)."""
        return self.gnlse_cutoff / self.estimate_cutoff


@dataclass(frozen=True)
class EnvelopeCheck:
    """The GNLSE check of a map (see the module docstring)."""

    points: tuple[CheckPoint, ...]
    factor: float
    sweet_spot: str
    notes: tuple[str, ...]  #: e.g. why there are no check points


def outside(ratio: float, factor: float = CHECK_FACTOR) -> bool:
    """True if ``ratio`` is finite and outside [1/factor, factor]."""
    return math.isfinite(ratio) and not 1.0 / factor <= ratio <= factor


def disagreement(ratio: float, what: str = "compressed FWHM", longer: str = "longer",
                 shorter: str = "shorter", factor: float = CHECK_FACTOR) -> str:
    """One phrase for a chain/estimate ratio: "" inside the band, else e.g.
    "GNLSE check: compressed FWHM 2.1x longer than the SPM-only estimate"."""
    if not outside(ratio, factor):
        return ""
    word, times = (longer, ratio) if ratio > 1 else (shorter, 1.0 / ratio)
    return f"GNLSE check: {what} {times:.2g}x {word} than the SPM-only estimate"


def sweet_spot_indices(result, count: int = CHECK_POINTS) -> list[tuple[int, int]]:
    """(energy index, pressure index) of ``count`` points of the sweet spot (module docstring).

    Fewer points when fewer pressures qualify; none when no pressure within the rating has a
    map energy below both lines.
    """
    if count < 1:
        raise HcfplanError(f"check points = {count}: need at least 1")
    energies, pressures = np.asarray(result.energies), np.asarray(result.pressures)
    top = np.minimum(result.self_focusing_max_energy, result.ionization_max_energy)
    columns = []
    for j, p in enumerate(pressures):
        if result.rated_pressure is not None and p > result.rated_pressure:
            continue
        below = np.flatnonzero(energies <= top[j])
        if below.size:
            columns.append((int(below[-1]), j))
    if not columns:
        return []
    picks = sorted({int(round((k + 0.5) / count * len(columns) - 0.5)) for k in range(count)})
    return [columns[k] for k in picks]


def check_envelope(config, result, *, count: int = CHECK_POINTS, indices=None,
                   factor: float = CHECK_FACTOR) -> EnvelopeCheck:
    """Run the chain at the check points and compare with the map's estimates.

    Parameters
    ----------
    config : PlanConfig
        The config the map was made from.
    result : EnvelopeResult
        From :func:`hcfplan.planning.envelope.envelope_map`.
    count : int
        Number of sweet-spot points (ignored when ``indices`` is given).
    indices : list of (int, int), optional
        Map points (energy index, pressure index) to check instead of the sweet spot.
    factor : float
        Flag ratios outside [1/factor, factor] (> 1).

    Returns
    -------
    EnvelopeCheck
    """
    if not factor > 1:
        raise HcfplanError(f"check factor = {factor}: must be > 1")
    chosen = sweet_spot_indices(result, count) if indices is None else list(indices)
    notes = () if chosen else (
        "no map point lies within the cell rating and below both limit lines; nothing checked",)
    points = tuple(_check_point(config, result, int(i), int(j)) for i, j in chosen)
    return EnvelopeCheck(points=points, factor=factor, sweet_spot=SWEET_SPOT, notes=notes)


def _point_config(config, energy: float, pressure: float):
    """The config at one map point; the chain sizes and refines its grid for that point."""
    grid = dataclasses.replace(config.grid, points=None, time_window=None,
                               z_samples=min(config.grid.z_samples, CHECK_Z_SAMPLES))
    return dataclasses.replace(
        config, laser=dataclasses.replace(config.laser, energy=energy),
        gas=config.gas.with_pressure(pressure), grid=grid)  # a gradient: its exit


def _check_point(config, result, i: int, j: int) -> CheckPoint:
    from hcfplan.planning.chain import run_chain
    from hcfplan.planning.thz_range import beyond_model_text
    from hcfplan.planning.verdict import Reason, convergence_reasons, solver_reason

    energy, pressure = float(result.energies[i]), float(result.pressures[j])
    duration = cutoff = math.nan
    code = cutoff_code = ""
    try:
        chain = run_chain(_point_config(config, energy, pressure))
    except HcfplanError as exc:
        reasons = [Reason("run_failed", f"the chain stopped: {exc}")]
    else:
        prop = chain.propagation
        found = solver_reason(prop.success, prop.status, prop.message)
        if found is not None:
            reasons = [found]
        elif chain.compression is None:
            reasons = [Reason("run_failed", "no compressed pulse")]
        elif chain.convergence is not None and not chain.convergence.converged:
            reasons = convergence_reasons([c.as_dict() for c in chain.convergence.checks])
        else:
            reasons = []
    if reasons:
        code = cutoff_code = reasons[0].code
        note = "; ".join(f"void ({r.code}: {r.message})" for r in reasons)
    else:
        duration = float(chain.compression.metrics.fwhm)
        notes = list(prop.warnings[:1])
        if chain.thz is not None and chain.thz.cutoff is not None:
            cutoff = float(chain.thz.cutoff)
        elif chain.thz is not None:
            cutoff_code = "thz_beyond_crystal_model"
            notes.append("THz cutoff void (thz_beyond_crystal_model: "
                         + beyond_model_text(chain.thz.model_limit) + ")")
        note = "; ".join(notes)
    return CheckPoint(energy=energy, pressure=pressure, index=(i, j),
                      estimate_duration=float(result.compressed_duration[i, j]),
                      gnlse_duration=duration,
                      estimate_cutoff=float(result.thz_cutoff[i, j]),
                      gnlse_cutoff=cutoff, note=note, void_code=code,
                      cutoff_void_code=cutoff_code)


def point_phrases(point: CheckPoint, factor: float = CHECK_FACTOR) -> list[str]:
    """The flags of one point ([] if both ratios lie within the band or the point is void)."""
    phrases = [disagreement(point.ratio, factor=factor),
               disagreement(point.cutoff_ratio, "THz cutoff (crystal included)", "higher",
                            "lower", factor)]
    return [p for p in phrases if p]


def _finite(x: float, scale: float = 1.0):
    return float(x) * scale if math.isfinite(x) else None


def check_json(check: EnvelopeCheck | None) -> dict:
    """``check.*`` keys of the envelope JSON; ``check.status = "unchecked"`` without a check."""
    if check is None:
        return {"check.status": "unchecked", "check.note": UNCHECKED_NOTE, "check.points": []}
    points = [{
        "energy_j": p.energy, "pressure_pa": p.pressure,
        "estimate_fs": _finite(p.estimate_duration, 1e15),
        "gnlse_fs": _finite(p.gnlse_duration, 1e15), "ratio": _finite(p.ratio),
        "estimate_cutoff_thz": _finite(p.estimate_cutoff, 1e-12),
        "gnlse_cutoff_thz": _finite(p.gnlse_cutoff, 1e-12),
        "cutoff_ratio": _finite(p.cutoff_ratio),
        "flags": point_phrases(p, check.factor), "note": p.note or None,
        "void_code": p.void_code or None, "cutoff_void_code": p.cutoff_void_code or None,
    } for p in check.points]
    return {
        "check.status": "checked",
        "check.note": ("ratio = GNLSE chain / SPM-only estimate at each point; flagged outside "
                       f"[1/{check.factor:g}, {check.factor:g}]"),
        "check.sweet_spot": check.sweet_spot,
        "check.factor": check.factor,
        "check.points": points,
        "check.flagged": sum(bool(pt["flags"]) for pt in points),
        "check.notes": list(check.notes),
    }
