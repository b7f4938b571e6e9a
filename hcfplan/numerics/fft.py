"""FFT back ends of the solver: preallocated buffers and unnormalised transforms.

What a back end provides (the nonlinear terms in :mod:`.operators` rely on these):

1. ``spectrum_in`` (complex, N): the array the caller fills with a spectrum (FFT order).
2. ``forward() -> ndarray``: the unnormalised FFT of ``spectrum_in`` (= N dt A(t), grid
   convention 2 of :mod:`hcfplan.numerics.grid`), written into the back end's time buffer and
   returned; the caller may change that buffer in place.
3. ``backward(source, out)``: the unnormalised inverse FFT (no 1/N) of ``source`` (the time
   buffer or an array from :func:`work_array`) into ``out``; ``source`` may be destroyed.
4. ``real_in`` (float, N), ``real_forward() -> half`` and ``real_backward(half) -> ndarray``:
   unnormalised real FFT pair of length N (for the delayed response); ``half`` is the array
   ``real_forward`` returned, changed in place by the caller.
5. ``transforms`` (dict): count of each kind of transform done, for the benchmark.
6. ``name`` (str): its key in :data:`FFT_BACKENDS`.

Three back ends, in :data:`FFT_BACKENDS`: ``"fftw"`` (pyFFTW, an optional speed-up: about
twice as fast as scipy's pocketfft at N = 2^13 on our 2-core test machine, see
``bench/solver.py``, and without the ~10-20 us of Python overhead per call), ``"scipy"``
(scipy.fft, always available) and ``"numpy"`` (numpy.fft: the slowest per transform, but it
imports nothing). :func:`default_backend` picks pyFFTW when it is installed, except for the
small problems of a one-shot command (below).

Importing pyFFTW imports its scipy interfaces, and with them scipy.fft and scipy.special
(0.13-0.37 s of a command's start-up, measured with ``python -X importtime``); planning, even
from wisdom, adds 10-40 ms. Where the kernel policy runs a problem on the numpy twins
(:func:`hcfplan.numerics.kernel_choice.compiled` under ``"auto"``: a small grid in one of the
first runs of a command), the transforms are numpy's too: at the demo's 2048 points a numpy
transform takes about 8 us more than FFTW's, some 20 ms over the whole chain, against the
import and planning saved.

References
----------
.. [1] M. Frigo and S. G. Johnson, "The design and implementation of FFTW3," Proc. IEEE,
       vol. 93, no. 2, pp. 216-231, 2005, doi:10.1109/JPROC.2004.840301.
.. [2] FFTW 3 manual, sec. 4.3.2 "Planner Flags": with FFTW_MEASURE and stronger flags "the
       input/output arrays are overwritten during planning" unless wisdom is available.
       [from memory]
"""

from __future__ import annotations

import importlib.util
import sys
import threading

import numpy as np

from hcfplan.numerics.kernel_choice import compiled, policy

#: Grids of at least this many points get a measured FFTW plan (else an estimated one).
FFTW_MEASURE_POINTS = 4096
#: Time limit of one FFTW planning call [s]: a guard, not a budget. Measuring takes 0.4 s at
#: N = 8192 and 0.7 s at 16384 on our 2-core test machine, once per machine (the wisdom is kept,
#: :mod:`hcfplan.numerics.fftw_wisdom`). The earlier limit of 0.5 s cut the measurement short at
#: 16384 and left a plan that took 163 us per transform instead of 123 us.
FFTW_PLANNING_LIMIT = 10.0


class _PocketTransforms:
    """The pocketfft back ends (scipy.fft and numpy.fft): each transform returns a new array that
    is reused. ``fft`` is the module, ``threads`` the options of every transform and ``scratch``
    those of a transform whose input may be destroyed."""

    name = ""

    def __init__(self, points: int, workers: int, fft, threads: dict, scratch: dict) -> None:
        self.points, self.workers = points, workers
        self._fft, self._threads, self._scratch = fft, threads, scratch
        self.spectrum_in = np.zeros(points, complex)
        self.real_in = np.zeros(points)
        self.transforms = {"c2c": 0, "r2c": 0, "c2r": 0}

    def forward(self) -> np.ndarray:
        """Unnormalised FFT of ``spectrum_in`` (item 2 of the module docstring).

        References
        ----------
        none: numerical helper (pocketfft of scipy.fft or numpy.fft)
        """
        self.transforms["c2c"] += 1
        return self._fft.fft(self.spectrum_in, **self._threads)

    def backward(self, source: np.ndarray, out: np.ndarray) -> None:
        """Unnormalised inverse FFT of ``source`` into ``out`` (item 3 of the module docstring).

        References
        ----------
        none: numerical helper (pocketfft of scipy.fft or numpy.fft)
        """
        self.transforms["c2c"] += 1
        out[...] = self._fft.ifft(source, norm="forward", **self._scratch)

    def real_forward(self) -> np.ndarray:
        """Unnormalised real FFT of ``real_in`` (item 4 of the module docstring).

        References
        ----------
        none: numerical helper (pocketfft of scipy.fft or numpy.fft)
        """
        self.transforms["r2c"] += 1
        return self._fft.rfft(self.real_in, **self._threads)

    def real_backward(self, half: np.ndarray) -> np.ndarray:
        """Unnormalised inverse real FFT of ``half`` (item 4 of the module docstring).

        References
        ----------
        none: numerical helper (pocketfft of scipy.fft or numpy.fft)
        """
        self.transforms["c2r"] += 1
        return self._fft.irfft(half, n=self.points, norm="forward", **self._scratch)


