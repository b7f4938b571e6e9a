"""The solver's kernel set for a grid: the compiled kernels or their numpy twins.

:func:`solver_kernels` is where the solver's callers (the nonlinear terms, the steppers through
them, the recorder) get their kernels: :mod:`hcfplan.propagation.kernels` (numba) or
:mod:`hcfplan.propagation.kernels_numpy`, as :mod:`hcfplan.numerics.kernel_choice` says. Both
modules have the same functions with the same signatures and in-place semantics; numba is
imported only when the compiled set is chosen.

References
----------
none: numerical helper
"""

from __future__ import annotations

from types import ModuleType

from hcfplan.numerics.kernel_choice import compiled


def solver_kernels(points: int, new_run: bool = False) -> ModuleType:
    """The kernel module for a grid of ``points`` under the process's kernel policy;
    ``new_run``: asked by the nonlinear terms of a new solver run (counted by the ``"auto"``
    policy, :func:`hcfplan.numerics.kernel_choice.compiled`).

    References
    ----------
    none: numerical helper
    """
    if compiled(points, new_run=new_run):
        from hcfplan.propagation import kernels

        return kernels
    from hcfplan.propagation import kernels_numpy

    return kernels_numpy
