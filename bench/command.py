"""Benchmark: README command 1 (``hcfplan simulate configs/yb_arf_argon.toml`` with its figures
and report) of this tree against the release ``v0.1.0``, side by side in one run.

Run from the repository root: ``python bench/command.py [--pairs N] [--no-figures]``.

Each side is installed into a venv of its own under ``bench/.venvs/`` (kept between runs,
rebuilt when its source changes): ``git archive v0.1.0`` is unpacked into a temporary folder
for the release, the working tree is copied for the current side, and each is installed with
``pip install --no-deps`` (the build requirements come from pip's cache or the registry). Both
venvs see the packages of the interpreter that runs this script (a ``.pth`` file), so the two
sides run on exactly the same numpy, scipy, numba, matplotlib and pyFFTW, and differ only in
hcfplan itself.

Then each side runs the whole command once to warm its caches (numba, FFTW wisdom, rate tables)
and the two commands are alternated, A B A B ..., each in a new process with a new output
folder; the script prints every pair, the median of each side (wall time, and CPU time of the
command with every process it started), their ratio and the load average before and after
(the machine may be shared: where it is busy, the wall time follows the CPU time more than the
work done in parallel). Nothing here is a timed test.
"""

from __future__ import annotations

import argparse
import hashlib
import os
import resource
import shutil
import statistics
import subprocess
import sys
import sysconfig
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
VENVS = ROOT / "bench" / ".venvs"
RELEASE = "v0.1.0"
CONFIG = "configs/yb_arf_argon.toml"


def _tree_digest(src: Path) -> str:
    """sha256 of the package sources and the project file (rebuild the venv when they change)."""
    digest = hashlib.sha256()
    for path in sorted([src / "pyproject.toml", *(src / "hcfplan").rglob("*")]):
        if path.is_file() and "__pycache__" not in path.parts:
            digest.update(str(path.relative_to(src)).encode())
            digest.update(path.read_bytes())
    return digest.hexdigest()


def _release_tree(dest: Path) -> Path:
    """Unpack ``git archive RELEASE`` into ``dest`` and return it."""
    dest.mkdir(parents=True)
    archive = subprocess.run(["git", "archive", RELEASE], cwd=ROOT, check=True,
                             capture_output=True).stdout
    subprocess.run(["tar", "-x", "-C", str(dest)], input=archive, check=True)
    return dest


def _current_tree(dest: Path) -> Path:
    """Copy what a release of the working tree would hold (package, gases, project files)."""
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc", "*.nbi", "*.nbc", "_gases")
    for name in ("hcfplan", "gases"):
        shutil.copytree(ROOT / name, dest / name, ignore=ignore)
    for name in ("pyproject.toml", "README.md", "LICENSE"):
        if (ROOT / name).exists():
            shutil.copy2(ROOT / name, dest / name)
    return dest


def _venv(name: str, make_tree) -> Path:
    """The venv ``VENVS/name`` with the tree of ``make_tree(folder)`` installed (made or reused)."""
    venv = VENVS / name
    with tempfile.TemporaryDirectory() as tmp:
        src = make_tree(Path(tmp) / "src")
        digest = _tree_digest(src)
        stamp = venv / "hcfplan-source.sha256"
        if stamp.exists() and stamp.read_text() == digest:
            return venv
        shutil.rmtree(venv, ignore_errors=True)
        subprocess.run([sys.executable, "-m", "venv", str(venv)], check=True)
        site = Path(sysconfig.get_paths(vars={"base": str(venv), "platbase": str(venv)})["purelib"])
        (site / "_bench_shared_deps.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")
        subprocess.run([str(venv / "bin" / "python"), "-m", "pip", "install", "--quiet",
                        "--no-deps", str(src)], check=True)
        stamp.write_text(digest)
    return venv


def _run(venv: Path, out: Path, figures: bool) -> tuple[float, float]:
    """Wall time and CPU time (user + system, with every process it started) [s] of the whole
    command from the venv, in a new process."""
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    cmd = [str(venv / "bin" / "hcfplan"), "simulate", CONFIG, "--out", str(out), "--quiet"]
    if not figures:
        cmd.append("--no-figures")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    subprocess.run(cmd, cwd=ROOT, env=env, check=True, stdout=subprocess.DEVNULL)
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--pairs", type=int, default=7, help="alternated pairs (>= 5)")
    parser.add_argument("--no-figures", action="store_true", help="time --no-figures runs")
    args = parser.parse_args()
    sides = {RELEASE: _venv("release", _release_tree), "current": _venv("current", _current_tree)}
    figures = not args.no_figures
    load_before = os.getloadavg()
    times: dict[str, list[float]] = {name: [] for name in sides}
    cpu: dict[str, list[float]] = {name: [] for name in sides}
    with tempfile.TemporaryDirectory() as tmp:
        for name, venv in sides.items():  # warm-up: caches of each side
            _run(venv, Path(tmp) / f"warm-{name}", figures)
        for i in range(args.pairs):
            row = []
            for name, venv in sides.items():
                seconds, cpu_seconds = _run(venv, Path(tmp) / f"{name}-{i}", figures)
                times[name].append(seconds)
                cpu[name].append(cpu_seconds)
                row.append(f"{name} {seconds:.2f} s (CPU {cpu_seconds:.2f} s)")
            print(f"pair {i + 1}: " + ", ".join(row), flush=True)
    load_after = os.getloadavg()
    medians = {name: statistics.median(t) for name, t in times.items()}
    what = "with figures" if figures else "--no-figures"
    print(f"\nhcfplan simulate {CONFIG} ({what}), median of {args.pairs} alternated pairs:")
    for name, med in medians.items():
        print(f"  {name:8s} {med:.2f} s  (min {min(times[name]):.2f}, max {max(times[name]):.2f}); "
              f"CPU {statistics.median(cpu[name]):.2f} s")
    print(f"  current / {RELEASE}: {medians['current'] / medians[RELEASE]:.2f} (wall), "
          f"{statistics.median(cpu['current']) / statistics.median(cpu[RELEASE]):.2f} (CPU)")
    print(f"load average (1 min) before {load_before[0]:.2f}, after {load_after[0]:.2f}; "
          f"{os.cpu_count()} CPUs")


if __name__ == "__main__":
    main()
