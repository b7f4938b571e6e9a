"""Scans: parsing of --vary, point files (resume, damage detection), local vs Dask executors.

Contract tests (no physics values are checked here; the chain's numbers are tested beside
each model). The scans use a 20 cm argon capillary on a 1024-point grid (~0.5 s per point). No
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

import pytest
from fast_cases import write_fast_config

from hcfplan.errors import ConfigError
from hcfplan.planning.scan import config_key, parse_vary, plan_scan, read_point, run_scan

ROOT = Path(__file__).resolve().parents[2]

@pytest.fixture()
def fast(tmp_path) -> Path:
    return write_fast_config(tmp_path)


# ---------------------------------------------------------------------------------------------
# --vary


def test_range_includes_both_ends():
    # contract: COUNT values, linearly spaced, both ends included
    vary = parse_vary("gas.pressure_bar=1:3:5")
    assert vary.values == pytest.approx((1.0, 1.5, 2.0, 2.5, 3.0), rel=0, abs=1e-12)
    assert vary.values[-1] == 3.0


def test_list_of_any_key():
    assert parse_vary("gas.species=Ar,Kr,Ne").values == ("Ar", "Kr", "Ne")
    assert parse_vary("grid.points=512:2048:3").values == (512, 1280, 2048)


@pytest.mark.parametrize("text,fragment", [
    ("gas.pressur=1:2:3", "gas.pressur: unknown key"),
    ("gass.pressure_bar=1:2:3", r"unknown section \[gass\]"),
    ("gas.species=1:2:3", "gas.species: a START:STOP:COUNT range needs a numeric key"),
    ("grid.points=500:1000:4", "grid.points=500:1000:4: grid.points is an integer key"),
    ("gas.pressure_bar=1:x:3", "gas.pressure_bar=1:x:3: expected START:STOP:COUNT"),
    ("gas.pressure_bar", "'gas.pressure_bar': expected section.key="),
])
def test_bad_vary(text, fragment):
    with pytest.raises(ConfigError, match=fragment):
        parse_vary(text)


def test_every_point_validated_up_front(fast):
    with pytest.raises(ConfigError, match=r"gas.pressure_bar = -1.0: must be >= 1e-09"):
        plan_scan(fast, [parse_vary("gas.pressure_bar=-1:2:4")])


def test_point_keys_follow_the_resolved_config(fast):
    # contract: the key is the config hash, independent of the point's position in the scan
    plan_a = plan_scan(fast, [parse_vary("gas.pressure_bar=1:3:3")])
    plan_b = plan_scan(fast, [parse_vary("gas.pressure_bar=3,2,1")])
    assert [p.key for p in plan_a.points] == [p.key for p in plan_b.points][::-1]
    assert len({p.key for p in plan_a.points}) == 3
    assert all(len(p.key) == 16 for p in plan_a.points)


# ---------------------------------------------------------------------------------------------
# point files


def _scan_cmd(config: Path, out: Path, *extra: str) -> list[str]:
    return [sys.executable, "-m", "hcfplan", "scan", str(config), "--vary",
            "gas.pressure_bar=1:3:5", "--out", str(out), "--workers", "1", "--no-figures",
            "--json", *extra]


def _env() -> dict:
    return {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}


def test_killed_scan_resumes_with_the_remaining_points(fast, tmp_path):
    # contract: a scan killed after k points recomputes only the other 5 - k on the rerun
    out = tmp_path / "scan"
    proc = subprocess.Popen(_scan_cmd(fast, out), env=_env(), cwd=tmp_path,
                            stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL,
                            start_new_session=True)
    try:
        deadline = time.monotonic() + 60
        while len(list((out / "points").glob("*.json"))) < 2 and time.monotonic() < deadline:
            time.sleep(0.05)
    finally:
        os.killpg(proc.pid, signal.SIGKILL)  # the session of the process started above
        proc.wait()
    done = {p: p.stat().st_mtime_ns for p in (out / "points").glob("*.json")}
    assert 2 <= len(done) < 5
    rerun = subprocess.run(_scan_cmd(fast, out), env=_env(), cwd=tmp_path, capture_output=True,
                           text=True, timeout=120)
    assert rerun.returncode == 0, rerun.stderr
    report = json.loads(rerun.stdout)
    assert report["reused"] == len(done)
    assert report["computed"] == 5 - len(done)
    assert {p: p.stat().st_mtime_ns for p in done} == done  # finished points untouched
    assert len(list((out / "points").glob("*.json"))) == 5
    assert not list((out / "points").glob(".*"))  # no temp files left behind


def test_damaged_point_files_are_recomputed(fast, tmp_path):
    # contract: truncated JSON, an edited value (checksum) and a wrong key are all detected
    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:3")])
    out = tmp_path / "scan"
    first = run_scan(plan, out, workers=1)
    assert len(first.computed) == 3 and not first.reused
    files = [out / "points" / f"{p.key}.json" for p in plan.points]
    files[0].write_text(files[0].read_text()[:200])
    edited = json.loads(files[1].read_text())
    edited["summary"]["compressed"]["fwhm_s"] *= 2
    files[1].write_text(json.dumps(edited))
    moved = json.loads(files[2].read_text())
    files[2].write_text(json.dumps({**moved, "key": "0" * 16}))
    second = run_scan(plan, out, workers=1)
    reasons = dict(second.damaged)
    assert set(second.computed) == {p.key for p in plan.points}
    assert "unreadable" in reasons[plan.points[0].key]
    assert reasons[plan.points[1].key] == "checksum mismatch"
    assert "key does not match" in reasons[plan.points[2].key]
    for path, point in zip(files, plan.points, strict=True):
        record, problem = read_point(path, point.key)
        assert problem == "" and config_key(record["config"]) == point.key


def test_failed_point_is_recorded_and_not_retried(fast, tmp_path):
    # contract: a run that stops (solver success False) is a finished, failed point
    plan = plan_scan(fast, [parse_vary("grid.stop_ionization_fraction=1e-30,0.1")])
    out = tmp_path / "scan"
    first = run_scan(plan, out, workers=1)
    status = [r["status"] for r in first.records]
    assert status == ["failed", "ok"]
    assert first.records[0]["message"]
    second = run_scan(plan, out, workers=1)
    assert not second.computed and len(second.reused) == 2
    table = (out / "table.csv").read_text().splitlines()
    assert table[0].startswith("point,key,grid.stop_ionization_fraction,status,message,")
    assert ",failed," in table[1] and ",ok," in table[2]


def test_other_scan_in_folder_is_refused(fast, tmp_path):
    out = tmp_path / "scan"
    run_scan(plan_scan(fast, [parse_vary("gas.pressure_bar=1,2")]), out, workers=1)
    other = plan_scan(fast, [parse_vary("gas.pressure_bar=1,3")])
    with pytest.raises(ConfigError, match=f"--out {out}: holds points of a different scan"):
        run_scan(other, out, workers=1)
    forced = run_scan(other, out, workers=1, force=True)  # the shared 1 bar point is reused
    assert len(forced.reused) == 1 and len(forced.computed) == 1
    fresh = run_scan(other, out, workers=1, fresh=True)
    assert len(fresh.computed) == 2


def test_unrelated_folder_is_refused(fast, tmp_path):
    out = tmp_path / "notes"
    out.mkdir()
    (out / "mine.txt").write_text("keep")
    with pytest.raises(ConfigError, match=f"--out {out}: folder is not empty and holds no"):
        run_scan(plan_scan(fast, [parse_vary("gas.pressure_bar=1,2")]), out, workers=1)


# ---------------------------------------------------------------------------------------------
# executors


def test_dask_and_local_pool_give_identical_tables(fast, tmp_path):
    # invariant: the executor does not change any number of the table
    distributed = pytest.importorskip("distributed")
    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:3")])
    local = run_scan(plan, tmp_path / "local", workers=2)
    assert local.executor == "processes"
    with distributed.LocalCluster(n_workers=2, processes=True, threads_per_worker=1,
                                  dashboard_address=None) as cluster:
        remote = run_scan(plan, tmp_path / "dask", address=cluster.scheduler_address)
    assert remote.executor == "dask"
    assert (tmp_path / "local" / "table.csv").read_text() == \
        (tmp_path / "dask" / "table.csv").read_text()


def test_parent_computes_points_beside_the_pool(fast, tmp_path, monkeypatch):
    # contract: with --workers 2 the parent takes the first point at once (it does not wait for
    # the fork server) and the pool process gets one at the start; together they compute
    # every point once, and the table equals the serial one
    from hcfplan.planning import scan
    from hcfplan.planning.scan import executors

    taken, intervals = [], []

    class Counting(executors.ParentWorker):
        def __init__(self, take, results, finished=None):
            def counted():
                task = take()
                if task is not None:
                    taken.append(task["key"])
                    intervals.append(sys.getswitchinterval())
                return task
            super().__init__(counted, results, finished)

    monkeypatch.setattr(executors, "ParentWorker", Counting)  # where run_processes finds it
    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:4")])
    before = sys.getswitchinterval()
    both = run_scan(plan, tmp_path / "both", workers=2)
    assert both.executor == "processes" and sorted(both.computed) == sorted(p.key for p in
                                                                            plan.points)
    assert taken[0] == plan.points[0].key and 1 <= len(taken) <= 3
    # hand-offs do not wait for the compute thread; the interval is restored afterwards
    assert intervals and all(i == pytest.approx(scan.HANDOFF_SWITCH_INTERVAL) for i in intervals)
    assert sys.getswitchinterval() == before
    run_scan(plan, tmp_path / "serial", workers=1)
    assert (tmp_path / "both" / "table.csv").read_text() == \
        (tmp_path / "serial" / "table.csv").read_text()


def test_local_pool_is_kept_between_runs(fast, tmp_path, monkeypatch):
    # contract: a second run with the same number of workers in this process is given the same
    # pool processes (warm: no new process, no first-point set-up); they compute in the
    # parent's current folder even when they started in another (here the config and its gas
    # table folder are given relative to it), and the table equals the serial one
    import shutil

    from hcfplan.planning import scan

    run_scan(plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:3")]), tmp_path / "first",
             workers=2)
    pool = scan.KEPT_POOL.pool
    processes = set(pool._processes)
    assert processes
    folder = tmp_path / "elsewhere"
    (folder / "tables").mkdir(parents=True)
    shutil.copy(ROOT / "gases" / "Ar.toml", folder / "tables" / "Ar.toml")
    config = write_fast_config(folder)
    config.write_text(config.read_text().replace('species = "Ar"',
                                                 'species = "Ar"\ntable_dir = "tables"'))
    monkeypatch.chdir(folder)
    plan = plan_scan(Path("fast.toml"), [parse_vary("gas.pressure_bar=1.5:2.5:4")])
    kept = run_scan(plan, Path("kept"), workers=2)
    assert scan.KEPT_POOL.pool is pool and set(pool._processes) == processes
    assert [r["status"] for r in kept.records] == ["ok"] * 4
    run_scan(plan, Path("serial"), workers=1)
    assert Path("kept/table.csv").read_text() == Path("serial/table.csv").read_text()


def test_runs_from_two_threads_do_not_share_the_kept_pool(fast, tmp_path):
    # contract: while one run has the kept pool, a run from another thread (here with another
    # number of workers, which would replace a free kept pool) gets a pool of its own; both
    # complete and give the serial table
    import threading

    from hcfplan.planning import scan

    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:4")])
    run_scan(plan, tmp_path / "serial", workers=1)
    run_scan(plan, tmp_path / "warm", workers=2)
    kept = scan.KEPT_POOL.pool
    started, errors = threading.Event(), []

    def other() -> None:
        started.wait(60)
        try:
            run_scan(plan, tmp_path / "three", workers=3)
        except BaseException as exc:  # handed to the test thread
            errors.append(exc)

    thread = threading.Thread(target=other)
    thread.start()

    def on_point(count, *_args):
        if count == 1:  # the kept pool is lent to this run now
            started.set()
            thread.join(120)

    run_scan(plan, tmp_path / "two", workers=2, on_point=on_point)
    assert not thread.is_alive() and errors == []
    assert scan.KEPT_POOL.pool is kept
    serial = (tmp_path / "serial" / "table.csv").read_text()
    for name in ("two", "three"):
        assert (tmp_path / name / "table.csv").read_text() == serial


def test_interrupted_run_stops_the_kept_pool(fast, tmp_path):
    # contract: a run that is interrupted (here the progress callback raises, as Ctrl-C
    # would) stops the pool's processes and drops the kept pool; the next run gets a new one
    from hcfplan.planning import scan

    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:3")])
    run_scan(plan, tmp_path / "warm", workers=2)
    old = scan.KEPT_POOL.pool
    processes = list(old._processes.values())

    def interrupt(*_args):
        raise KeyboardInterrupt

    with pytest.raises(KeyboardInterrupt):
        run_scan(plan, tmp_path / "stopped", workers=2, on_point=interrupt)
    assert scan.KEPT_POOL.pool is None
    for process in processes:
        process.join(timeout=10)
        assert not process.is_alive()
    again = run_scan(plan, tmp_path / "again", workers=2)
    assert scan.KEPT_POOL.pool is not old and len(again.computed) == 3


def _work_record(key: str, evaluations: int, points: int = 1024) -> dict:
    return {"key": key, "summary": {"solver": {"rhs_evaluations": evaluations},
                                    "grid": {"points": points}}}


def _simulated_run(costs: list[float], starts: tuple[float, ...] = (0.0, 0.0)):
    """Tasks taken by workers that start at ``starts`` and take the next task when they finish
    one (a point of cost c takes c seconds and reports c evaluations). Returns (order of the
    task indices taken, makespan)."""
    import heapq

    from hcfplan.planning import scan

    tasks = [{"key": f"p{i}", "index": i} for i in range(len(costs))]
    order, taken = scan.CostlierEndFirst(tasks), []
    running = []  # (finish time, worker, task)
    for worker, start in sorted(enumerate(starts), key=lambda item: item[1]):
        task = order.take()
        taken.append(task["index"])
        heapq.heappush(running, (start + costs[task["index"]], worker, task))
    end = 0.0
    while running:
        end, worker, task = heapq.heappop(running)
        order.finished(_work_record(task["key"], costs[task["index"]]))
        task = order.take()
        if task is not None:
            taken.append(task["index"])
            heapq.heappush(running, (end + costs[task["index"]], worker, task))
    return taken, end


def _plan_order_makespan(costs: list[float], starts=(0.0, 0.0)) -> float:
    free = sorted(starts)
    for cost in costs:
        free[0] += cost
        free.sort()
    return free[-1]


def test_costliest_points_are_taken_first():
    # contract: with costs that grow (or fall) along the task list, the workers take the two
    # ends first, then go on from the costlier end, so no worker ends on a long point while
    # the other waits (Graham's longest-processing-time-first rule, SIAM J. Appl. Math. 17,
    # 416 (1969)); every task is taken once
    rising = [1.0 + 0.004 * i**2 for i in range(16)]  # as a pressure scan's points
    taken, makespan = _simulated_run(rising)
    assert taken == [0, 15, *range(14, 0, -1)]
    assert makespan < _plan_order_makespan(rising)
    assert makespan <= sum(rising) / 2 + min(rising)  # at most the cheapest point of idling
    falling = rising[::-1]
    taken, makespan = _simulated_run(falling)
    assert taken == [0, 15, *range(1, 15)]
    assert makespan <= sum(falling) / 2 + min(falling)
    # a second worker that starts late first finishes its cheap end late: the order turns
    # to the costlier end once both ends have a finished point
    taken, makespan = _simulated_run(falling, starts=(0.0, 2.2))
    assert taken == [0, 15, 14, *range(1, 14)]
    assert makespan <= _plan_order_makespan(falling, starts=(0.0, 2.2))
    taken, makespan = _simulated_run(rising, starts=(0.0, 2.2))
    assert taken == [0, 15, *range(14, 0, -1)]
    assert makespan < _plan_order_makespan(rising, starts=(0.0, 2.2))


def test_point_work_counts_solver_evaluations_and_grid():
    # the work measure of the ordering: N evaluations x N log2 N; a point without a solver
    # run (a config problem of that point) counts 0
    from hcfplan.planning import scan

    assert scan.point_work(_work_record("a", 10, 1024)) == pytest.approx(10 * 1024 * 10)
    assert scan.point_work({"key": "b", "summary": {}}) == 0.0


def test_json_ready_gives_plain_values():
    # the converter of every JSON file and of the point checksums: numpy values to Python,
    # non-finite floats to null, paths to strings, tuples to lists, keys to strings
    import numpy as np

    from hcfplan.io.results import json_ready

    data = {"a": np.arange(3.0), "b": (np.float64(1.5), np.int64(2), np.bool_(True)),
            "c": [float("nan"), float("inf"), -0.25, np.float32(np.nan)], 4: Path("x/y"),
            "d": {"e": None, "f": "text", "g": True, "h": 7}, "i": np.array([[1, 2]])}
    ready = json_ready(data)
    assert ready == {"a": [0.0, 1.0, 2.0], "b": [1.5, 2, True], "c": [None, None, -0.25, None],
                     "4": "x/y", "d": {"e": None, "f": "text", "g": True, "h": 7},
                     "i": [[1, 2]]}
    assert type(ready["b"][0]) is float and type(ready["b"][1]) is int
    assert type(ready["b"][2]) is bool


def test_point_files_hold_one_field_per_line(tmp_path):
    # the scan's point files: the same JSON data, each top-level field on a line of its own
    import numpy as np

    from hcfplan.io.results import json_ready, write_json

    record = {"key": "abc", "summary": {"x": {"y": np.float64(2.0)}, "z": float("nan")},
              "spectrum": {"f": list(np.linspace(0, 1, 5))}, "seconds": {"point": 0.1}}
    write_json(tmp_path / "p.json", record, one_line_fields=True)
    text = (tmp_path / "p.json").read_text()
    assert json.loads(text) == json_ready(record)
    assert text.count("\n") == len(record) + 2 and text.startswith('{\n  "key": "abc",\n')
    write_json(tmp_path / "q.json", record)  # the default: indented by 2
    assert json.loads((tmp_path / "q.json").read_text()) == json_ready(record)
    assert (tmp_path / "q.json").read_text().count("\n") > len(record) + 2


def test_parent_worker_hands_a_bug_to_the_main_thread():
    # a non-validation exception in the parent's own point reaches the caller, it is not lost
    import queue

    from hcfplan.planning import scan

    tasks, results = [{"raw": {}}], queue.Queue()
    worker = scan.ParentWorker(lambda: tasks.pop() if tasks else None, results)
    source, record, error = results.get(timeout=30)
    assert source is worker and record is None and isinstance(error, KeyError)


def test_missing_scheduler_is_one_line_error(fast, tmp_path, monkeypatch):
    pytest.importorskip("distributed")
    monkeypatch.setattr("hcfplan.planning.scan.executors.DASK_CONNECT_TIMEOUT", 0.5)
    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1,2")])
    start = time.perf_counter()
    with pytest.raises(ConfigError, match="--dask-scheduler tcp://127.0.0.1:1: cannot connect"):
        run_scan(plan, tmp_path / "s", address="tcp://127.0.0.1:1")
    # the shortened timeout is the one run_dask reads (a patch of the package's re-exported
    # name would leave it at 10 s)
    assert time.perf_counter() - start < 5.0


def test_worker_environment_is_set_for_the_workers_and_restored(monkeypatch):
    # contract: the numerical libraries of the scan workers run one thread each (the workers
    # are the parallelism); the parent's environment is left as it was
    import os

    from hcfplan.planning import scan

    monkeypatch.setenv("OMP_NUM_THREADS", "7")
    monkeypatch.delenv("OPENBLAS_NUM_THREADS", raising=False)
    with scan.worker_environment():
        assert all(os.environ[key] == "1" for key in scan.WORKER_THREADS)
    assert os.environ["OMP_NUM_THREADS"] == "7"
    assert "OPENBLAS_NUM_THREADS" not in os.environ


_PRELOAD_CHECK = """
import importlib, json, sys
from hcfplan.planning.scan import WORKER_PRELOAD, compute_point
task = json.loads(sys.argv[1])  # planned by the test: a worker never plans
for name in WORKER_PRELOAD:
    importlib.import_module(name)
