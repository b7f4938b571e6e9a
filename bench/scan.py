"""Benchmark: a 16-point pressure scan with 1 and 2 workers; speed-up and per-point overhead.

Run: ``PYTHONPATH=. python bench/scan.py [GRID_POINTS ...]`` (default: 1024 and 8192 points of
a small invented capillary config with 0.1-0.5 s points, then the README's demo config at 16384
points, 1-2 s points). First the hand-off latency between this process and a pool process
beside a busy thread, at Python's default switch interval and at the scan's
(:func:`handoff_latency`). Then, for each scan, two measurements:

1. In this process (``run_scan``), :data:`ROUNDS` runs of each executor, alternated: the best
   wall time per executor, the speed-up of 2 workers over 1 and the overhead per point outside
   the chain (wall time x workers / points minus the mean time spent inside the point
   computation), as a fraction of a point's time. Both executors are warmed up first (imports
   and kernels in this process; the fork server, which a process starts once), so this is the
   steady state of a session that runs several scans: with 2 workers the second one is the
   pool process kept from the previous run (``hcfplan.planning.scan.pool.KeptPool``). A third
   series, ``2 (new pool)``, drops the kept pool before each run, so its pool process is forked
   from the server and pays its own first-call set-up: a session's first scan. Beside it,
   this machine's own ceiling for the same points (:func:`chain_ceiling`: two warm
   processes, each computing a fixed half, against one).
2. The whole command as a user runs it, ``hcfplan scan ... --workers 1`` and ``--workers 2``
   in a new process each, best of :data:`ROUNDS` (alternated; imports, kernel load and the
   fork server's start included; no figures).

FFTW wisdom is read from and written to a cache folder of this run (not the user's), made
once by a warm-up, so both executors find the same plans.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import tempfile
import time
from pathlib import Path

from hcfplan.planning.scan import compute_point, parse_vary, plan_scan, release_workers, run_scan

#: The tests folder (for the invented fast config of tests/fast_cases.py). It is imported inside
#: main() only: a pool process runs this script again at its start (multiprocessing does so for
#: a script run by path), and importing pytest there cost 0.2 s per process.
TESTS = Path(__file__).resolve().parents[1] / "tests"

POINTS = 16
#: Runs of each executor (alternated; the best is reported: the machine is shared and noisy).
ROUNDS = 3


def _run(plan, out: Path, workers: int) -> tuple[float, list[float]]:
    shutil.rmtree(out, ignore_errors=True)
    start = time.perf_counter()
    outcome = run_scan(plan, out, workers=workers)
    wall = time.perf_counter() - start
    return wall, [r["seconds"]["point"] for r in outcome.records]


def _fft_loop(_seed: int) -> float:
    """A CPU-bound FFT loop of the size the solver uses: the machine's own parallel ceiling."""
    import numpy as np

    a = np.random.default_rng(_seed).standard_normal(8192) + 0j
    start = time.perf_counter()
    for _ in range(2000):
        a = np.fft.ifft(np.fft.fft(a))
    return time.perf_counter() - start


def machine_ceiling() -> float:
    """Speed-up of 4 FFT loops on 2 processes over 1: what 2 workers can give on this machine."""
    from concurrent.futures import ProcessPoolExecutor

    start = time.perf_counter()
    for seed in range(4):
        _fft_loop(seed)
    serial = time.perf_counter() - start
    with ProcessPoolExecutor(2) as pool:
        list(pool.map(_fft_loop, range(2)))  # start the workers
        start = time.perf_counter()
        list(pool.map(_fft_loop, range(4)))
        parallel = time.perf_counter() - start
    return serial / parallel


def handoff_latency(interval: float) -> tuple[float, float]:
    """(start of a new pool process, median submit-to-start of a task) [s] with a busy Python
    thread beside the main thread (the parent's compute thread of a scan) at the given switch
    interval; the fork server is started and warm first. The task is ``time.perf_counter``
    (CLOCK_MONOTONIC, one clock for all processes), so the pool process imports nothing."""
    import statistics
    import threading
    from concurrent.futures import ProcessPoolExecutor

    from hcfplan.planning.scan import pool_context, start_worker_server

    start_worker_server(2)
    with ProcessPoolExecutor(1, mp_context=pool_context()) as pool:  # the server is warm
        pool.submit(time.perf_counter).result()
    stop = threading.Event()

    def busy() -> None:
        while not stop.is_set():
            sum(range(1000))

    saved = sys.getswitchinterval()
    sys.setswitchinterval(interval)
    threading.Thread(target=busy, daemon=True).start()
    try:
        with ProcessPoolExecutor(1, mp_context=pool_context()) as pool:
            start = time.perf_counter()
            first = pool.submit(time.perf_counter).result() - start  # one clock for all
            delays = []
            for _ in range(20):
                sent = time.perf_counter()
                delays.append(pool.submit(time.perf_counter).result() - sent)
    finally:
        stop.set()
        sys.setswitchinterval(saved)
    return first, statistics.median(delays)


#: The demo config of the README at 16384 points: an anti-resonant fiber with argon, points of
#: 1-2 s (a lab-sized planning scan), pressures 1-4 bar.
DEMO = (Path(__file__).resolve().parents[1] / "configs" / "yb_arf_argon.toml", "gas.pressure_bar",
        (1.0, 4.0), 16384)


