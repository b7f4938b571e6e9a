"""Load the solver's compiled kernels and FFT library once, e.g. in a fork server.

Importing this module calls every numba kernel of :mod:`.kernels` once on tiny arrays (which
loads the machine code from numba's cache, or compiles it on a machine's first run) and
imports pyFFTW when it is installed (its import takes about 0.9 s) and CoolProp (0.2 s, the
real-gas densities of every point need it). The scan's local process
pool lists it in ``WORKER_PRELOAD`` (:mod:`hcfplan.planning.scan`), so the workers forked
from the server start with all of this done. Nothing here changes any result.
"""

from __future__ import annotations

import numpy as np

from . import kernels
from .transforms import fftw_available


def warm_kernels() -> None:
    """Call every kernel once with 4-point arrays (loads or compiles the machine code)."""
    a, b, c, d, e, f, g, h = (np.ones(4, complex) for _ in range(8))
    real, zero = np.ones(4), np.zeros(4)
    kernels.stage_first(a, b, c, d, e, f, g, 0.1)
    kernels.stage_middle(a, b, c, d, e, 0.1)
    kernels.stage_last(a, b, c, d, e, 0.1, f)
    kernels.stage_combine(a, b, c, d, e, f, g, h, 0.1)
    kernels.difference_norm2(a, b, c)
    kernels.difference_scaled_rms(a, b, c, d, e, 0.1, 1e-6, 0.0)
    kernels.kerr_in_place(a)
    kernels.power_of(a, real)
    kernels.delayed_in_place(a, real, zero, 1.0)
    kernels.multiply_in_place(a, b)
    kernels.add_scaled_product(a, b, c, 0.5)
    table = (np.array([30.0, 31.0]), np.array([1.0, 2.0]), np.array([0, 2], dtype=np.int64),
             np.array([1.0]), np.array([1e25]), np.array([2.5e-18]))
    kernels.plasma_in_place(a, b, real, zero, 1.0, *table, 1.0, 1e-9, 1e-15, 1e-3)


warm_kernels()
import CoolProp  # noqa: E402, F401 - imported for its start-up cost only

if fftw_available():
    import pyfftw  # noqa: F401 - imported for its start-up cost only
