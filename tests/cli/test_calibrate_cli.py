"""The ``calibrate`` command and ``hcfplan.calibrate``: JSON, figure and calibrated config."""

from __future__ import annotations

import json

import numpy as np
import pytest
from fast_cases import write_fast_config

import hcfplan
from hcfplan.cli.app import main
from hcfplan.io.config import load_config
from hcfplan.planning.calibrate import modelled_output, spectrum_per_wavelength
from hcfplan.planning.chain import run_chain


@pytest.fixture(scope="module")
def setup(tmp_path_factory):
    """A config and a spectrum the model made at energy_uj = 150 (noise 3 %, invented)."""
    folder = tmp_path_factory.mktemp("calcli")
    config = write_fast_config(folder, energy_uj=200.0)
    truth = load_config(config, overrides=["laser.energy_uj=150"])
    grid = run_chain(truth).grid
    wavelength = np.linspace(960e-9, 1100e-9, 141)
    density = spectrum_per_wavelength(grid, modelled_output(truth, grid), wavelength)
    density *= 1 + 0.03 * np.random.default_rng(5).standard_normal(density.size)
    spectrum = folder / "measured.csv"
    rows = "\n".join(f"{w * 1e9:.3f},{max(d, 0.0):.6e}" for w, d in zip(wavelength, density,
                                                                         strict=True))
    spectrum.write_text("wavelength_nm,intensity\n" + rows + "\n", encoding="utf-8")
    return folder, config, spectrum


def test_calibrate_json_figure_and_calibrated_config(setup, capsys):
    folder, config, spectrum = setup
    out = folder / "calibrated.toml"
    code = main(["calibrate", str(config), "--measured", str(spectrum), "--at",
                 "gas.pressure_bar=2", "--fit", "energy", "--out", str(out), "--json"])
    report = json.loads(capsys.readouterr().out)
    assert code == 0
    fit = report["fit"]
    assert abs(fit["energy"]["value"] - 150.0) <= 2 * fit["energy"]["uncertainty"]
    assert fit["residual_db"] < 1.0 and fit["quality"] == "good"
    assert (folder / "calibrated.png").stat().st_size > 0
    text = out.read_text(encoding="utf-8")
    assert text.startswith("# Calibrated by hcfplan calibrate")
    calibrated = load_config(out)  # what simulate, compare and recommend read
    assert calibrated.laser.energy * 1e6 == pytest.approx(fit["energy"]["value"], rel=1e-5)
    assert calibrated.gas.pressure == pytest.approx(2e5)


@pytest.mark.parametrize(("args", "match"), [
    (["--at", "gas.pressure_bar=1", "--at", "gas.pressure_bar=2"],
     "--at given 2 time(s) for 1 --measured"),
    (["--at", "gas.pressure_barr=1"], "gas.pressure_barr"),
    (["--fit", "thickness"], "--fit 'thickness': unknown parameter"),
])
def test_calibrate_refusals_exit_2(setup, capsys, args, match):
    folder, config, spectrum = setup
    out = folder / "refused.toml"
    fit = [] if "--fit" in args else ["--fit", "energy"]
    code = main(["calibrate", str(config), "--measured", str(spectrum), *fit, *args,
                 "--out", str(out)])
    assert code == 2
    assert match in capsys.readouterr().err
    assert not out.exists()


def test_calibrate_is_in_the_python_api():
    assert "calibrate" in hcfplan.API_NAMES
    assert hcfplan.calibrate is hcfplan.api.calibrate
    with pytest.raises(hcfplan.ConfigError, match="at: 2 setting"):
        hcfplan.calibrate("missing.toml", ["a.csv"], fit="energy", at=[{}, {}])


def test_python_api_calibrate_reports_the_json_keys(setup):
    folder, config, spectrum = setup
    result = hcfplan.calibrate(config, spectrum, fit=["energy"], max_evaluations=4,
                               out=folder / "api.toml")
    fit = result.as_dict()["fit"]
    assert set(fit["energy"]) >= {"value", "uncertainty"} and "residual_db" in fit
    assert load_config(folder / "api.toml").laser.energy * 1e6 == pytest.approx(
        result.values["energy"], rel=1e-5)


def test_calibrate_never_overwrites_its_config(setup, capsys):
    folder, config, spectrum = setup
    before = config.read_text(encoding="utf-8")
    code = main(["calibrate", str(config), "--measured", str(spectrum), "--fit", "energy",
                 "--out", str(config)])
    assert code == 2
    assert "is the config itself" in capsys.readouterr().err
    assert config.read_text(encoding="utf-8") == before
