"""The package version (one place; ``hcfplan --version`` and the cache keys read it)."""

__version__ = "0.1.0"
