"""Benchmark of the operating-envelope map (prints figures; not a test).

Times ``envelope_map`` on a 100 x 100 energy x pressure grid for each gas-filled demo config:
the first call for each config (includes building its ionisation-rate table and the first
CoolProp calls of that fluid) and the median of later calls. The one-time module imports
(hcfplan.fibers and the envelope's own scipy.optimize, paid by every command that builds a
fiber or a map) are timed separately, before. Target: < 1 s per map.

Run: PYTHONPATH=. python bench/envelope.py
"""

from __future__ import annotations

import statistics
import time
from pathlib import Path

from hcfplan.io.config import load_config
from hcfplan.planning.envelope import envelope_map

TARGET = 1.0  # [s] per 100 x 100 map
REPEATS = 5


def _time(config) -> float:
    start = time.perf_counter()
    envelope_map(config, points=(100, 100))
    return time.perf_counter() - start


def main() -> None:
    start = time.perf_counter()
    import scipy.optimize  # noqa: F401  (the envelope's lazy import)

    import hcfplan.fibers  # noqa: F401
    print(f"one-time imports (scipy.optimize, hcfplan.fibers): {time.perf_counter() - start:.3f} s")
    configs = sorted(Path(__file__).resolve().parent.parent.glob("configs/*.toml"))
    for path in configs:
        config = load_config(path)
        if config.gas is None:
            continue
        first = _time(config)
        later = statistics.median(_time(config) for _ in range(REPEATS))
        verdict = "meets" if max(first, later) < TARGET else "misses"
        print(f"{path.name:32s} first {first:6.3f} s   median of {REPEATS} {later:6.3f} s   "
              f"target < {TARGET:g} s: {verdict}")


if __name__ == "__main__":
    main()
