"""Benchmark of the propagation solver (prints figures; not a test).

1. Overhead: wall time / (FFTs done x time of one FFT of that size, measured in this run) for
   the Kerr + self-steepening supercontinuum case of Dudley et al. (Rev. Mod. Phys. 78, 1135
   (2006), parameters from memory, Raman off so each N evaluation is exactly 2 complex FFTs)
   at N = 2^13 and 2^14. Target <= 1.3.
2. Adaptive vs fixed: steps of ERK4(3)-IP and of fixed-step RK4IP at equal final error for an
   N = 4 soliton with self-steepening, Raman and third-order dispersion (fission). Target:
   adaptive <= 20 % of fixed.

Run: PYTHONPATH=. python bench/solver.py
"""

from __future__ import annotations

import math
import time
import timeit

import numpy as np
from scipy import fft as sfft

from hcfplan.constants import c
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.grid import Grid
from hcfplan.propagation.solve import propagate
from hcfplan.pulse import pulse_field

BETAS_PS_KM = (-11.830, 8.1038e-2, -9.5205e-5, 2.0737e-7, -5.3943e-10, 1.3486e-12,
               -2.5495e-15, 3.0524e-18, -1.7140e-21)
OMEGA0 = 2 * np.pi * c / 835e-9


def _fft_time(n: int) -> float:
    x = np.random.default_rng(1).standard_normal(n) + 0j
    return min(timeit.repeat(lambda: sfft.fft(x), number=200, repeat=7)) / 200


def overhead(points: int) -> None:
    betas = [b * 1e-12 ** (k + 2) / 1e3 for k, b in enumerate(BETAS_PS_KM)]
    grid = Grid(points=points, dt=1.5259e-15, omega0=OMEGA0)
    fiber = TaylorFiber(omega0=OMEGA0, betas=betas, gamma=0.11, length=0.15,
                        self_steepening=True, raman_fraction=0.0)
    field0 = pulse_field(grid, "sech2", 50e-15, 2 * 10e3 * 50e-15 / 1.7627)
    propagate(field0, grid, TaylorFiber(omega0=OMEGA0, betas=betas, gamma=0.11, length=1e-3),
              z_samples=2)  # warm-up
    start = time.perf_counter()
    result = propagate(field0, grid, fiber, rtol=1e-5, z_samples=100)
    wall = time.perf_counter() - start
    t_fft = _fft_time(points)
    ffts = 2 * result.n_rhs_evals
    print(f"N = 2^{int(math.log2(points))}: wall {wall:.2f} s, steps {result.n_steps} "
          f"(+{result.n_rejected} rejected), N-evals {result.n_rhs_evals}, one FFT "
          f"{t_fft * 1e6:.1f} us, ratio wall/(FFTs x t_FFT) = {wall / (ffts * t_fft):.2f}, "
          f"per step {wall / (result.n_steps + result.n_rejected) * 1e3:.2f} ms, "
          f"{result.status}")


def _fission_case():
    """N = 4 soliton, self-steepening, Raman and beta3 over one soliton period (fission)."""
    grid = Grid(points=2**12, dt=1.5e-15, omega0=OMEGA0)
    t0 = 28.4e-15
    beta2, beta3 = -11.83e-27, 8.1e-41
    p1 = abs(beta2) / (0.11 * t0**2)
    length = 0.5 * math.pi * t0**2 / abs(beta2)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(beta2, beta3), gamma=0.11, length=length,
                        self_steepening=True, raman_fraction=0.18)
    return grid, pulse_field(grid, "sech2", 50e-15, 16 * 2 * p1 * t0), fiber


def _wave_breaking_case():
    """N = 15 Gaussian in normal dispersion over 3 L_D: the peak power falls as it spreads."""
    t0 = 100e-15
    grid = Grid(points=2**12, dt=2.0e-15, omega0=OMEGA0)
    beta2 = 20e-27
    p0 = 225 * beta2 / (0.11 * t0**2)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(beta2,), gamma=0.11, length=3 * t0**2 / beta2,
                        self_steepening=False)
    return grid, pulse_field(grid, "gaussian", 1.6651 * t0, math.sqrt(math.pi) * p0 * t0), fiber


def _error(result, reference) -> float:
    return float(np.max(np.abs(result.field_out_spectrum - reference))
                 / np.max(np.abs(reference)))


def adaptive_vs_fixed(name: str, case, rtol: float = 1e-6) -> None:
    grid, field0, fiber = case
    reference = propagate(field0, grid, fiber, rtol=1e-11, z_samples=2).field_out_spectrum
    adaptive = propagate(field0, grid, fiber, rtol=rtol, z_samples=2)
    target = _error(adaptive, reference)
    n = max(2, adaptive.n_steps // 2)
    for _ in range(30):  # smallest fixed step count (in 15 % increments) reaching the error
        err = _error(propagate(field0, grid, fiber, stepper="rk4ip", step=fiber.length / n,
                               z_samples=2), reference)
        if err <= target:
            break
        n = int(math.ceil(n * 1.15))
    attempts = adaptive.n_steps + adaptive.n_rejected
    print(f"{name}: adaptive (rtol {rtol:g}) {adaptive.n_steps} steps (+{adaptive.n_rejected} "
          f"rejected), error {target:.2e}; fixed RK4IP at <= that error: {n} steps (error "
          f"{err:.2e}); adaptive attempts / fixed steps = {attempts / n:.1%}")


if __name__ == "__main__":
    for points in (2**13, 2**14):
        overhead(points)
    adaptive_vs_fixed("soliton fission", _fission_case())
    adaptive_vs_fixed("wave breaking", _wave_breaking_case())
