"""Benchmark of the propagation solver (prints figures against the targets; not a test).

1. Overhead: wall time / (transforms done x time of one transform of that kind and size,
   measured in this run with the back end the solver used) for the Kerr + self-steepening
   supercontinuum case of Dudley et al. (Rev. Mod. Phys. 78, 1135 (2006), parameters from
   memory, Raman off so each N evaluation is exactly 2 complex FFTs) at N = 2^13 and 2^14.
   Every transform is counted (steps, rejected steps, records). Target <= 1.3. Both error
   norms of hcfplan.propagation.control: the default relative-L2 norm (fewer, longer steps)
   and the scaled-RMS norm (more steps; its kernel has a square root and a division per
   bin). The wall time is also given against scipy's FFT, for both back ends. The same ratio
   for an ionising gas case (argon-filled capillary, PPT photoionisation and plasma: 3 FFTs
   per N evaluation), the main job of the planner.
2. Adaptive vs fixed: attempts of ERK4(3)-IP against the steps of fixed-step RK4IP that reach
   the SAME final error (max-norm of the output spectrum against an rtol = 1e-11 reference,
   relative to its peak; fixed step count found by bisection), for both error norms of
   hcfplan.propagation.control, on four fiber cases whose stiffness changes along z by different
   amounts, and on the ionising gas case of item 1, at N = 2^13 and 2^14. Target: adaptive
   <= 20 % of fixed. Beside it, an estimate of the ratio an ideal local controller would get
   from the step-length profile of the adaptive run (:func:`distribution_bound`).
3. JIT: time to compile the numba kernels (fresh cache directory) and to load them from the
   cache.

Run: PYTHONPATH=. python bench/solver.py [adaptive]   (``adaptive``: item 2 only)
"""

from __future__ import annotations

import math
import os
import subprocess
import sys
import tempfile
import time
import timeit
import warnings

import numpy as np
from scipy import fft as sfft

from hcfplan.constants import c
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.numerics.fft import FFT_BACKENDS, fftw_available
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

BETAS_PS_KM = (-11.830, 8.1038e-2, -9.5205e-5, 2.0737e-7, -5.3943e-10, 1.3486e-12,
               -2.5495e-15, 3.0524e-18, -1.7140e-21)
OMEGA0 = 2 * np.pi * c / 835e-9


def _time(fn, number: int = 200) -> float:
    return min(timeit.repeat(fn, number=number, repeat=7)) / number


def transform_times(backend: str, points: int) -> dict[str, float]:
    """Time of one transform of each kind with the back end's own buffers. [s]"""
    fft = FFT_BACKENDS[backend](points)
    fft.spectrum_in[:] = np.random.default_rng(1).standard_normal(points)
    out = fft.empty() if hasattr(fft, "empty") else np.empty(points, complex)
    a = fft.forward()

    def backward():
        fft.backward(a, out)

    return {"c2c": 0.5 * (_time(fft.forward) + _time(backward)),
            "r2c": _time(fft.real_forward), "c2r": _time(lambda: fft.real_backward(
                fft.real_forward()))}


def _scipy_fft_time(points: int) -> float:
    x = np.random.default_rng(1).standard_normal(points) + 0j
    return _time(lambda: sfft.fft(x))


def _kerr_case(points: int):
    betas = [b * 1e-12 ** (k + 2) / 1e3 for k, b in enumerate(BETAS_PS_KM)]
    grid = Grid(points=points, dt=1.5259e-15, omega0=OMEGA0)
    fiber = TaylorFiber(omega0=OMEGA0, betas=betas, gamma=0.11, length=0.15,
                        self_steepening=True, raman_fraction=0.0)
    return grid, pulse_field(grid, "sech2", 50e-15, 2 * 10e3 * 50e-15 / 1.7627), fiber, betas


