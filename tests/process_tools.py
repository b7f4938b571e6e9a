"""Helpers of the tests that start real processes (signals, kills, concurrency, full or
read-only disks); not a test module.

Everything polls for the state it needs (a file, a process) with generous time limits instead
of sleeping fixed times, so the tests pass on a loaded two-core machine.
"""

from __future__ import annotations

import os
import shutil
import signal
import subprocess
import sys
import time
from collections.abc import Callable
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
#: Longest wait for a state a test polls for. [s]
PATIENCE = 120.0


def env() -> dict:
    """The environment of a child ``python -m hcfplan``: this checkout first on the path."""
    return dict(os.environ,
                PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))


def foreground_sigint() -> None:
    """In the child before exec: SIGINT as in a terminal's foreground job (a shell starts a
    background job with SIGINT ignored, and an ignored signal stays ignored across exec)."""
    signal.signal(signal.SIGINT, signal.SIG_DFL)


def start(args: list[str], cwd: Path, **kwargs) -> subprocess.Popen:
    """``python -m hcfplan ARGS`` in a session of its own (its process group is the one a
    terminal would signal), stdout and stderr piped."""
    return subprocess.Popen([sys.executable, "-m", "hcfplan", *args], env=env(), cwd=cwd,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            start_new_session=True, preexec_fn=foreground_sigint, **kwargs)


def wait_for(condition: Callable[[], bool], proc: subprocess.Popen | None = None,
             timeout: float = PATIENCE, what: str = "the state") -> None:
    """Poll ``condition`` until it holds; fail if ``proc`` ends first or time runs out."""
    import pytest

    deadline = time.monotonic() + timeout
    while not condition():
        if proc is not None and proc.poll() is not None:
            pytest.fail(f"the process ended (code {proc.returncode}) before {what}: "
                        f"{proc.stderr.read()[-3000:] if proc.stderr else ''}")
        if time.monotonic() > deadline:
            if proc is not None:
                kill_session(proc)
            pytest.fail(f"timed out waiting for {what}")
        time.sleep(0.02)


def _stat(pid: str) -> list[str] | None:
    try:
        text = Path(f"/proc/{pid}/stat").read_text()
    except OSError:
        return None
    return text.rsplit(")", 1)[1].split()  # fields from the state on


def session_processes(session: int) -> list[int]:
    """Live (not zombie) processes of the session ``session`` (Linux /proc)."""
    found = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            fields = _stat(entry.name)
            if fields is not None and fields[0] != "Z" and int(fields[3]) == session:
                found.append(int(entry.name))
    return found


def children_of(pid: int) -> list[int]:
    """Live child processes of ``pid``."""
    found = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            fields = _stat(entry.name)
            if fields is not None and fields[0] != "Z" and int(fields[1]) == pid:
                found.append(int(entry.name))
    return found


def workers_running(proc: subprocess.Popen) -> Callable[[], bool]:
    """Condition: a scan worker exists (a child of the command's fork server)."""
    def condition() -> bool:
        for child in children_of(proc.pid):
            try:
                cmdline = Path(f"/proc/{child}/cmdline").read_bytes()
            except OSError:
                continue
            if b"forkserver" in cmdline and children_of(child):
                return True
        return False
    return condition


def kill_session(proc: subprocess.Popen) -> None:
    """SIGKILL every process of ``proc``'s session (clean-up of a failed test)."""
    for pid in [proc.pid, *session_processes(proc.pid)]:
        try:
            os.kill(pid, signal.SIGKILL)
        except OSError:
            pass


def has_proc() -> bool:
    return Path("/proc/self/stat").exists()


# ---------------------------------------------------------------------------------------------
# a private, small tmpfs (full disk) or a read-only mount, in a mount namespace of its own


def private_mounts_available() -> bool:
    """Whether ``unshare -Urm`` (a user and mount namespace, no privileges needed where the
    kernel allows unprivileged user namespaces) can mount a tmpfs here."""
    if shutil.which("unshare") is None or not sys.platform.startswith("linux"):
        return False
    probe = subprocess.run(["unshare", "-Urm", "sh", "-c",
                            "mount -t tmpfs -o size=8k tmpfs /mnt 2>/dev/null || "
                            "mount -t tmpfs -o size=8k tmpfs /tmp"],
                           capture_output=True, timeout=30)
    return probe.returncode == 0


def run_in_tmpfs(folder: Path, size: str, args: list[str], *, prepare: str = "",
                 read_only: bool = False, after: str = "",
                 cwd: Path) -> tuple[int, str, str]:
    """Run ``python -m hcfplan ARGS`` with a new tmpfs of ``size`` (e.g. "108k") mounted on
    ``folder`` in a private mount namespace (nothing is mounted for anyone else, and the mount
    goes with the process). ``prepare``: shell commands run on it first (e.g. copying a scan
    in); ``read_only``: remount it read-only before the command; ``after``: shell commands run
    after it, while the tmpfs exists (e.g. listing a folder). Returns (exit code of the
    command, stdout of the command and ``after``, stderr)."""
    import shlex

    command = " ".join(shlex.quote(a) for a in [sys.executable, "-m", "hcfplan", *args])
    quoted = shlex.quote(str(folder))
    steps = [f"mount -t tmpfs -o size={size} tmpfs {quoted}"]
    steps += [prepare] if prepare else []
    steps += [f"mount -o remount,ro {quoted}"] if read_only else []
    script = " && ".join(steps) + f" || exit 99\n{command}\nrc=$?\n{after}\necho rc=$rc\n"
    folder.mkdir(parents=True, exist_ok=True)
    proc = subprocess.run(["unshare", "-Urm", "sh", "-c", script], env=env(), cwd=cwd,
                          capture_output=True, text=True, timeout=PATIENCE * 2)
    assert proc.returncode == 0, (proc.returncode, proc.stderr)  # the mount and the script
    *out, last = proc.stdout.rstrip("\n").split("\n")
    assert last.startswith("rc="), proc.stdout
    return int(last[3:]), "\n".join(out), proc.stderr