def _warm_point(task: dict) -> int:
    time.sleep(0.5)  # both pool processes take one warm-up task
    compute_point(task)
    return os.getpid()


def chain_ceiling(plan) -> float:
    """Speed-up of the same points computed as two fixed halves by two warm pool processes
    (one thread each, no scan machinery: no files, no scheduling, no start-up) over all of them
    in this warm process: what the machine itself allows for this work (memory and cache
    contention between the two cores)."""
    from concurrent.futures import ProcessPoolExecutor

    from hcfplan.planning.scan import point_task, pool_context, worker_environment

    tasks = [point_task(plan, p) for p in plan.points]
    start = time.perf_counter()
    for task in tasks:
        compute_point(task)
    serial = time.perf_counter() - start
    with worker_environment():
        pool = ProcessPoolExecutor(2, mp_context=pool_context())
        warm = {pool.submit(_warm_point, tasks[0]), pool.submit(_warm_point, tasks[1])}
    with pool:
        assert len({f.result() for f in warm}) == 2, "one pool process took both warm-ups"
        start = time.perf_counter()
        list(pool.map(compute_point, tasks, chunksize=len(tasks) // 2))
        parallel = time.perf_counter() - start
    return serial / parallel


def main(grid_points: int = 1024, config: Path | None = None, key: str = "gas.pressure_bar",
         span: tuple[float, float] = (0.5, 4.0)) -> None:
    folder = Path(tempfile.mkdtemp(prefix="hcfplan-bench-scan-"))
    if config is None:
        sys.path.insert(0, str(TESTS))
        from fast_cases import write_fast_config

        config = write_fast_config(folder, energy_uj=300.0)
    over = (f"grid.points={grid_points}",)
    vary = f"{key}={span[0]}:{span[1]}:{POINTS}"
    print(f"{config.name}, grid.points = {grid_points}, --vary {vary}")
    plan = plan_scan(config, [parse_vary(vary)], over)
    warm = plan_scan(config, [parse_vary(f"{key}={0.9 * span[0]},{0.95 * span[0]}")], over)
    run_scan(warm, folder / "warm", workers=1)  # imports and numba cache in this process
    run_scan(warm, folder / "warm2", workers=2)  # the fork server (started once per process)
    runs: dict[str, list[tuple[float, list[float]]]] = {"1": [], "2": [], "2 (new pool)": []}
    for _ in range(ROUNDS):  # alternated, so a slow spell of the machine hits all
        for series in runs:
            workers = int(series[0])
            if series == "2 (new pool)":
                release_workers()
            runs[series].append(_run(plan, folder / f"w{workers}", workers))
    best = {}
    for series, found in runs.items():
        wall, inside = min(found)
        mean_point = sum(inside) / len(inside)
        overhead = wall * int(series[0]) / POINTS - mean_point
        best[series] = wall
        walls = ", ".join(f"{w:.2f}" for w, _ in found)
        print(f"{series} worker(s): best {wall:6.2f} s wall ({walls}), {mean_point:.3f} s per "
              f"point inside, overhead {overhead:+.3f} s per point ({overhead / mean_point:+.1%})")
    print(f"speed-up 2 vs 1 workers, best against best: {best['1'] / best['2']:.2f} (target >= "
          f"1.8 on 2 cores; with a new pool each run {best['1'] / best['2 (new pool)']:.2f}); this "
          f"machine's ceiling for these points: {chain_ceiling(plan):.2f}")
    command: dict[int, list[float]] = {1: [], 2: []}
    for _ in range(ROUNDS):
        for w in (1, 2):
            command[w].append(_command_wall(config, over, vary, w, folder / f"cli{w}"))
    one, two = min(command[1]), min(command[2])
    print(f"whole command 'hcfplan scan' in a new process, best of {ROUNDS}: 1 worker {one:.2f} s, "
          f"2 workers {two:.2f} s, speed-up {one / two:.2f} (target >= 1.8)")
    shutil.rmtree(folder, ignore_errors=True)


def _command_wall(config: Path, over: tuple[str, ...], vary: str, workers: int,
                  out: Path) -> float:
    command = [sys.executable, "-m", "hcfplan", "scan", str(config), "--vary", vary,
               *(arg for o in over for arg in ("--set", o)), "--workers", str(workers),
               "--out", str(out), "--fresh", "--no-figures", "--json"]
    start = time.perf_counter()
    subprocess.run(command, check=True, capture_output=True)
    return time.perf_counter() - start


if __name__ == "__main__":
    os.environ["HCFPLAN_CACHE_DIR"] = tempfile.mkdtemp(prefix="hcfplan-bench-cache-")
    print(f"machine ceiling: 2 processes of a plain FFT loop run {machine_ceiling():.2f}x as fast "
          "as 1 (an ideal 2-core machine gives 2.0)")
    from hcfplan.planning.scan import HANDOFF_SWITCH_INTERVAL

    for interval in (sys.getswitchinterval(), HANDOFF_SWITCH_INTERVAL):
        first, task = handoff_latency(interval)
        print(f"hand-off beside a busy thread, switch interval {interval * 1e3:g} ms: new pool "
              f"process {first * 1e3:.0f} ms, task submit-to-start {task * 1e3:.1f} ms (median)")
    for n in (int(a) for a in (sys.argv[1:] or ["1024", "8192"])):
        main(n)
    if not sys.argv[1:]:
        path, name, span, n = DEMO
        main(n, path, name, span)
