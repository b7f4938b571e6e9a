"""Front end of the pulse-propagation solver: :func:`propagate`.

It checks the inputs, builds the linear and nonlinear terms (:mod:`.operators`; the ionising
components of the fill with :func:`~.ionizing.ionizing_gas`), advances the spectrum with a
stepper from :data:`~.steppers.STEPPERS`, records the tracked quantities at ``z_samples``
evenly spaced positions and returns a frozen :class:`~.result.PropagationResult`. The numerical
settings come as one :class:`~.options.SolverOptions`, whose fields are checked when it is made.

Sampling: each interval between two record positions is divided into equal steps no longer
than the step the controller proposes, so the records are hit exactly (no interpolation). An
adaptive stepper may take up to ``STEP_OVERSHOOT`` times its proposal to reach a record in fewer
steps: the proposal is ``SAFETY`` (0.9) times the error-optimal step, so its error estimate is
about 0.9^4 = 0.66 of the tolerance and 1.1 times that step still about 0.96 of it (an
attempt above the tolerance is rejected as always). Without it, an interval 1.05 times the
proposal took two half steps: the demo config took 124 steps for 100 records where its steps
alone need 98; with it 108 (`bench/accuracy.py`: every case as close to its converged run as
before).
Within an interval the step stays the same unless the controller asks for a shorter one or for
one at least ``REPLAN_GROWTH`` times longer, so the stepper reuses its propagators exp(L h/2)
(a complex exp over the grid costs about three FFTs).

Gradient fills: ``segments`` (one :class:`FillSegment` per stretch of uniform fill, e.g. from
:func:`~.profile.pressure_segments`) give each stretch its own waveguide and gas; dispersion,
loss, Kerr, Raman and ionisation then follow the local density. At each boundary the stepper
is rebuilt on that stretch's terms and restarted from the field reached (the step length
carries over). Without segments (a static fill) the run is one stretch, as before.

Faults end the run with ``success=False`` and keep what was computed (the records so far plus
one at the position reached, and the last good field): a non-finite field, a step below
``MIN_STEP_FRACTION`` of the length, the step budget ``max_steps`` used up, or an ionisation
fraction above ``stop_ionization_fraction``. Each message names z, the step, the likely cause and
a remedy. Warnings (the run goes on): energy at the time or frequency window edges, and, for
anti-resonant fibers, more than ``RESONANCE_ENERGY_LIMIT`` of the energy in a wall-resonance band.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from hcfplan.errors import ConfigError
from hcfplan.fibers.base import Waveguide
from hcfplan.numerics.fft import default_backend
from hcfplan.numerics.grid import Grid
from hcfplan.propagation import control
from hcfplan.propagation.ionizing import ionizing_gas
from hcfplan.propagation.operators import (
    NonlinearTerms,
    delayed_response,
    kerr_coefficient_spectrum,
    linear_terms,
)
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.result import PropagationResult, Recorder
from hcfplan.propagation.steppers import STEPPERS, StepState

#: Within a sampling interval the step is re-planned when the controller proposes this factor
#: more (a longer step saves steps, a new length costs one complex exp ~ 3 FFTs).
REPLAN_GROWTH = 1.2
#: Most an adaptive step may exceed the controller's proposal to reach the next record (or
#: the end of a gradient's segment) in fewer equal steps (module docstring).
STEP_OVERSHOOT = 1.1
#: Field energy outside the model's valid band above which a warning is given. [fraction]
INVALID_BAND_LIMIT = 1e-6
#: The options of a call without ``options``.
DEFAULT_OPTIONS = SolverOptions()

Progress = Callable[[float, float, int], None]


@dataclass(frozen=True)
class FillSegment:
    """One stretch of uniform fill of a gradient (``start`` to ``end`` [m] along the fiber):
    the waveguide and gas that hold there (dispersion, loss, Kerr from the waveguide; Raman and
    ionisation from the gas)."""

    start: float  #: [m]
    end: float  #: [m]
    waveguide: Waveguide
    gas: object


@dataclass
class _Counters:
    n_steps: int = 0
    n_rejected: int = 0


@dataclass(frozen=True)
class RunSettings:
    """What the stepping loop needs besides the stepper: the options and the callback."""

    options: SolverOptions
    progress: Progress | None


def _check_inputs(field0, grid, waveguide, options, progress) -> np.ndarray:
    if not isinstance(grid, Grid):
        raise ConfigError(f"grid = {type(grid).__name__}: must be a hcfplan.numerics.grid.Grid")
    field = np.asarray(field0)
    if field.shape != (grid.points,):
        raise ConfigError(f"field0 shape = {field.shape}: must be ({grid.points},) like the grid")
    if not np.all(np.isfinite(field)) or not np.any(field != 0):
        raise ConfigError("field0: must be finite and not all zero")
    if not isinstance(waveguide, Waveguide):
        raise ConfigError(f"waveguide = {type(waveguide).__name__}: lacks the Waveguide interface")
    length = waveguide.length
    if isinstance(length, bool) or not (isinstance(length, (int, float))
                                        and math.isfinite(length) and length > 0):
        raise ConfigError(f"waveguide.length = {length!r} m: must be finite and > 0")
    if not isinstance(options, SolverOptions):
        raise ConfigError(f"options = {type(options).__name__}: must be a "
                          "hcfplan.propagation.options.SolverOptions")
    if progress is not None and not callable(progress):
        raise ConfigError("progress: must be a callable progress(z, length, n_steps) or None")
    return field.astype(complex)


def check_stretches(segments, length: float, kind: type) -> tuple | None:
    """``segments`` as a tuple after checking that they are ``kind`` stretches (objects with
    ``start`` and ``end`` [m]) covering 0 to ``length`` without gaps, in order; None stays None.

    References
    ----------
    none: input check
    """
    if segments is None:
        return None
    segments = tuple(segments)
    ends = [0.0] + [float(s.end) for s in segments]
    starts = [float(s.start) for s in segments]
    ok = (segments and all(isinstance(s, kind) for s in segments)
          and np.allclose(starts, ends[:-1], rtol=0, atol=1e-12 * length)
          and abs(ends[-1] - length) <= 1e-12 * length and all(np.diff(ends) > 0))
    if not ok:
        raise ConfigError(f"segments: must be {kind.__name__}s covering 0 to the fiber length "
                          "without gaps, in order")
    return segments


def _check_segments(segments, length: float) -> tuple[FillSegment, ...] | None:
    segments = check_stretches(segments, length, FillSegment)
    for s in segments or ():
        if not isinstance(s.waveguide, Waveguide):
            raise ConfigError(f"segments: waveguide {type(s.waveguide).__name__} lacks the "
                              "Waveguide interface")
    return segments


def _build(grid, waveguide, gas, options: SolverOptions, length: float | None = None):
    length = float(waveguide.length) if length is None else length
    lin = linear_terms(grid, waveguide, length)
    gamma = kerr_coefficient_spectrum(grid, waveguide, lin.valid)
    f_inst, response, notes = delayed_response(grid, waveguide, gas)
    plasma = ionizing_gas(grid, waveguide, gas, options.ionization_model)
    area = float(getattr(waveguide, "peak_intensity_area", math.nan))
    backend = options.fft_backend or default_backend(grid.points, next_run=True)
    nonlinear = NonlinearTerms(grid, gamma, f_inst, response, plasma.species, area,
                               options.workers, backend)
    return lin, nonlinear, notes + list(plasma.notes)


def _first_step(u0: np.ndarray, nonlinear, interval: float) -> float:
    """A first trial step from the initial nonlinear rate (the controller corrects it). [m]"""
    out = np.empty_like(u0)
    nonlinear(u0, out)
    rate = float(np.max(np.abs(out)) / np.max(np.abs(u0)))
    return interval if rate == 0 else min(interval, 0.05 / rate)


def propagate(
    field0: np.ndarray,
    grid: Grid,
    waveguide,
    *,
    gas=None,
    options: SolverOptions | None = None,
    progress: Progress | None = None,
    segments=None,
) -> PropagationResult:
    """Propagate a pulse through a waveguide (single-mode envelope GNLSE, see :mod:`.operators`).

    Parameters
    ----------
    field0 : ndarray of complex
        Input envelope A(t) on ``grid.time``, |A|^2 in W. [sqrt(W)]
    grid : Grid
        Time/frequency grid (e.g. from :func:`hcfplan.numerics.grid.choose_grid`).
    waveguide : Waveguide
        Fiber model (:mod:`hcfplan.fibers.base`); its ``length`` is propagated. [m]
    gas : GasMedium, optional
        The fill, for photoionisation and rotational Raman (dispersion and Kerr come from the
        waveguide). None: neither.
    options : SolverOptions, optional
        Tolerances, stepper, record positions, ionisation model and stop level, FFT back end
        (:class:`~hcfplan.propagation.options.SolverOptions`, checked when made). None: the
        defaults (:data:`DEFAULT_OPTIONS`).
    progress : callable, optional
        Called as ``progress(z, length, n_steps)`` after every accepted step.
    segments : sequence of FillSegment, optional
        A fill that varies along z (gradient): consecutive stretches from 0 to the length, each
        with its own waveguide and gas, used there instead of ``waveguide`` and ``gas`` (which
        still give the length and the resonance bands). None: one uniform fill.

    Returns
    -------
    PropagationResult

    Raises
    ------
    ConfigError
        For invalid inputs (checked before any work starts).

    References
    ----------
    RK4IP: J. Hult, J. Lightwave Technol. 25, 3770 (2007); ERK4(3)-IP: S. Balac and F. Mahé,
    Comput. Phys. Commun. 184, 1211 (2013) (:mod:`.steppers`); the terms of the equation cite
    theirs in :mod:`.operators`.
    """
    options = DEFAULT_OPTIONS if options is None else options
    field = _check_inputs(field0, grid, waveguide, options, progress)
    segments = _check_segments(segments, float(waveguide.length))
    if segments is None:
        segments = (FillSegment(0.0, float(waveguide.length), waveguide, gas),)
    stages = Stages(grid, segments, options, float(waveguide.length))
    lin = stages.lin
    u0 = grid.to_spectrum(field)
    removed = grid.energy_w(np.where(lin.valid, 0, u0)) / grid.energy_w(u0)
    if removed > INVALID_BAND_LIMIT:
        stages.notes.append(f"{removed:.2e} of the input energy lies where the waveguide model "
                            "gives no valid beta/alpha and was removed")
    u0 = np.where(lin.valid, u0, 0)
    stages.atol = options.absolute_tolerance(float(np.max(np.abs(u0))))
    return _run(u0, field, grid, waveguide, stages, RunSettings(options, progress))


class Stages:
    """The stepper of each stretch of uniform fill, built when the run reaches it (``build``
    makes its linear and nonlinear terms; default: the single-mode ones)."""

    def __init__(self, grid, segments, options: SolverOptions, length: float,
                 build=None) -> None:
        self.grid, self.segments, self.options, self.length = grid, segments, options, length
        # build(grid, waveguide, gas, options, length) -> (linear terms, nonlinear terms,
        # notes); the multimode solver passes its own
        self.build = _build if build is None else build
        self.index, self.atol, self.notes, self.rhs_before = 0, 0.0, [], 0
        self._make(0)

    def _make(self, index: int) -> None:
        seg = self.segments[index]
        self.lin, self.nonlinear, notes = self.build(self.grid, seg.waveguide, seg.gas,
                                                     self.options, self.length)
        self.notes += [n for n in notes if n not in self.notes]
        self.end = float(seg.end)

    def runner(self):
        """The stepper of the current stretch (not started).

        References
        ----------
        none: numerical helper (the steppers cite theirs in :mod:`.steppers`)
        """
        o = self.options
        return STEPPERS[o.stepper](self.lin.operator, self.nonlinear, o.rtol, self.atol,
                                   o.error_norm)

    @property
    def boundaries(self) -> np.ndarray:
        """Positions of the boundaries between the stretches. [m]

        References
        ----------
        none: numerical helper
        """
        return np.array([float(s.end) for s in self.segments[:-1]])

    def advance(self):
        """Move to the next stretch; returns its runner (not started).

        References
        ----------
        none: numerical helper
        """
        self.rhs_before += self.nonlinear.n_calls
        self.index += 1
        self._make(self.index)
        return self.runner()

    @property
    def n_rhs_evals(self) -> int:
        """Evaluations of the nonlinear terms over all stretches so far.

        References
        ----------
        none: numerical helper
        """
        return self.rhs_before + self.nonlinear.n_calls


def _run(u0, field, grid, waveguide, stages: Stages, run: RunSettings) -> PropagationResult:
    nonlinear = stages.nonlinear
    plasma = nonlinear if nonlinear.species else None
    recorder = Recorder(grid, run.options.z_samples + 1, nonlinear.intensity_area, plasma,
                        waveguide, transforms=nonlinear.fft)  # its buffers are free between steps
    state, counters, status, message = run_stepping(u0, float(waveguide.length), stages,
                                                    recorder, run)
    notes = stages.notes
    return PropagationResult(
        grid=grid,
        **recorder.arrays(),
        field_in_t=field,
        field_out_t=grid.to_time(state.u),
        field_out_spectrum=state.u.copy(),
        status=status,
        message=message,
        success=status == "completed",
        n_steps=counters.n_steps,
        n_rejected=counters.n_rejected,
        n_rhs_evals=stages.n_rhs_evals,
        warnings=tuple(notes + recorder.edge_warnings()),
        **recorder.edge_fractions(),
    )


def run_stepping(u0: np.ndarray, length: float, stages: Stages, recorder, run: RunSettings):
    """Step the spectrum ``u0`` from 0 to ``length``, recording at ``z_samples`` positions.

    The loop shared by :func:`propagate` and the multimode solver
    (:mod:`hcfplan.propagation.multimode`): ``stages`` gives the runner and the nonlinear
    terms of each stretch, ``recorder`` has ``record(z, u)``, ``z``, ``count`` and ``plasma``
    (the :class:`~.result.Recorder` interface). After a fault the position reached is recorded
    too.

    Returns
    -------
    state : StepState
        The final spectrum ``u``, position ``z`` and step ``h``.
    counters : object
        ``n_steps`` (accepted) and ``n_rejected``.
    status, message : str
        As in :class:`~.result.PropagationResult`.

    References
    ----------
    none: numerical helper (the steppers cite theirs in :mod:`.steppers`)
    """
    records = np.linspace(0.0, length, run.options.z_samples)
    targets = np.union1d(records, stages.boundaries)
    is_record = np.isin(targets, records)
    recorder.record(0.0, u0)
    runner = stages.runner()
    runner.start(u0)
    h0 = run.options.step or _first_step(u0, stages.nonlinear, targets[1])
    state = StepState(u=u0.copy(), z=0.0, h=h0)
    counters = _Counters()
    status, message = _advance(state, runner, stages, (targets, is_record), recorder, counters,
                               run)
    if status != "completed" and state.z > recorder.z[recorder.count - 1]:
        recorder.record(state.z, state.u)
    return state, counters, status, message


def _next_step(state, target: float, current: float | None, overshoot: float = 1.0) -> float:
    """Step for the next attempt: equal steps to the target, each at most ``overshoot`` times the
    proposal ``state.h``, kept unless the proposal is shorter or longer by ``REPLAN_GROWTH``
    (a new step length costs a new exp(L h/2))."""
    remaining = target - state.z
    if (current is None
            or not current * (1 - 1e-9) <= overshoot * state.h < REPLAN_GROWTH * current):
        return remaining / max(1, math.ceil(remaining / (overshoot * state.h) * (1 - 1e-12)))
    return remaining / max(1, round(remaining / current))


def _advance(state, runner, stages: Stages, positions, recorder, counters,
             run: RunSettings) -> tuple[str, str]:
    """The stepping loop; returns (status, message). ``positions`` = (targets, is_record):
    the step ends (record positions and stretch boundaries) and which of them are records."""
    options, progress = run.options, run.progress
    targets, is_record = positions
    nonlinear = stages.nonlinear
    stop = options.stop_ionization_fraction
    length, floor = targets[-1], control.MIN_STEP_FRACTION * targets[-1]
    index, attempts, h = 1, 0, None
    overshoot = STEP_OVERSHOOT if runner.adaptive else 1.0
    while index < targets.size:
        proposal = state.h
        h = _next_step(state, float(targets[index]), h, overshoot)
        accepted, reason = runner.step(state, h)
        attempts += 1
        if accepted:
            counters.n_steps += 1
            if h < proposal and runner.adaptive:
                state.h = max(state.h, proposal)  # a shortened step says little about the next
            if targets[index] - state.z <= 1e-9 * length:
                state.z = float(targets[index])
                if is_record[index]:
                    recorder.record(state.z, state.u)
                if state.z >= stages.end and index + 1 < targets.size:
                    runner, nonlinear = _next_stretch(stages, state, recorder)
                index, h = index + 1, None
            if nonlinear.species and nonlinear.ionization_fraction > stop:
                return "ionization_stop", _stop_message(state, h, nonlinear, stop)
            if progress is not None:
                progress(state.z, length, counters.n_steps)
        else:
            counters.n_rejected += 1
            h = None
            if reason == "nonfinite" and not runner.adaptive:
                return "nonfinite", _nonfinite_message(state, proposal)
            if state.h < floor:
                kind = "nonfinite" if reason == "nonfinite" else "step_collapse"
                return kind, _collapse_message(state, proposal, floor, reason, options)
        if attempts >= options.max_steps:
            return "step_budget", _budget_message(state, proposal, options)
    return "completed", ""


def _next_stretch(stages: Stages, state, recorder):
    """Runner and nonlinear terms of the next stretch of fill, started from ``state.u``."""
    runner = stages.advance()
    runner.start(state.u)
    nonlinear = stages.nonlinear
    if recorder.plasma is not None or nonlinear.species:
        recorder.plasma = nonlinear if nonlinear.species else None
    return runner, nonlinear


def _nonfinite_message(state, h) -> str:
    return (
        f"field became non-finite (NaN/Inf) in the step from z = {state.z:.6g} m with step "
        f"{h:.3e} m: the fixed step is too long for the nonlinearity (or the input overflows); "
        "use a smaller step or the adaptive stepper 'erk43ip'"
    )


def _collapse_message(state, h, floor, reason, options: SolverOptions) -> str:
    cause = (
        "the field became non-finite (NaN/Inf) for every step tried: likely an overflow in the "
        "nonlinear terms (peak power or ionisation far outside the model)"
        if reason == "nonfinite"
        else f"the local error stays above rtol = {options.rtol:g}: the tolerance may be "
        "unattainable in double precision, or the field changes abruptly (collapse, "
        "ionisation front)"
    )
    return (
        f"step size collapsed at z = {state.z:.6g} m (last step {h:.3e} m, floor {floor:.1e} m): "
        f"{cause}; remedy: loosen rtol/atol, lower the energy or use a finer grid"
    )


def _budget_message(state, h, options: SolverOptions) -> str:
    return (
        f"step budget max_steps = {options.max_steps} used up at z = {state.z:.6g} m (step "
        f"{h:.3e} m): rtol = {options.rtol:g} may be too tight for this case; loosen rtol or "
        "raise max_steps"
    )


def _stop_message(state, h, nonlinear, stop) -> str:
    step = "" if h is None else f" (step {h:.3e} m)"
    return (
        f"ionisation fraction {nonlinear.ionization_fraction:.3g} exceeded the stop level "
        f"{stop:g} at z = {state.z:.6g} m{step}: ionisation runaway, the envelope plasma model "
        "(single ionisation, no avalanche) is outside its range; remedy: lower the energy or "
        "the pressure, use a larger core, or raise stop_ionization_fraction if intended"
    )
