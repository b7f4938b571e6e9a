"""Front end of the pulse-propagation solver: :func:`propagate`.

It checks every input, builds the linear and nonlinear terms (:mod:`.operators`), advances the
spectrum with a stepper from :data:`~.steppers.STEPPERS`, records the tracked quantities at
``z_samples`` evenly spaced positions and returns a frozen :class:`~.result.PropagationResult`.

Sampling: each interval between two record positions is divided into equal steps no longer
than the step the controller proposes, so the records are hit exactly (no interpolation).
Within an interval the step stays the same unless the controller asks for a shorter one or for
one at least ``REPLAN_GROWTH`` times longer, so the stepper reuses its propagators exp(L h/2)
(a complex exp over the grid costs about three FFTs).

Faults end the run with ``success=False`` and keep what was computed (the records so far plus
one at the position reached, and the last good field): a non-finite field, a step below
``MIN_STEP_FRACTION`` of the length, the step budget ``max_steps`` used up, or an ionisation
fraction above ``stop_ionization_fraction``. Each message names z, the step, the likely cause and
a remedy. Warnings (the run goes on): energy at the time or frequency window edges, and, for
anti-resonant fibers, more than ``RESONANCE_ENERGY_LIMIT`` of the energy in a wall-resonance band.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

import numpy as np

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.fibers.base import Waveguide
from hcfplan.numerics.fft import FFT_BACKENDS, default_backend, fftw_available
from hcfplan.numerics.grid import Grid
from hcfplan.propagation import control
from hcfplan.propagation.operators import (
    IonizingSpecies,
    NonlinearTerms,
    delayed_response,
    kerr_coefficient_spectrum,
    linear_terms,
)
from hcfplan.propagation.result import PropagationResult, Recorder
from hcfplan.propagation.steppers import STEPPERS, StepState

StepperName = Literal["erk43ip", "rk4ip"]
FftBackendName = Literal["fftw", "scipy"]
#: Default atol of the "scaled_rms" norm as a fraction of rtol * max|A~(0)| (common practice,
#: no source); the "relative_l2" norm has atol = 0 by default.
ATOL_FRACTION = 1e-3
#: Intensity range of the ionisation-rate tables. [W/m^2] (1e11 to 1e17 W/cm^2)
RATE_TABLE_RANGE = (1e15, 1e21)
#: Within a sampling interval the step is re-planned when the controller proposes this factor
#: more (a longer step saves steps, a new length costs one complex exp ~ 3 FFTs).
REPLAN_GROWTH = 1.2
#: Field energy outside the model's valid band above which a warning is given. [fraction]
INVALID_BAND_LIMIT = 1e-6


@dataclass
class _Counters:
    n_steps: int = 0
    n_rejected: int = 0


def _check_number(name: str, value, low: float, high: float, unit: str = "") -> None:
    ok = isinstance(value, (int, float)) and math.isfinite(value) and low < value < high
    if not ok:
        raise ConfigError(f"{name} = {value!r} {unit}: must be in ({low:g}, {high:g})".strip())


def _check_inputs(field0, grid, waveguide, opts: dict) -> np.ndarray:
    if not isinstance(grid, Grid):
        raise ConfigError(f"grid = {type(grid).__name__}: must be a hcfplan.numerics.grid.Grid")
    field = np.asarray(field0)
    if field.shape != (grid.points,):
        raise ConfigError(f"field0 shape = {field.shape}: must be ({grid.points},) like the grid")
    if not np.all(np.isfinite(field)) or not np.any(field != 0):
        raise ConfigError("field0: must be finite and not all zero")
    if not isinstance(waveguide, Waveguide):
        raise ConfigError(f"waveguide = {type(waveguide).__name__}: lacks the Waveguide interface")
    _check_number("waveguide.length", waveguide.length, 0.0, math.inf, "m")
    _check_number("rtol", opts["rtol"], 0.0, 1.0)
    if opts["atol"] is not None:
        _check_number("atol", opts["atol"], 0.0, math.inf, "sqrt(J/Hz)")
    if opts["stepper"] not in STEPPERS:
        raise ConfigError(f"stepper = {opts['stepper']!r}: allowed are {sorted(STEPPERS)}")
    samples = opts["z_samples"]
    if isinstance(samples, bool) or not isinstance(samples, int) or samples < 2:
        raise ConfigError(f"z_samples = {opts['z_samples']!r}: must be an integer >= 2")
    _check_number("stop_ionization_fraction", opts["stop"], 0.0, 1.0 + 1e-12)
    if opts["step"] is not None:
        _check_number("step", opts["step"], 0.0, math.inf, "m")
    elif not STEPPERS[opts["stepper"]].adaptive:
        raise ConfigError(f"stepper = {opts['stepper']!r} is fixed-step: give step [m]")
    if not isinstance(opts["max_steps"], int) or opts["max_steps"] < 1:
        raise ConfigError(f"max_steps = {opts['max_steps']!r}: must be an integer >= 1")
    if opts["progress"] is not None and not callable(opts["progress"]):
        raise ConfigError("progress: must be a callable progress(z, length, n_steps) or None")
    if opts["error_norm"] not in control.ERROR_NORMS:
        raise ConfigError(f"error_norm = {opts['error_norm']!r}: allowed are "
                          f"{sorted(control.ERROR_NORMS)}")
    backend = opts["fft_backend"]
    if backend is not None and backend not in FFT_BACKENDS:
        raise ConfigError(f"fft_backend = {backend!r}: allowed are {sorted(FFT_BACKENDS)}")
    if backend == "fftw" and not fftw_available():
        raise ConfigError("fft_backend = 'fftw': pyFFTW is not installed (pip install pyfftw), "
                          "use 'scipy' or None")
    return field.astype(complex)


def _ionizing_species(grid: Grid, waveguide, gas, model) -> tuple[tuple, list[str]]:
    """Rate tables of the ionising gas components (empty without gas or model)."""
    if gas is None or model is None:
        return (), []
    from hcfplan.ionization.rates import rate_function

    rate_function(model)  # ConfigError listing the models if unknown
    area = float(getattr(waveguide, "peak_intensity_area", math.nan))
    if not (math.isfinite(area) and area > 0):
        return (), ["ionisation ignored: the waveguide has no peak_intensity_area"]
    wavelength = 2 * math.pi * c / grid.omega0
    found = []
    for component in gas.components:
        ion = getattr(component.table, "ionization", None)
        if ion is None:
            continue
        table = _rate_table(model, wavelength, ion.potential, ion.l, ion.m, ion.charge)
        density = component.number_density * ion.mole_fraction
        found.append(IonizingSpecies(density, ion.potential, table))
    return tuple(found), []


@functools.lru_cache(maxsize=32)
def _rate_table(model, wavelength, potential, l, m, charge):  # noqa: E741 - PPT quantum numbers
    """Rate table (pure, scalar inputs: cached in memory and in hcfplan's cache folder, it
    costs 1-3 s per gas component to compute)."""
    from hcfplan.numerics.cache import cached_rate_table

    return cached_rate_table(model, wavelength, potential, l, m, charge, *RATE_TABLE_RANGE)


def _build(grid, waveguide, gas, opts):
    length = float(waveguide.length)
    lin = linear_terms(grid, waveguide, length)
    gamma = kerr_coefficient_spectrum(grid, waveguide, lin.valid)
    f_inst, response, notes = delayed_response(grid, waveguide, gas)
    species, more = _ionizing_species(grid, waveguide, gas, opts["ionization_model"])
    area = float(getattr(waveguide, "peak_intensity_area", math.nan))
    backend = opts["fft_backend"] or default_backend()
    nonlinear = NonlinearTerms(grid, gamma, f_inst, response, species, area, opts["workers"],
                               backend)
    return lin, nonlinear, notes + more


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
    rtol: float = 1e-6,
    atol: float | None = None,
    z_samples: int = 100,
    ionization_model: Literal["ppt", "adk"] | None = "ppt",
    stop_ionization_fraction: float = 0.1,
    stepper: StepperName = "erk43ip",
    step: float | None = None,
    max_steps: int = control.MAX_STEPS,
    workers: int = 1,
    progress: Callable[[float, float, int], None] | None = None,
    error_norm: control.ErrorNormName = "relative_l2",
    fft_backend: FftBackendName | None = None,
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
    rtol : float
        Relative local tolerance of the adaptive stepper. [1]
    atol : float, optional
        Absolute tolerance on the grid spectrum (per-bin RMS of the local error). Default 0
        for ``error_norm="relative_l2"`` and ``ATOL_FRACTION * rtol * max|A~(0)|`` for
        ``"scaled_rms"``. [sqrt(J/Hz)]
    z_samples : int
        Number of evenly spaced record positions including 0 and the length.
    ionization_model : {"ppt", "adk"} or None
        Rate model of :mod:`hcfplan.ionization.rates`; None switches photoionisation off.
    stop_ionization_fraction : float
        The run stops (``success=False``) once the ionisation fraction exceeds this. [1]
    stepper : {"erk43ip", "rk4ip"}
        Key of :data:`~.steppers.STEPPERS`; "rk4ip" is fixed-step and needs ``step``.
    step : float, optional
        Fixed step ("rk4ip"), or the first trial step of an adaptive stepper. [m]
    max_steps : int
        Budget of attempted steps.
    workers : int
        Threads for scipy.fft.
    progress : callable, optional
        Called as ``progress(z, length, n_steps)`` after every accepted step.
    error_norm : {"relative_l2", "scaled_rms"}
        Local-error norm of the adaptive stepper (:data:`~.control.ERROR_NORMS`; the
        module docstring of :mod:`.control` says which and why).
    fft_backend : {"fftw", "scipy"}, optional
        FFT back end (:data:`~.transforms.FFT_BACKENDS`); default pyFFTW when installed.

    Returns
    -------
    PropagationResult

    Raises
    ------
    ConfigError
        For invalid inputs (checked before any work starts).
    """
    opts = dict(rtol=rtol, atol=atol, stepper=stepper, z_samples=z_samples, step=step,
                stop=stop_ionization_fraction, max_steps=max_steps, progress=progress,
                ionization_model=ionization_model, workers=workers, error_norm=error_norm,
                fft_backend=fft_backend)
    field = _check_inputs(field0, grid, waveguide, opts)
    lin, nonlinear, notes = _build(grid, waveguide, gas, opts)
    u0 = grid.to_spectrum(field)
    removed = grid.energy_w(np.where(lin.valid, 0, u0)) / grid.energy_w(u0)
    if removed > INVALID_BAND_LIMIT:
        notes.append(f"{removed:.2e} of the input energy lies where the waveguide model gives no "
                     "valid beta/alpha and was removed")
    u0 = np.where(lin.valid, u0, 0)
    atol_value = atol
    if atol is None:
        atol_value = 0.0 if error_norm == "relative_l2" else (
            ATOL_FRACTION * rtol * float(np.max(np.abs(u0))))
    runner = STEPPERS[stepper](lin.operator, nonlinear, rtol, atol_value, error_norm)
    return _run(u0, field, grid, waveguide, runner, nonlinear, opts, notes)


