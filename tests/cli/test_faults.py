"""Faults of the machine in every command: an output path of the wrong kind, a read-only
folder, a full disk, and two commands writing into one folder at once.

Each gives one line naming the path and the cause, exit code 2 (found before the work starts)
or 1 (met while writing), no traceback, and nothing half-written. A real full disk and a real
read-only folder are a small tmpfs in a private mount namespace where the machine allows one
(tests/process_tools.py); ENOSPC is also simulated in-process. Concurrency uses real processes.
Contract tests; no external source is needed.
"""

from __future__ import annotations

import errno
import os
import subprocess
import sys
from pathlib import Path

import pytest
from fast_cases import TINY, write_fast_config
from process_tools import (
    env,
    private_mounts_available,
    run_in_tmpfs,
)

from hcfplan.cli.app import main
from hcfplan.numerics import storage

ROOT = Path(__file__).resolve().parents[2]
SPECTRUM = ROOT / "configs" / "demo_broadened_spectrum.csv"
MOUNTS = private_mounts_available()
needs_mounts = pytest.mark.skipif(not MOUNTS, reason="no private tmpfs here (unshare -Urm "
                                  "refused); full disk and read-only folder simulated instead")


def run(capsys, *argv) -> tuple[int, str]:
    code = main([str(a) for a in argv])
    return code, capsys.readouterr().err


def one_line(err: str) -> str:
    lines = [line for line in err.splitlines() if line.strip()]
    assert len(lines) == 1, err
    assert "Traceback" not in err
    return lines[0]


@pytest.fixture()
def tiny(tmp_path) -> Path:
    path = tmp_path / "tiny.toml"
    path.write_text(TINY, encoding="utf-8")
    return path


def _no_temporary_files(folder: Path) -> None:
    if folder.exists():
        assert not [p for p in folder.rglob(".*")], sorted(folder.rglob("*"))


# ---------------------------------------------------------------------------------------------
# an output path of the wrong kind: refused before any work, exit 2


def _plot_commands(tmp_path: Path, plot: Path) -> dict[str, list]:
    config = write_fast_config(tmp_path)
    return {"fiber": ["fiber", config, "--plot", plot],
            "envelope": ["envelope", config, "--plot", plot],
            "thz": ["thz", SPECTRUM, "--plot", plot]}


@pytest.mark.parametrize("command", ["fiber", "envelope", "thz"])
def test_plot_that_is_a_folder(tmp_path, capsys, command):
    folder = tmp_path / "figs"
    folder.mkdir()
    code, err = run(capsys, *_plot_commands(tmp_path, folder)[command])
    assert code == 2
    assert one_line(err) == (f"hcfplan: error: --plot {folder}: is a folder; give a file "
                             f"name, e.g. {folder / 'figure.png'}")
    assert list(folder.iterdir()) == []


@pytest.mark.parametrize("command", ["fiber", "envelope", "thz"])
def test_plot_under_a_file(tmp_path, capsys, command):
    blocker = tmp_path / "notes.txt"
    blocker.write_text("a file")
    plot = blocker / "figure.png"
    code, err = run(capsys, *_plot_commands(tmp_path, plot)[command])
    assert code == 2
    assert one_line(err) == f"hcfplan: error: --plot {plot}: {blocker} is a file, not a folder"
    assert blocker.read_text() == "a file"


@pytest.mark.parametrize("command", ["simulate", "compare", "scan"])
def test_out_that_is_a_file(tmp_path, capsys, command):
    config = write_fast_config(tmp_path)
    out = tmp_path / "out"
    out.write_text("a file")
    argv = {"simulate": ["simulate", config, "--out", out, "--quiet"],
            "compare": ["compare", config, "--set-b", "laser.energy_uj=150", "--out", out],
            "scan": ["scan", config, "--vary", "gas.pressure_bar=1,2", "--out", out,
                     "--workers", "1"]}[command]
    code, err = run(capsys, *argv)
    assert code == 2
    assert one_line(err) == f"hcfplan: error: --out {out}: exists and is not a folder"
    assert out.read_text() == "a file"


@pytest.mark.parametrize(("name", "kind"), [("points", "file"), ("scan.json", "folder"),
                                            ("table.csv", "folder")])
def test_scan_folder_with_an_entry_of_the_wrong_kind(tmp_path, capsys, name, kind):
    config = write_fast_config(tmp_path)
    out = tmp_path / "scan"
    out.mkdir()
    if kind == "file":
        (out / name).write_text("in the way")
    else:
        (out / name).mkdir()
    code, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1,2", "--out", out,
                    "--workers", "1", "--force")
    assert code == 2
    line = one_line(err)
    assert line.startswith(f"hcfplan: error: --out {out}: {out / name} is a {kind} where ")
    assert sorted(p.name for p in out.iterdir()) == [name]  # nothing written


