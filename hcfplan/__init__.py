"""hcfplan: a planner for pulse compression in gas-filled hollow-core fibers.

The package is layered: physics modules (``materials``, ``fibers``, ``grid``, ``pulse``,
``ionization``, ``propagation``, ``compression``, ``thz``, ``limits``) take and return SI values;
``planning`` composes them; ``io`` and ``cli`` are the only places that know about units with
suffixes, files and the terminal. Importing the package has no side effects.

The Python API (:mod:`hcfplan.api`) is reached from here: ``hcfplan.load_config``,
``hcfplan.simulate``, ``hcfplan.scan``, ``hcfplan.envelope``, ``hcfplan.recommend``,
``hcfplan.compare``, ``hcfplan.calibrate`` and ``hcfplan.ConfigError``; they are imported on
first use, so ``import hcfplan`` stays light. ``hcfplan.limits`` is the physics package of the
limits, so the limits report of a config is ``hcfplan.api.limits``.
"""

from hcfplan.version import __version__

#: Names of :mod:`hcfplan.api` offered at the top level (imported on first use).
API_NAMES = ("load_config", "simulate", "scan", "envelope", "recommend", "compare",
             "calibrate",
             "Run", "ScanTable", "Table", "Comparison", "Envelope", "Recommendations",
             "ConfigError", "HcfplanError")

__all__ = ["__version__", *API_NAMES]


def __getattr__(name: str):
    if name in API_NAMES:
        import hcfplan.api

        return getattr(hcfplan.api, name)
    raise AttributeError(f"module 'hcfplan' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(set(globals()) | set(API_NAMES))
