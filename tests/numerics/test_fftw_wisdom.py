"""FFTW wisdom kept on disk (hcfplan.numerics.fftw_wisdom): written after planning, read by a new
process before its first plan, ignored when damaged or foreign, never an error.

Invariant checks (common practice, no source): the transforms are compared with numpy.fft;
FFTW_WISDOM_ONLY plans succeed only from wisdom (FFTW 3 manual, sec. 4.3.2 "Planner Flags",
from memory)."""

from __future__ import annotations

import json

import numpy as np
import pytest

from hcfplan.numerics import fftw_wisdom
from hcfplan.numerics.fft import FFTW_MEASURE_POINTS, FftwTransforms, fftw_available

pytestmark = pytest.mark.skipif(not fftw_available(), reason="pyFFTW not installed (optional)")
#: A measured size no other test uses.
POINTS = 5 * 1024
assert POINTS >= FFTW_MEASURE_POINTS


@pytest.fixture()
def fresh(tmp_path, monkeypatch):
    """An empty cache folder and a process state as after start-up (no wisdom in memory)."""
    import pyfftw

    monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(tmp_path))
    fftw_wisdom.forget_loaded()
    pyfftw.forget_wisdom()
    yield tmp_path
    fftw_wisdom.forget_loaded()


def _wisdom_only_plan(pyfftw):
    a, b = pyfftw.zeros_aligned(POINTS, complex), pyfftw.zeros_aligned(POINTS, complex)
    return pyfftw.FFTW(a, b, flags=("FFTW_MEASURE", "FFTW_DESTROY_INPUT", "FFTW_WISDOM_ONLY"))


def test_plans_measured_once_are_read_by_a_new_process(fresh):
    """FFTW_WISDOM_ONLY plans succeed only from wisdom: after a restart (wisdom forgotten) the
    forward plan of the back end is found again through the file."""
    import pyfftw

    FftwTransforms(POINTS)
    data = json.loads((fresh / fftw_wisdom.WISDOM_FILE).read_text())
    assert data["format"] == fftw_wisdom.WISDOM_FORMAT and len(data["wisdom"]) == 3
    pyfftw.forget_wisdom()
    fftw_wisdom.forget_loaded()
    with pytest.raises(RuntimeError):
        _wisdom_only_plan(pyfftw)
    fftw_wisdom.load_wisdom(pyfftw)
    plan = _wisdom_only_plan(pyfftw)
    x = np.random.default_rng(3).standard_normal(POINTS) + 0j
    plan.input_array[...] = x
    np.testing.assert_allclose(plan(), np.fft.fft(x), rtol=0, atol=1e-10 * POINTS)


@pytest.mark.parametrize("content", ["not json {", json.dumps([1, 2]),
                                     json.dumps({"format": "hcfplan-fftw-wisdom", "version": 1,
                                                 "fftw": "0.0", "machine": "other",
                                                 "wisdom": ["", "", ""]})])
def test_damaged_or_foreign_file_is_ignored_and_replaced(fresh, content):
    import pyfftw

    path = fresh / fftw_wisdom.WISDOM_FILE
    path.write_text(content)
    fft = FftwTransforms(POINTS)
    fft.spectrum_in[...] = 1.0
    assert fft.forward()[0] == pytest.approx(POINTS)
    data = json.loads(path.read_text())
    assert data["fftw"] == pyfftw.__version__ and data["wisdom"][0].startswith("(fftw")


def test_unwritable_cache_is_not_an_error(fresh, monkeypatch):
    blocker = fresh / "a-file"
    blocker.write_text("")
    monkeypatch.setenv("HCFPLAN_CACHE_DIR", str(blocker / "cache"))  # below a file: no folder
    fft = FftwTransforms(POINTS)
    fft.spectrum_in[...] = 1.0
    assert fft.forward()[0] == pytest.approx(POINTS)


def test_file_of_an_earlier_version_is_measured_again(fresh):
    """Version 1 files hold plans measured under a 0.5 s time limit (cut short at N = 16384):
    their wisdom is not used, and the file is replaced by one of the current version."""
    import pyfftw

    FftwTransforms(POINTS)
    path = fresh / fftw_wisdom.WISDOM_FILE
    data = json.loads(path.read_text())
    path.write_text(json.dumps(dict(data, version=1)))
    fftw_wisdom.forget_loaded()
    pyfftw.forget_wisdom()
    fftw_wisdom.load_wisdom(pyfftw)
    with pytest.raises(RuntimeError):
        _wisdom_only_plan(pyfftw)
    FftwTransforms(POINTS)
    assert json.loads(path.read_text())["version"] == fftw_wisdom.WISDOM_VERSION == 2


def test_a_problem_saved_once_is_not_exported_again(fresh, monkeypatch):
    """A second back end of the same size makes the same plans, which add no wisdom: no export
    (2-3 ms each) and no write. A new size is saved as before, and after forget_loaded (another
    cache folder) a known problem is checked against the file again."""
    import pyfftw

    FftwTransforms(POINTS)
    exports = []
    real_export = pyfftw.export_wisdom
    monkeypatch.setattr(pyfftw, "export_wisdom", lambda: exports.append(1) or real_export())
    FftwTransforms(POINTS)
    assert exports == []
    FftwTransforms(POINTS // 5)  # 1024 points: new problems, their wisdom is saved
    assert exports
    exports.clear()
    fftw_wisdom.forget_loaded()
    FftwTransforms(POINTS)
    assert exports  # compared with the file's wisdom again


def test_a_forked_process_reads_the_file_again(fresh):
    """A process forked after its parent read the file (a scan worker forked from the fork
    server) reads it again before its first plan: here the file gains a plan after the read
    and the parent forgets it, so only the file has it. The parent, which read the file
    already, does not read it again; the forked child finds the plan (FFTW_WISDOM_ONLY)."""
    import os

    import pyfftw

    fftw_wisdom.load_wisdom(pyfftw)  # the parent reads the (missing) file
    FftwTransforms(POINTS)  # measured and saved to the file
    pyfftw.forget_wisdom()
    child = os.fork()
    if child == 0:  # pragma: no cover - runs in the child, which reports by its exit code
        code = 1
        try:
            fftw_wisdom.load_wisdom(pyfftw)
            _wisdom_only_plan(pyfftw)
            code = 0
        finally:
            os._exit(code)
    _, status = os.waitpid(child, 0)
    assert os.waitstatus_to_exitcode(status) == 0
    fftw_wisdom.load_wisdom(pyfftw)
    with pytest.raises(RuntimeError):
        _wisdom_only_plan(pyfftw)
