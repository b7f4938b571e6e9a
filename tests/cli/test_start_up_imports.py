"""What the main command imports: no part of scipy on the demo run's path.

Importing any scipy submodule loads scipy's array-API layer (0.1-0.2 s, paid by the command's
process and again by its figure helper; README "Performance"). The demo chain (fiber,
compressor, THz, limits, summary) and the figure helper's preload therefore use numpy, the
constants of hcfplan.constants, the own solvers of hcfplan.numerics (optimize, bessel) and
numpy's FFT for a problem this small (hcfplan.numerics.fft.default_backend);
scipy stays the reference the tests check them against, and the other commands and the rare
paths (rate tables computed anew, measured curves, fits) import it where they need it.
Common practice, no source: a guard against a start-up cost creeping back.
"""

import json
import subprocess
import sys

from tests.process_tools import ROOT, env

CHAIN = """
import json, sys
from pathlib import Path
from hcfplan.io.config import load_config
from hcfplan.planning.chain import run_chain
from hcfplan.planning.run_folder import write_run
from hcfplan.report import write_run_report
from hcfplan.numerics.kernel_choice import policy_set
with policy_set("auto"):  # the command line's policy
    chain = run_chain(load_config("configs/yb_arf_argon.toml"))
    out = Path(sys.argv[1])
    summary = write_run(out, chain, figures=None)
    write_run_report(out, summary, command="hcfplan simulate configs/yb_arf_argon.toml")
print(json.dumps(sorted(sys.modules)))
"""

HELPER = """
import json, sys
from hcfplan.plotting.helpers import _preload
_preload()
print(json.dumps(sorted(sys.modules)))
"""


def _scipy_modules(code: str, *args: str) -> list[str]:
    """The scipy modules a child running ``code`` imported beyond scipy's package itself (its
    ``__init__`` imports ``scipy._lib``, ``scipy.version`` and a few more small modules, which
    the disk cache's key uses for the version): the public subpackages and the array-API
    layer."""
    done = subprocess.run([sys.executable, "-c", code, *args], cwd=ROOT, env=env(),
                          capture_output=True, text=True, timeout=600, check=True)
    return _heavy(json.loads(done.stdout.strip().splitlines()[-1]))


def _heavy(modules: list[str]) -> list[str]:
    """The scipy modules among ``modules`` beyond scipy's package file: the public subpackages
    and the array-API layer."""
    return [m for m in modules if m.startswith("scipy.")
            and (not m.split(".")[1].startswith("_") and m != "scipy.version"
                 or m.startswith("scipy._lib._array_api"))]


def test_demo_run_imports_no_scipy_submodule(tmp_path):
    # the chain, summary.json, fields.npz and report.html of README command 1 (figures: below);
    # the first run fills the test run's cache folder (the ionisation rate tables, whose
    # computation uses scipy.special), as the first run on a machine does; the second is the
    # usual run
    _scipy_modules(CHAIN, str(tmp_path / "first"))
    assert _scipy_modules(CHAIN, str(tmp_path / "run")) == []


def test_figure_helper_preload_imports_no_scipy_submodule():
    assert _scipy_modules(HELPER) == []


def test_the_command_itself_imports_no_scipy_submodule(tmp_path):
    # README command 1 as a user runs it (the command line, the run, its files and report;
    # the figures are drawn by the helper, checked above): `python -X importtime` lists every
    # module the process imported; a first run fills the cache folder
    def imported(out):
        done = subprocess.run(
            [sys.executable, "-X", "importtime", "-m", "hcfplan", "simulate",
             "configs/yb_arf_argon.toml", "--out", str(out), "--quiet", "--no-figures"],
            cwd=ROOT, env=env(), capture_output=True, text=True, timeout=600, check=True)
        return [line.rsplit("|", 1)[-1].strip() for line in done.stderr.splitlines()
                if line.startswith("import time:")]

    imported(tmp_path / "first")
    modules = imported(tmp_path / "run")
    assert "hcfplan.planning.chain" in modules  # the log is read right
    assert _heavy(modules) == []
