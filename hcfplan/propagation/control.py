"""Step-size control: the error norms of a step and the step-factor rule.

Error norm (which and why)
--------------------------
``delta`` is the difference of the embedded solutions of a step (an estimate of its local
error), ``old``/``new`` the spectra before and after it. Two norms, in :data:`ERROR_NORMS`:

* ``"relative_l2"`` (the default):
  ``err = ||delta||_2 / (rtol * max(||old||_2, ||new||_2) + atol * sqrt(n))``,
  i.e. the local error relative to the whole field (an energy-weighted measure: by Parseval
  ``||delta||^2 / ||u||^2`` is the energy of the error over the pulse energy, in the time domain
  as well). ``atol`` is an absolute floor on the RMS of delta per bin (default 0).
* ``"scaled_rms"``: the RMS over the bins of ``|delta| / (atol + rtol * max(|old|, |new|))``
  (the usual norm of ODE codes, Hairer et al. [1]).

Why the default is the relative L2 norm: a pulse spectrum occupies a small part of the
frequency window, and the per-bin norm gives the empty bins (where ``|delta|`` is far below
``atol``) the same weight as the occupied ones, so the RMS is diluted by the empty bins, while
the bins in the far wings (where ``atol`` dominates) weigh in with their *absolute* error. The
result depended on the window and on ``atol``; on the benchmark cases (``bench/solver.py``) it
gave final max-norm errors 100-1000 rtol. The relative L2 norm ties the local error to the field
as a whole, independent of the window size and of an ``atol`` choice; the benchmark prints the
steps both norms need for the same final error.

``err <= 1`` means the step meets the tolerance. The next step is
``h * clip(SAFETY * err**(-1/(q+1)), MIN_FACTOR, MAX_FACTOR)`` with q the order of the embedded
(lower-order) solution, the elementary controller of [1].

References
----------
.. [1] E. Hairer, S. P. Nørsett and G. Wanner, *Solving Ordinary Differential Equations I*,
       2nd ed., Springer, 1993, sec. II.4 (automatic step size control). [from memory]
"""

from __future__ import annotations

import math
from collections.abc import Callable
from typing import Literal

import numpy as np

SAFETY = 0.9  # fraction of the error-optimal step that is actually proposed
MIN_FACTOR = 0.2  # strongest reduction of the step after one attempt
MAX_FACTOR = 2.0  # strongest growth of the step after one accepted attempt
MIN_STEP_FRACTION = 1e-9  # a step below this fraction of the fiber length counts as collapsed
FIRST_STEP_FRACTION = 1e-3  # first trial step as a fraction of the fiber length (no hint given)
MAX_STEPS = 200_000  # default budget of attempted steps per run

ErrorNormName = Literal["relative_l2", "scaled_rms"]


def relative_l2_norm(
    delta: np.ndarray, new: np.ndarray, old: np.ndarray, rtol: float, atol: float
) -> float:
    """||delta|| / (rtol max(||old||, ||new||) + atol sqrt(n)) (module docstring). [1]

    References
    ----------
    none: numerical helper (the norm chosen here, module docstring)
    """
    big = max(float(np.linalg.norm(new)), float(np.linalg.norm(old)))
    return float(np.linalg.norm(delta) / (rtol * big + atol * np.sqrt(delta.size)))


def scaled_rms_norm(
    delta: np.ndarray, new: np.ndarray, old: np.ndarray, rtol: float, atol: float
) -> float:
    """RMS of delta scaled by atol + rtol * max(|old|, |new|) (module docstring). [1]

    References
    ----------
    The usual norm of ODE codes: E. Hairer, S. P. Nørsett and G. Wanner, Solving Ordinary
    Differential Equations I, 2nd ed., Springer (1993), sec. II.4 [from memory].
    """
    scale = np.maximum(np.abs(new), np.abs(old))
    scale *= rtol
    scale += atol
    ratio = np.abs(delta)
    ratio /= scale
    return float(np.sqrt(np.mean(ratio * ratio)))


#: Error-norm registry: key -> reference implementation (the steppers use fused kernels that
#: compute the same numbers, checked in tests/propagation/test_propagation_solver.py).
ERROR_NORMS: dict[str, Callable[..., float]] = {
    "relative_l2": relative_l2_norm,
    "scaled_rms": scaled_rms_norm,
}


def step_factor(err: float, embedded_order: int) -> float:
    """Factor for the next step from the error norm (inf/nan -> MIN_FACTOR). [1]

    References
    ----------
    The elementary controller of E. Hairer, S. P. Nørsett and G. Wanner, Solving Ordinary
    Differential Equations I, 2nd ed., Springer (1993), sec. II.4 [from memory].
    """
    if not math.isfinite(err):  # (math: a Python float per step, 10x cheaper than numpy's)
        return MIN_FACTOR
    if err == 0.0:
        return MAX_FACTOR
    factor = SAFETY * err ** (-1.0 / (embedded_order + 1))
    return float(min(MAX_FACTOR, max(MIN_FACTOR, factor)))
