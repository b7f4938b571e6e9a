"""Options of the propagation solver: one frozen, validated :class:`SolverOptions`.

:func:`hcfplan.propagation.solve.propagate` takes its numerical settings (tolerances, stepper,
record positions, ionisation stop level, FFT back end) as one :class:`SolverOptions`. Every
field is checked once, when the object is made: a bad value raises
:class:`~hcfplan.errors.ConfigError` naming the option, before any work starts. The progress
callback is not an option value and is passed to ``propagate`` on its own.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Literal

from hcfplan.errors import ConfigError
from hcfplan.ionization.rates import RATE_MODELS
from hcfplan.numerics.fft import FFT_BACKENDS, fftw_available
from hcfplan.propagation import control
from hcfplan.propagation.steppers import STEPPERS

StepperName = Literal["erk43ip", "rk4ip"]
FftBackendName = Literal["fftw", "scipy", "numpy"]
IonizationModelName = Literal["ppt", "adk"]
#: Default atol of the "scaled_rms" norm as a fraction of rtol * max|A~(0)| (common practice,
#: no source); the "relative_l2" norm has atol = 0 by default.
ATOL_FRACTION = 1e-3


def _check_number(name: str, value, low: float, high: float, unit: str = "") -> None:
    ok = (isinstance(value, (int, float)) and not isinstance(value, bool)
          and math.isfinite(value) and low < value < high)
    if not ok:
        raise ConfigError(f"{name} = {value!r} {unit}: must be in ({low:g}, {high:g})".strip())


def _check_count(name: str, value, least: int) -> None:
    if isinstance(value, bool) or not isinstance(value, int) or value < least:
        raise ConfigError(f"{name} = {value!r}: must be an integer >= {least}")


def _check_choice(name: str, value, allowed) -> None:
    if not isinstance(value, str) or value not in allowed:
        raise ConfigError(f"{name} = {value!r}: allowed are {sorted(allowed)}")


@dataclass(frozen=True)
class SolverOptions:
    """Numerical settings of one propagation run (SI units; checked when made).

    Parameters
    ----------
    rtol : float
        Relative local tolerance of the adaptive stepper, in (0, 1). [1]
    atol : float, optional
        Absolute tolerance on the grid spectrum (per-bin RMS of the local error). None: 0 for
        ``error_norm="relative_l2"`` and ``ATOL_FRACTION * rtol * max|A~(0)|`` for
        ``"scaled_rms"`` (see :meth:`absolute_tolerance`). [sqrt(J/Hz)]
    z_samples : int
        Number of evenly spaced record positions including 0 and the length, >= 2.
    ionization_model : {"ppt", "adk"} or None
        Rate model of :mod:`hcfplan.ionization.rates`; None switches photoionisation off.
    stop_ionization_fraction : float
        The run stops (``success=False``) once the ionisation fraction exceeds this, in
        (0, 1]. [1]
    stepper : {"erk43ip", "rk4ip"}
        Key of :data:`~hcfplan.propagation.steppers.STEPPERS`; "rk4ip" is fixed-step and
        needs ``step``.
    step : float, optional
        Fixed step ("rk4ip"), or the first trial step of an adaptive stepper. [m]
    max_steps : int
        Budget of attempted steps, >= 1.
    workers : int
        Threads of the FFT back end, >= 1.
    error_norm : {"relative_l2", "scaled_rms"}
        Local-error norm of the adaptive stepper (:data:`~hcfplan.propagation.control.ERROR_NORMS`;
        the module docstring of :mod:`hcfplan.propagation.control` says which and why).
    fft_backend : {"fftw", "scipy", "numpy"}, optional
        FFT back end (:data:`~hcfplan.numerics.fft.FFT_BACKENDS`); None:
        :func:`~hcfplan.numerics.fft.default_backend` of the grid (pyFFTW when installed, else
        scipy; numpy for the small problems of a one-shot command).

    Raises
    ------
    ConfigError
        When a field is out of range; the message names the option and the value.

    References
    ----------
    none: numerical settings, no published model (the steppers and the norms cite theirs).
    """

    rtol: float = 1e-6
    atol: float | None = None
    z_samples: int = 100
    ionization_model: IonizationModelName | None = "ppt"
    stop_ionization_fraction: float = 0.1
    stepper: StepperName = "erk43ip"
    step: float | None = None
    max_steps: int = control.MAX_STEPS
    workers: int = 1
    error_norm: control.ErrorNormName = "relative_l2"
    fft_backend: FftBackendName | None = None

    def __post_init__(self) -> None:
        _check_number("rtol", self.rtol, 0.0, 1.0)
        if self.atol is not None:
            _check_number("atol", self.atol, 0.0, math.inf, "sqrt(J/Hz)")
        _check_count("z_samples", self.z_samples, 2)
        if self.ionization_model is not None:
            _check_choice("ionization_model", self.ionization_model, RATE_MODELS)
        _check_number("stop_ionization_fraction", self.stop_ionization_fraction, 0.0,
                      1.0 + 1e-12)
        _check_choice("stepper", self.stepper, STEPPERS)
        if self.step is not None:
            _check_number("step", self.step, 0.0, math.inf, "m")
        elif not STEPPERS[self.stepper].adaptive:
            raise ConfigError(f"stepper = {self.stepper!r} is fixed-step: give step [m]")
        _check_count("max_steps", self.max_steps, 1)
        _check_count("workers", self.workers, 1)
        _check_choice("error_norm", self.error_norm, control.ERROR_NORMS)
        if self.fft_backend is not None:
            _check_choice("fft_backend", self.fft_backend, FFT_BACKENDS)
            if self.fft_backend == "fftw" and not fftw_available():
                raise ConfigError("fft_backend = 'fftw': pyFFTW is not installed (pip install "
                                  "pyfftw), use 'scipy' or None")

    def absolute_tolerance(self, peak: float) -> float:
        """The atol the stepper uses: :attr:`atol`, or its default for the error norm.

        Parameters
        ----------
        peak : float
            max|A~(0)| of the initial grid spectrum. [sqrt(J/Hz)]

        Returns
        -------
        float
            Absolute tolerance. [sqrt(J/Hz)]

        References
        ----------
        none: numerical helper (default "common practice, no source", see ATOL_FRACTION).
        """
        if self.atol is not None:
            return float(self.atol)
        if self.error_norm == "relative_l2":
            return 0.0
        return ATOL_FRACTION * self.rtol * float(peak)
