"""Interaction-picture Runge-Kutta steppers for dz u = L u + N(u) (u = grid spectrum).

What every stepper provides (the solver in :mod:`hcfplan.propagation.solve` relies on these):

1. ``adaptive`` (bool): whether the stepper estimates its local error and may reject a step.
2. ``order`` (int): order of the propagated solution; ``embedded_order`` (int) for adaptive ones.
3. ``__init__(linear, nonlinear, rtol, atol, norm)``: ``linear`` is L(omega) (complex
   array), ``nonlinear`` the :class:`~.operators.NonlinearTerms` (N = i gain raw, evaluated on
   its ``input`` buffer), ``norm`` a key of :data:`~.control.ERROR_NORMS`; all work arrays are
   allocated here, once per run.
4. ``start(u)``: called once with the initial spectrum before the first step.
5. ``step(state, h) -> (accepted, message)``: attempt one step of length ``h`` from
   ``state.u`` at ``state.z``. If accepted, ``state.u`` (rebound to the new spectrum: buffers
   are swapped, not copied) and ``state.z`` are advanced.
   In every case ``state.h`` is set to the proposed next step. ``message`` is ``""`` or
   ``"nonfinite"`` when the attempted solution contained NaN or Inf.
6. ``rhs_per_step`` (int): evaluations of N per attempted step (after ``start``).
7. Between calls (before ``start``, after ``step``) nothing is kept in the FFT buffers of the
   nonlinear terms (``input`` and the time buffer): the solver's recorder uses them.

The half-step propagators exp(L h/2) are cached per step length (the solver keeps the step
fixed within a sampling interval unless the controller asks for a shorter one, so only a few
distinct lengths occur; one complex exp over the grid costs about three FFTs).

All stages are fused kernels: the compiled ones of :mod:`.kernels` (numba) or their numpy twins
(:mod:`.kernels_numpy`), the set of the nonlinear terms (:mod:`.kernel_sets`); per step 4 N
evaluations (2 FFTs each without Raman or plasma) and 5 passes over the spectrum.

References
----------
.. [1] J. Hult, "A fourth-order Runge-Kutta in the interaction picture method for simulating
       supercontinuum generation in optical fibers," J. Lightwave Technol., vol. 25, no. 12,
       pp. 3770-3775, 2007, doi:10.1109/JLT.2007.909373.
.. [2] S. Balac and F. Mahé, "Embedded Runge-Kutta scheme for step-size control in the
       interaction picture method," Comput. Phys. Commun., vol. 184, no. 4, pp. 1211-1219,
       2013, doi:10.1016/j.cpc.2012.12.020.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from hcfplan.propagation.control import step_factor

#: RK4IP weights of k1..k4 (Hult [1], Eq. (11)); the propagated solution of both steppers.
RK4_WEIGHTS = (1.0 / 6.0, 2.0 / 6.0, 2.0 / 6.0, 1.0 / 6.0)
#: Embedded third-order solution of ERK4(3)-IP (Balac & Mahé [2]): weights of k4 and of
#: k5 = N(u4) added to the common part beta = D(u_I + h(k1 + 2k2 + 2k3)/6). [from memory;
#: checked here against the order conditions for u' = u]
ERK3_WEIGHTS = (2.0 / 30.0, 3.0 / 30.0)
#: Propagators kept per run (distinct step lengths).
_CACHE_SIZE = 12


@dataclass
class StepState:
    """Mutable run state: spectrum ``u`` (FFT order), position ``z`` [m], next step ``h`` [m]."""

    u: np.ndarray
    z: float
    h: float


class _InteractionPicture:
    """Shared buffers, the fused RK4IP stages and the cache of half-step propagators."""

    adaptive = False
    order = 4
    embedded_order = 0
    rhs_per_step = 4

    def __init__(self, linear: np.ndarray, nonlinear, rtol: float, atol: float,
                 norm: str = "relative_l2") -> None:
        self.kernels = nonlinear.kernels  # the set chosen for the run (kernel_sets.py)
        self.linear = linear
        self.nonlinear = nonlinear
        self.rtol, self.atol, self.norm = rtol, atol, norm
        shape = linear.shape
        self.ui, self.acc, self.u4 = (np.empty(shape, complex) for _ in range(3))
        # targets of the inverse FFT (aligned for pyFFTW)
        self.r, self.nu, self.r5 = (nonlinear.new_work() for _ in range(3))
        self.norm_u = 0.0  # sum |u|^2 of the current state (set by the first stage)
        self._cache: dict[float, np.ndarray] = {}

    def half_propagator(self, h: float) -> np.ndarray:
        """exp(L h/2), cached by h rounded to 12 digits (steps of one interval differ by ulps)."""
        key = float(f"{h:.11e}")
        found = self._cache.get(key)
        if found is None:
            if len(self._cache) >= _CACHE_SIZE:
                self._cache.pop(next(iter(self._cache)))
            found = self._cache[key] = np.exp(self.linear * (0.5 * h))
        return found

    def start(self, u: np.ndarray) -> None:
        self.nonlinear.input[...] = u
        self.nonlinear.evaluate(self.nu)

    def _rk4(self, u: np.ndarray, h: float, d: np.ndarray) -> float:
        """RK4IP step of Hult [1] from u (N(u) raw in self.nu): u4 (also in the FFT input) and
        raw k4 in self.r. Returns sum |u4|^2 (not finite when the step overflowed)."""
        kn, n, g = self.kernels, self.nonlinear, self.nonlinear.gain
        ui, acc, x, r = self.ui, self.acc, self.nonlinear.input, self.r
        self.norm_u = kn.stage_first(ui, acc, x, d, u, g, self.nu, 0.5 * h)  # u_I, k1
        n.evaluate(r)  # k2 = g r
        kn.stage_middle(x, acc, ui, g, r, 0.5 * h)
        n.evaluate(r)  # k3
        kn.stage_last(x, acc, ui, g, r, h, d)
        n.evaluate(r)  # k4
        return kn.stage_combine(self.u4, x, d, ui, acc, g, r, h * RK4_WEIGHTS[0])

    def _accept(self, state: StepState, h: float) -> None:
        state.u, self.u4 = self.u4, state.u  # swap buffers instead of copying
        state.z += h


class RK4IP(_InteractionPicture):
    """Fixed-step RK4 in the interaction picture (Hult [1]); four N evaluations per step."""

    def step(self, state: StepState, h: float) -> tuple[bool, str]:
        """One RK4IP step of length ``h`` [m] from ``state`` (item 5 of the module docstring).

        References
        ----------
        J. Hult, J. Lightwave Technol. 25, 3770 (2007).
        """
        norm2 = self._rk4(state.u, h, self.half_propagator(h))
        state.h = h
        if not math.isfinite(norm2):
            return False, "nonfinite"
        self._accept(state, h)
        self.nonlinear.evaluate(self.nu)  # k1 of the next step (the FFT input holds u4)
        return True, ""


def _relative_l2(stepper, s: float, norm2: float) -> float:
    """||s i g (r4 - r5)|| / (rtol max(||u||, ||u4||) + atol sqrt(n)) (control.py); raw k4 is
    ``stepper.r``."""
    delta = abs(s) * math.sqrt(stepper.kernels.difference_norm2(stepper.nonlinear.gain,
                                                                stepper.r, stepper.r5))
    size = stepper.linear.size
    return delta / (stepper.rtol * math.sqrt(max(norm2, stepper.norm_u))
                    + stepper.atol * math.sqrt(size))


def _scaled_rms(stepper, s: float, norm2: float, u: np.ndarray) -> float:
    """RMS of s i g (r4 - r5) / (atol + rtol max(|u|, |u4|)) (control.py); raw k4 is
    ``stepper.r``."""
    return float(stepper.kernels.difference_scaled_rms(
        stepper.nonlinear.gain, stepper.r, stepper.r5, stepper.u4, u, s, stepper.rtol,
        stepper.atol))


class ERK43IP(_InteractionPicture):
    """Adaptive ERK4(3)-IP of Balac & Mahé [2]: RK4IP plus an FSAL embedded 3rd-order estimate.

    Four new N evaluations per attempt (k2, k3, k4 and k5 = N(u4), which is k1's N of the
    next step). The local error estimate is u4 - u3 = h (k4 - k5) / 10, measured with the
    norm ``norm`` of :data:`~.control.ERROR_NORMS`.
    """

    adaptive = True
    embedded_order = 3

    def step(self, state: StepState, h: float) -> tuple[bool, str]:
        """One attempt of length ``h`` [m] from ``state``, accepted when the embedded error
        estimate meets the tolerance (item 5 of the module docstring).

        References
        ----------
        S. Balac and F. Mahé, Comput. Phys. Commun. 184, 1211 (2013).
        RK4IP part: J. Hult, J. Lightwave Technol. 25, 3770 (2007).
        """
        norm2 = self._rk4(state.u, h, self.half_propagator(h))
        if not math.isfinite(norm2):
            state.h = h * step_factor(np.inf, self.embedded_order)
            return False, "nonfinite"
        self.nonlinear.evaluate(self.r5)  # k5 = g r5 = N(u4)
        # u4 - u3 = h [(1/6 - 2/30) k4 - (3/30) k5] = h (k4 - k5) 3/30
        s = h * ERK3_WEIGHTS[1]
        if self.norm == "relative_l2":
            err = _relative_l2(self, s, norm2)
        else:
            err = _scaled_rms(self, s, norm2, state.u)
        state.h = h * step_factor(err, self.embedded_order)
        if not math.isfinite(err):
            return False, "nonfinite"
        if err > 1.0:
            return False, ""
        self._accept(state, h)
        self.nu, self.r5 = self.r5, self.nu  # FSAL: N(u_new) is ready
        return True, ""


#: Stepper registry: key -> class (see the numbered list in the module docstring).
STEPPERS: dict[str, type[_InteractionPicture]] = {"erk43ip": ERK43IP, "rk4ip": RK4IP}
