"""hcfplan: a planner for pulse compression in gas-filled hollow-core fibers.

The package is layered: physics modules (``materials``, ``fibers``, ``grid``, ``pulse``,
``ionization``, ``propagation``, ``compression``, ``thz``, ``limits``) take and return SI values;
``planning`` composes them; ``io`` and ``cli`` are the only places that know about units with
suffixes, files and the terminal. Importing the package has no side effects.
"""

from hcfplan.version import __version__

__all__ = ["__version__"]
