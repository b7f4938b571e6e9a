"""Interrupted runs lose nothing: ``simulate`` stopped by SIGINT or SIGTERM leaves its output
folder with complete files only (or no folder), never a temporary or half-written file.

Contract tests of hcfplan.io.results (atomic writes, SIGTERM held back while a file is being
written) and of ``simulate --out`` (a non-empty folder is refused without ``--force``).
The runs are real ``python -m hcfplan`` processes on an invented 1 m capillary scenario. No
external source is needed for these checks.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pytest
from fast_cases import TINY

from hcfplan.cli.app import main
from hcfplan.io.csvdata import read_field_csv
from hcfplan.io.tomlio import parse_toml

ROOT = Path(__file__).resolve().parents[2]

#: Invented scenario that runs for several seconds (1 m capillary, 8192 points): a step ends
#: at every saved z position, and 4000 of them take seconds after the kernels load on an idle
#: machine, far beyond the 0.5 s after which the test signals (the run ends with the signal, so
#: its length costs the suite nothing).
SLOW = """
[laser]
wavelength_nm = 800.0
fwhm_fs = 40.0
shape = "gaussian"
energy_uj = 100.0

[fiber]
kind = "capillary"
core_diameter_um = 200.0
length_m = 1.0

[gas]
species = "Ar"
pressure_bar = 1.0

[grid]
points = 8192
z_samples = 4000
"""


PNG_START = b"\x89PNG\r\n\x1a\n"
PNG_END = b"IEND\xaeB`\x82"


def _env() -> dict:
    return dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))


def _default_sigint() -> None:
    """In the child before exec: SIGINT as in a terminal's foreground job. A shell starts a
    background job with SIGINT ignored and an ignored signal stays ignored across exec (POSIX;
    Python then installs no KeyboardInterrupt handler), so a test suite started with ``&``
    would see Ctrl-C ignored, as it should be for a background job. Common practice, no
    source."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def _start(config: Path, out: Path, **env) -> subprocess.Popen:
    return subprocess.Popen([sys.executable, "-m", "hcfplan", "simulate", str(config), "--out",
                             str(out), "--quiet"], env=dict(_env(), **env), cwd=config.parent,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            preexec_fn=_default_sigint)


def _wait_for(condition, proc: subprocess.Popen, timeout: float = 60.0) -> None:
    start = time.monotonic()
    while not condition():
        if proc.poll() is not None:
            pytest.fail(f"simulate ended before the signal (code {proc.returncode}): "
                        f"{proc.stderr.read()[-2000:]}")
        if time.monotonic() - start > timeout:
            proc.kill()
            pytest.fail("timed out waiting for the run to reach the interrupted phase")
        time.sleep(0.005)


def _running_physics(proc: subprocess.Popen):
    """True once the child has loaded numba's LLVM library (the solver's kernels), i.e. left the
    config loading (CoolProp is no sign of it: a repeat run reads its answers from the cache)."""
    maps = Path(f"/proc/{proc.pid}/maps")
    start = time.monotonic()

    def condition() -> bool:
        if not maps.exists():  # no /proc: fall back to a fixed delay
            return time.monotonic() - start > 3.0
        try:
            return "llvmlite" in maps.read_text(errors="replace")
        except OSError:
            return False
    return condition


def _assert_complete_or_absent(out: Path) -> list[str]:
    """Every file in ``out`` is complete and readable; no temporary files. Returns the names."""
    if not out.exists():
        return []
    names = sorted(p.name for p in out.iterdir())
    assert not [n for n in names if n.startswith(".")], f"temporary files left: {names}"
    for path in out.iterdir():
        assert path.is_file(), path
        if path.suffix == ".json":
            json.loads(path.read_text(encoding="utf-8"))
        elif path.suffix == ".npz":
            with np.load(path) as data:
                for key in data.files:
                    data[key]  # noqa: B018 - reading every array checks the archive
        elif path.suffix == ".toml":
            parse_toml(path.read_text(encoding="utf-8"), path.name)
        elif path.suffix == ".png":
            blob = path.read_bytes()
            assert blob.startswith(PNG_START) and blob.endswith(PNG_END), path
        elif path.suffix == ".html":
            assert path.read_text(encoding="utf-8").rstrip().endswith("</html>"), path
        elif path.suffix == ".csv":
            read_field_csv(path)  # compressed_field.csv: complete and readable
        else:
            pytest.fail(f"unexpected file {path.name}")
    return names