before = set(sys.modules)
record = compute_point(task)
print(record["status"], *sorted(m for m in set(sys.modules) - before if m.startswith("hcfplan")))
"""


def test_worker_preload_covers_every_module_a_point_imports(fast):
    """Contract: the fork server preloads every hcfplan module a scan point imports, so no
    worker imports one during its first point (a fresh interpreter)."""
    from hcfplan.planning.scan import point_task

    plan = plan_scan(fast, [parse_vary("gas.pressure_bar=1.5")])
    task = json.dumps(point_task(plan, plan.points[0]))
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    out = subprocess.run([sys.executable, "-c", _PRELOAD_CHECK, task], env=env, check=True,
                         capture_output=True, text=True, timeout=300).stdout.split()
    assert out == ["ok"]


def test_worker_preload_modules_import():
    # the fork server ignores a failing preload silently: check every module imports
    import importlib

    from hcfplan.planning.scan import WORKER_PRELOAD

    for name in WORKER_PRELOAD:
        importlib.import_module(name)


_SERVER_CHECK = """
import os, sys, time
from pathlib import Path
from hcfplan.planning.scan import start_worker_server

def children():
    found = []
    for stat in Path("/proc").glob("[0-9]*/stat"):
        try:
            fields = stat.read_text().rsplit(")", 1)[1].split()
        except OSError:
            continue
        if int(fields[1]) == os.getpid():
            found.append(int(stat.parent.name))
    return found

