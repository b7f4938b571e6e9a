"""Calibration against measured output spectra: spectra made by the model at known parameters
plus noise are fitted back within their uncertainties; spectra the model cannot describe give
a poor fit."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest
from fast_cases import FAST_CONFIG

from hcfplan.errors import ConfigError
from hcfplan.io.config import load_config
from hcfplan.planning import calibrate as cal
from hcfplan.planning.chain import run_chain

WAVELENGTH = np.linspace(950e-9, 1110e-9, 241)
#: Relative noise of the synthetic spectra (a spectrometer's shot-to-shot scatter; invented).
NOISE = 0.05


@pytest.fixture(scope="module")
def config_path(tmp_path_factory):
    path = tmp_path_factory.mktemp("cal") / "fast.toml"
    path.write_text(FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0), encoding="utf-8")
    return path


def _loader(path):
    return lambda overrides: load_config(path, overrides=overrides)


def synthetic(path, overrides, seed) -> cal.Measurement:
    """The model's output spectrum at ``overrides`` with multiplicative noise."""
    config = load_config(path, overrides=overrides)
    config = dataclasses.replace(config, present_sections=tuple(
        s for s in config.present_sections if s != "thz"))
    chain = run_chain(config)
    density = cal.spectrum_per_wavelength(chain.grid, chain.propagation.field_out_spectrum,
                                          WAVELENGTH)
    noisy = density * (1 + NOISE * np.random.default_rng(seed).standard_normal(density.size))
    return cal.Measurement(Path(f"synthetic-{seed}.csv"), WAVELENGTH, np.clip(noisy, 0, None))


def test_energy_is_fitted_back_within_its_uncertainty(config_path):
    truth = 160.0
    measured = synthetic(config_path, ["laser.energy_uj=160"], seed=1)
    result = cal.calibrate_config(_loader(config_path), load_config(config_path), ("energy",),
                                  [measured])
    value, sigma = result.values["energy"], result.uncertainties["energy"]
    assert abs(value - truth) <= 2 * sigma  # 2 standard errors (95 %)
    assert 0 < sigma < 0.02 * truth  # the check is not void: a tight, finite uncertainty
    assert result.quality == "good" and result.residual_db < 1.0
    assert result.evaluations <= cal.MAX_EVALUATIONS + 1


@pytest.mark.parametrize(("names", "truth"), [
    (("fwhm",), {"laser.fwhm_fs": 170.0}),
    (("n2",), {"gas.n2_scale": 1.3}),
    (("energy", "fwhm"), {"laser.energy_uj": 170.0, "laser.fwhm_fs": 230.0}),
])
def test_other_parameters_are_fitted_back_within_their_uncertainties(config_path, names,
                                                                     truth):
    measured = synthetic(config_path, [f"{k}={v}" for k, v in truth.items()], seed=3)
    result = cal.calibrate_config(_loader(config_path), load_config(config_path), names,
                                  [measured])
    for name in names:
        value, sigma = result.values[name], result.uncertainties[name]
        expected = truth[cal.FIT_PARAMETERS[name].path]
        assert abs(value - expected) <= 2 * sigma, name  # 2 standard errors (95 %)
        assert 0 < sigma < 0.05 * expected, name
    assert result.quality == "good"


def test_density_factor_from_two_spectra_at_two_pressures(config_path):
    truth = 0.8
    at = (("gas.pressure_bar=1",), ("gas.pressure_bar=3",))
    measured = [dataclasses.replace(synthetic(config_path, [*a, f"gas.density_scale={truth}"],
                                              seed=10 + i), overrides=a)
                for i, a in enumerate(at)]
    result = cal.calibrate_config(_loader(config_path), load_config(config_path),
                                  ("pressure",), measured, max_evaluations=20)
    value, sigma = result.values["pressure"], result.uncertainties["pressure"]
    assert abs(value - truth) <= 2 * sigma
    assert 0 < sigma < 0.05
    assert result.quality == "good"


def test_a_spectrum_the_model_cannot_describe_is_a_poor_fit(config_path):
    # two separate lines 80 nm apart: no energy of this fiber makes them (invented)
    double = (np.exp(-(((WAVELENGTH - 990e-9) / 4e-9) ** 2))
              + np.exp(-(((WAVELENGTH - 1070e-9) / 4e-9) ** 2)))
    measured = cal.Measurement(Path("double.csv"), WAVELENGTH, double)
    result = cal.calibrate_config(_loader(config_path), load_config(config_path), ("energy",),
                                  [measured], max_evaluations=6)
    assert result.quality == "poor"
    assert result.residual_db > cal.POOR_FIT_RESIDUAL_DB
    assert any("does not describe" in reason for reason in result.reasons)


@pytest.mark.parametrize(("text", "match"), [
    ("energy,thickness", r"--fit 'thickness': unknown parameter \(choose from energy, fwhm, "
                         r"pressure, n2\)"),
    ("energy,energy", r"named twice"),
    (" , ", r"name at least one"),
])
def test_fit_names_are_checked(text, match):
    with pytest.raises(ConfigError, match=match):
        cal.parse_fit_names(text)


def test_a_setting_may_not_be_a_fitted_key(tmp_path):
    path = tmp_path / "s.csv"
    path.write_text("wavelength_nm,intensity\n1000,0.5\n1030,1\n1060,0.5\n", encoding="utf-8")
    with pytest.raises(ConfigError, match=r"--at gas.n2_scale=2: gas.n2_scale is a fitted"):
        cal.read_measurement(path, ["gas.n2_scale=2"])
    with pytest.raises(ConfigError, match=r"--measured: .*s\.csv:2: negative intensity -1"):
        path.write_text("wavelength_nm,intensity\n1000,-1\n1030,1\n1060,0.5\n")
        cal.read_measurement(path)
