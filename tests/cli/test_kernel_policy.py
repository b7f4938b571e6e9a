"""The command line's kernel policy: a one-shot command on a small grid runs the numpy twins and
never imports numba (checked in the child's own import log, no timing); HCFPLAN_KERNELS
overrides the policy, and a bad value is one line naming it, exit 2, nothing written."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

from fast_cases import TINY

ROOT = Path(__file__).resolve().parents[2]


def _simulate(tmp_path: Path, *options: str, **env: str) -> subprocess.CompletedProcess:
    config = tmp_path / "tiny.toml"
    config.write_text(TINY, encoding="utf-8")
    environ = {k: v for k, v in os.environ.items() if k != "HCFPLAN_KERNELS"}
    environ["PYTHONPATH"] = str(ROOT) + os.pathsep + environ.get("PYTHONPATH", "")
    environ.update(env)
    return subprocess.run([sys.executable, *options, "-m", "hcfplan", "simulate", str(config),
                           "--out", str(tmp_path / "run"), "--force", "--quiet",
                           "--no-figures"],
                          capture_output=True, text=True, timeout=300, env=environ,
                          cwd=tmp_path)


def _imported(stderr: str) -> set[str]:
    """Top-level modules named in a ``-X importtime`` log."""
    names = set()
    for line in stderr.splitlines():
        if line.startswith("import time:") and "|" in line:
            names.add(line.rsplit("|", 1)[1].strip().split(".")[0])
    return names


def test_a_small_run_of_the_command_never_imports_numba(tmp_path):
    proc = _simulate(tmp_path, "-X", "importtime")
    assert proc.returncode in (0, 3), proc.stderr[-2000:]
    imported = _imported(proc.stderr)
    assert "hcfplan" in imported and "scipy" in imported  # the log is read right
    assert "numba" not in imported and "llvmlite" not in imported
    assert (tmp_path / "run" / "summary.json").exists()


def test_the_environment_overrides_the_command_line_policy(tmp_path):
    proc = _simulate(tmp_path, "-X", "importtime", HCFPLAN_KERNELS="numba")
    assert proc.returncode in (0, 3), proc.stderr[-2000:]
    assert "numba" in _imported(proc.stderr)


def test_a_bad_kernel_policy_is_one_line_and_exit_2(tmp_path):
    proc = _simulate(tmp_path, HCFPLAN_KERNELS="fastest")
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and "HCFPLAN_KERNELS = 'fastest'" in lines[0]
    assert not (tmp_path / "run").exists()
