"""Load the solver's and the THz model's compiled kernels and the FFT library once, in a fork
server.

Importing this module calls every numba kernel once on tiny arrays
(:func:`hcfplan.propagation.kernels.warm_kernels`,
:func:`hcfplan.pulse.bandlimited_compiled.warm_kernels` and
:func:`hcfplan.thz.kernels.warm_kernels`: loads the machine code from numba's cache, or compiles
it on a machine's first run), so numba is loaded in the workers: they run the compiled kernels
(their kernel policy is the library's default, ``"numba"``, unless ``HCFPLAN_KERNELS`` says
otherwise, and ``"auto"`` takes the compiled kernels where numba is loaded;
:mod:`hcfplan.numerics.kernel_choice`). It also imports CoolProp (0.2 s; the real-gas densities
of every point need it) and pyFFTW when it is installed
(without Dask, see :func:`hcfplan.numerics.fft.import_pyfftw`) and reads the FFTW wisdom of
hcfplan's cache folder (:mod:`hcfplan.numerics.fftw_wisdom`). The scan's local process pool
lists this module last in :data:`hcfplan.planning.scan.pool.WORKER_PRELOAD`, so the workers
forked from the server start with all of this done. Nothing here changes any result. It sits
in the scan package, above both physics layers it warms, so that neither of them imports the
other for it; the package's ``__init__`` does not import it (an import warms the kernels).
"""

from __future__ import annotations

from hcfplan.numerics.fft import fftw_available, import_pyfftw
from hcfplan.propagation import kernels
from hcfplan.pulse import bandlimited_compiled
from hcfplan.thz import kernels as thz_kernels

kernels.warm_kernels()
bandlimited_compiled.warm_kernels()
thz_kernels.warm_kernels()
import CoolProp  # noqa: E402, F401 - imported for its start-up cost only

if fftw_available():
    from hcfplan.numerics.fftw_wisdom import load_wisdom

    load_wisdom(import_pyfftw())  # the plans measured by earlier runs, inherited by forked workers
