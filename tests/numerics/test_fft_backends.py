"""FFT back ends of the solver against numpy.fft (a general-purpose reference library).

Kind: contract tests over :data:`hcfplan.numerics.fft.FFT_BACKENDS` (and the back
ends kept by ``shared_transforms`` for the compressor search and the solver's records), plus a
regression test: FFTW's measuring planner overwrites the arrays of a plan it has no wisdom for
(FFTW 3 manual, sec. 4.3.2 "Planner Flags", from memory); the back end makes plans on first use,
when the arrays already hold data, and must not lose that data.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.numerics.fft import FFT_BACKENDS, FFTW_MEASURE_POINTS, fftw_available, work_array

#: A size no other test uses (so no FFTW wisdom exists for it) at which plans are measured.
POINTS = 9 * 512
assert POINTS >= FFTW_MEASURE_POINTS


@pytest.mark.parametrize("name", sorted(FFT_BACKENDS))
def test_first_transforms_match_numpy(name, tmp_path, monkeypatch):
    if name == "fftw":
        if not fftw_available():
            pytest.skip("pyFFTW not installed (optional)")
        import pyfftw

        from hcfplan.numerics.fftw_wisdom import forget_loaded

        monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(tmp_path))  # no wisdom file either
        forget_loaded()
        pyfftw.forget_wisdom()
    rng = np.random.default_rng(7)
    spectrum = rng.standard_normal(POINTS) + 1j * rng.standard_normal(POINTS)
    fft = FFT_BACKENDS[name](POINTS)
    fft.spectrum_in[...] = spectrum
    a = fft.forward()
    np.testing.assert_allclose(a, np.fft.fft(spectrum), rtol=0, atol=1e-10 * POINTS)
    a *= 2.0  # the caller changes the time buffer in place (as the Kerr kernel does)
    out = work_array(fft, POINTS)
    fft.backward(a, out)  # first use of this target: a new plan
    np.testing.assert_allclose(out, 2.0 * POINTS * spectrum, rtol=1e-12, atol=1e-9 * POINTS)
    real = rng.standard_normal(POINTS)
    fft.real_in[...] = real
    half = fft.real_forward()  # first use: both real plans are made here
    np.testing.assert_allclose(half, np.fft.rfft(real), rtol=0, atol=1e-10 * POINTS)
    back = fft.real_backward(half)
    np.testing.assert_allclose(back, POINTS * real, rtol=0, atol=1e-9 * POINTS)


_IMPORT_CHECK = """
import sys
from hcfplan.numerics.fft import import_pyfftw
if {dask_first}:
    import dask.array.fft
pyfftw = import_pyfftw()
print(int("dask.array" in sys.modules), int(hasattr(pyfftw.interfaces, "dask_fft")),
      int(sys.modules.get("dask.array.fft", 0) is None))
import dask.array.fft
print(int(callable(dask.array.fft.fft)))
"""


@pytest.mark.parametrize("dask_first", [False, True])
def test_pyfftw_import_leaves_dask_alone(dask_first):
    """Without Dask imported, pyFFTW is imported without its Dask interface (0.4 s of start-up)
    and Dask imports as usual afterwards; with Dask already imported nothing is blocked.
    Contract test of import_pyfftw (a fresh interpreter each)."""
    import subprocess
    import sys

    if not fftw_available():
        pytest.skip("pyFFTW not installed (optional)")
    pytest.importorskip("dask.array")
    code = _IMPORT_CHECK.format(dask_first=dask_first)
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True,
                         text=True).stdout.split()
    expected = ["1", "1", "0", "1"] if dask_first else ["0", "0", "0", "1"]
    assert out == expected


@pytest.mark.parametrize("name", sorted(FFT_BACKENDS))
def test_shared_back_end_is_kept_per_thread_back_end_and_size(name):
    # contract: shared_transforms gives the same back end again in one thread, another one in
    # another thread (buffers are never shared between threads), and its forward() is numpy's
    # fft of what was put into spectrum_in
    import threading

    from hcfplan.numerics.fft import shared_transforms

    if name == "fftw" and not fftw_available():
        pytest.skip("pyFFTW not installed (optional)")
    first = shared_transforms(256, name)
    assert shared_transforms(256, name) is first and first.name == name
    assert shared_transforms(512, name) is not first
    other = []
    thread = threading.Thread(target=lambda: other.append(shared_transforms(256, name)))
    thread.start()
    thread.join()
    assert other[0] is not first and other[0].name == name
    spectrum = np.random.default_rng(2).standard_normal(256) * (1 + 0.5j)
    first.spectrum_in[...] = spectrum
    np.testing.assert_allclose(first.forward(), np.fft.fft(spectrum), rtol=0, atol=1e-12)


@pytest.mark.parametrize("name", sorted(FFT_BACKENDS))
def test_recorded_power_is_the_envelope_of_the_spectrum(name):
    # consistency: the recorder's power |A(t)|^2 (taken on a kept back end) equals
    # |grid.to_time(u)|^2, the grid's convention 2, to 1e-12 of its peak
    from hcfplan.numerics.grid import Grid
    from hcfplan.propagation.result import Recorder

    if name == "fftw" and not fftw_available():
        pytest.skip("pyFFTW not installed (optional)")
    grid = Grid(points=1024, dt=2e-15, omega0=2.3e15)
    rng = np.random.default_rng(4)
    u = (rng.standard_normal(1024) + 1j * rng.standard_normal(1024)) * 1e-9
    power, peak, _ = Recorder(grid, 2, 1e-9, None, fft_backend=name)._power(u)
    expected = np.abs(grid.to_time(u)) ** 2
    np.testing.assert_allclose(power, expected, rtol=0, atol=1e-12 * expected.max())
    # the recorded peak is that of the band-limited envelope, between the samples
    from hcfplan.pulse.bandlimited import peak_power

    assert peak == pytest.approx(peak_power(grid.to_time(u)), rel=1e-9)
    assert peak >= expected.max()