def kernel_time(points: int, backend: str, norm: str) -> float:
    """Time of the compiled kernels of one ERK4(3)-IP attempt of the Kerr case, each called
    alone with warm caches on the arrays of a run 300 steps in (the four stage kernels, the
    error norm and four Kerr passes; no FFT, no Python between them). [s]

    (FFTs x one FFT + attempts x this) / (FFTs x one FFT) is the ratio the same arithmetic
    would reach with no Python and no cache misses between the kernels: the floor of this
    algorithm on this machine."""
    from scipy import fft as sfft

    from hcfplan.propagation import kernels as kn
    from hcfplan.propagation.operators import (
        NonlinearTerms,
        kerr_coefficient_spectrum,
        linear_terms,
    )
    from hcfplan.propagation.steppers import ERK43IP, StepState

    grid, field0, fiber, _ = _kerr_case(points)
    lin = linear_terms(grid, fiber, fiber.length)
    nl = NonlinearTerms(grid, kerr_coefficient_spectrum(grid, fiber, lin.valid), 1.0, None,
                        backend=backend)
    stepper = ERK43IP(lin.operator, nl, 1e-5, 0.0, norm)
    h = fiber.length / 2500
    state = StepState(sfft.ifft(field0) * nl.scale, 0.0, h)
    stepper.start(state.u)
    for _ in range(300):
        stepper.step(state, h)
    st, x, g, d = stepper, nl.input, nl.gain, stepper.half_propagator(h)
    calls = [lambda: kn.stage_first(st.ui, st.acc, x, d, state.u, g, st.nu, 0.5 * h),
             lambda: kn.stage_middle(x, st.acc, st.ui, g, st.r, 0.5 * h),
             lambda: kn.stage_last(x, st.acc, st.ui, g, st.r, h, d),
             lambda: kn.stage_combine(st.u4, x, d, st.ui, st.acc, g, st.r, h / 6),
             (lambda: kn.difference_norm2(g, st.r, st.r5)) if norm == "relative_l2" else
             (lambda: kn.difference_scaled_rms(g, st.r, st.r5, st.u4, state.u, h / 10, 1e-5,
                                               0.0))]
    work = nl.new_work()
    work[...] = x
    kerr = _time(lambda: kn.kerr_in_place(work))
    return sum(_time(call) for call in calls) + 4 * kerr


def overhead(points: int, backend: str, norm: str = "relative_l2") -> None:
    grid, field0, fiber, betas = _kerr_case(points)
    propagate(field0, grid, TaylorFiber(omega0=OMEGA0, betas=betas, gamma=0.11, length=1e-3),
              options=SolverOptions(z_samples=2, fft_backend=backend))  # warm-up (JIT, plans)
    start = time.perf_counter()
    options = SolverOptions(rtol=1e-5, z_samples=100, fft_backend=backend, error_norm=norm)
    result = propagate(field0, grid, fiber, options=options)
    wall = time.perf_counter() - start
    t = transform_times(backend, points)
    ffts = 2 * result.n_rhs_evals + result.z.size  # N evaluations + one per record
    floor = ffts * t["c2c"]
    t_scipy = _scipy_fft_time(points)
    key = f"2^{int(math.log2(points))}"
    print(f"[{backend}, {norm}] N = {key}: wall {wall:.2f} s, "
          f"steps {result.n_steps} (+{result.n_rejected} rejected), FFTs {ffts}, one FFT "
          f"{t['c2c'] * 1e6:.1f} us ({backend}) / {t_scipy * 1e6:.1f} us (scipy); ratio "
          f"wall/(FFTs x t_FFT) = {wall / floor:.2f} (target <= 1.3); "
          f"wall/(FFTs x t_FFT,scipy) = {wall / (ffts * t_scipy):.2f}; per step "
          f"{wall / (result.n_steps + result.n_rejected) * 1e3:.2f} ms; {result.status}")
    attempts = result.n_steps + result.n_rejected
    kernels = kernel_time(points, backend, norm)
    print(f"    floor of the algorithm: the compiled kernels of one attempt alone, warm, "
          f"{kernels * 1e6:.1f} us, against {8 * t['c2c'] * 1e6:.1f} us for its 8 FFTs; "
          f"(FFTs x t_FFT + attempts x kernels) / (FFTs x t_FFT) = "
          f"{(floor + attempts * kernels) / floor:.2f}")


def _ionising_gas_case(points: int):
    """Ti:sapphire pulse (30 fs, 0.3 mJ, 800 nm) in a 125 um-radius capillary with 1 bar of
    argon (Marcatili dispersion and loss, PPT photoionisation and plasma: each N evaluation is
    3 complex FFTs). An invented planning case, about 1 % ionisation at the end."""
    from hcfplan.fibers.capillary import CapillaryFiber
    from hcfplan.materials.gases import GasFill, gas_medium

    omega0 = 2 * np.pi * c / 800e-9
    gas = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    fiber = CapillaryFiber(core_radius=125e-6, length=0.5, gas=gas)
    grid = Grid(points=points, dt=1.6e-15, omega0=omega0)
    return grid, pulse_field(grid, "sech2", 30e-15, 0.3e-3), fiber, gas


