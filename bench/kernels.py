"""Benchmark: the compiled (numba) kernels against their numpy twins, for the kernel policy's
thresholds (:mod:`hcfplan.numerics.kernel_choice`; prints figures, not a test).

1. Start-up of the compiled set in a new process: ``import numba`` and the first call of a
   kernel from numba's cache (what a process pays once before the first compiled kernel runs).
2. The demo config's chain (``configs/yb_arf_argon.toml``: propagation, compressor search, THz
   estimate) in one process, warm, on each set, alternated, at several grid sizes
   (``grid.points``, same time window): the best of ``--repeat`` runs and the difference, and
   where the difference passes the start-up of item 1.
3. The solver's run count in a process at which the start-up is paid back at the demo's size.

Run from the repository root: ``PYTHONPATH=. python bench/kernels.py [--repeat 3]``.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
CONFIG = ROOT / "configs" / "yb_arf_argon.toml"

STARTUP = r"""
import time
t0 = time.perf_counter()
import numba  # noqa: F401
t1 = time.perf_counter()
import numpy as np
from hcfplan.propagation import kernels
t2 = time.perf_counter()
kernels.power_of(np.ones(4, complex), np.empty(4))
t3 = time.perf_counter()
print(f"{t1 - t0:.3f} {t2 - t1:.3f} {t3 - t2:.3f}")
"""


def startup(repeat: int) -> float:
    """Best start-up [s] of the compiled set in new processes (import numba, the kernels
    module's decorations, the first call)."""
    best = None
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    env.pop("HCFPLAN_KERNELS", None)
    for _ in range(repeat):
        out = subprocess.run([sys.executable, "-c", STARTUP], capture_output=True, text=True,
                             check=True, env=env, cwd=ROOT).stdout.split()
        parts = [float(x) for x in out]
        if best is None or sum(parts) < sum(best):
            best = parts
    print(f"1. start-up of the compiled set (best of {repeat} new processes): import numba "
          f"{best[0]:.3f} s, kernels module {best[1]:.3f} s, first call {best[2]:.3f} s; "
          f"total {sum(best):.3f} s")
    return sum(best)


def chain_times(points: int, repeat: int) -> dict[str, float]:
    from hcfplan.io.config import load_config
    from hcfplan.numerics import kernel_choice
    from hcfplan.planning.chain import run_chain

    config = load_config(CONFIG, overrides=[f"grid.points={points}"])
    best = {"numba": float("inf"), "numpy": float("inf")}
    for policy in ("numba", "numpy"):  # warm both (compiled code, FFT plans, tables)
        kernel_choice.set_policy(policy)
        run_chain(config)
    for _ in range(repeat):
        for policy in ("numba", "numpy"):
            kernel_choice.set_policy(policy)
            start = time.perf_counter()
            run_chain(config)
            best[policy] = min(best[policy], time.perf_counter() - start)
    kernel_choice.set_policy(kernel_choice.DEFAULT_POLICY)
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3)
    parser.add_argument("--points", type=int, nargs="*", default=[1024, 2048, 4096, 8192, 16384])
    args = parser.parse_args()
    os.environ.pop("HCFPLAN_KERNELS", None)
    cost = startup(args.repeat)
    print(f"2. demo chain, warm, best of {args.repeat} (numba | numpy | numpy - numba):")
    demo = None
    for points in args.points:
        best = chain_times(points, args.repeat)
        extra = best["numpy"] - best["numba"]
        if points == 2048:
            demo = extra
        print(f"   {points:6d} points: {best['numba'] * 1e3:8.1f} ms | {best['numpy'] * 1e3:8.1f} "
              f"ms | {extra * 1e3:+8.1f} ms  ({'numpy' if extra < cost else 'numba'} wins a "
              "one-run process)")
    if demo and demo > 0:
        print(f"3. at 2048 points the start-up pays back after {cost / demo:.1f} runs in one "
              "process")


if __name__ == "__main__":
    main()
