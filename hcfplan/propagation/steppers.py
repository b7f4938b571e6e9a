"""Interaction-picture Runge-Kutta steppers for dz u = L u + N(u) (u = grid spectrum).

What every stepper provides (the solver in :mod:`hcfplan.propagation.solve` relies on these):

1. ``adaptive`` (bool): whether the stepper estimates its local error and may reject a step.
2. ``order`` (int): order of the propagated solution; ``embedded_order`` (int) for adaptive ones.
3. ``__init__(linear, nonlinear, rtol, atol)``: ``linear`` is L(omega) (complex array),
   ``nonlinear`` the callable ``N(u, out)`` of :class:`~.operators.NonlinearTerms`; all work
   arrays are allocated here, once per run.
4. ``start(u)``: called once with the initial spectrum before the first step.
5. ``step(state, h) -> (accepted, message)``: attempt one step of length ``h`` from
   ``state.u`` at ``state.z``. If accepted, ``state.u`` (in place) and ``state.z`` are advanced.
   In every case ``state.h`` is set to the proposed next step. ``message`` is ``""`` or
   ``"nonfinite"`` when the attempted solution contained NaN or Inf.
6. ``rhs_per_step`` (int): evaluations of N per attempted step (after ``start``).

The half-step propagators exp(L h/2) are cached per step length (the solver divides each
sampling interval into equal steps, so only a few distinct lengths occur).

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

from dataclasses import dataclass

import numpy as np

from .control import step_factor

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
    """Shared buffers and the cache of half-step propagators exp(L h / 2)."""

    adaptive = False
    order = 4
    embedded_order = 0
    rhs_per_step = 4

    def __init__(self, linear: np.ndarray, nonlinear, rtol: float, atol: float) -> None:
        self.linear = linear
        self.nonlinear = nonlinear
        self.rtol, self.atol = rtol, atol
        shape = linear.shape
        self.ui, self.k, self.acc, self.tmp, self.u4, self.nu, self.k5 = (
            np.empty(shape, complex) for _ in range(7)
        )
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
        self.nonlinear(u, self.nu)

    def _rk4(self, u: np.ndarray, h: float, d: np.ndarray) -> np.ndarray:
        """RK4IP step of Hult [1] from u with N(u) in self.nu; result in self.u4, k4 in self.k."""
        from . import kernels as kn

        ui, k, acc, tmp, u4, n = self.ui, self.k, self.acc, self.tmp, self.u4, self.nonlinear
        kn.start_stage(ui, acc, tmp, d, u, self.nu, 0.5 * h)  # u_I, k1, stage-2 input
        n(tmp, k)  # k2
        kn.middle_stage(tmp, ui, k, 0.5 * h, acc)
        n(tmp, k)  # k3
        kn.last_stage(tmp, ui, k, h, acc, d)
        n(tmp, k)  # k4
        kn.combine(u4, d, ui, acc, k, h * RK4_WEIGHTS[0])  # beta of [2] + h k4 / 6
        return u4


class RK4IP(_InteractionPicture):
    """Fixed-step RK4 in the interaction picture (Hult [1]); four N evaluations per step."""

    def step(self, state: StepState, h: float) -> tuple[bool, str]:
        u4 = self._rk4(state.u, h, self.half_propagator(h))
        state.h = h
        if not np.all(np.isfinite(u4)):
            return False, "nonfinite"
        state.u[...] = u4
        state.z += h
        self.nonlinear(state.u, self.nu)  # k1 of the next step
        return True, ""


class ERK43IP(_InteractionPicture):
    """Adaptive ERK4(3)-IP of Balac & Mahé [2]: RK4IP plus an FSAL embedded 3rd-order estimate.

    Four new N evaluations per attempt (k2, k3, k4 and k5 = N(u4), which is k1's N of the
    next step). The local error estimate is u4 - u3 = h (k4 - k5) / 10.
    """

    adaptive = True
    embedded_order = 3

    def step(self, state: StepState, h: float) -> tuple[bool, str]:
        from .kernels import scaled_rms

        u4 = self._rk4(state.u, h, self.half_propagator(h))
        k5 = self.k5
        self.nonlinear(u4, k5)
        # u4 - u3 = h [(1/6 - 2/30) k4 - (3/30) k5] = h (k4 - k5) 3/30; norm of control.py
        err = float(scaled_rms(self.k, k5, u4, state.u, h * ERK3_WEIGHTS[1], self.rtol, self.atol))
        state.h = h * step_factor(err, self.embedded_order)
        if not np.isfinite(err):
            return False, "nonfinite"
        if err > 1.0:
            return False, ""
        state.u[...] = u4
        state.z += h
        self.nu, self.k5 = k5, self.nu  # FSAL: N(u_new) is ready
        return True, ""


#: Stepper registry: key -> class (see the numbered list in the module docstring).
STEPPERS: dict[str, type[_InteractionPicture]] = {"erk43ip": ERK43IP, "rk4ip": RK4IP}
