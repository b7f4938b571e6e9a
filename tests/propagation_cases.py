"""Shared set-ups of the propagation tests (textbook NLSE cases on small grids)."""

from __future__ import annotations

import numpy as np

from hcfplan.constants import c
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.numerics.grid import Grid
from hcfplan.pulse.fields import pulse_field, shape_t0_factor

#: Carrier for the textbook cases: 1550 nm (only sets the self-steepening scale). [rad/s]
OMEGA0 = 2 * np.pi * c / 1.55e-6
#: Textbook pulse parameter T0 (1 ps keeps the frequency window far from zero). [s]
T0 = 1e-12
BETA2 = -20e-27  # anomalous, -20 ps^2/km [s^2/m]
GAMMA = 1.3e-3  # [1/(W m)]
L_D = T0**2 / abs(BETA2)  # dispersion length [m]
Z0 = 0.5 * np.pi * L_D  # soliton period (Agrawal, Nonlinear Fiber Optics, ch. 5)


def textbook_grid(points: int = 2**10, window_t0: float = 40.0) -> Grid:
    return Grid(points=points, dt=window_t0 * T0 / points, omega0=OMEGA0)


def soliton(grid: Grid, order: float) -> np.ndarray:
    """A(0, t) = N sqrt(P1) sech(t/T0) with P1 = |beta2|/(gamma T0^2) (Agrawal eq. 5.2.x)."""
    p1 = abs(BETA2) / (GAMMA * T0**2)
    return pulse_field(grid, "sech2", T0 * shape_t0_factor("sech2"), order**2 * 2 * p1 * T0)


def taylor(length: float, betas=(BETA2,), gamma=GAMMA, **kw) -> TaylorFiber:
    kw.setdefault("self_steepening", False)
    return TaylorFiber(omega0=OMEGA0, betas=betas, gamma=gamma, length=length, **kw)


def max_intensity_error(a: np.ndarray, b: np.ndarray) -> float:
    """max | |a|^2 - |b|^2 | / max |b|^2."""
    return float(np.max(np.abs(np.abs(a) ** 2 - np.abs(b) ** 2)) / np.max(np.abs(b) ** 2))