class ScipyTransforms(_PocketTransforms):
    """scipy.fft back end, with threads (``workers``). scipy.fft is imported here, when the back
    end is made (a command run with pyFFTW or numpy's FFT needs no part of scipy)."""

    name = "scipy"

    def __init__(self, points: int, workers: int = 1) -> None:
        from scipy import fft as sfft

        super().__init__(points, workers, sfft, {"workers": workers},
                         {"workers": workers, "overwrite_x": True})


class NumpyTransforms(_PocketTransforms):
    """numpy.fft back end: no import beyond numpy, no threads."""

    name = "numpy"

    def __init__(self, points: int, workers: int = 1) -> None:
        super().__init__(points, workers, np.fft, {}, {})


class FftwTransforms:
    """pyFFTW back end [1]: plans bound to aligned buffers, executed without copies."""

    name = "fftw"

    def __init__(self, points: int, workers: int = 1) -> None:
        pyfftw = import_pyfftw()
        self._pyfftw = pyfftw
        self.points, self.workers = points, workers
        flag = "FFTW_MEASURE" if points >= FFTW_MEASURE_POINTS else "FFTW_ESTIMATE"
        self._flags = (flag, "FFTW_DESTROY_INPUT")
        self.spectrum_in = pyfftw.zeros_aligned(points, complex)
        self.time = pyfftw.zeros_aligned(points, complex)
        self.real_in = pyfftw.zeros_aligned(points, float)
        self.half = pyfftw.zeros_aligned(points // 2 + 1, complex)
        self.real_out = pyfftw.zeros_aligned(points, float)
        self._forward = self._plan(self.spectrum_in, self.time, "FFTW_FORWARD")
        self._backward: dict[tuple[int, int], tuple[np.ndarray, np.ndarray, object]] = {}
        self._real = None
        self.transforms = {"c2c": 0, "r2c": 0, "c2r": 0}

    def _plan(self, a, b, direction):
        """A plan a -> b. FFTW's measuring planner overwrites both arrays unless it has wisdom
        for the problem [2]; plans are made lazily, when ``a`` may hold data, so both arrays are
        saved and restored around the planning. Wisdom is read from and written to hcfplan's
        cache folder (:mod:`hcfplan.numerics.fftw_wisdom`)."""
        from hcfplan.numerics.fftw_wisdom import load_wisdom, save_wisdom

        load_wisdom(self._pyfftw)  # plans measured by earlier runs (hcfplan.numerics.fftw_wisdom)
        saved = a.copy(), b.copy()
        plan = self._pyfftw.FFTW(a, b, direction=direction, flags=self._flags,
                                 threads=self.workers, planning_timelimit=FFTW_PLANNING_LIMIT)
        a[...], b[...] = saved
        save_wisdom(self._pyfftw, (a.shape, a.dtype.str, b.shape, b.dtype.str, direction,
                                   self._flags, self.workers))
        return plan

    def forward(self) -> np.ndarray:
        """Unnormalised FFT of ``spectrum_in`` (item 2 of the module docstring).

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        self.transforms["c2c"] += 1
        self._forward.execute()
        return self.time

    def backward(self, source: np.ndarray, out: np.ndarray) -> None:
        """Unnormalised inverse FFT of ``source`` into ``out`` (item 3 of the module docstring;
        arrays not aligned for FFTW go through numpy.fft).

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        self.transforms["c2c"] += 1
        entry = self._backward.get((id(source), id(out)))
        if entry is None or entry[0] is not source or entry[1] is not out:
            if not (_aligned(source) and _aligned(out)):  # foreign arrays: plain numpy
                out[...] = np.fft.ifft(source, norm="forward")
                return
            plan = self._plan(source, out, "FFTW_BACKWARD")
            entry = self._backward[(id(source), id(out))] = (source, out, plan)
        entry[2].execute()

    def real_forward(self) -> np.ndarray:
        """Unnormalised real FFT of ``real_in`` (item 4 of the module docstring).

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        self.transforms["r2c"] += 1
        self._real_plans()[0].execute()
        return self.half

    def real_backward(self, half: np.ndarray) -> np.ndarray:
        """Unnormalised inverse real FFT of ``half`` (item 4 of the module docstring).

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        self.transforms["c2r"] += 1
        self._real_plans()[1].execute()
        return self.real_out

    def _real_plans(self):
        if self._real is None:
            self._real = (self._plan(self.real_in, self.half, "FFTW_FORWARD"),
                          self._plan(self.half, self.real_out, "FFTW_BACKWARD"))
        return self._real

    def empty(self) -> np.ndarray:
        """An aligned complex work array of N points (a backward target).

        References
        ----------
        none: numerical helper
        """
        return self._pyfftw.zeros_aligned(self.points, complex)


def _aligned(array: np.ndarray) -> bool:
    pyfftw = import_pyfftw()
    return array.ctypes.data % pyfftw.simd_alignment == 0 and array.flags.c_contiguous


#: FFT back-end registry: key -> class (numbered list in the module docstring).
FFT_BACKENDS: dict[str, type] = {"fftw": FftwTransforms, "scipy": ScipyTransforms,
                                  "numpy": NumpyTransforms}


def fftw_available() -> bool:
    """True when pyFFTW can be imported (without importing it).

    References
    ----------
    none: numerical helper
    """
    return importlib.util.find_spec("pyfftw") is not None


#: pyFFTW's optional Dask interface, which hcfplan does not use (see :func:`import_pyfftw`).
_PYFFTW_DASK_MODULE = "dask.array.fft"


def import_pyfftw():
    """``import pyfftw`` without importing Dask.

    When Dask is installed (the test and cluster extras), ``import pyfftw`` also imports
    ``dask.array`` for its optional Dask FFT interface: 0.4 s of every command's start-up and
    of the scan's fork server (measured with ``python -X importtime``). While pyFFTW is
    imported, ``sys.modules`` maps ``dask.array.fft`` to None, so that optional import fails at
    once (the import system's documented way to block a module); the entry is removed
    afterwards, so importing Dask later works as usual. If Dask was already imported, nothing
    is blocked.

    References
    ----------
    none: numerical helper
    """
    found = sys.modules.get("pyfftw")
    if found is not None:
        return found
    block = _PYFFTW_DASK_MODULE not in sys.modules
    if block:
        sys.modules[_PYFFTW_DASK_MODULE] = None
    try:
        import pyfftw
    finally:
        if block and _PYFFTW_DASK_MODULE in sys.modules \
                and sys.modules[_PYFFTW_DASK_MODULE] is None:
            del sys.modules[_PYFFTW_DASK_MODULE]
    return pyfftw


def default_backend(points: int | None = None, *, next_run: bool = False) -> str:
    """``"numpy"`` for a problem of ``points`` that the ``"auto"`` kernel policy gives to the
    numpy twins (module docstring); else ``"fftw"`` when pyFFTW is installed, else
    ``"scipy"``. ``next_run``: asked for a solver run about to start, whose kernels the policy
    chooses when it starts (:func:`~hcfplan.numerics.kernel_choice.compiled`).

    References
    ----------
    none: numerical helper
    """
    if points is not None and policy() == "auto" and not compiled(points, next_run=next_run):
        return "numpy"
    return "fftw" if fftw_available() else "scipy"


_SHARED = threading.local()


def shared_transforms(points: int, backend: str | None = None):
    """A back end (``backend``, else :func:`default_backend` of ``points``) for ``points``
    samples, kept per
    thread, back end and size, for code outside the solver's steps that transforms many
    spectra one after the other (the compressor search, the solver's records). Planning, even
    from FFTW wisdom, costs 10-40 ms; a kept back end costs nothing after its first use. The
    caller fills ``spectrum_in``, calls ``forward()`` and uses the result before it calls
    other code, which may use the same back end.

    References
    ----------
    none: numerical helper
    """
    kept = getattr(_SHARED, "by_points", None)
    if kept is None:
        kept = _SHARED.by_points = {}
    key = (backend or default_backend(points), points)
    if key not in kept:
        if len(kept) >= 4:
            kept.pop(next(iter(kept)))
        kept[key] = FFT_BACKENDS[key[0]](points)
    return kept[key]


def work_array(transforms, points: int) -> np.ndarray:
    """A complex work array suited as a ``backward`` target of this back end.

    References
    ----------
    none: numerical helper
    """
    maker = getattr(transforms, "empty", None)
    return maker() if maker is not None else np.zeros(points, complex)
