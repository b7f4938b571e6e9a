"""Batched transforms of the N mode envelopes for the multimode solver.

The multimode nonlinear terms (:mod:`.multimode_terms`) transform the N spectra of the modes
together: one forward transform of the (N, points) state, one or two backward ones (Kerr and
plasma), and, with a delayed (Raman) response, the real transforms of the N(N+1)/2 mode
products. :class:`ModeTransforms` does each of them as one planned multi-transform (pyFFTW,
``"fftw"``) over preallocated aligned buffers, or with scipy.fft (``"scipy"``), by the key of
:data:`hcfplan.numerics.fft.FFT_BACKENDS` (``None``: :func:`~hcfplan.numerics.fft.default_backend`).

Measured on the demo capillary config (2048 points, 4 modes, loaded 2-core machine): one
batch of 4 forward transforms 14 us with a planned pyFFTW multi-transform against 36-48 us
with scipy.fft (workers = 1), whose Python overhead per call is 10-20 us as well.

The conventions are those of :mod:`hcfplan.numerics.fft`: unnormalised transforms, the
forward one from the grid spectrum to N dt A(t) (convention 2 of
:mod:`hcfplan.numerics.grid`).

References
----------
.. [1] M. Frigo and S. G. Johnson, "The design and implementation of FFTW3," Proc. IEEE,
       vol. 93, no. 2, pp. 216-231, 2005, doi:10.1109/JPROC.2004.840301.
"""

from __future__ import annotations

import numpy as np
from scipy import fft as sfft

from hcfplan.numerics.fft import FFTW_MEASURE_POINTS, default_backend, import_pyfftw

#: Backward plans kept (pairs of arrays; the steppers use three targets).
_PLANS_KEPT = 8


class ModeTransforms:
    """Forward and backward transforms of (rows, points) arrays along the last axis.

    ``spectrum_in`` (modes, points) is the input of :meth:`forward`, which returns the time
    buffer (modes, points) (the caller may change it). :meth:`backward` transforms a (modes,
    points) array made by :meth:`empty` into another (the source may be destroyed);
    :meth:`real_forward` / :meth:`real_backward` the real rows of ``real_in`` (pairs, points).
    """

    def __init__(self, modes: int, points: int, pairs: int = 0, backend: str | None = None,
                 workers: int = 1) -> None:
        self.modes, self.points, self.workers = modes, points, workers
        self.name = backend or default_backend()
        self._fftw = import_pyfftw() if self.name == "fftw" else None
        self.spectrum_in = self.empty()
        self.real_in = self._zeros((pairs, points), float)
        self._plans: dict[tuple[int, int], tuple] = {}
        self._real = None
        if self._fftw is not None:
            self.time = self.empty()
            self._forward = self._plan(self.spectrum_in, self.time, "FFTW_FORWARD", False)

    def _zeros(self, shape, dtype) -> np.ndarray:
        if self._fftw is None:
            return np.zeros(shape, dtype)
        return self._fftw.zeros_aligned(shape, dtype)

    def empty(self) -> np.ndarray:
        """A zeroed (modes, points) complex array (aligned for FFTW).

        References
        ----------
        none: numerical helper
        """
        return self._zeros((self.modes, self.points), complex)

    def _plan(self, a, b, direction: str, destroy: bool = True):
        """A plan a -> b over the last axis. FFTW's measuring planner overwrites both arrays
        unless it has wisdom (FFTW 3 manual, planner flags [from memory]): they are saved and
        restored; the wisdom is read and written as in :class:`~hcfplan.numerics.fft.
        FftwTransforms`."""
        from hcfplan.numerics.fftw_wisdom import load_wisdom, save_wisdom

        pyfftw = self._fftw
        flags = ("FFTW_MEASURE" if self.points >= FFTW_MEASURE_POINTS else "FFTW_ESTIMATE",)
        if destroy:
            flags += ("FFTW_DESTROY_INPUT",)
        load_wisdom(pyfftw)
        saved = a.copy(), b.copy()
        plan = pyfftw.FFTW(a, b, axes=(-1,), direction=direction, flags=flags,
                           threads=self.workers)
        a[...], b[...] = saved
        save_wisdom(pyfftw, (a.shape, a.dtype.str, b.shape, b.dtype.str, direction, flags,
                             self.workers))
        return plan

    def forward(self) -> np.ndarray:
        """Unnormalised FFT of every row of ``spectrum_in`` (= N dt A_m(t)).

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        if self._fftw is None:
            return sfft.fft(self.spectrum_in, axis=-1, workers=self.workers)
        self._forward.execute()
        return self.time

    def backward(self, source: np.ndarray, out: np.ndarray) -> None:
        """Unnormalised inverse FFT (no 1/N) of every row of ``source`` into ``out`` (both
        from :meth:`empty` or flat views of such arrays; any arrays with the scipy back end);
        ``source`` may be destroyed. The plan of a pair of arrays is made at its first use.

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        if self._fftw is None:
            rows = (self.modes, self.points)
            out.reshape(rows)[...] = sfft.ifft(source.reshape(rows), axis=-1, norm="forward",
                                               overwrite_x=True, workers=self.workers)
            return
        key = (id(source), id(out))
        entry = self._plans.get(key)
        if entry is None or entry[0] is not source or entry[1] is not out:
            rows = (self.modes, self.points)  # a flat ``out`` is planned through a view
            if len(self._plans) >= _PLANS_KEPT:
                self._plans.pop(next(iter(self._plans)))
            entry = self._plans[key] = (source, out, self._plan(
                source.reshape(rows), out.reshape(rows), "FFTW_BACKWARD"))
        entry[2].execute()

    def real_forward(self) -> np.ndarray:
        """Unnormalised real FFT of every row of ``real_in``; the caller may change the
        returned half spectrum, then call :meth:`real_backward` on it.

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        if self._fftw is None:
            return sfft.rfft(self.real_in, axis=-1, workers=self.workers)
        return self._real_plans()[0]()

    def real_backward(self, half: np.ndarray) -> np.ndarray:
        """Unnormalised inverse real FFT (no 1/N) of the rows of ``half`` (from
        :meth:`real_forward`); ``half`` may be destroyed.

        References
        ----------
        M. Frigo and S. G. Johnson, Proc. IEEE 93, 216 (2005).
        """
        if self._fftw is None:
            return sfft.irfft(half, n=self.points, axis=-1, norm="forward", overwrite_x=True,
                              workers=self.workers)
        return self._real_plans()[1]()

    def _real_plans(self):
        if self._real is None:
            rows = self.real_in.shape[0]
            half = self._zeros((rows, self.points // 2 + 1), complex)
            out = self._zeros((rows, self.points), float)
            forward = self._plan(self.real_in, half, "FFTW_FORWARD", False)
            backward = self._plan(half, out, "FFTW_BACKWARD")

            def run_forward():
                forward.execute()
                return half

            def run_backward():
                backward.execute()
                return out

            self._real = (run_forward, run_backward)
        return self._real
