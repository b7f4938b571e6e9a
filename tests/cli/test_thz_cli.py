"""The ``thz`` command's time domain, absolute figures, geometry and user crystals."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from hcfplan.cli.app import main

ROOT = Path(__file__).resolve().parents[2]
SPECTRUM = str(ROOT / "configs" / "demo_broadened_spectrum.csv")


def test_thz_command_tilted_front_absolute_json(capsys, tmp_path):
    plot = tmp_path / "thz.png"
    code = main(["thz", SPECTRUM, "--crystal", "LiNbO3", "--geometry", "tilted_front",
                 "--thickness-mm", "2", "--energy-uj", "100", "--beam-waist-um", "2000",
                 "--repetition-khz", "10", "--focus-f-number", "2", "--detector-crystal",
                 "GaP", "--detector-thickness-mm", "0.2", "--plot", str(plot), "--json"])
    report = json.loads(capsys.readouterr().out)
    assert code == 0
    assert report["geometry"] == "tilted_front"
    assert report["tilt_angle_deg"] == pytest.approx(63.5, abs=1.0)  # Hebling et al. 2002
    assert report["peak_field_v_per_m"] > report["peak_field_exit_v_per_m"] > 0
    assert report["efficiency"] == pytest.approx(report["energy_estimate_j"] / 100e-6)
    assert report["average_power_w"] == pytest.approx(report["energy_estimate_j"] * 1e4)
    assert "grating and imaging not modelled" in report["absolute_assumptions"]
    assert report["binding_limit"] == "damage"  # no two-photon absorption in LiNbO3
    assert "rad" in report["eo_signal_normalisation"]
    assert plot.exists() and Path(report["waveform_figure"]).exists()


def test_thz_command_text_shows_field_and_assumptions(capsys):
    code = main(["thz", SPECTRUM, "--crystal", "GaP", "--thickness-mm", "0.3",
                 "--energy-uj", "5", "--beam-waist-um", "1500"])
    out = capsys.readouterr().out
    assert code == 0
    assert "THz peak field" in out and "kV/cm   at an f/2 focus" in out
    assert "THz assumptions" in out and "plane wave, undepleted pump, collinear" in out
    assert "crystal fluence" in out and "binding limit" in out


def test_thz_command_refuses_bad_geometry(capsys):
    code = main(["thz", SPECTRUM, "--geometry", "oblique"])
    err = capsys.readouterr().err
    assert code == 2
    assert "--geometry = 'oblique': must be one of collinear, tilted_front" in err


def test_thz_command_reads_user_crystals_from_the_environment(capsys, tmp_path, monkeypatch):
    text = (ROOT / "hcfplan" / "materials" / "data" / "crystals" / "gap.toml").read_text()
    (tmp_path / "mygap.toml").write_text(text.replace('name = "GaP"', 'name = "MyGaP"'))
    monkeypatch.setenv("HCFPLAN_CRYSTAL_PATH", str(tmp_path))
    code = main(["thz", SPECTRUM, "--crystal", "mygap", "--json"])
    assert code == 0
    assert json.loads(capsys.readouterr().out)["crystal"] == "MyGaP"


def test_simulate_writes_time_domain_arrays(tmp_path):
    from fast_cases import FAST

    config = tmp_path / "fast.toml"
    config.write_text(FAST.replace("detector_thickness_mm = 0.2",
                                   "detector_thickness_mm = 0.2\nbeam_waist_um = 2000.0")
                      .replace("energy_uj = 300.0", "energy_uj = 300.0\nrepetition_khz = 1.0"))
    out = tmp_path / "out"
    assert main(["simulate", str(config), "--out", str(out), "--quiet", "--figures",
                 "default,thz_waveform"]) == 0
    fields = np.load(out / "fields.npz")
    for key in ("thz_time_s", "thz_field_v_per_m", "eo_delay_s", "eo_signal"):
        assert key in fields.files
    summary = json.loads((out / "summary.json").read_text())
    thz = summary["thz"]
    assert thz["peak_field_v_per_m"] > 0
    assert thz["average_power_w"] == pytest.approx(thz["energy_estimate_j"] * 1e3)
    pump = summary["compressed"]["energy_j"]  # energy on the crystal
    assert thz["efficiency"] == pytest.approx(thz["energy_estimate_j"] / pump, rel=1e-3)
    assert (out / "thz_waveform.png").exists()
