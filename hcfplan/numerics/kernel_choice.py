"""Which kernels a process runs: the compiled (numba) ones or their plain numpy twins.

Every compiled kernel of the solver (:mod:`hcfplan.propagation.kernels`), of the band-limited
peak search (:mod:`hcfplan.pulse.bandlimited`) and of the THz mixing sum
(:mod:`hcfplan.thz.kernels`) has a numpy twin with the same signature, the same in-place
semantics and the same formulas (results equal to rounding). The compiled kernels are faster
per call, but the first one a process calls costs about 0.5 s of start-up (importing numba,
its target context and the machine code from numba's cache); the numpy twins cost nothing to
start. The policy of this process says which set runs:

``"numba"``
    Always the compiled kernels: the library's default (a Python program or notebook, and the
    scan and ``--spread`` worker processes, which load the kernels on purpose before their
    first point, :mod:`hcfplan.planning.scan.warmup`).
``"numpy"``
    Always the numpy twins.
``"auto"``
    The numpy twins for a small problem (a size up to the caller's limit, by default
    :data:`AUTO_NUMPY_POINTS` grid points) in the first :data:`AUTO_NUMPY_RUNS` solver runs of
    the process, unless numba is already loaded in this process; the compiled kernels
    otherwise. The command line sets it for its one-shot commands (:func:`policy_set`; a
    multimode run always takes the compiled kernels); a command that runs many
    points in its own process (a serial scan, a calibration) turns to the compiled kernels
    after the first few, where the start-up has paid back.

The environment variable ``HCFPLAN_KERNELS`` (``numba``, ``numpy`` or ``auto``) overrides the
policy set by the program; a bad value raises :class:`~hcfplan.errors.ConfigError` naming it.

References
----------
none: numerical helper (the limits below are measurements of this code, quoted where they are
set).
"""

from __future__ import annotations

import contextlib
import os
import sys
from collections.abc import Iterator

from hcfplan.errors import ConfigError

#: The policies (see the module docstring).
POLICIES = ("numba", "numpy", "auto")
#: The environment variable that overrides the policy set by the program.
VARIABLE = "HCFPLAN_KERNELS"
#: The policy of a process that sets none.
DEFAULT_POLICY = "numba"
#: Largest grid (points) on which ``"auto"`` runs the numpy twins. Measured with
#: ``bench/kernels.py`` (the demo config's whole chain in one process, warm, both sets
#: alternated; 2 shared cores under load): the twins took 70-85 ms more at 2048 points, 120 ms
#: at 4096, 190 ms at 8192 and 470 ms at 16384, against 0.46-0.53 s of numba start-up in a new
#: process (import, the kernels module, the first call from numba's cache).
AUTO_NUMPY_POINTS = 8192
#: Solver runs of a process that ``"auto"`` gives to the numpy twins; later runs take the
#: compiled kernels. At 2048 points the start-up pays back after about 6 runs (same bench), so
#: a process of many runs loses at most half the start-up, and one of up to 3 runs gains it.
AUTO_NUMPY_RUNS = 3

_chosen = {"policy": DEFAULT_POLICY, "runs": 0}


def _checked(value: str, where: str) -> str:
    """``value`` in lower case if it names a policy; else ConfigError naming ``where``."""
    if value.lower() not in POLICIES:
        raise ConfigError(f"{where} = {value!r}: must be one of {', '.join(POLICIES)}")
    return value.lower()


def environment_policy(environ=None) -> str | None:
    """The policy named by ``HCFPLAN_KERNELS`` in ``environ`` (default ``os.environ``), None if
    unset or empty.

    Raises
    ------
    ConfigError
        If the value is not one of :data:`POLICIES`.

    References
    ----------
    none: numerical helper
    """
    value = (os.environ if environ is None else environ).get(VARIABLE, "").strip()
    return _checked(value, VARIABLE) if value else None


def set_policy(policy: str) -> None:
    """Set this process's policy (``"numba"``, ``"numpy"`` or ``"auto"``); the environment's
    ``HCFPLAN_KERNELS`` still overrides it, and is checked here.

    Raises
    ------
    ConfigError
        If ``policy`` or the environment's value is not one of :data:`POLICIES`.

    References
    ----------
    none: numerical helper
    """
    _chosen["policy"] = _checked(policy, "kernel policy")
    environment_policy()


@contextlib.contextmanager
def policy_set(value: str) -> Iterator[None]:
    """Within the block the process's policy is ``value`` (:func:`set_policy`, so the
    environment's value is checked on entry); on leaving, the policy and the count of solver
    runs are what they were before. The command line runs each command in such a block, so a
    program that calls :func:`hcfplan.cli.app.main` keeps its own policy afterwards.

    References
    ----------
    none: numerical helper
    """
    saved = dict(_chosen)
    try:
        set_policy(value)
        yield
    finally:
        _chosen.update(saved)


def policy() -> str:
    """The policy in force: the environment's, else the one set (default ``"numba"``).

    References
    ----------
    none: numerical helper
    """
    return environment_policy() or _chosen["policy"]


def compiled(size: int, numpy_limit: int = AUTO_NUMPY_POINTS, *, new_run: bool = False,
             next_run: bool = False) -> bool:
    """True when a problem of ``size`` runs on the compiled kernels under the policy in force.

    Parameters
    ----------
    size : int
        The problem's size in the caller's measure (grid points for the solver and the peak
        search, terms of the sum for the THz mixing).
    numpy_limit : int
        Largest size that ``"auto"`` gives to the numpy twins.
    new_run : bool
        The question starts a solver run (counted against :data:`AUTO_NUMPY_RUNS` when
        ``"auto"`` would choose the numpy twins). The other questions of the run get the same
        answer.
    next_run : bool
        The answer that ``new_run`` would give, without counting the run (asked before a run
        starts, e.g. for its FFT back end).

    References
    ----------
    none: numerical helper
    """
    chosen = policy()
    if chosen == "numba":
        return True
    if chosen == "numpy":
        return False
    if "numba" in sys.modules or size > numpy_limit:
        return True
    if new_run:
        _chosen["runs"] += 1
    return _chosen["runs"] + (1 if next_run else 0) > AUTO_NUMPY_RUNS
