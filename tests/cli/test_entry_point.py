"""The console entry point (hcfplan.__main__:entry): named by the project file, light to
import, and running the command line.

Contract tests; no external source is needed.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

try:  # Python >= 3.11
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib

ROOT = Path(__file__).resolve().parents[2]


def test_the_project_file_names_the_guarded_entry_point():
    project = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    assert project["project"]["scripts"]["hcfplan"] == "hcfplan.__main__:entry"


def test_importing_the_entry_point_loads_no_command_line():
    code = ("import sys, hcfplan.__main__; "
            "print([m for m in ('typer', 'numpy', 'hcfplan.cli.app') if m in sys.modules])")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=60)
    assert out.stdout.strip() == "[]"


def test_the_entry_point_runs_the_command_line():
    from hcfplan.version import __version__

    code = ("import sys; sys.argv = ['hcfplan', '--version']; "
            "from hcfplan.__main__ import entry; sys.exit(entry())")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=60)
    assert out.returncode == 0
    assert out.stdout.strip() == f"hcfplan {__version__}"