# ---------------------------------------------------------------------------------------------
# a full disk met while writing: exit 1, one line, complete files only (ENOSPC simulated)


def _no_space_for(monkeypatch, name: str) -> None:
    """Make the flush of ``name``'s temporary file fail with ENOSPC."""
    real = storage._sync

    def sync(path: Path) -> None:
        if path.name.startswith(f".{name}."):
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        real(path)

    monkeypatch.setattr(storage, "_sync", sync)


def test_simulate_on_a_full_disk(tmp_path, capsys, monkeypatch, tiny):
    out = tmp_path / "run"
    _no_space_for(monkeypatch, "summary.json")
    code, err = run(capsys, "simulate", tiny, "--out", out, "--quiet", "--no-figures")
    assert code == 1
    assert one_line(err) == (f"hcfplan: error: cannot write {out / 'summary.json'}: No space "
                             f"left on device; kept {out}/: compressed_field.csv, "
                             "config.resolved.toml, fields.npz (complete files only)")
    assert sorted(p.name for p in out.iterdir()) == ["compressed_field.csv",
                                                     "config.resolved.toml", "fields.npz"]


def test_scan_on_a_full_disk(tmp_path, capsys, monkeypatch):
    config = write_fast_config(tmp_path)
    out = tmp_path / "scan"
    _no_space_for(monkeypatch, "table.csv")
    code, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1,2", "--out", out,
                    "--workers", "1", "--no-figures")
    assert code == 1
    line = one_line(err)
    assert line.startswith(f"hcfplan: error: cannot write {out / 'table.csv'}: No space left "
                           f"on device; kept {out}/: scan.json, points/ with 2 files")
    _no_temporary_files(out)
    # the points are kept: a rerun with space reuses them
    monkeypatch.undo()
    code, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1,2", "--out", out,
                    "--workers", "1", "--no-figures", "--json")
    assert code == 0, err
    assert (out / "table.csv").exists()


@needs_mounts
def test_simulate_on_a_real_full_disk(tmp_path, tiny):
    folder = tmp_path / "small"
    out = folder / "run"
    code, listing, err = run_in_tmpfs(
        folder, "108k", ["simulate", str(tiny), "--out", str(out), "--quiet", "--no-figures"],
        after=f"ls -A1 {out} 2>/dev/null", cwd=tmp_path)  # a folder left empty is removed
    assert code == 1, err
    line = one_line(err)
    assert line.startswith("hcfplan: error: cannot write "), line
    assert ": No space left on device" in line
    names = [n for n in listing.splitlines() if n]
    assert not [n for n in names if n.startswith(".")], names  # no temporary file
    for name in names:  # every file left is named as kept
        assert name in line


# ---------------------------------------------------------------------------------------------
# a read-only folder: refused before any work, exit 2


@needs_mounts
@pytest.mark.parametrize("command", ["simulate", "fiber", "scan-resume"])
def test_read_only_folder(tmp_path, capsys, command):
    config = write_fast_config(tmp_path)
    folder = tmp_path / "ro"
    prepare = ""
    if command == "simulate":
        argv = ["simulate", str(config), "--out", str(folder / "run"), "--quiet"]
    elif command == "fiber":
        argv = ["fiber", str(config), "--plot", str(folder / "gvd.png")]
    else:  # a finished scan, copied onto the read-only folder: the rerun must update scan.json
        scan = tmp_path / "scan"
        vary = ["--vary", "gas.pressure_bar=1,2", "--workers", "1", "--no-figures"]
        assert main(["scan", str(config), *vary, "--out", str(scan), "--json"]) == 0
        capsys.readouterr()
        prepare = f"cp -r {scan} {folder / 'scan'}"
        argv = ["scan", str(config), *vary, "--out", str(folder / "scan")]
    code, _, err = run_in_tmpfs(folder, "1m", argv, prepare=prepare, read_only=True,
                                cwd=tmp_path)
    assert code == 2, err
    line = one_line(err)
    option, path, under = {"simulate": ("--out", folder / "run", folder),
                           "fiber": ("--plot", folder / "gvd.png", folder),
                           "scan-resume": ("--out", folder / "scan", folder / "scan")}[command]
    assert line == (f"hcfplan: error: {option} {path}: cannot create files under {under} "
                    "(read-only file system)")


# ---------------------------------------------------------------------------------------------
# two commands writing into one folder at once


_HOLD = """
import sys
from hcfplan.io.results import lock_output_dir
lock_output_dir(sys.argv[1])
print("locked", flush=True)
sys.stdin.read()  # until the test closes stdin
"""