@pytest.fixture()
def slow_config(tmp_path) -> Path:
    path = tmp_path / "slow.toml"
    path.write_text(SLOW, encoding="utf-8")
    return path


@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_signal_during_propagation(slow_config, tmp_path, signum):
    out = tmp_path / "run"
    # the compiled kernels, whose loading shows that the run has reached the physics
    proc = _start(slow_config, out, HCFPLAN_KERNELS="numba")
    _wait_for(_running_physics(proc), proc)
    time.sleep(0.5)
    proc.send_signal(signum)
    _, err = proc.communicate(timeout=60)
    assert proc.returncode != 0
    assert "Traceback" not in err, err
    # stopped inside the propagation: nothing was written, not even the folder
    assert _assert_complete_or_absent(out) == []
    assert not out.exists()


@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_signal_while_writing(tmp_path, signum):
    config = tmp_path / "fast.toml"  # only the writing is interrupted: a short run will do
    config.write_text(TINY, encoding="utf-8")
    out = tmp_path / "run"
    proc = _start(config, out)
    # the folder appears with the first (temporary) file of the results
    _wait_for(lambda: out.exists() and any(out.iterdir()), proc, timeout=120)
    proc.send_signal(signum)
    proc.communicate(timeout=120)
    assert proc.returncode != 0
    names = _assert_complete_or_absent(out)
    if signum == signal.SIGTERM:
        # SIGTERM is held until the file being written is complete: that file is kept
        assert "fields.npz" in names


_HOLD_SCRIPT = """
import os, signal, sys
from pathlib import Path
from hcfplan.numerics.storage import write_text

out = Path(sys.argv[1])
# the signal arrives while the temporary file exists; the write must still complete
original = Path.write_text
def slow_write(self, data, *args, **kwargs):
    os.kill(os.getpid(), signal.SIGTERM)
    return original(self, data, *args, **kwargs)
Path.write_text = slow_write
write_text(out / "a.txt", "complete\\n")
print("not reached")
"""


def test_sigterm_is_held_until_the_file_is_complete(tmp_path):
    proc = subprocess.run([sys.executable, "-c", _HOLD_SCRIPT, str(tmp_path)], env=_env(),
                          capture_output=True, text=True, timeout=60)
    assert proc.returncode == -signal.SIGTERM, proc.stderr
    assert "not reached" not in proc.stdout
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.txt"]
    assert (tmp_path / "a.txt").read_text() == "complete\n"


def test_existing_out_refused_without_force(tmp_path, capsys):
    config = tmp_path / "fast.toml"
    config.write_text(TINY, encoding="utf-8")
    out = tmp_path / "run"
    argv = ["simulate", str(config), "--out", str(out), "--quiet", "--no-figures"]
    assert main(argv) == 0, capsys.readouterr().err
    capsys.readouterr()
    before = {p.name: p.read_bytes() for p in out.iterdir()}
    assert "summary.json" in before

    assert main(argv) == 2
    err = capsys.readouterr().err
    lines = [line for line in err.splitlines() if line.strip()]
    assert len(lines) == 1 and "--force" in lines[0] and str(out) in lines[0], err
    assert {p.name: p.read_bytes() for p in out.iterdir()} == before  # untouched

    os.utime(out / "summary.json", (0, 0))
    assert main([*argv, "--force"]) == 0, capsys.readouterr().err
    assert (out / "summary.json").stat().st_mtime > 0  # written again
    _assert_complete_or_absent(out)


def test_out_that_is_a_file_refused(tmp_path, capsys):
    config = tmp_path / "fast.toml"
    config.write_text(TINY, encoding="utf-8")
    out = tmp_path / "run"
    out.write_text("not a folder")
    assert main(["simulate", str(config), "--out", str(out), "--quiet"]) == 2
    assert "exists and is not a folder" in capsys.readouterr().err
    assert out.read_text() == "not a folder"
