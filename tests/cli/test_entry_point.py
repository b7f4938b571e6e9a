"""The console entry point (hcfplan.__main__:run): named by the project file, light to
import, running the command line, and ending the process without the interpreter's tear-down
but with the exit functions and the streams flushed.

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
    assert project["project"]["scripts"]["hcfplan"] == "hcfplan.__main__:run"


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


def test_the_process_ends_with_the_exit_code_its_output_and_exit_functions():
    """run(): the command's exit code (2 for a missing config), everything written to stdout
    and stderr arrives, and an atexit function registered before still runs."""
    code = ("import atexit, sys; atexit.register(lambda: print('exit function ran')); "
            "sys.argv = ['hcfplan', 'check', 'no_such_config.toml']; "
            "sys.stdout.write('x' * 100000); "
            "from hcfplan.__main__ import run; run()")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 2
    assert out.stdout.startswith("x" * 100000)
    assert out.stdout.rstrip().endswith("exit function ran")
    assert "no_such_config.toml" in out.stderr and "Traceback" not in out.stderr


def test_a_running_thread_gets_the_usual_exit():
    """With a second thread alive, run() leaves through sys.exit, which waits for it."""
    code = ("import sys, threading, time; "
            "t = threading.Thread(target=lambda: (time.sleep(0.3), print('thread done'))); "
            "t.start(); sys.argv = ['hcfplan', '--version']; "
            "from hcfplan.__main__ import run; run()")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         timeout=120)
    assert out.returncode == 0
    assert "thread done" in out.stdout


def test_a_profiled_command_keeps_its_profile(tmp_path):
    """Under ``python -m cProfile`` the process takes the usual exit, so the profile is
    written."""
    out = tmp_path / "profile.out"
    code = ("import cProfile, sys; sys.argv = ['hcfplan', '--version']; "
            "from hcfplan.__main__ import run; "
            f"cProfile.run('run()', {str(out)!r})")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert out.stat().st_size > 0
