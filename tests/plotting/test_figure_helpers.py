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


def test_the_jobs_of_a_run_unpickle_without_new_imports(tmp_path):
    """The helper is forked after RESULT_MODULES are imported, so unpickling a run's figure
    jobs there imports nothing more (numba and scipy.optimize cost 0.24 s of CPU otherwise)."""
    import pickle
    import subprocess
    import sys

    from fast_cases import write_fast_config

    from hcfplan.io.config import load_config
    from hcfplan.planning.chain import run_chain
    from hcfplan.plotting.report import figure_jobs

    chain = run_chain(load_config(write_fast_config(tmp_path)))
    blob = tmp_path / "jobs.pickle"
    blob.write_bytes(pickle.dumps(figure_jobs(tmp_path, chain)))
    code = ("import pickle, sys; "
            "from hcfplan.plotting import helpers, report; helpers._import_result_modules(); "
            "before = set(sys.modules); pickle.loads(open(sys.argv[1], 'rb').read()); "
            "print(' '.join(sorted(m for m in set(sys.modules) - before "
            "if m.startswith(('hcfplan', 'numba', 'scipy')))))")
    out = subprocess.run([sys.executable, "-c", code, str(blob)], capture_output=True,
                         text=True, check=True, timeout=120)
    assert out.stdout.strip() == ""
