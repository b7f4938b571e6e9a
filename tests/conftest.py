"""Session set-up shared by all tests."""

from __future__ import annotations

import os
import shutil
import tempfile


def pytest_configure(config):
    """Keep hcfplan's cache folder (FFTW wisdom and rate tables, hcfplan.numerics.cache) in a folder
    of this session, also for the CLI subprocesses the tests start: no test reads what another
    run stored or writes into the user's cache."""
    folder = tempfile.mkdtemp(prefix="hcfplan-test-cache-")
    config._hcfplan_cache = folder
    os.environ["HCFPLAN_CACHE_DIR"] = folder


def pytest_unconfigure(config):
    folder = getattr(config, "_hcfplan_cache", None)
    if folder:
        shutil.rmtree(folder, ignore_errors=True)
