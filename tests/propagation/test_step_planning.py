"""How the solver divides the intervals between its records into steps
(hcfplan.propagation.solve._next_step; module docstring of hcfplan.propagation.solve).

Contract tests of a numerical rule (no external source): an adaptive stepper may take up to
STEP_OVERSHOOT times its proposal to reach the next record in fewer equal steps, a fixed step is
never lengthened, and the steps of an interval always end on its record.
"""

import math

import numpy as np
import pytest

from hcfplan.propagation import solve
from hcfplan.propagation.steppers import StepState


def _steps_to(target: float, proposal: float, overshoot: float) -> list[float]:
    state = StepState(u=np.zeros(1, complex), z=0.0, h=proposal)
    steps, current = [], None
    while target - state.z > 1e-12:
        current = solve._next_step(state, target, current, overshoot)
        steps.append(current)
        state.z += current
    return steps


def test_a_record_just_beyond_the_proposal_takes_one_longer_step():
    assert _steps_to(1.05, 1.0, solve.STEP_OVERSHOOT) == pytest.approx([1.05])
    assert _steps_to(1.05, 1.0, 1.0) == pytest.approx([0.525, 0.525])  # without the overshoot


@pytest.mark.parametrize("interval", [0.3, 1.0, 1.09, 1.2, 2.5, 7.7])
def test_equal_steps_no_longer_than_the_allowed_overshoot(interval):
    steps = _steps_to(interval, 1.0, solve.STEP_OVERSHOOT)
    assert sum(steps) == pytest.approx(interval)
    assert max(steps) <= solve.STEP_OVERSHOOT * 1.0 * (1 + 1e-12)
    assert np.ptp(steps) <= 1e-12 * interval
    assert len(steps) == max(1, math.ceil(interval / solve.STEP_OVERSHOOT - 1e-12))


def test_a_fixed_step_is_not_lengthened():
    # a fixed-step run (RK4IP with options.step) never takes a step longer than the given one:
    # a length of 2.05 steps takes 3 steps, where the overshoot would have taken 2
    from propagation_cases import Z0, soliton, taylor, textbook_grid

    from hcfplan.propagation.options import SolverOptions

    grid = textbook_grid()
    fiber = taylor(0.05 * Z0)
    options = SolverOptions(stepper="rk4ip", step=fiber.length / 2.05, z_samples=2)
    result = solve.propagate(soliton(grid, 1.0), grid, fiber, options=options)
    assert result.n_steps == 3
