"""Chirped-mirror compressor after the fiber: bounce optimisation, references and pulse metrics.

The chain after the fiber is, in order: the cell exit window, an air path, the chirped mirrors
(``n`` bounces) and an optional pair of wedges used as a fine trim. The window and the air are
one *fixed* phase array (see :func:`hcfplan.compression.elements.stack_phase`); a bounce adds
``mirror_phase_per_bounce`` (from :func:`~hcfplan.compression.elements.mirror_phase` or a measured
GDD curve via :func:`~hcfplan.compression.elements.phase_from_gdd_curve`); the trim adds
``insertion * phase_per_length``. All phases multiply the spectrum as :math:`e^{i\\phi}`
(convention 4 of :mod:`hcfplan.numerics.grid`), so the elements conserve energy; the mirror band is
the only loss.

Definitions used throughout
---------------------------
* Band clipping (hard edges, :func:`~hcfplan.compression.elements.clip_to_band`) is applied to
  every candidate, including zero bounces: the band stands for the compressor's acceptance.
* "Transform limit" is the flat-phase pulse of the spectrum *after* band clipping.
* The references (best pure-quadratic phase, best quadratic + cubic phase) replace the mirrors
  and the trim by an ideal polynomial phase; the fixed phase and the band clipping stay. Their
  reported GDD/TOD, like those of the chirped-mirror result, are the totals of the applied
  phase (fixed + compressor) at the pump (``grid.omega_pump``).
* Main lobe, pre- and post-pulse follow :func:`hcfplan.pulse.lobes.main_lobe`; every metric
  is measured on the band-limited interpolant of the envelope (:mod:`hcfplan.pulse.metrics`),
  and the peak-power search uses the band-limited peak too.

The evaluation machinery of the searches (objectives, the scorer, the 1-D search) is in
:mod:`hcfplan.compression.scoring`, the reference searches in
:mod:`hcfplan.compression.references`.

References
----------
.. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
       Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from hcfplan.compression.elements import clip_to_band, material_phase, phase_derivatives_at
from hcfplan.compression.references import ReferencePulse, reference_pulses
from hcfplan.compression.scoring import (
    OBJECTIVES,
    Objective,
    Scorer,
    peak_powers,
    scan_then_refine,
)
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid
from hcfplan.pulse.metrics import PulseMetrics, pulse_metrics

#: Spectral power, relative to its peak, below which the residual phase is not defined (nan).
RESIDUAL_PHASE_FLOOR = 1e-4


@dataclass(frozen=True, eq=False)
class TrimSpec:
    """A continuously adjustable insertion of extra material (a wedge pair) for fine tuning.

    Attributes
    ----------
    phase_per_length : ndarray
        ``material_phase(omega, omega_pump, n, 1.0)`` on ``grid.omega`` (see :meth:`from_index`).
        [rad/m]
    insertion_min, insertion_max : float
        Bounds of the total insertion (thickness traversed). [m]
    """

    phase_per_length: np.ndarray
    insertion_min: float
    insertion_max: float

    def __post_init__(self) -> None:
        if not 0 <= self.insertion_min < self.insertion_max:
            raise ConfigError(
                f"trim insertion range = ({self.insertion_min}, {self.insertion_max}) m: "
                "need 0 <= insertion_min < insertion_max"
            )

    @classmethod
    def from_index(
        cls, grid: Grid, refractive_index: np.ndarray, insertion_min: float, insertion_max: float
    ) -> TrimSpec:
        """Build from n(omega) evaluated on ``grid.omega`` [1] and the insertion bounds [m].

        References
        ----------
        None: :func:`hcfplan.compression.elements.material_phase` per unit length, whose
        docstring names its source.
        """
        unit = material_phase(grid.omega, grid.omega_pump, refractive_index, 1.0)
        return cls(unit, insertion_min, insertion_max)


@dataclass(frozen=True, eq=False)
class CompressionResult:
    """Outcome of :func:`optimize_bounces` (all SI; spectral arrays in FFT order).

    Attributes
    ----------
    grid : Grid
        The grid of every array below.
    objective : str
        Objective used (a key of :data:`OBJECTIVES`).
    bounces : int
        Chosen number of mirror bounces.
    total_gdd, total_tod : float
        GDD and TOD at the pump of the whole applied phase (fixed + mirrors + trim). [s^2], [s^3]
    trim_insertion : float
        Chosen trim insertion (0 without a trim). [m]
    field_t : ndarray
        Compressed envelope. [sqrt(W)]
    spectrum : ndarray
        Complex spectrum after the compressor (band-clipped, phase applied). [sqrt(J/Hz)]
    input_energy : float
        Energy before the compressor. [J]
    band_loss : float
        Energy fraction lost outside the mirror band. [1]
    metrics : PulseMetrics
        Metrics of ``field_t``.
    bounce_counts : ndarray of int
        Candidate bounce counts.
    peak_power_vs_bounces : ndarray
        Peak power for each candidate without trim. [W]
    peak_power_vs_bounces_trimmed : ndarray or None
        Peak power for each candidate at its own optimal trim (None without trim). [W]
    residual_phase : ndarray
        Spectral phase after the compressor minus constant and delay (weighted fit); nan where
        the spectral power is below :data:`RESIDUAL_PHASE_FLOOR` of its peak. [rad]
    quadratic, quadratic_cubic, transform_limit : ReferencePulse
        The references (see the module docstring).
    cautions : tuple of str
        Plain-text notes, e.g. that the best count is the largest one allowed (the optimum may
        lie beyond ``max_bounces``), that the trim ended at a bound of its range, or that the
        main peak is narrower than the transform limit's.
    """

    grid: Grid
    objective: str
    bounces: int
    total_gdd: float
    total_tod: float
    trim_insertion: float
    field_t: np.ndarray
    spectrum: np.ndarray
    input_energy: float
    band_loss: float
    metrics: PulseMetrics
    bounce_counts: np.ndarray
    peak_power_vs_bounces: np.ndarray
    peak_power_vs_bounces_trimmed: np.ndarray | None
    residual_phase: np.ndarray
    quadratic: ReferencePulse
    quadratic_cubic: ReferencePulse
    transform_limit: ReferencePulse
    cautions: tuple[str, ...] = ()


def residual_spectral_phase(grid: Grid, spectrum: np.ndarray) -> np.ndarray:
    """Spectral phase of a pulse minus its constant and group-delay parts.

    Parameters
    ----------
    grid : Grid
        The grid of ``spectrum``.
    spectrum : ndarray
        Spectral amplitude in FFT order. [sqrt(J/Hz)]

    Returns
    -------
    ndarray
        Residual phase in FFT order; nan where :math:`|\\tilde A|^2` is below
        :data:`RESIDUAL_PHASE_FLOOR` times its peak. [rad]

    Notes
    -----
    The factor :math:`(-1)^j` that the centred time axis puts on the FFT-ordered spectrum
    (index N/2 is t = 0, see :mod:`hcfplan.numerics.grid`) and the delay of the intensity centroid
    are removed first, so that the phase changes slowly between samples; then the phase is unwrapped
    over the retained samples in ascending frequency and a straight line fitted with the spectral
    power as weight is subtracted. Common practice, no source.

    References
    ----------
    None: numerical helper (weighted linear fit of the unwrapped phase).
    """
    field_t = grid.to_time(spectrum)
    power_t = np.abs(field_t) ** 2
    centroid = float(np.sum(grid.time * power_t) / np.sum(power_t))
    physical = grid.to_spectrum(np.fft.ifftshift(field_t)) * np.exp(-1j * grid.domega * centroid)
    order = np.argsort(grid.domega)
    weight = np.abs(physical[order]) ** 2
    keep = weight >= RESIDUAL_PHASE_FLOOR * weight.max()
    x = grid.domega[order][keep]
    phase = np.unwrap(np.angle(physical[order][keep]))
    slope, offset = np.polyfit(x, phase, 1, w=np.sqrt(weight[keep]))
    residual = np.full(grid.points, np.nan)
    residual[order[keep]] = phase - (slope * x + offset)
    return residual


def _bounce_counts(max_bounces: int, in_pairs: bool) -> np.ndarray:
    """Candidate bounce counts 0..max_bounces (even only when ``in_pairs``)."""
    if isinstance(max_bounces, bool) or not isinstance(max_bounces, (int, np.integer)):
        raise ConfigError(f"max_bounces = {max_bounces!r}: must be an integer >= 0")
    if max_bounces < 0:
        raise ConfigError(f"max_bounces = {max_bounces}: must be >= 0")
    return np.arange(0, max_bounces + 1, 2 if in_pairs else 1)


def _finite_phase(name: str, phase: np.ndarray, spectrum: np.ndarray) -> np.ndarray:
    """Check that ``phase`` is finite wherever ``spectrum`` carries light; zero it elsewhere."""
    phase = np.asarray(phase, dtype=float)
    bad = ~np.isfinite(phase)
    if np.any(bad & (np.abs(spectrum) > 0)):
        count = int(np.count_nonzero(bad & (np.abs(spectrum) > 0)))
        raise ConfigError(
            f"{name}: non-finite at {count} samples where the spectrum is nonzero "
            "(evaluate the refractive index inside its validity range or narrow the band)"
        )
    return np.where(bad, 0.0, phase)


def _check_inputs(grid: Grid, arrays: dict[str, np.ndarray], objective: str) -> None:
    """Cheap shape and choice checks at the start of :func:`optimize_bounces`."""
    if objective not in OBJECTIVES:
        raise ConfigError(f"objective = {objective!r}: allowed are {sorted(OBJECTIVES)}")
    for name, array in arrays.items():
        if np.shape(array) != (grid.points,):
            raise ConfigError(
                f"{name}: shape {np.shape(array)} does not match the grid ({grid.points},)"
            )


def _scan_bounces(
    score: Scorer,
    base: np.ndarray,
    per_bounce: np.ndarray,
    counts: np.ndarray,
    trim: TrimSpec | None,
) -> tuple[np.ndarray, np.ndarray]:
    """Best score and trim insertion for each candidate bounce count."""
    scores, trims = [], []
    base, per_bounce = score.part(base), score.part(per_bounce)
    trim_phase = None if trim is None else score.part(trim.phase_per_length)
    for n in counts:
        phase_n = base + n * per_bounce
        if trim is None:
            scores.append(score(phase_n))
            trims.append(0.0)
            continue
        shaped = score.with_phase(phase_n)
        best_l, best_s = scan_then_refine(
            lambda l, shaped=shaped: shaped(l * trim_phase),
            trim.insertion_min,
            trim.insertion_max,
        )
        scores.append(best_s)
        trims.append(best_l)
    return np.array(scores), np.array(trims)


@dataclass(frozen=True, eq=False)
class _Chain:
    """Checked phase arrays of the compressor (private helper of :func:`optimize_bounces`)."""

    grid: Grid
    clipped: np.ndarray
    band_loss: float
    fixed: np.ndarray
    mirror: np.ndarray
    trim: TrimSpec | None

    def phase(self, bounces: int, insertion: float) -> np.ndarray:
        """Total applied phase for a bounce count and a trim insertion. [rad]"""
        total = self.fixed + bounces * self.mirror
        return total if self.trim is None else total + insertion * self.trim.phase_per_length

    def gdd_tod(self, phase: np.ndarray) -> tuple[float, float]:
        """GDD [s^2] and TOD [s^3] of ``phase`` at the pump (``grid.omega_pump``)."""
        _, _, gdd, tod = phase_derivatives_at(self.grid.omega, self.grid.omega_pump, phase)
        return gdd, tod

    def search_span(self, counts: np.ndarray) -> float:
        """GDD half-span for the reference searches: two bounce steps plus the trim range."""
        step = int(counts[1] - counts[0]) if counts.size > 1 else 1
        span = 2.0 * abs(self.gdd_tod(self.mirror)[0]) * step
        if self.trim is not None:
            span += abs(self.gdd_tod(self.trim.phase_per_length)[0]) * self.trim.insertion_max
        return span


def _chain(grid: Grid, spectrum, fixed_phase, mirror_phase_per_bounce, band, trim) -> _Chain:
    """Clip to the band and check the phase arrays (finite where there is light)."""
    clipped, loss = clip_to_band(grid, spectrum, band)
    if trim is not None:
        trim_phase = _finite_phase("trim.phase_per_length", trim.phase_per_length, clipped)
        trim = TrimSpec(trim_phase, trim.insertion_min, trim.insertion_max)
    return _Chain(
        grid,
        clipped,
        loss,
        _finite_phase("fixed_phase", fixed_phase, clipped),
        _finite_phase("mirror_phase_per_bounce", mirror_phase_per_bounce, clipped),
        trim,
    )


def _narrower_than_limit(m: PulseMetrics) -> list[str]:
    """A note when the main peak is narrower than the transform limit's (see
    :mod:`hcfplan.pulse.metrics`: a phase can do that by moving energy out of the peak)."""
    if not m.fwhm < m.transform_limited_fwhm:
        return []
    return [f"the main peak ({m.fwhm * 1e15:.2f} fs FWHM) is narrower than the transform "
            f"limit's ({m.transform_limited_fwhm * 1e15:.2f} fs) because the remaining phase moves "
            f"energy out of it (peak power {m.peak_to_transform_limit:.0%} of the transform "
            "limit's); judge the compression by peak power, not by FWHM"]


def _cautions(counts: np.ndarray, bounces: int, trim: TrimSpec | None, insertion: float):
    """Notes on a choice at the edge of the search range."""
    notes = []
    if counts.size > 1 and bounces == counts[-1]:
        notes.append(
            f"best bounce count {bounces} is the largest allowed (max_bounces); "
            "more bounces may compress better"
        )
    if trim is not None:
        span = trim.insertion_max - trim.insertion_min
        for label, bound in (("min", trim.insertion_min), ("max", trim.insertion_max)):
            if abs(insertion - bound) <= 1e-3 * span:
                notes.append(f"trim insertion {insertion:.3e} m is at insertion_{label}")
    return tuple(notes)


def optimize_bounces(
    grid: Grid,
    spectrum: np.ndarray,
    fixed_phase: np.ndarray,
    mirror_phase_per_bounce: np.ndarray,
    *,
    max_bounces: int,
    in_pairs: bool = False,
    objective: Objective = "peak_power",
    band: tuple[float, float] | None = None,
    trim: TrimSpec | None = None,
    input_peak_power: float | None = None,
) -> CompressionResult:
    """Choose the number of chirped-mirror bounces (and a trim insertion) that compress best.

    Parameters
    ----------
    grid : Grid
        The grid of every array.
    spectrum : ndarray
        Complex spectrum leaving the fiber, FFT order. [sqrt(J/Hz)]
    fixed_phase : ndarray
        Phase of the fixed elements (exit window, air path) on ``grid.omega``. [rad]
    mirror_phase_per_bounce : ndarray
        Phase of one bounce on ``grid.omega``. [rad]
    max_bounces : int
        Largest bounce count considered (candidates 0..max_bounces).
    in_pairs : bool
        Consider even counts only (complementary mirror pairs).
    objective : {"peak_power", "fwhm"}
        Maximise the peak power or minimise the FWHM (:data:`OBJECTIVES`).
    band : (float, float), optional
        Mirror reflection band (omega_lo, omega_hi); light outside is lost. [rad/s]
    trim : TrimSpec, optional
        Fine trim by a continuous insertion of extra material, optimised for every count
        (coarse scan, then bounded Brent minimisation).
    input_peak_power : float, optional
        Peak power to which the gain refers (e.g. the pulse entering the fiber). [W]

    Returns
    -------
    CompressionResult
        Ties between counts go to the smaller count. See the module docstring for definitions.

    Notes
    -----
    The elements are phase-only (convention 4 of :mod:`hcfplan.numerics.grid`); GDD and TOD
    are the second and third derivatives of the applied phase at the pump [1]. The search is
    numerical: every candidate count is scored, the trim by a coarse scan and bounded Brent
    minimisation (:func:`hcfplan.compression.scoring.scan_then_refine`).

    References
    ----------
    .. [1] J.-C. Diels and W. Rudolph, *Ultrashort Laser Pulse Phenomena*, 2nd ed., Academic
           Press, 2006, ch. 1 [from memory] (spectral phase, GDD and TOD).
    """
    arrays = {"spectrum": spectrum, "fixed_phase": fixed_phase}
    arrays["mirror_phase_per_bounce"] = mirror_phase_per_bounce
    if trim is not None:
        arrays["trim.phase_per_length"] = trim.phase_per_length
    _check_inputs(grid, arrays, objective)
    if input_peak_power is not None and not input_peak_power > 0:
        raise ConfigError(f"input_peak_power = {input_peak_power} W: must be > 0")
    counts = _bounce_counts(max_bounces, in_pairs)
    chain = _chain(grid, spectrum, fixed_phase, mirror_phase_per_bounce, band, trim)
    score = Scorer(grid, chain.clipped, OBJECTIVES[objective])
    scores, trims = _scan_bounces(score, chain.fixed, chain.mirror, counts, chain.trim)
    best = int(np.argmin(scores))
    n, insertion = int(counts[best]), float(trims[best])
    phase = chain.phase(n, insertion)
    out_spectrum = chain.clipped * np.exp(1j * phase)
    field_t = grid.to_time(out_spectrum)
    gdd, tod = chain.gdd_tod(phase)
    fixed_gdd, fixed_tod = chain.gdd_tod(chain.fixed)
    compressor = (gdd - fixed_gdd, tod - fixed_tod, chain.search_span(counts))
    refs = reference_pulses(grid, chain.clipped, chain.fixed, score, compressor,
                            input_peak_power)
    # with the peak-power objective the bounce scan has computed the curves already
    by_peak = objective == "peak_power"
    if by_peak and chain.trim is None:
        curve = -scores
    else:
        curve = peak_powers(score, [chain.phase(k, 0.0) for k in counts])
    curve_trim = None
    if chain.trim is not None:
        phases = [chain.phase(k, l) for k, l in zip(counts, trims, strict=True)]
        curve_trim = -scores if by_peak else peak_powers(score, phases)
    limit = refs[2].metrics  # refs: quadratic, quadratic_cubic, transform_limit (same spectrum)
    result_metrics = pulse_metrics(
        grid, field_t, input_peak_power=input_peak_power,
        transform_limit=(limit.transform_limited_fwhm, limit.transform_limited_peak_power))
    return CompressionResult(
        grid=grid,
        objective=objective,
        bounces=n,
        total_gdd=gdd,
        total_tod=tod,
        trim_insertion=insertion,
        field_t=field_t,
        spectrum=out_spectrum,
        input_energy=grid.energy_w(spectrum),
        band_loss=chain.band_loss,
        metrics=result_metrics,
        bounce_counts=counts,
        peak_power_vs_bounces=curve,
        peak_power_vs_bounces_trimmed=curve_trim,
        residual_phase=residual_spectral_phase(grid, out_spectrum),
        quadratic=refs[0],
        quadratic_cubic=refs[1],
        transform_limit=refs[2],
        cautions=_cautions(counts, n, chain.trim, insertion)
        + tuple(_narrower_than_limit(result_metrics)),
    )
