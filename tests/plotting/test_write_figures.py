"""Figures drawn by two processes (hcfplan.io.results.write_figures): the same files as drawn
one by one, a figure the helper process does not finish is drawn by the parent, an error is
raised in the parent, and SIGTERM during the figures leaves complete files only.

Contract tests; no external source is needed for these checks (the PNG bytes are compared with
the serial drawing of the same figures).
"""

from __future__ import annotations

import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import pytest

from hcfplan.io import results

ROOT = Path(__file__).resolve().parents[2]
PARENT = os.getpid()

pytestmark = pytest.mark.skipif(results.figure_helpers(2) == 0,
                                reason="figures are drawn in one process here (one core or "
                                "not Linux)")


def _draw(fig, k, log):
    """A small line plot; appends the drawing process's id to ``log``."""
    with open(log, "a", encoding="ascii") as handle:
        handle.write(f"{os.getpid()}\n")
    time.sleep(0.2)  # long enough that both processes take figures
    ax = fig.subplots()
    ax.plot([0, 1, 2], [k, k * k, 1])
    ax.set_title(f"figure {k}")


def _draw_here_only(fig, k, log):
    if os.getpid() != PARENT:
        raise RuntimeError("the helper fails")
    _draw(fig, k, log)


def _draw_nowhere(fig, k, log):
    raise ValueError("no figure")


def _jobs(folder: Path, draw, n: int = 4):
    folder.mkdir()
    log = folder.parent / f"{folder.name}.log"
    return [(folder / f"f{k}.png", draw, (k, log)) for k in range(n)], log


def _serial(folder: Path, n: int = 4) -> dict[str, bytes]:
    jobs, _ = _jobs(folder, _draw, n)
    for path, draw, args in jobs:
        results.write_figure(path, draw, *args)
    return {p.name: p.read_bytes() for p in folder.iterdir()}


def test_two_processes_write_the_same_files_as_one(tmp_path):
    jobs, log = _jobs(tmp_path / "two", _draw)
    results.write_figures(jobs)
    drawn = {p.name: p.read_bytes() for p in (tmp_path / "two").iterdir()}
    assert drawn == _serial(tmp_path / "one")
    assert len(set(log.read_text().split())) == 2  # both processes drew


def test_figure_the_helper_fails_is_drawn_by_the_parent(tmp_path):
    jobs, log = _jobs(tmp_path / "two", _draw_here_only)
    results.write_figures(jobs)
    drawn = {p.name: p.read_bytes() for p in (tmp_path / "two").iterdir()}
    assert drawn == _serial(tmp_path / "one")
    assert set(log.read_text().split()) == {str(PARENT)}


def test_error_of_a_figure_is_raised_in_the_parent(tmp_path):
    jobs, _ = _jobs(tmp_path / "two", _draw_nowhere)
    with pytest.raises(ValueError, match="no figure"):
        results.write_figures(jobs)
    assert not [p for p in (tmp_path / "two").iterdir()]  # no file, no temporary file


_SIGTERM_SCRIPT = """
import os, signal, sys, time
from pathlib import Path
sys.path.insert(0, sys.argv[2])
from test_write_figures import _jobs, _draw
from hcfplan.io import results

parent, who = os.getpid(), sys.argv[3]
jobs, log = _jobs(Path(sys.argv[1]), _draw, 6)
def draw_then_stop(fig, k, log):
    _draw(fig, k, log)
    if (os.getpid() == parent) == (who == "parent"):
        os.kill(os.getpid(), signal.SIGTERM)  # the chosen process is stopped after a figure
jobs = [(path, draw_then_stop, args) for path, _, args in jobs]
results.write_figures(jobs)
print("all written")
"""


@pytest.mark.parametrize("who", ["parent", "helper"])
def test_sigterm_during_the_figures_leaves_complete_files_and_no_helper(tmp_path, who):
    """SIGTERM to the parent: the helper is stopped too (after its current file) and nothing
    is written after the parent ends. SIGTERM to the helper: the parent draws the rest."""
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    folder = tmp_path / "figs"
    proc = subprocess.run([sys.executable, "-c", _SIGTERM_SCRIPT, str(folder),
                           str(ROOT / "tests" / "plotting"), who], env=env, capture_output=True,
                          text=True, timeout=120)
    time.sleep(1.0)  # a helper left running would write more files meanwhile
    names = sorted(p.name for p in folder.iterdir())
    assert not [n for n in names if n.startswith(".")], names
    for name in names:
        assert (folder / name).read_bytes().endswith(b"IEND\xaeB`\x82"), name
    if who == "parent":
        assert proc.returncode == -signal.SIGTERM, proc.stderr
        # stopped at its first figure; the helper ends after the file it writes, if any
        assert len(names) <= 1, names
    else:
        assert proc.returncode == 0 and "all written" in proc.stdout, proc.stderr
        assert names == [f"f{k}.png" for k in range(6)]
    assert sorted(p.name for p in folder.iterdir()) == names


def _draw_stuck_in_helper(fig, k, log):
    if os.getpid() != PARENT:
        time.sleep(3600)  # a helper that never finishes its figure
    _draw(fig, k, log)


def test_stuck_helper_is_killed_and_its_figure_drawn_here(tmp_path, monkeypatch):
    monkeypatch.setattr(results, "HELPER_STALL_LIMIT", 1.0)
    jobs, log = _jobs(tmp_path / "two", _draw_stuck_in_helper)
    start = time.monotonic()
    results.write_figures(jobs)
    assert time.monotonic() - start < 30
    drawn = {p.name: p.read_bytes() for p in (tmp_path / "two").iterdir()}
    assert drawn == _serial(tmp_path / "one")