os.environ["OMP_NUM_THREADS"] = "7"
start_worker_server(int(sys.argv[1]))
time.sleep(0.2)
kids = children()  # the fork server and multiprocessing's resource tracker
env = [Path(f"/proc/{pid}/environ").read_bytes().split(b"\\0") for pid in kids]
one_thread = all(b"OMP_NUM_THREADS=1" in e for e in env)
print(int(len(kids) > 0), int(one_thread), os.environ["OMP_NUM_THREADS"])
"""


@pytest.mark.skipif(not Path("/proc/self/stat").exists(), reason="needs /proc (Linux)")
@pytest.mark.parametrize(("workers", "expected"), [(1, ["0", "1", "7"]), (2, ["1", "1", "7"])])
def test_worker_server_starts_early_with_the_worker_environment(workers, expected):
    """Contract: with more than one worker the fork server is started at once (it imports while
    the command plans), in the workers' one-thread environment; the caller's is unchanged."""
    import multiprocessing

    if "forkserver" not in multiprocessing.get_all_start_methods():
        pytest.skip("no fork server on this platform")
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    out = subprocess.run([sys.executable, "-c", _SERVER_CHECK, str(workers)], env=env,
                         check=True, capture_output=True, text=True, timeout=120).stdout.split()
    assert out == expected


def test_scan_above_point_limit_is_refused_fast(fast):
    from hcfplan.planning.scan.plan import MAX_SCAN_POINTS

    start = time.perf_counter()
    over = MAX_SCAN_POINTS + 1
    with pytest.raises(ConfigError, match=rf"--vary gas.pressure_bar=1:2:{over}: COUNT = {over}"):
        parse_vary(f"gas.pressure_bar=1:2:{over}")
    values = ",".join(str(1 + i * 1e-4) for i in range(over))
    with pytest.raises(ConfigError, match=rf"{over} values exceed the limit"):
        parse_vary(f"gas.pressure_bar={values}")
    with pytest.raises(ConfigError, match=r"\(101\) x laser.energy_uj \(100\): 10100 points"):
        plan_scan(fast, [parse_vary("gas.pressure_bar=1:2:101"),
                         parse_vary("laser.energy_uj=100:200:100")])
    assert time.perf_counter() - start < 5.0