def _run(u0, field, grid, waveguide, runner, nonlinear, opts, notes) -> PropagationResult:
    length = float(waveguide.length)
    targets = np.linspace(0.0, length, opts["z_samples"])
    plasma = nonlinear if nonlinear.species else None
    recorder = Recorder(grid, opts["z_samples"] + 1, nonlinear.intensity_area, plasma, waveguide,
                        transforms=nonlinear.fft)  # its buffers are free between steps
    recorder.record(0.0, u0)
    runner.start(u0)
    h0 = opts["step"] or _first_step(u0, nonlinear, targets[1])
    state = StepState(u=u0.copy(), z=0.0, h=h0)
    counters = _Counters()
    status, message = _advance(state, runner, nonlinear, targets, recorder, counters, opts)
    if status != "completed" and state.z > recorder.z[recorder.count - 1]:
        recorder.record(state.z, state.u)
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
        n_rhs_evals=nonlinear.n_calls,
        warnings=tuple(notes + recorder.edge_warnings()),
    )


def _next_step(state, target: float, current: float | None) -> float:
    """Step for the next attempt: equal steps to the target, kept unless the proposal is
    shorter or longer by ``REPLAN_GROWTH`` (a new step length costs a new exp(L h/2))."""
    remaining = target - state.z
    if current is None or not current * (1 - 1e-9) <= state.h < REPLAN_GROWTH * current:
        return remaining / max(1, math.ceil(remaining / state.h * (1 - 1e-12)))
    return remaining / max(1, round(remaining / current))


