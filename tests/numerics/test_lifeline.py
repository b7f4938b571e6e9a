"""Child processes end with their parent: a parent killed by SIGKILL leaves no child behind.

Contract tests of hcfplan.numerics.lifeline with real processes (a parent started here is
killed, its child must end by itself within a few seconds). No external source is needed.
"""

from __future__ import annotations

import os
import subprocess
import sys
import time

import pytest
from process_tools import env, has_proc

pytestmark = pytest.mark.skipif(not has_proc() or not hasattr(os, "fork"),
                                reason="needs fork and /proc (Linux)")

#: The parent: starts a child that watches it (``mode``), prints the child's pid, waits.
_PARENT = """
import multiprocessing, os, sys, time
from hcfplan.numerics import lifeline

mode = sys.argv[1] if len(sys.argv) > 1 else ""

def child_with_parent(parent, poll_only):
    if poll_only:  # as where the kernel offers no parent-death signal
        lifeline._prctl_death_signal = lambda signum: False
    lifeline.exit_with_parent(parent)
    time.sleep(300)

def child_with_lifeline(reader):
    lifeline.exit_at_eof(reader)
    time.sleep(300)

if __name__ != "__main__":  # a spawned child imports this script too
    pass
elif mode == "lifeline":
    line = lifeline.Lifeline()
    context = multiprocessing.get_context("spawn")  # not forked: no copy of the write end
    child = context.Process(target=child_with_lifeline, args=(line.reader,))
else:
    context = multiprocessing.get_context("fork")
    child = context.Process(target=child_with_parent, args=(os.getpid(), mode == "poll"))
if __name__ == "__main__":
    child.start()
    print(child.pid, flush=True)
    time.sleep(300)
"""


def _alive(pid: int) -> bool:
    try:
        state = open(f"/proc/{pid}/stat").read().rsplit(")", 1)[1].split()[0]
    except OSError:
        return False
    return state != "Z"


@pytest.mark.parametrize("mode", ["prctl", "poll", "lifeline"])
def test_child_ends_when_its_parent_is_killed(mode, tmp_path):
    script = tmp_path / "parent.py"  # a file: a spawned child imports its functions
    script.write_text(_PARENT, encoding="utf-8")
    parent = subprocess.Popen([sys.executable, str(script), mode], env=env(),
                              stdout=subprocess.PIPE, text=True)
    try:
        child = int(parent.stdout.readline())
        time.sleep(0.5 if mode == "lifeline" else 0.3)  # the child sets its watch
        assert _alive(child)
        parent.kill()
        parent.wait(timeout=60)
        deadline = time.monotonic() + 30  # a few seconds unloaded; generous under load
        while _alive(child) and time.monotonic() < deadline:
            time.sleep(0.05)
        assert not _alive(child), f"child {child} outlived its parent ({mode})"
    finally:
        parent.kill()
        parent.wait()
