"""A measured pulse as input (``laser.field_csv``) and the compressed pulse a run writes
(``compressed_field.csv``); the calibration factors of the gas (``gas.density_scale``,
``gas.n2_scale``)."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from fast_cases import FAST_CONFIG

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.io.config import load_config
from hcfplan.planning.build import build_medium
from hcfplan.planning.chain import run_chain
from hcfplan.planning.field_export import compressed_field_csv, envelope_about_pump
from hcfplan.pulse.metrics import envelope_fwhm

EVACUATED = """
[laser]
wavelength_nm = 1030.0
fwhm_fs = {fwhm_fs}
energy_uj = {energy_uj}
field_csv = "compressed_field.csv"

[fiber]
kind = "capillary"
core_diameter_um = 150.0
length_m = 0.2

[gas]
species = "Ar"
pressure_bar = 1e-9

[grid]
points = 1024
z_samples = 4
"""


def _without_thz(config):
    return dataclasses.replace(config, present_sections=tuple(
        s for s in config.present_sections if s != "thz"))


@pytest.fixture(scope="module")
def first_run(tmp_path_factory):
    folder = tmp_path_factory.mktemp("first")
    path = folder / "fast.toml"
    path.write_text(FAST_CONFIG.format(energy_uj=300.0, rated_bar=20.0), encoding="utf-8")
    chain = run_chain(_without_thz(load_config(path)))
    assert chain.compression is not None
    return chain


def test_compressed_field_fed_to_an_evacuated_fiber_comes_out_unchanged(first_run, tmp_path):
    # invariant: without gas (1e-9 bar) the fiber only attenuates, so the pulse keeps its shape
    (tmp_path / "compressed_field.csv").write_text(compressed_field_csv(first_run))
    energy_uj = first_run.compression.metrics.energy * 1e6
    fwhm_fs = first_run.compression.metrics.fwhm * 1e15
    path = tmp_path / "evacuated.toml"
    path.write_text(EVACUATED.format(fwhm_fs=fwhm_fs, energy_uj=energy_uj), encoding="utf-8")
    grid = first_run.grid  # the same sampling: no interpolation error between the two grids
    config = load_config(path, overrides=[
        f"grid.time_window_fs={grid.time_window * 1e15!r}",
        f"grid.center_wavelength_nm={2 * np.pi * c / grid.omega0 * 1e9!r}"])
    assert config.laser.field.axis == "time"
    second = run_chain(config)
    assert second.launched_energy == pytest.approx(energy_uj * 1e-6
                                                   * second.coupling_efficiency, rel=1e-9)
    t1, p1, phi1 = envelope_about_pump(first_run.grid, first_run.compression.field_t)
    t2, p2, phi2 = envelope_about_pump(second.grid, second.propagation.field_out_t)
    p2_on_1 = np.interp(t1, t2, p2 / p2.max(), left=0.0, right=0.0)
    phi2_on_1 = np.interp(t1, t2, phi2)
    weight = p1 / p1.max()
    # the compressed pulse keeps a residual phase, so the phase check is not void
    assert np.sqrt(np.sum(weight * phi1**2) / np.sum(weight)) > 0.1
    assert np.max(np.abs(p2_on_1 - weight)) < 5e-3
    assert np.sqrt(np.sum(weight * (phi2_on_1 - phi1) ** 2) / np.sum(weight)) < 5e-3
    assert envelope_fwhm(second.grid, second.propagation.field_out_t) == pytest.approx(
        first_run.compression.metrics.fwhm, rel=5e-3)


def test_compressed_field_csv_has_the_documented_columns(first_run):
    text = compressed_field_csv(first_run)
    header = [line for line in text.splitlines() if not line.startswith("#")][0]
    assert header == "time_fs,intensity,phase_rad"
    assert "envelope about the pump carrier 1030 nm" in text


@pytest.mark.parametrize(("fwhm_fs", "extra", "match"), [
    (40.0, "", r"laser\.fwhm_fs = 40\.0: the pulse of laser\.field_csv "
               r"\(.*compressed_field\.csv\) has an intensity FWHM of \d+\.\d+ fs"),
    (None, 'spectrum_csv = "compressed_field.csv"\n',
     r"laser\.spectrum_csv and laser\.field_csv: give one of them"),
])
def test_field_csv_refusals(first_run, tmp_path, fwhm_fs, extra, match):
    (tmp_path / "compressed_field.csv").write_text(compressed_field_csv(first_run))
    fwhm = fwhm_fs or first_run.compression.metrics.fwhm * 1e15
    text = EVACUATED.format(fwhm_fs=fwhm, energy_uj=100.0).replace("[fiber]", extra + "\n[fiber]")
    path = tmp_path / "bad.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(ConfigError, match=match):
        load_config(path)


def test_density_scale_equals_the_pressure_of_an_ideal_gas(tmp_path):
    # analytic: an ideal gas's density is proportional to pressure, so density_scale = 2 at
    # 1 bar gives the medium of 2 bar (index, number density and n2)
    path = tmp_path / "fast.toml"
    path.write_text(FAST_CONFIG.format(energy_uj=100.0, rated_bar=20.0), encoding="utf-8")
    scaled = build_medium(load_config(path, overrides=[
        "gas.equation_of_state='ideal'", "gas.pressure_bar=1", "gas.density_scale=2"]).gas)
    double = build_medium(load_config(path, overrides=[
        "gas.equation_of_state='ideal'", "gas.pressure_bar=2"]).gas)
    omega = np.array([1.5e15, 1.83e15, 2.5e15])
    assert scaled.number_density == pytest.approx(double.number_density, rel=1e-12)
    assert scaled.n2 == pytest.approx(double.n2, rel=1e-12)
    np.testing.assert_allclose(scaled.refractive_index(omega), double.refractive_index(omega),
                               rtol=1e-12)


def test_n2_scale_scales_the_electronic_kerr_coefficient_only(tmp_path):
    path = tmp_path / "fast.toml"
    path.write_text(FAST_CONFIG.format(energy_uj=100.0, rated_bar=20.0), encoding="utf-8")
    plain = build_medium(load_config(path).gas)
    scaled = build_medium(load_config(path, overrides=["gas.n2_scale=1.7"]).gas)
    assert scaled.n2 == pytest.approx(1.7 * plain.n2, rel=1e-12)
    assert scaled.number_density == plain.number_density


def _spectral_csv(path, centre_nm, fwhm_fs=200.0, gdd_fs2=0.0):
    """A Gaussian pulse's spectrum per nm with a GDD phase (invented test data)."""
    wavelength_nm = np.linspace(centre_nm - 40, centre_nm + 40, 401)
    omega = 2 * np.pi * c / (wavelength_nm * 1e-9)
    omega0 = 2 * np.pi * c / (centre_nm * 1e-9)
    t0 = fwhm_fs * 1e-15 / (2 * np.sqrt(np.log(2)))
    intensity = np.exp(-((omega - omega0) * t0) ** 2) * omega**2
    phase = 0.5 * gdd_fs2 * 1e-30 * (omega - omega0) ** 2
    rows = "\n".join(f"{w:.4f},{i:.8e},{p:.8f}" for w, i, p in
                     zip(wavelength_nm, intensity, phase, strict=True))
    path.write_text("wavelength_nm,intensity,phase_rad\n" + rows + "\n", encoding="utf-8")