def _advance(state, runner, nonlinear, targets, recorder, counters, opts) -> tuple[str, str]:
    """The stepping loop; returns (status, message)."""
    length, floor = targets[-1], control.MIN_STEP_FRACTION * targets[-1]
    index, attempts, h = 1, 0, None
    while index < targets.size:
        proposal = state.h
        h = _next_step(state, float(targets[index]), h)
        accepted, reason = runner.step(state, h)
        attempts += 1
        if accepted:
            counters.n_steps += 1
            if h < proposal and runner.adaptive:
                state.h = max(state.h, proposal)  # a shortened step says little about the next
            if targets[index] - state.z <= 1e-9 * length:
                state.z = float(targets[index])
                recorder.record(state.z, state.u)
                index, h = index + 1, None
            if nonlinear.species and nonlinear.ionization_fraction > opts["stop"]:
                return "ionization_stop", _stop_message(state, h, nonlinear, opts["stop"])
            if opts["progress"] is not None:
                opts["progress"](state.z, length, counters.n_steps)
        else:
            counters.n_rejected += 1
            h = None
            if reason == "nonfinite" and not runner.adaptive:
                return "nonfinite", _nonfinite_message(state, proposal, opts)
            if state.h < floor:
                kind = "nonfinite" if reason == "nonfinite" else "step_collapse"
                return kind, _collapse_message(state, proposal, floor, reason, opts)
        if attempts >= opts["max_steps"]:
            return "step_budget", _budget_message(state, proposal, opts)
    return "completed", ""


