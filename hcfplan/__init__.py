"""hcfplan: a planner for pulse compression in gas-filled hollow-core fibers.

The package is layered: physics modules (``materials``, ``fibers``, ``grid``, ``pulse``,
``ionization``, ``propagation``, ``compression``, ``thz``, ``limits``) take and return SI values;
``planning`` composes them; ``io`` and ``cli`` are the only places that know about units with
suffixes, files and the terminal. Importing the package has no side effects.

The Python API (:mod:`hcfplan.api`) is reached from here: ``hcfplan.load_config``,
``hcfplan.simulate``, ``hcfplan.scan``, ``hcfplan.envelope``, ``hcfplan.recommend``,
``hcfplan.compare``, ``hcfplan.calibrate`` and ``hcfplan.ConfigError``; they are imported on
first use, so ``import hcfplan`` stays light. ``hcfplan.limits`` is both the package of the
limit formulas (``hcfplan.limits.beam``…) and, called, the limits report of a config
(``hcfplan.limits(config)`` = :func:`hcfplan.api.limits`).
"""

import types as _types

import hcfplan.limits as _limits_package
from hcfplan.version import __version__


class _CallableLimits(_types.ModuleType):
    """The package :mod:`hcfplan.limits`, which called gives the limits report of a config."""

    def __call__(self, config, overrides=None) -> dict:
        """``hcfplan.limits(config, overrides=None)``: see :func:`hcfplan.api.limits`."""
        from hcfplan.api import limits

        return limits(config, overrides)


_limits_package.__class__ = _CallableLimits

#: Names of :mod:`hcfplan.api` offered at the top level (imported on first use).
API_NAMES = ("load_config", "simulate", "scan", "envelope", "recommend", "compare",
             "calibrate",
             "Run", "ScanTable", "Table", "Comparison", "Envelope", "Recommendations",
             "ConfigError", "HcfplanError")

__all__ = ["__version__", "limits", *API_NAMES]


def __getattr__(name: str):
    if name in API_NAMES:
        import hcfplan.api

        return getattr(hcfplan.api, name)
    raise AttributeError(f"module 'hcfplan' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(API_NAMES))
