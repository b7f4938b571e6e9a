"""Step-size control: the scaled error norm and the step-factor rule.

The error of an attempted step is the RMS over the spectral samples of
``|delta| / (atol + rtol * max(|u_old|, |u_new|))`` (``delta`` = difference of the embedded
solutions), so ``err <= 1`` means the local error meets the tolerance. The next step is
``h * clip(SAFETY * err**(-1/(q+1)), MIN_FACTOR, MAX_FACTOR)`` with q the order of the embedded
(lower-order) solution, the elementary controller of Hairer, Nørsett & Wanner [1].

References
----------
.. [1] E. Hairer, S. P. Nørsett and G. Wanner, *Solving Ordinary Differential Equations I*,
       2nd ed., Springer, 1993, sec. II.4 (automatic step size control). [from memory]
"""

from __future__ import annotations

import numpy as np

SAFETY = 0.9  # fraction of the error-optimal step that is actually proposed
MIN_FACTOR = 0.2  # strongest reduction of the step after one attempt
MAX_FACTOR = 2.0  # strongest growth of the step after one accepted attempt
MIN_STEP_FRACTION = 1e-9  # a step below this fraction of the fiber length counts as collapsed
FIRST_STEP_FRACTION = 1e-3  # first trial step as a fraction of the fiber length (no hint given)
MAX_STEPS = 200_000  # default budget of attempted steps per run


def error_norm(
    delta: np.ndarray, new: np.ndarray, old: np.ndarray, rtol: float, atol: float
) -> float:
    """RMS of delta scaled by atol + rtol * max(|old|, |new|) (module docstring). [1]"""
    scale = np.maximum(np.abs(new), np.abs(old))
    scale *= rtol
    scale += atol
    ratio = np.abs(delta)
    ratio /= scale
    return float(np.sqrt(np.mean(ratio * ratio)))


def step_factor(err: float, embedded_order: int) -> float:
    """Factor for the next step from the error norm (inf/nan -> MIN_FACTOR). [1]"""
    if not np.isfinite(err):
        return MIN_FACTOR
    if err == 0.0:
        return MAX_FACTOR
    factor = SAFETY * err ** (-1.0 / (embedded_order + 1))
    return float(min(MAX_FACTOR, max(MIN_FACTOR, factor)))