@pytest.fixture()
def held_folder(tmp_path):
    """A folder locked by another process (as a running hcfplan command holds it)."""
    folder = tmp_path / "busy"
    proc = subprocess.Popen([sys.executable, "-c", _HOLD, str(folder)], env=env(),
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    assert proc.stdout.readline().strip() == "locked"
    yield folder
    proc.stdin.close()
    proc.wait(timeout=60)


@pytest.mark.parametrize("command", ["simulate", "compare", "scan"])
def test_second_command_in_a_busy_folder_is_refused(held_folder, tmp_path, capsys, command):
    config = write_fast_config(tmp_path)
    argv = {"simulate": ["simulate", config, "--out", held_folder, "--quiet", "--force"],
            "compare": ["compare", config, "--set-b", "laser.energy_uj=150", "--out",
                        held_folder, "--force"],
            "scan": ["scan", config, "--vary", "gas.pressure_bar=1,2", "--out", held_folder,
                     "--workers", "1", "--force"]}[command]
    code, err = run(capsys, *argv)
    assert code == 2
    assert one_line(err) == (f"hcfplan: error: --out {held_folder}: another hcfplan command is "
                             "writing into this folder; wait for it to finish or choose "
                             "another --out")
    assert list(held_folder.iterdir()) == []


def test_folder_is_free_again_after_a_command(tmp_path, capsys, tiny):
    out = tmp_path / "run"
    assert main(["simulate", str(tiny), "--out", str(out), "--quiet", "--no-figures"]) == 0
    proc = subprocess.run([sys.executable, "-c", _HOLD, str(out)], env=env(), input="",
                          capture_output=True, text=True, timeout=120)
    assert proc.stdout.strip() == "locked", proc.stderr


def test_commands_started_together_write_one_run(tmp_path, tiny):
    """Three ``simulate`` into one new folder at the same moment: one writes its run, the
    others are refused (busy folder, or not empty once the first is done); never two."""
    out = tmp_path / "run"
    procs = [subprocess.Popen([sys.executable, "-m", "hcfplan", "simulate", str(tiny), "--out",
                               str(out), "--quiet", "--no-figures"], env=env(), cwd=tmp_path,
                              stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
             for _ in range(3)]
    results = [(p.wait(timeout=300), p.stderr.read()) for p in procs]
    for p in procs:
        p.stdout.close()
        p.stderr.close()
    codes = sorted(code for code, _ in results)
    assert codes == [0, 2, 2], results
    for code, err in results:
        if code == 2:
            line = one_line(err)
            assert ("another hcfplan command is writing into this folder" in line
                    or "folder exists and is not empty; use --force" in line), line
    assert sorted(p.name for p in out.iterdir()) == ["compressed_field.csv",
                                                     "config.resolved.toml", "fields.npz",
                                                     "report.html", "summary.json"]


def test_scan_points_folder_not_writable(tmp_path, capsys, monkeypatch):
    # a points folder this user may not write (simulated: the tests may run as root, who may)
    config = write_fast_config(tmp_path)
    out = tmp_path / "scan"
    (out / "points").mkdir(parents=True)
    real = os.access
    monkeypatch.setattr(os, "access", lambda path, mode: False if Path(path) == out / "points"
                        else real(path, mode))
    code, err = run(capsys, "scan", config, "--vary", "gas.pressure_bar=1,2", "--out", out,
                    "--workers", "1", "--force")
    assert code == 2
    assert one_line(err) == (f"hcfplan: error: --out {out}: {out / 'points'} is not writable "
                             "(the scan updates its index and adds points there)")
    assert list((out / "points").iterdir()) == []


def test_default_run_folder_passes_over_a_busy_one(tmp_path, capsys, monkeypatch, tiny):
    # simulate without --out: runs/<stem> is being written by another command -> runs/<stem>-2
    from hcfplan.io.results import lock_output_dir, unlock_output_dir

    monkeypatch.chdir(tmp_path)
    busy = Path("runs") / "tiny"
    proc = subprocess.Popen([sys.executable, "-c", _HOLD, str(tmp_path / busy)], env=env(),
                            stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True)
    try:
        assert proc.stdout.readline().strip() == "locked"
        code, err = run(capsys, "simulate", tiny, "--quiet", "--no-figures")
    finally:
        proc.stdin.close()
        proc.wait(timeout=60)
    assert code == 0, err
    assert list((tmp_path / busy).iterdir()) == []
    assert (tmp_path / "runs" / "tiny-2" / "summary.json").exists()
    lock_output_dir(tmp_path / busy)  # free again
    unlock_output_dir(tmp_path / busy)