def overhead_gas(points: int, backend: str) -> None:
    grid, field0, fiber, gas = _ionising_gas_case(points)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # fits used beyond their range at the window edges
        # warm-up (JIT load, FFT plans, rate table)
        propagate(field0, grid, fiber, gas=gas,
                  options=SolverOptions(z_samples=2, fft_backend=backend, max_steps=20))
        start = time.perf_counter()
        result = propagate(field0, grid, fiber, gas=gas,
                           options=SolverOptions(rtol=1e-6, z_samples=100, fft_backend=backend))
        wall = time.perf_counter() - start
    t = transform_times(backend, points)
    ffts = 3 * result.n_rhs_evals + result.z.size
    key = f"2^{int(math.log2(points))}"
    print(f"[{backend}] ionising gas, N = {key}: wall {wall:.2f} s, steps {result.n_steps} "
          f"(+{result.n_rejected} rejected), FFTs {ffts}, final ionisation "
          f"{result.ionization_fraction_z.max():.2e}; ratio wall/(FFTs x t_FFT) = "
          f"{wall / (ffts * t['c2c']):.2f} (target <= 1.3); {result.status}")


def _fission_case(points: int = 2**13):
    """N = 4 soliton, self-steepening, Raman and beta3 over one soliton period (fission)."""
    grid = Grid(points=points, dt=1.5e-15, omega0=OMEGA0)
    t0 = 28.4e-15
    beta2, beta3 = -11.83e-27, 8.1e-41
    p1 = abs(beta2) / (0.11 * t0**2)
    length = 0.5 * math.pi * t0**2 / abs(beta2)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(beta2, beta3), gamma=0.11, length=length,
                        self_steepening=True, raman_fraction=0.18)
    return grid, pulse_field(grid, "sech2", 50e-15, 16 * 2 * p1 * t0), fiber


def _wave_breaking_case(points: int = 2**13):
    """N = 15 Gaussian in normal dispersion over 3 L_D: the peak power falls as it spreads. The
    time window is 32.8 ps at every N (at 16.4 ps, 3 % of the energy reached its edges)."""
    t0 = 100e-15
    grid = Grid(points=points, dt=32.768e-12 / points, omega0=OMEGA0)
    beta2 = 20e-27
    p0 = 225 * beta2 / (0.11 * t0**2)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(beta2,), gamma=0.11, length=3 * t0**2 / beta2,
                        self_steepening=False)
    return grid, pulse_field(grid, "gaussian", 1.6651 * t0, math.sqrt(math.pi) * p0 * t0), fiber


def _chirped_compression_case(points: int = 2**13):
    """Pre-chirped N = 4 soliton (stretched ~10x by positive GDD) in anomalous dispersion: it
    compresses linearly over ~0.9 of the length (weak nonlinearity, long steps), then self-
    compresses and fissions (short steps), the stiffness changing by orders of magnitude."""
    grid = Grid(points=points, dt=1.5e-15, omega0=OMEGA0)
    t0, beta2, beta3 = 28.4e-15, -11.83e-27, 8.1e-41
    p1 = abs(beta2) / (0.11 * t0**2)
    gdd = 10 * t0**2  # stretch factor sqrt(1 + (gdd/t0^2)^2) ~ 10
    length = 1.1 * gdd / abs(beta2)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(beta2, beta3), gamma=0.11, length=length,
                        self_steepening=True, raman_fraction=0.18)
    return grid, pulse_field(grid, "sech2", 50e-15, 16 * 2 * p1 * t0, gdd=gdd), fiber


def _lossy_fission_case(points: int = 2**13):
    """The fission case over five times the length in a lossy fiber (power down 30 dB over the
    first fifth): an intense stage, then a long weakly nonlinear stretch (a delivery fiber)."""
    grid, field0, fiber = _fission_case(points)
    first = fiber.length
    lossy = TaylorFiber(omega0=OMEGA0, betas=fiber.betas, gamma=fiber.gamma, length=5 * first,
                        loss=math.log(1e3) / (2 * first), self_steepening=True,
                        raman_fraction=fiber.raman_fraction)
    return grid, field0, lossy


def _error(result, reference) -> float:
    return float(np.max(np.abs(result.field_out_spectrum - reference))
                 / np.max(np.abs(reference)))


def _run_case(case, progress=None, **options):
    """propagate() on a case (grid, field0, fiber[, gas]) with two records, the given
    :class:`SolverOptions` fields and an optional progress callback; the gas cases ignore
    fit-range warnings (window edges)."""
    grid, field0, fiber, *gas = case
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return propagate(field0, grid, fiber, gas=gas[0] if gas else None,
                         options=SolverOptions(z_samples=2, **options), progress=progress)


def _fixed_error(case, n: int, reference) -> float:
    return _error(_run_case(case, stepper="rk4ip", step=case[2].length / n), reference)