def _nonfinite_message(state, h, opts) -> str:
    return (
        f"field became non-finite (NaN/Inf) in the step from z = {state.z:.6g} m with step "
        f"{h:.3e} m: the fixed step is too long for the nonlinearity (or the input overflows); "
        "use a smaller step or the adaptive stepper 'erk43ip'"
    )


def _collapse_message(state, h, floor, reason, opts) -> str:
    cause = (
        "the field became non-finite (NaN/Inf) for every step tried: likely an overflow in the "
        "nonlinear terms (peak power or ionisation far outside the model)"
        if reason == "nonfinite"
        else f"the local error stays above rtol = {opts['rtol']:g}: the tolerance may be "
        "unattainable in double precision, or the field changes abruptly (collapse, "
        "ionisation front)"
    )
    return (
        f"step size collapsed at z = {state.z:.6g} m (last step {h:.3e} m, floor {floor:.1e} m): "
        f"{cause}; remedy: loosen rtol/atol, lower the energy or use a finer grid"
    )


def _budget_message(state, h, opts) -> str:
    return (
        f"step budget max_steps = {opts['max_steps']} used up at z = {state.z:.6g} m (step "
        f"{h:.3e} m): rtol = {opts['rtol']:g} may be too tight for this case; loosen rtol or "
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
