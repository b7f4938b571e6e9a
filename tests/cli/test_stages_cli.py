"""Cascaded stages from the command line: simulate writes every stage's summary and figures,
stage keys work in ``--set``, ``scan --vary`` and ``compare --set-b``; a key that names no stage
is refused with one line and exit code 2.

Contract tests on an invented two-stage case (the fast argon capillary, then a short evacuated
one); no published values are checked here.
"""

from __future__ import annotations

import json
from pathlib import Path

from fast_cases import FAST_CONFIG

from hcfplan.cli.app import main

ROOT = Path(__file__).resolve().parents[2]

#: Test scenario (invented): the fast argon capillary, then a second argon capillary.
STAGED = """
[laser]
wavelength_nm = 1030.0
fwhm_fs = 200.0
shape = "gaussian"
energy_uj = 200.0

[[stage]]
[stage.fiber]
kind = "capillary"
core_diameter_um = 150.0
length_m = 0.2
[stage.gas]
species = "Ar"
pressure_bar = 2.0
ionization_model = "adk"
[stage.compressor]
mirror_gdd_fs2 = -100.0
max_bounces = 30

[[stage]]
[stage.fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.05
[stage.gas]
species = "Ar"
pressure_bar = 0.5
ionization_model = "adk"

[thz]
crystal = "GaP"
thickness_mm = 0.1

[grid]
points = 1024
z_samples = 10
"""


def _run(capsys, *args):
    code = main([str(a) for a in args])
    out = capsys.readouterr()
    return code, out.out, out.err


def test_simulate_writes_stages_and_their_figures(capsys, tmp_path):
    config = tmp_path / "two.toml"
    config.write_text(STAGED)
    out = tmp_path / "run"
    code, stdout, err = _run(capsys, "simulate", config, "--out", out, "--json", "--no-report",
                             "--set", "stage.1.gas.pressure_bar=0.8")
    assert code == 0, err
    summary = json.loads(stdout)
    assert summary["config"]["stage"][1]["gas"]["pressure_bar"] == 0.8
    assert summary["gas"]["pressure_pa"] == 0.8e5  # the final stage at the top-level keys
    assert summary["stages"]["1"]["input"]["energy_j"] == summary["stages"]["0"]["compressed"][
        "energy_j"]
    for name in ("stages_overview.png", "stage_0_spectrum_in_out.png",
                 "stage_0_compressed_pulse.png", "spectrum_in_out.png", "thz_spectrum.png"):
        assert (out / name).stat().st_size > 10_000, name
    assert "stage_0_thz_spectrum.png" not in summary["figures"]  # THz: the final stage only
    resolved = (out / "config.resolved.toml").read_text()
    assert resolved.count("[[stage]]") == 2


def test_stage_key_naming_no_stage_is_refused(capsys, tmp_path):
    config = tmp_path / "two.toml"
    config.write_text(STAGED)
    code, _, err = _run(capsys, "simulate", config, "--out", tmp_path / "x",
                        "--set", "gas.pressure_bar=1")
    assert code == 2
    assert err.strip().count("\n") == 0 and "stage.0.gas.pressure_bar" in err
    assert not (tmp_path / "x" / "summary.json").exists()


def test_scan_and_compare_take_stage_keys(capsys, tmp_path):
    config = tmp_path / "two.toml"
    config.write_text(STAGED)
    code, stdout, err = _run(capsys, "scan", config, "--vary", "stage.1.gas.pressure_bar=0.3,0.6",
                             "--out", tmp_path / "scan", "--workers", "1", "--json")
    assert code == 0, err
    rows = json.loads(stdout)["rows"]
    assert [r["stage.1.gas.pressure_bar"] for r in rows] == [0.3, 0.6]
    fwhm = [r["compressed.fwhm_s"] for r in rows]
    assert fwhm[0] != fwhm[1]  # the varied stage changed the final pulse
    code, stdout, err = _run(capsys, "compare", config, "--set-b", "stage.1.fiber.length_m=0.1",
                             "--json")
    assert code == 0, err
    assert json.loads(stdout)["rows"]


def test_one_stage_config_keeps_working(capsys, tmp_path):
    # contract: the single-stage form is one stage; no stages keys appear
    config = tmp_path / "one.toml"
    config.write_text(FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0))
    code, stdout, err = _run(capsys, "simulate", config, "--out", tmp_path / "one", "--json",
                             "--no-figures", "--no-report")
    assert code == 0, err
    assert "stages" not in json.loads(stdout)
