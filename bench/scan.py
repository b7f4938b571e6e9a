"""Benchmark: a 16-point pressure scan with 1 and 2 workers; speed-up and per-point overhead.

Run: ``PYTHONPATH=. python bench/scan.py [GRID_POINTS ...]`` (default 1024 and 8192).
Prints the wall time per executor, the speed-up of 2 workers over 1 and the overhead per
point outside the chain (wall time x workers / points minus the mean time spent inside the
point computation), as a fraction of a point's time. The serial run warms up in-process
first; the pool workers pay their own start (imports, numba cache load, first-call set-up),
which counts as overhead.
"""

from __future__ import annotations

import shutil
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))

from test_scan import write_fast_config  # noqa: E402

from hcfplan.planning.scan import parse_vary, plan_scan, run_scan  # noqa: E402

POINTS = 16


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


def main(grid_points: int = 1024) -> None:
    folder = Path(tempfile.mkdtemp(prefix="hcfplan-bench-scan-"))
    config = write_fast_config(folder, energy_uj=300.0)
    over = (f"grid.points={grid_points}",)
    print(f"grid.points = {grid_points}")
    plan = plan_scan(config, [parse_vary(f"gas.pressure_bar=0.5:4:{POINTS}")], over)
    warm = plan_scan(config, [parse_vary("gas.pressure_bar=0.4,0.45")], over)
    run_scan(warm, folder / "warm", workers=1)  # imports and numba cache in this process
    results = {}
    for workers in (1, 2):
        wall, inside = _run(plan, folder / f"w{workers}", workers)
        mean_point = sum(inside) / len(inside)
        overhead = wall * workers / POINTS - mean_point
        results[workers] = wall
        print(f"{workers} worker(s): {wall:6.2f} s wall, {mean_point:.3f} s per point inside, "
              f"overhead {overhead:+.3f} s per point ({overhead / mean_point:+.1%})")
    print(f"speed-up 2 vs 1 workers: {results[1] / results[2]:.2f} (target >= 1.8 on 2 cores)")
    shutil.rmtree(folder, ignore_errors=True)


if __name__ == "__main__":
    print(f"machine ceiling: 2 processes of a plain FFT loop run {machine_ceiling():.2f}x as fast "
          "as 1 (an ideal 2-core machine gives 2.0)")
    for n in (int(a) for a in (sys.argv[1:] or ["1024", "8192"])):
        main(n)
