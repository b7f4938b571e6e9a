"""Atomic writes on a failing machine: the data is flushed before the rename, and a write that
fails (full disk, read-only file system, a folder in the way) leaves the old file, no temporary
file, and one error naming the target and the cause.

Contract tests of hcfplan.numerics.storage; a real full disk is a small private tmpfs where the
machine allows one (tests/process_tools.py), ENOSPC is also simulated. No external source is
needed for these checks.
"""

from __future__ import annotations

import errno
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest
from process_tools import env, private_mounts_available

from hcfplan.numerics import storage
from hcfplan.numerics.storage import WriteError, write_npz, write_text


def _record_calls(monkeypatch) -> list[tuple[str, str]]:
    """Record fsync (of a file or a folder) and replace calls, in order."""
    calls: list[tuple[str, str]] = []
    real_fsync, real_replace, real_open = os.fsync, os.replace, os.open
    names: dict[int, str] = {}

    def opening(path, flags, *args, **kwargs):
        fd = real_open(path, flags, *args, **kwargs)
        names[fd] = str(path)
        return fd

    def fsync(fd):
        calls.append(("fsync", names.get(fd, "?")))
        return real_fsync(fd)

    def replace(src, dst, *args, **kwargs):
        calls.append(("replace", str(dst)))
        return real_replace(src, dst, *args, **kwargs)

    monkeypatch.setattr(storage.os, "open", opening)
    monkeypatch.setattr(storage.os, "fsync", fsync)
    monkeypatch.setattr(storage.os, "replace", replace)
    return calls


def test_file_synced_before_the_rename_and_folder_after(tmp_path, monkeypatch):
    calls = _record_calls(monkeypatch)
    target = tmp_path / "a.json"
    write_text(target, "{}\n")
    kinds = [kind for kind, _ in calls]
    assert kinds == ["fsync", "replace", "fsync"], calls
    assert Path(calls[0][1]).name.startswith(".a.json.")  # the temporary file, before
    assert calls[2][1] == str(tmp_path)  # the folder, after: the new name is on disk
    assert target.read_text() == "{}\n"


def test_new_folders_are_synced_into_their_parents(tmp_path, monkeypatch):
    calls = _record_calls(monkeypatch)
    write_npz(tmp_path / "new" / "deeper" / "x.npz", {"x": [1.0, 2.0]})
    synced = [name for kind, name in calls if kind == "fsync"]
    assert str(tmp_path) in synced and str(tmp_path / "new") in synced
    assert str(tmp_path / "new" / "deeper") in synced


def _stale(folder: Path) -> list[str]:
    return [p.name for p in folder.iterdir() if p.name.startswith(".")]


@pytest.mark.parametrize("where", ["data", "sync"])
def test_full_disk_keeps_the_old_file_and_names_the_target(tmp_path, monkeypatch, where):
    # ENOSPC simulated while the data is written, or when it is flushed
    target = tmp_path / "summary.json"
    target.write_text("old\n")

    def no_space(*args, **kwargs):
        raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))

    if where == "data":
        monkeypatch.setattr(Path, "write_text", no_space)
    else:
        monkeypatch.setattr(storage.os, "fsync", no_space)
    with pytest.raises(WriteError) as info:
        storage.write_text(target, "new\n")
    assert str(info.value) == f"cannot write {target}: No space left on device"
    assert info.value.errno == errno.ENOSPC and info.value.filename == str(target)
    monkeypatch.undo()
    assert target.read_text() == "old\n"
    assert _stale(tmp_path) == []


def test_folder_in_place_of_the_file(tmp_path):
    (tmp_path / "table.csv").mkdir()
    with pytest.raises(WriteError, match=r"cannot write .*table\.csv: Is a directory"):
        write_text(tmp_path / "table.csv", "a\n")
    assert _stale(tmp_path) == []


def test_file_in_place_of_the_folder(tmp_path):
    (tmp_path / "points").write_text("not a folder")
    with pytest.raises(WriteError, match=r"cannot write .*points/p\.json: "):
        write_text(tmp_path / "points" / "p.json", "{}")


_FULL_DISK = """
import sys
from pathlib import Path
from hcfplan.numerics.storage import WriteError, write_text
folder = Path(sys.argv[1])
write_text(folder / "a.txt", "old\\n")
try:
    write_text(folder / "a.txt", "x" * 400_000)
except WriteError as exc:
    print(exc)
print(sorted(p.name for p in folder.iterdir()), (folder / "a.txt").read_text().strip())
"""


@pytest.mark.skipif(not private_mounts_available(),
                    reason="no private tmpfs here (unshare -Urm refused); the full disk is "
                           "simulated by the tests above")
def test_real_full_disk(tmp_path):
    folder = tmp_path / "small"
    folder.mkdir()
    script = tmp_path / "full.py"
    script.write_text(_FULL_DISK)
    proc = subprocess.run(["unshare", "-Urm", "sh", "-c",
                           f"mount -t tmpfs -o size=64k tmpfs {folder} && "
                           f"exec {sys.executable} {script} {folder}"],
                          env=env(), capture_output=True, text=True, timeout=120)
    assert proc.returncode == 0, proc.stderr
    lines = proc.stdout.splitlines()
    assert lines[0] == f"cannot write {folder / 'a.txt'}: No space left on device"
    assert lines[1] == "['a.txt'] old"  # the old file, no temporary file


#: Ways to write a file directly. Every writer of the package goes through
#: hcfplan.numerics.storage (write_text, write_npz, atomic_path) instead.
_DIRECT_WRITES = re.compile(r"\.write_text\(|\.write_bytes\(|np\.save|open\([^)]*['\"][wax]b?['\"]"
                            r"|os\.rename\(|shutil\.(copy|move)")


def test_every_writer_uses_the_atomic_writes():
    # structural check: no module writes a file but through the atomic writes; savefig writes
    # into atomic_path's temporary file (hcfplan.io.results.write_figure, save_png) or into
    # memory (save_png's drawing)
    package = Path(storage.__file__).resolve().parents[1]
    found = []
    for path in sorted(package.rglob("*.py")):
        if path.name == "storage.py":
            continue
        for number, line in enumerate(path.read_text(encoding="utf-8").splitlines(), 1):
            code = line.split("#", 1)[0]
            if _DIRECT_WRITES.search(code) or ("savefig(" in code and "tmp" not in code
                                                      and "memory" not in code):
                found.append(f"{path.relative_to(package)}:{number}: {line.strip()}")
    assert found == []
