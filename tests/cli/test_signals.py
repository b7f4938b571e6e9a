"""Interrupted and killed commands that run worker processes: ``scan``, ``simulate --spread``
and ``compare --spread``.

SIGINT to the whole process group (what Ctrl-C in a terminal does) or SIGTERM to the command,
while its fork server imports or while its workers compute: no traceback from any process, one
line from the command, exit 130 (SIGINT) or 143 (SIGTERM), every process of the command gone,
complete files only. SIGKILL to the command: its workers and fork server end by themselves
within seconds and release the caller's output pipe. All of it runs beside a CPU-bound process
(the load of a busy machine). Real processes; contract tests, no external source needed.
"""

from __future__ import annotations

import json
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest
from fast_cases import write_fast_config
from process_tools import (
    PATIENCE,
    children_of,
    has_proc,
    kill_session,
    session_processes,
    start,
    wait_for,
    workers_running,
)

pytestmark = pytest.mark.skipif(not has_proc(), reason="reads /proc to see the processes")


@pytest.fixture(scope="module", autouse=True)
def cpu_load():
    """A CPU-bound process beside every test of this module."""
    burner = subprocess.Popen([sys.executable, "-c", "while True: pass"])
    yield
    burner.kill()
    burner.wait()


def _server_running(proc):
    """Condition: the command's fork server exists (it imports for a few seconds)."""
    def condition() -> bool:
        for child in children_of(proc.pid):
            try:
                if b"forkserver" in Path(f"/proc/{child}/cmdline").read_bytes():
                    return True
            except OSError:
                pass
        return False
    return condition


PHASES = {"server": _server_running, "workers": workers_running}
#: Exit codes of an interrupted command: 128 + the signal's number.
EXPECTED = {signal.SIGINT: 130, signal.SIGTERM: 143}


def _send(proc, signum: int) -> None:
    if signum == signal.SIGINT:
        os.killpg(proc.pid, signum)  # the terminal's Ctrl-C: every process of the group
    else:
        proc.send_signal(signum)  # `kill PID`: the command only


def _end(proc) -> tuple[int, str]:
    """Wait for the command and for every process of its session; its exit code and stderr."""
    try:
        _, err = proc.communicate(timeout=PATIENCE)  # returns once nobody holds the pipes
    except subprocess.TimeoutExpired:
        kill_session(proc)
        pytest.fail("the output pipes stayed open: a process of the command lives on")
    wait_for(lambda: not session_processes(proc.pid), timeout=30,
             what="every process of the command to end")
    return proc.returncode, err


def _interrupted_line(err: str) -> str:
    assert "Traceback" not in err and "Error" not in err, err
    lines = [line for line in err.splitlines() if line.strip()]
    assert len(lines) == 1 and lines[0].startswith("hcfplan: interrupted; "), err
    return lines[0]


def _complete_files_only(out: Path, killed: bool = False) -> None:
    """Every result file parses; no temporary is left, except after SIGKILL, which no process
    can catch: a temporary being written at that instant stays (named ``.<file>.*``, never read
    as a result)."""
    if not out.exists():
        return
    if not killed:
        assert not list(out.rglob(".*")), sorted(out.rglob("*"))
    for path in out.rglob("*.json"):
        if not path.name.startswith("."):
            json.loads(path.read_text(encoding="utf-8"))


def _scan(tmp_path: Path) -> tuple[list[str], Path]:
    config = write_fast_config(tmp_path)
    out = tmp_path / "scan"
    return ["scan", str(config), "--vary", "gas.pressure_bar=1:3:8", "--out", str(out),
            "--workers", "3", "--no-figures", "--json"], out


@pytest.mark.parametrize("phase", list(PHASES))
@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM], ids=["SIGINT", "SIGTERM"])
def test_interrupted_scan(tmp_path, phase, signum):
    argv, out = _scan(tmp_path)
    proc = start(argv, tmp_path)
    wait_for(PHASES[phase](proc), proc, what=f"the {phase} phase")
    _send(proc, signum)
    code, err = _end(proc)
    assert code == EXPECTED[signum], (code, err)
    line = _interrupted_line(err)
    assert line == "hcfplan: interrupted; nothing written" or "resumes from them" in line
    _complete_files_only(out)


def test_killed_scan_leaves_no_process(tmp_path):
    argv, out = _scan(tmp_path)
    proc = start(argv, tmp_path)
    wait_for(workers_running(proc), proc, what="the workers")
    proc.kill()
    start_wait = time.monotonic()
    _end(proc)  # workers and fork server gone, the pipes closed
    assert time.monotonic() - start_wait < 30
    _complete_files_only(out, killed=True)


@pytest.mark.parametrize(("command", "signum"), [("simulate", signal.SIGINT),
                                                 ("compare", signal.SIGTERM)])
def test_interrupted_spread(tmp_path, command, signum):
    config = write_fast_config(tmp_path)
    out = tmp_path / "out"
    # corner runs on a grid 8 times the fast config's, so that they are still running when
    # the test looks for them on a loaded machine (with 1024 points a spread could end first)
    spread = ["--spread", "energy=5%,pressure=2%,fwhm=5%", "--workers", "3", "--set",
              "grid.points=8192"]
    argv = {"simulate": ["simulate", str(config), "--out", str(out), "--quiet", *spread],
            "compare": ["compare", str(config), "--set-b", "laser.energy_uj=150", "--out",
                        str(out), "--json", *spread]}[command]
    proc = start(argv, tmp_path)
    wait_for(workers_running(proc), proc, what="the corner runs")
    _send(proc, signum)
    code, err = _end(proc)
    assert code == EXPECTED[signum], (code, err)
    _interrupted_line(err)
    _complete_files_only(out)
