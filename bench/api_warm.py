"""Warm ``hcfplan.simulate`` calls in a new process: what a second call of the demo costs.

Starts a fresh Python process (the caches on disk, FFTW wisdom, rate tables and compiled
kernels, are those a first run left), which calls ``hcfplan.simulate`` on the demo config once
cold and then ``--repeat`` times warm, and prints the times and where a warm call spends its
time (cProfile cumulative times of the chain's stages, per call). Wall and CPU time are printed:
on a machine shared with other jobs, the CPU time of this process is the steadier figure.

    PYTHONPATH=. python bench/api_warm.py [--config configs/yb_arf_argon.toml] [--repeat 9]
"""

from __future__ import annotations

import argparse
import subprocess
import sys

CHILD = r"""
import cProfile, pstats, sys, time
t0 = time.perf_counter()
import hcfplan
config = hcfplan.load_config(sys.argv[1])
t1 = time.perf_counter()
hcfplan.simulate(config)
t2 = time.perf_counter()
warm, cpu = [], []
for _ in range(int(sys.argv[2])):
    start, start_cpu = time.perf_counter(), time.process_time()
    hcfplan.simulate(sys.argv[1])
    warm.append(time.perf_counter() - start)
    cpu.append(time.process_time() - start_cpu)
print(f"import + load_config: {t1 - t0:.3f} s; first simulate (cold in this process): "
      f"{t2 - t1:.3f} s")
warm.sort()
cpu.sort()
print(f"warm simulate: best {warm[0] * 1e3:.1f} ms, median {warm[len(warm) // 2] * 1e3:.1f} ms "
      f"wall; best {cpu[0] * 1e3:.1f} ms, median {cpu[len(cpu) // 2] * 1e3:.1f} ms CPU "
      f"({len(warm)} calls; CPU time is less disturbed by other jobs on the machine)")
profile = cProfile.Profile()
profile.enable()
for _ in range(5):
    hcfplan.simulate(sys.argv[1])
profile.disable()
stats = pstats.Stats(profile).stats
stages = {"run_chain": "whole chain", "propagate": "GNLSE propagation",
          "compress_output": "compressor search", "fiber_report": "fiber first-look numbers",
          "_with_thz": "THz estimate", "summary_dict": "summary (limits, verdict)",
          "load_config": "config loading"}
total = sum(v[3] for k, v in stats.items() if k[2] == "simulate") / 5
print(f"under the profiler, one warm call: {total * 1e3:.1f} ms, of which")
for (path, line, name), value in sorted(stats.items(), key=lambda kv: -kv[1][3]):
    if name in stages and "hcfplan" in path:
        print(f"  {value[3] / 5 * 1e3:7.1f} ms  {stages.pop(name)} ({name})")
"""


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--config", default="configs/yb_arf_argon.toml")
    parser.add_argument("--repeat", type=int, default=9)
    args = parser.parse_args()
    subprocess.run([sys.executable, "-c", CHILD, args.config, str(args.repeat)], check=True)


if __name__ == "__main__":
    main()
