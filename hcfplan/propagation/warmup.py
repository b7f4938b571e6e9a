"""Load the solver's compiled kernels and FFT library once, e.g. in a fork server.

Importing this module calls every numba kernel once on tiny arrays
(:func:`~.kernels.warm_kernels` and :func:`hcfplan.thz.kernels.warm_kernels`: loads the machine
code from numba's cache, or compiles it on a machine's first run), imports CoolProp (0.2 s; the
real-gas densities of every point need it) and pyFFTW when it is installed (without Dask, see
:func:`~.transforms.import_pyfftw`) and reads the FFTW wisdom of hcfplan's cache folder
(:mod:`hcfplan.numerics.fftw_wisdom`). The scan's local process pool lists this module in
``WORKER_PRELOAD`` (:mod:`hcfplan.planning.scan`), so the workers forked from the server start
with all of this done. Nothing here changes any result.
"""

from __future__ import annotations

from hcfplan.numerics.fft import fftw_available, import_pyfftw
from hcfplan.propagation import kernels
from hcfplan.thz import kernels as thz_kernels

kernels.warm_kernels()
thz_kernels.warm_kernels()
import CoolProp  # noqa: E402, F401 - imported for its start-up cost only

if fftw_available():
    from hcfplan.numerics.fftw_wisdom import load_wisdom

    load_wisdom(import_pyfftw())  # the plans measured by earlier runs, inherited by forked workers
