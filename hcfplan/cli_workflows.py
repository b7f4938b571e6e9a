"""Command-line front of the planning workflows (scan, recommend, compare).

``register(app)`` adds the commands to the typer app of :mod:`hcfplan.cli`. Heavy modules are
imported inside the commands only.
"""

from __future__ import annotations


def register(app) -> None:
    """Add the workflow commands to ``app``."""
