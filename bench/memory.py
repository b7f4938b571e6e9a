"""Peak memory of a 2^14-point propagation storing 200 z-samples (prints figures; not a test).

Target < 500 MB. tracemalloc counts the Python/numpy allocations made during the run (pyFFTW's
aligned buffers are numpy arrays and are counted); ru_maxrss is the whole process high-water
mark, including the interpreter, numpy/scipy/numba and the compiled kernels.

Run: PYTHONPATH=. python bench/memory.py
"""

from __future__ import annotations

import resource
import tracemalloc

import numpy as np

from hcfplan.constants import c
from hcfplan.fibers.taylor import TaylorFiber
from hcfplan.numerics.grid import Grid
from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate
from hcfplan.pulse.fields import pulse_field

OMEGA0 = 2 * np.pi * c / 835e-9


def main() -> None:
    grid = Grid(points=2**14, dt=1.5259e-15, omega0=OMEGA0)
    fiber = TaylorFiber(omega0=OMEGA0, betas=(-11.83e-27, 8.1e-41), gamma=0.11, length=0.02,
                        self_steepening=True, raman_fraction=0.18)
    field0 = pulse_field(grid, "sech2", 50e-15, 2 * 10e3 * 50e-15 / 1.7627)
    propagate(field0, grid,
              TaylorFiber(omega0=OMEGA0, betas=(-11.83e-27,), gamma=0.11, length=1e-4),
              options=SolverOptions(z_samples=2))  # load kernels, plans
    tracemalloc.start()
    result = propagate(field0, grid, fiber, options=SolverOptions(rtol=1e-6, z_samples=200))
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024  # kB on Linux
    stored = result.spectrum_z.nbytes / 2**20
    print(f"2^14 points, {result.z.size} z-samples ({result.status}, {result.n_steps} steps): "
          f"tracemalloc peak during the run {peak / 2**20:.1f} MB (spectra stored "
          f"{stored:.1f} MB), process max RSS {rss:.0f} MB (target < 500 MB)")


if __name__ == "__main__":
    main()
