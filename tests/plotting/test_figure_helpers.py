"""Figure helpers forked before a run (hcfplan.plotting.helpers): they draw the same files as
one process would, a figure a helper does not complete is drawn by the parent, and helpers
that get no figures end.

Contract tests; no external source is needed (the PNG bytes are compared with the serial
drawing of the same figures).
"""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from hcfplan.io.results import write_figure
from hcfplan.plotting.helpers import FigureHelpers

PARENT = os.getpid()


def _draw(fig, k, log):
    """A small line plot; appends the drawing process's id to ``log``."""
    with open(log, "a", encoding="ascii") as handle:
        handle.write(f"{os.getpid()}\n")
    ax = fig.subplots()
    ax.plot([0, 1, 2], [k, k * k, 1])
    ax.set_title(f"figure {k}")


def _draw_here_only(fig, k, log):
    """Fails in a helper, draws in the parent."""
    if os.getpid() != PARENT:
        raise RuntimeError("helper failure")
    _draw(fig, k, log)


@pytest.fixture()
def helpers():
    started = FigureHelpers.start(2)
    if started is None:
        pytest.skip("figures are drawn in one process here (one core or not Linux)")
    yield started
    started.close()


def test_helpers_draw_the_same_files(helpers, tmp_path):
    log = tmp_path / "pids.txt"
    jobs = [(tmp_path / f"f{k}.png", _draw, (k, log)) for k in range(4)]
    helpers.write(jobs)
    pids = {int(line) for line in log.read_text().split()}
    assert pids and PARENT not in pids  # every figure drawn by a helper
    for k in range(4):
        serial = tmp_path / f"serial{k}.png"
        write_figure(serial, _draw, k, tmp_path / "serial.txt")
        assert (tmp_path / f"f{k}.png").read_bytes() == serial.read_bytes()
    assert not list(tmp_path.glob(".*"))  # no temporary file left


def test_a_figure_a_helper_fails_is_drawn_here(helpers, tmp_path):
    log = tmp_path / "pids.txt"
    jobs = [(tmp_path / "ok.png", _draw, (1, log)),
            (tmp_path / "here.png", _draw_here_only, (2, log))]
    helpers.write(jobs)
    assert (tmp_path / "ok.png").stat().st_size > 0
    assert (tmp_path / "here.png").stat().st_size > 0
    assert PARENT in {int(line) for line in log.read_text().split()}


def test_an_error_is_raised_here(helpers, tmp_path):
    def fails(fig):
        raise ValueError("no such data")

    with pytest.raises(ValueError, match="no such data"):
        helpers.write([(tmp_path / "bad.png", fails, ())])  # a local function: not picklable
    assert not Path(tmp_path / "bad.png").exists()


def test_helpers_without_figures_end(helpers):
    processes = list(helpers._processes)
    helpers.close()
    assert not any(p.is_alive() for p in processes)