def fixed_steps_for(case, target: float, reference, start: int) -> tuple[int, float]:
    """Smallest fixed step count whose final error is <= target (bisection)."""
    lo, hi = max(1, start // 4), max(2, start)
    while _fixed_error(case, hi, reference) > target:
        lo, hi = hi, 2 * hi
    while hi - lo > max(1, hi // 100):
        mid = (lo + hi) // 2
        lo, hi = (lo, mid) if _fixed_error(case, mid, reference) <= target else (mid, hi)
    return hi, _fixed_error(case, hi, reference)


def distribution_bound(z: np.ndarray) -> float:
    """Estimate of the steps an ideal local controller needs, over uniform steps at equal final
    error, from the step-length profile h(z) of an adaptive run (accepted steps ending at z).

    With local errors c(z) h^5 that add up without growth (global order 4), uniform steps give
    E = h^4 int c dz and the best distribution, h ~ c^(-1/5), needs (int c^(1/5) dz)^(5/4) /
    E^(1/4) steps. Taking c ~ h^-5 from the adaptive run (equal error per step), the ratio is
    (N / L)^(5/4) / (sum_i h_i^-4 / L)^(1/4): 1 for constant steps, f when the steps must be
    short on a fraction f of the length only. It shows what the variation of the step length
    along a case allows when errors simply add; where errors made early grow later (soliton
    fission), the real ratio is worse. An estimate, not a strict bound (c is inferred from the
    controller's own steps). Analytic, the standard step-size optimisation argument (common
    practice, no source).
    """
    h = np.diff(np.concatenate(([0.0], np.asarray(z, float))))
    h = h[h > 0]
    length, n = float(h.sum()), h.size
    return float((n / length) ** 1.25 / (np.sum(h**-4.0) / length) ** 0.25)


def adaptive_vs_fixed(name: str, case, rtols: dict[str, float]) -> None:
    reference = _run_case(case, rtol=1e-11, error_norm="scaled_rms").field_out_spectrum
    for norm, rtol in rtols.items():
        ends: list[float] = []
        adaptive = _run_case(case, rtol=rtol, error_norm=norm,
                             progress=lambda z, _length, _n, ends=ends: ends.append(z))
        target = _error(adaptive, reference)
        attempts = adaptive.n_steps + adaptive.n_rejected
        n, err = fixed_steps_for(case, target, reference, attempts)
        print(f"{name}, N = 2^{int(math.log2(case[0].points))} [{norm}, rtol {rtol:g}]: adaptive "
              f"{adaptive.n_steps} steps (+{adaptive.n_rejected} rejected), error {target:.2e}; "
              f"fixed RK4IP at the same error: {n} steps (error {err:.2e}); adaptive attempts / "
              f"fixed steps = {attempts / n:.1%} (target <= 20 %); estimate for an ideal "
              f"local controller from the step-length profile: {distribution_bound(ends):.0%}")


_JIT_SNIPPET = """
import time
t = time.perf_counter()
from hcfplan.propagation import kernels
kernels.warm_kernels()
print(time.perf_counter() - t)
"""


def jit_cost() -> None:
    with tempfile.TemporaryDirectory() as cache:
        env = dict(os.environ, NUMBA_CACHE_DIR=cache)
        times = [float(subprocess.run([sys.executable, "-c", _JIT_SNIPPET], env=env, check=True,
                                      capture_output=True, text=True).stdout) for _ in range(2)]
    print(f"numba kernels: first run (compile) {times[0]:.2f} s, second run (load from cache) "
          f"{times[1]:.2f} s, both including 'import numba'")


if __name__ == "__main__":
    if sys.argv[1:] != ["adaptive"]:
        jit_cost()
        backends = ["fftw", "scipy"] if fftw_available() else ["scipy"]
        for backend in backends:
            for points in (2**13, 2**14):
                for norm in ("relative_l2", "scaled_rms"):  # the default norm first
                    overhead(points, backend, norm)
                overhead_gas(points, backend)
    tolerances = {"scaled_rms": 1e-6, "relative_l2": 1e-7}
    for points in (2**13, 2**14):
        adaptive_vs_fixed("soliton fission", _fission_case(points), tolerances)
        adaptive_vs_fixed("wave breaking", _wave_breaking_case(points), tolerances)
        adaptive_vs_fixed("chirped self-compression", _chirped_compression_case(points),
                          tolerances)
        adaptive_vs_fixed("fission then lossy stretch", _lossy_fission_case(points), tolerances)
        adaptive_vs_fixed("ionising gas", _ionising_gas_case(points), tolerances)
