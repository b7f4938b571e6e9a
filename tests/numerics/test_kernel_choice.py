"""The kernel policy (hcfplan.numerics.kernel_choice): the library default, the environment
override and its check, the "auto" size limit, run budget and numba-already-loaded rule."""

from __future__ import annotations

import subprocess
import sys

import pytest

from hcfplan.errors import ConfigError
from hcfplan.numerics import kernel_choice


@pytest.fixture(autouse=True)
def _restore(monkeypatch):
    """Each test starts from the library's default with no override, and leaves it so."""
    monkeypatch.delenv(kernel_choice.VARIABLE, raising=False)
    saved = dict(kernel_choice._chosen)
    kernel_choice._chosen.update(policy=kernel_choice.DEFAULT_POLICY, runs=0)
    yield
    kernel_choice._chosen.update(saved)


def test_the_library_default_is_numba():
    assert kernel_choice.DEFAULT_POLICY == "numba"
    assert kernel_choice.policy() == "numba"
    assert kernel_choice.compiled(16) and kernel_choice.compiled(10**9)


def test_set_policy_and_the_environment_override(monkeypatch):
    kernel_choice.set_policy("numpy")
    assert kernel_choice.policy() == "numpy" and not kernel_choice.compiled(10**9)
    monkeypatch.setenv(kernel_choice.VARIABLE, "numba")  # the environment wins
    assert kernel_choice.policy() == "numba" and kernel_choice.compiled(16)
    monkeypatch.setenv(kernel_choice.VARIABLE, " NumPy ")  # case and blanks do not matter
    kernel_choice.set_policy("auto")
    assert kernel_choice.policy() == "numpy"
    monkeypatch.setenv(kernel_choice.VARIABLE, "")  # empty: not set
    assert kernel_choice.policy() == "auto"


@pytest.mark.parametrize("value", ["numba2", "fast", "1"])
def test_a_bad_environment_value_is_one_line_naming_the_variable(monkeypatch, value):
    monkeypatch.setenv(kernel_choice.VARIABLE, value)
    for call in (kernel_choice.policy, lambda: kernel_choice.set_policy("auto"),
                 lambda: kernel_choice.compiled(16)):
        with pytest.raises(ConfigError) as caught:
            call()
        message = str(caught.value)
        assert "HCFPLAN_KERNELS" in message and repr(value) in message
        assert "numba, numpy, auto" in message and "\n" not in message


def test_a_bad_policy_is_refused():
    with pytest.raises(ConfigError, match="kernel policy = 'jit'"):
        kernel_choice.set_policy("jit")
    assert kernel_choice.policy() == "numba"  # unchanged


def test_auto_size_limit_and_run_budget(monkeypatch):
    # numba not loaded (as in a command on the auto path): the rule of sizes and runs alone
    monkeypatch.delitem(sys.modules, "numba", raising=False)
    kernel_choice.set_policy("auto")
    kernel_choice._chosen["runs"] = 0
    limit = kernel_choice.AUTO_NUMPY_POINTS
    assert not kernel_choice.compiled(limit) and kernel_choice.compiled(limit + 1)
    assert kernel_choice.compiled(100, numpy_limit=99) and not kernel_choice.compiled(
        99, numpy_limit=99)
    for _ in range(kernel_choice.AUTO_NUMPY_RUNS):  # the first runs take the numpy twins ...
        assert not kernel_choice.compiled(2048, new_run=True)
        assert not kernel_choice.compiled(2048)  # ... and every question of the run too
    assert kernel_choice.compiled(2048, new_run=True)  # later runs the compiled kernels
    assert kernel_choice.compiled(2048)
    kernel_choice.set_policy("numpy")
    assert not kernel_choice.compiled(2048, new_run=True)  # the budget is auto's only


def test_auto_takes_numba_where_numba_is_loaded():
    # in a new process: auto gives a small problem to the numpy twins until numba is imported
    code = ("import sys; from hcfplan.numerics import kernel_choice as k; "
            "k.set_policy('auto'); before = k.compiled(2048); "
            "import numba; print(before, k.compiled(2048), 'numba' in sys.modules)")
    env = {key: value for key, value in __import__("os").environ.items()
           if key != kernel_choice.VARIABLE}
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=120, env=env).stdout.split()
    assert out == ["False", "True", "True"]


def test_a_policy_set_for_a_block_is_undone_after_it():
    with kernel_choice.policy_set("numpy"):
        assert kernel_choice.policy() == "numpy"
        assert not kernel_choice.compiled(16, new_run=True)
    assert kernel_choice.policy() == "numba"
    with pytest.raises(RuntimeError), kernel_choice.policy_set("auto"):
        raise RuntimeError("the block failed")
    assert kernel_choice.policy() == "numba"


def test_a_command_run_in_a_program_leaves_its_policy():
    # the command line runs with "auto"; a program that calls it keeps its own policy
    from hcfplan.cli.app import main

    kernel_choice.set_policy("numpy")
    assert main(["--version"]) == 0
    assert kernel_choice.policy() == "numpy"


def test_the_fft_back_end_follows_the_kernels_of_each_run(monkeypatch):
    # consistency: under "auto" a run on the numpy twins also transforms with numpy's FFT; the
    # back end is asked before the run starts (next_run), the kernels when it starts (new_run),
    # and both answers agree for the first runs and after AUTO_NUMPY_RUNS (no source needed)
    from hcfplan.numerics import fft

    kc = kernel_choice
    monkeypatch.delenv(kc.VARIABLE, raising=False)
    monkeypatch.delitem(sys.modules, "numba", raising=False)
    with kc.policy_set("auto"):
        for _ in range(kc.AUTO_NUMPY_RUNS + 2):
            backend = fft.default_backend(2048, next_run=True)
            uses_compiled = kc.compiled(2048, new_run=True)
            assert (backend == "numpy") == (not uses_compiled)
        assert uses_compiled  # the last runs take the compiled kernels and pyFFTW or scipy
