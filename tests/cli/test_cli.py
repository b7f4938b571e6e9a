"""The command line: commands run on every demo config, JSON keys, exit codes, one-line errors.

Contract and error tests (no physics values are checked here; those live beside each model).
"""

from __future__ import annotations

import json
import re
import subprocess
import sys
from pathlib import Path

import pytest

from hcfplan.cli.app import main

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "configs").glob("*.toml"))


def run(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


@pytest.mark.parametrize("path", DEMOS, ids=[p.name for p in DEMOS])
def test_check_every_demo(capsys, path):
    code, out, err = run(capsys, "check", str(path))
    assert code == 0, err
    assert "[laser]" in out and "wavelength_nm" in out


@pytest.mark.parametrize("path", DEMOS, ids=[p.name for p in DEMOS])
def test_fiber_every_demo_json_and_plot(capsys, tmp_path, path):
    figure = tmp_path / "fiber.png"
    code, out, err = run(capsys, "fiber", str(path), "--json", "--plot", str(figure))
    assert code == 0, err
    report = json.loads(out)
    for key in ("fiber.beta2_s2_per_m", "fiber.transmission", "fiber.soliton_order",
                "fiber.zdw_m", "coupling.efficiency", "estimate.nonlinear_phase_rad"):
        assert key in report
    assert figure.stat().st_size > 10_000


def test_fiber_text_shows_cautions(capsys):
    code, out, _ = run(capsys, "fiber", str(ROOT / "configs" / "yb_capillary_mixture.toml"))
    assert code == 0
    assert "Cautions:" in out and "Class 4" in out and "rated pressure" in out


def test_gas_json(capsys):
    code, out, err = run(capsys, "gas", "Ar", "--pressure-bar", "2", "--wavelength-nm", "800",
                         "--json")
    assert code == 0, err
    report = json.loads(out)
    row = report["wavelengths"][0]
    assert {"refractive_index", "group_index", "gvd_s2_per_m", "critical_power_w"} <= set(row)
    assert report["number_density_real_per_m3"] > 0
    assert report["sources"]["dispersion"]


def test_gas_text_has_sources_and_cautions(capsys):
    code, out, _ = run(capsys, "gas", "Ne")
    assert code == 0
    assert "Sources:" in out and "Cautions:" in out


@pytest.mark.parametrize("argv,fragment", [
    (["gas", "Unobtainium"], "Unobtainium"),
    (["gas", "Ar", "--pressure-bar", "-1"], "--pressure-bar = -1.0"),
    (["gas", "Ar", "--eos", "vdw"], "--eos = 'vdw'"),
    (["check", "missing.toml"], "missing.toml: file not found"),
    (["fiber", str(ROOT / "configs" / "yb_arf_argon.toml"), "--set", "gas.pressure_bar=abc"],
     "gas.pressure_bar = 'abc': must be a number"),
    (["check", str(ROOT / "configs" / "yb_arf_argon.toml"), "--set", "fiber.core=3"],
     "fiber.core: unknown key"),
])
def test_bad_input_exit_2_one_line(capsys, argv, fragment):
    code, out, err = run(capsys, *argv)
    assert code == 2
    lines = [ln for ln in err.splitlines() if ln.strip()]
    assert len(lines) == 1, err
    assert fragment in lines[0]
    assert "Traceback" not in err


def test_bad_config_subprocess_no_traceback(tmp_path):
    # the real console path: a separate interpreter, stderr captured as the user sees it
    bad = tmp_path / "bad.toml"
    bad.write_text('[laser]\nwavelength_nm = "x"\n')
    proc = subprocess.run([sys.executable, "-m", "hcfplan", "check", str(bad)],
                          capture_output=True, text=True, timeout=120)
    assert proc.returncode == 2
    assert "Traceback" not in proc.stderr
    assert proc.stderr.strip().count("\n") == 0
    assert "laser.wavelength_nm" in proc.stderr


def test_cli_import_is_light():
    # start-up rule: importing the CLI must not pull in the heavy modules (they are imported
    # inside the commands); checked structurally rather than by timing.
    code = ("import sys, hcfplan.cli.app; heavy = [m for m in ('matplotlib', 'numba', 'CoolProp', "
            "'scipy') if m in sys.modules]; print(','.join(heavy))")
    proc = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert proc.stdout.strip() == ""


@pytest.mark.parametrize("path", DEMOS, ids=[p.name for p in DEMOS])
def test_limits_every_demo(capsys, path):
    code, out, err = run(capsys, "limits", str(path), "--json")
    assert code == 0, err
    report = json.loads(out)
    assert report["limits.cautions"]
    statuses = {c["status"] for c in report["limits.checks"]}
    assert statuses <= {"within", "exceeds", "not checked"}
    # never calls an operating point "safe" (house rule); "safety" in the cautions is fine
    assert re.search(r"\bsafe\b", out.lower()) is None


def test_limits_text_has_table_and_cautions(capsys):
    code, out, _ = run(capsys, "limits", str(ROOT / "configs" / "yb_capillary_mixture.toml"))
    assert code == 0
    assert "self_focusing.input" in out and "gas_handling.oxygen" in out
    assert "Cautions:" in out


def test_envelope_json_and_plot(capsys, tmp_path):
    figure = tmp_path / "env.png"
    code, out, err = run(capsys, "envelope", str(ROOT / "configs" / "tisa_capillary_neon.toml"),
                         "--json", "--plot", str(figure))
    assert code == 0, err
    data = json.loads(out)
    assert len(data["envelope.energies_j"]) == 100 and len(data["envelope.pressures_pa"]) == 100
    assert len(data["envelope.self_focusing_max_energy_j"]) == 100
    assert figure.stat().st_size > 10_000


def test_envelope_names_the_regime_without_zero_dispersion(capsys):
    code, out, err = run(capsys, "envelope", str(ROOT / "configs" / "yb_arf_argon.toml"))
    assert code == 0, err
    (line,) = [x for x in out.splitlines() if "zero-dispersion pressure" in x]
    assert "none on the map" in line
    assert "anomalous dispersion at the pump over the whole map" in line
    assert "below" not in line and "above" not in line


def test_envelope_regime_words():
    from hcfplan.cli.output import _dispersion_regime

    assert _dispersion_regime([1e-27, 2e-27], float("nan")).startswith("normal dispersion")
    assert _dispersion_regime([-1e-27, -2e-27], float("nan")).startswith("anomalous")
    assert _dispersion_regime([-1e-27, 2e-27], 3e5) == "anomalous below, normal above"


def test_check_refuses_a_liquid_fill_like_limits(capsys):
    keys = ["--set", "gas.species=Xe", "--set", "gas.pressure_bar=60",
            "--set", "gas.temperature_k=288.15"]
    path = str(ROOT / "configs" / "yb_arf_argon.toml")
    code, out, err = run(capsys, "check", path, *keys)
    assert code == 2 and "valid" not in out and "Traceback" not in err
    assert len(err.strip().splitlines()) == 1
    assert "gas.pressure_bar = 60" in err and "gas.temperature_k = 288.15" in err
    assert "liquid" in err
    code_limits, _, err_limits = run(capsys, "limits", path, *keys)
    assert code_limits == 2 and err_limits == err


@pytest.mark.parametrize(("pressure", "expected"), [
    ("25", "exceeds cell.rated_pressure_bar = 20"),
    ("19", "above limits.rating_fraction x cell.rated_pressure_bar = 0.9 x 20 = 18 bar"),
])
def test_check_notes_a_fill_above_the_rating(capsys, pressure, expected):
    code, out, err = run(capsys, "check", str(ROOT / "configs" / "yb_arf_argon.toml"),
                         "--set", f"gas.pressure_bar={pressure}")
    assert code == 0, err
    notes = out[out.index("Notes (limits to report, not errors):"):out.index("Cautions:")]
    assert expected in notes and "cell maker's rating" in notes
    assert "local pressure-equipment codes" in notes and "mbar" not in notes
    assert "Cautions:" in out and "rated pressure" in out
    assert re.search(r"\bsafe\b", out.lower()) is None


def test_check_hints_mbar_for_hundreds_of_bar(capsys):
    code, out, err = run(capsys, "check", str(ROOT / "configs" / "yb_capillary_mixture.toml"),
                         "--set", "gas.pressure_bar=500")
    assert code == 0, err
    assert "did you mean mbar (gas.pressure_bar = 0.5)?" in out
    assert "exceeds cell.rated_pressure_bar = 5" in out
    code, out, err = run(capsys, "check", str(ROOT / "configs" / "yb_capillary_mixture.toml"),
                         "--json", "--set", "gas.pressure_bar=500")
    assert code == 0 and json.loads(out)["gas"]["pressure_bar"] == 500
    assert "did you mean mbar" in err


def test_check_without_notes_on_a_demo(capsys):
    code, out, _ = run(capsys, "check", str(ROOT / "configs" / "yb_arf_argon.toml"))
    assert code == 0 and "Notes" not in out and ": valid. Resolved" in out


def test_envelope_refuses_taylor(capsys):
    code, _, err = run(capsys, "envelope", str(ROOT / "configs" / "taylor_pcf_check.toml"))
    assert code == 2 and "Traceback" not in err


def test_interrupt_inside_a_command_exit_130_one_line(capsys, monkeypatch):
    # contract: Ctrl-C (KeyboardInterrupt) inside any command ends it with exit 130 and one
    # stderr line, no traceback. No external source is needed for this check.
    from hcfplan.io import config as io_config

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(io_config, "load_config", interrupted)
    code, out, err = run(capsys, "check", str(DEMOS[0]))
    assert code == 130
    assert err.strip() == "hcfplan: interrupted; nothing written", err
    assert out == ""


def test_interrupted_message_names_only_what_was_written(tmp_path):
    # contract of hcfplan.cli.common.WrittenFiles: files present before the command started
    # are not listed, temporary files (".name.xxx") are not listed, files in a subfolder are
    # counted. No external source is needed for this check.
    from hcfplan.cli.common import WRITTEN, interrupted_message

    folder = tmp_path / "scan"
    folder.mkdir()
    (folder / "old.csv").write_text("old\n")
    figure = tmp_path / "fig.png"
    WRITTEN.clear()
    try:
        WRITTEN.watch(folder, "resumable")
        WRITTEN.watch(figure)
        assert interrupted_message() == "interrupted; nothing written"
        (folder / "points").mkdir()
        for name in ("a.json", "b.json"):
            (folder / "points" / name).write_text("{}\n")
        (folder / "table.csv").write_text("x\n")
        (folder / ".table.csv.tmp123").write_text("half")
        message = interrupted_message()
    finally:
        WRITTEN.clear()
    assert message == (f"interrupted; kept {folder}/: table.csv, points/ with 2 files "
                       "(complete files only); resumable")


def test_envelope_check_text_says_above_the_model_range(capsys):
    from types import SimpleNamespace

    from hcfplan.cli.output import _print_envelope_check
    from hcfplan.planning.envelope_check import CheckPoint, EnvelopeCheck

    point = CheckPoint(energy=1e-3, pressure=2e5, index=(0, 0), estimate_duration=10e-15,
                       gnlse_duration=12e-15, estimate_cutoff=50e12, gnlse_cutoff=float("nan"),
                       note="")
    check = EnvelopeCheck(points=(point,), factor=1.5, sweet_spot="s", notes=())
    _print_envelope_check(check, SimpleNamespace(thz_model_limit=20e12))
    out = capsys.readouterr().out
    assert "THz cutoff above the model's range (> 20 THz) estimated, void chain" in out
    assert "50 THz" not in out and "n/a THz" not in out


#: Each command and a function it calls early: (argv after the command, module, name).
_EARLY_CALLS = {
    "gas": (["Ar"], "hcfplan.planning.reports.gas", "gas_report"),
    "check": ([str(DEMOS[0])], "hcfplan.io.config", "load_config"),
    "fiber": ([str(DEMOS[0])], "hcfplan.io.config", "load_config"),
    "simulate": ([str(DEMOS[0]), "--out", "{tmp}/run"], "hcfplan.io.config", "load_config"),
    "limits": ([str(DEMOS[0])], "hcfplan.io.config", "load_config"),
    "envelope": ([str(DEMOS[0])], "hcfplan.io.config", "load_config"),
    "thz": ([str(ROOT / "configs" / "demo_broadened_spectrum.csv")],
            "hcfplan.planning.reports.thz", "thz_setup_from_options"),
    "scan": ([str(DEMOS[0]), "--vary", "gas.pressure_bar=1,2", "--workers", "1", "--out",
              "{tmp}/scan"], "hcfplan.planning.scan", "plan_scan"),
    "recommend": ([str(DEMOS[0]), "--goal", "shortest", "--workers", "1"],
                  "hcfplan.planning.recommend", "recommend"),
    "compare": ([str(DEMOS[0]), "--set-b", "laser.energy_uj=10"], "hcfplan.io.config",
                "load_config"),
    "calibrate": ([str(DEMOS[0]), "--measured",
                   str(ROOT / "configs" / "demo_broadened_spectrum.csv"), "--fit", "energy",
                   "--out", "{tmp}/calibrated.toml"], "hcfplan.planning.calibrate",
                  "calibrate_files"),
}


@pytest.mark.parametrize("command", list(_EARLY_CALLS))
def test_ctrl_c_prints_one_line_in_every_command(capsys, monkeypatch, tmp_path, command):
    # contract: Ctrl-C (KeyboardInterrupt) in any command: exit 130, one line on stderr, no
    # traceback. No external source is needed for this check.
    import importlib

    from hcfplan.cli.app import app

    assert sorted(_EARLY_CALLS) == sorted(c.name for c in app.registered_commands)
    args, module, name = _EARLY_CALLS[command]

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(importlib.import_module(module), name, interrupted)
    code, out, err = run(capsys, command, *(a.format(tmp=tmp_path) for a in args))
    assert code == 130
    assert err == "hcfplan: interrupted; nothing written\n"
    assert list(tmp_path.iterdir()) == []  # no output folder left behind


@pytest.mark.parametrize(("name", "expected"), [("SIGTERM", 143), ("SIGHUP", 129)])
def test_termination_ends_a_command_like_ctrl_c(capsys, monkeypatch, name, expected):
    # contract: SIGTERM or SIGHUP inside a command: exit 128 + the signal, the same one line
    import os
    import signal
    import time

    from hcfplan.io import config as io_config

    signum = getattr(signal, name)

    def terminated(*args, **kwargs):
        os.kill(os.getpid(), signum)
        time.sleep(5)  # the handler raises before this ends
        pytest.fail(f"{name} was not handled")

    previous = signal.getsignal(signum)
    monkeypatch.setattr(io_config, "load_config", terminated)
    code, out, err = run(capsys, "check", str(DEMOS[0]))
    assert code == expected
    assert err == "hcfplan: interrupted; nothing written\n"
    assert signal.getsignal(signum) is previous  # restored after the command


def test_version(capsys):
    from hcfplan.version import __version__

    code, out, err = run(capsys, "--version")
    assert code == 0 and err == ""
    assert out == f"hcfplan {__version__}\n"