def test_spectral_layout_loads_and_its_fwhm_includes_the_phase(tmp_path):
    # analytic: 200 fs Gaussian with 20000 fs^2 of GDD lasts 200 sqrt(1 + (4 ln2 GDD /
    # FWHM^2)^2) = 341.8 fs (Agrawal, Nonlinear Fiber Optics, 6th ed., Eq. (3.2.12), equation
    # number from memory)
    _spectral_csv(tmp_path / "compressed_field.csv", 1030.0, gdd_fs2=20000.0)
    text = EVACUATED.format(fwhm_fs=342.0, energy_uj=100.0)
    (tmp_path / "s.toml").write_text(text, encoding="utf-8")
    config = load_config(tmp_path / "s.toml")
    assert config.laser.field.axis == "wavelength" and config.laser.spectrum is None
    (tmp_path / "s.toml").write_text(text.replace("fwhm_fs = 342.0", "fwhm_fs = 200.0"))
    with pytest.raises(ConfigError, match=r"intensity FWHM of 341\.[89] fs"):
        load_config(tmp_path / "s.toml")


def test_spectral_layout_must_hold_the_pump(tmp_path):
    _spectral_csv(tmp_path / "compressed_field.csv", 800.0)
    (tmp_path / "s.toml").write_text(EVACUATED.format(fwhm_fs=200.0, energy_uj=100.0))
    with pytest.raises(ConfigError, match=r"laser\.wavelength_nm = 1030\.0: outside the "
                                          r"measured spectrum of laser\.field_csv"):
        load_config(tmp_path / "s.toml")
