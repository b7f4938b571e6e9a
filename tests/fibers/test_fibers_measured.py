"""Measured loss and GVD laid over a fiber model (hcfplan.fibers.measured) and their config keys."""

from __future__ import annotations

import math

import numpy as np
import pytest

from hcfplan.errors import ConfigError
from hcfplan.fibers import MeasuredFiber, TaylorFiber, derived

C = 299792458.0
OMEGA0 = 2 * np.pi * C / 1030e-9
BETA2 = -20e-30  # model: -20 fs^2/m
MODEL = TaylorFiber(OMEGA0, (BETA2,), gamma=0.0, length=1.0, loss=0.5)


def _alpha(db_per_m):
    return db_per_m * math.log(10) / 20  # field attenuation of a power loss (dB definition)


def test_flat_loss_replaces_the_model_loss():
    fiber = MeasuredFiber(MODEL, OMEGA0, flat_loss=_alpha(0.3))
    omega = OMEGA0 * np.array([0.8, 1.0, 1.3])
    np.testing.assert_allclose(fiber.attenuation(omega), _alpha(0.3))
    assert fiber.loss_model == "measured_flat"
    # everything else is the model's
    assert fiber.gamma == MODEL.gamma and fiber.length == MODEL.length


def test_loss_curve_inside_and_the_model_outside():
    wavelength = np.array([900e-9, 1100e-9])
    fiber = MeasuredFiber(MODEL, OMEGA0, loss_wavelength=wavelength,
                          loss=np.array([_alpha(0.2), _alpha(0.4)]))
    omega = 2 * np.pi * C / np.array([1000e-9, 1200e-9])
    alpha = fiber.attenuation(omega)
    assert alpha[0] == pytest.approx(_alpha(0.3))  # linear in wavelength, midway
    assert alpha[1] == pytest.approx(0.5)  # beyond the curve: the model's loss
    assert fiber.loss_model == "measured_curve"


def test_measured_gvd_is_integrated_about_the_pump():
    """Analytic: a measured constant beta2 comes back as beta2 at and around the pump, with
    beta0 and beta1 of the model at the pump; outside the range the model's beta2."""
    wavelength = np.linspace(900e-9, 1200e-9, 31)
    measured = -50e-30 * np.ones_like(wavelength)
    fiber = MeasuredFiber(MODEL, OMEGA0, gvd_wavelength=wavelength, gvd=measured)
    coefficients = derived.dispersion_coefficients(fiber, OMEGA0, order=2)
    assert coefficients[2] == pytest.approx(-50e-30, rel=1e-6)
    assert abs(coefficients[0]) < 1e-9 and abs(coefficients[1]) < 1e-15  # the model's (0, 0)
    far = 2 * np.pi * C / 1500e-9  # outside the measured range
    assert derived.dispersion_coefficients(fiber, far, order=2)[2] == pytest.approx(
        BETA2, rel=1e-5)
    # beta and the group delay are continuous at the edge of the range
    edge = 2 * np.pi * C / 1200e-9
    h = 1e-7 * edge
    beta = fiber.propagation_constant(np.array([edge - 2 * h, edge - h, edge + h, edge + 2 * h]))
    slope_left, slope_right = (beta[1] - beta[0]) / h, (beta[3] - beta[2]) / h
    assert slope_right == pytest.approx(slope_left, rel=1e-4, abs=1e-12)
    assert fiber.dispersion_model == "measured_gvd"


def test_gvd_curve_must_contain_the_pump():
    with pytest.raises(ConfigError, match=r"must contain the pump \(1030 nm\)"):
        MeasuredFiber(MODEL, OMEGA0, gvd_wavelength=np.array([600e-9, 900e-9]),
                      gvd=np.array([1e-30, 2e-30]))


# --- config keys -------------------------------------------------------------------------------

ARF = """
[laser]
wavelength_nm = 1030
fwhm_fs = 250
energy_uj = 100
[fiber]
kind = "antiresonant"
core_diameter_um = 40
wall_thickness_um = 0.3
length_m = 1.0
{extra}
[gas]
species = "Ar"
pressure_bar = 1.0
"""


def _config(tmp_path, extra: str, files: dict | None = None):
    from hcfplan.io.config import load_config

    for name, text in (files or {}).items():
        (tmp_path / name).write_text(text)
    path = tmp_path / "c.toml"
    path.write_text(ARF.format(extra=extra))
    return load_config(path)


def test_single_tube_loss_is_reported_and_a_flat_loss_replaces_it(tmp_path):
    """The single-tube model gives 9.2 dB/m for a 40 um core with a 0.3 um wall at 1030 nm;
    the report names the loss used, and fiber.loss_db_per_m replaces it for every kind."""
    from hcfplan.planning.reports.fiber import fiber_report

    report = fiber_report(_config(tmp_path, ""))
    assert report["fiber.loss_model"] == "antiresonant_single_tube_zeisberger2017"
    assert report["fiber.power_loss_db_per_m"] == pytest.approx(9.2, abs=0.1)
    assert any("overstates" in w for w in report["warnings"])
    report = fiber_report(_config(tmp_path, "loss_db_per_m = 0.2"))
    assert report["fiber.loss_model"] == "measured_flat"
    assert report["fiber.power_loss_db_per_m"] == pytest.approx(0.2, rel=1e-12)
    assert not any("overstates" in w for w in report["warnings"])
    assert report["fiber.dispersion_model"] == "model"


def test_loss_and_gvd_csv_from_a_config(tmp_path):
    from hcfplan.planning.reports.fiber import fiber_report

    files = {"loss.csv": "wavelength_nm,loss_db_per_m\n900,0.1\n1100,0.3\n",
             "gvd.csv": "wavelength_nm,gvd_fs2_per_m\n900,-40\n1000,-40\n1100,-40\n"}
    config = _config(tmp_path, 'loss_csv = "loss.csv"\ngvd_csv = "gvd.csv"', files)
    report = fiber_report(config)
    assert report["fiber.loss_model"] == "measured_curve"
    assert report["fiber.power_loss_db_per_m"] == pytest.approx(0.23, rel=1e-9)
    # the measured fiber GVD plus the GVD of the argon fill at its density (sum rule)
    from hcfplan.materials.gases import GasFill, gas_medium

    medium = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    w0, h = OMEGA0, 1e-3 * OMEGA0
    k = [w / C * float(medium.refractive_index(np.array([w]))[0]) for w in (w0 - h, w0, w0 + h)]
    gas_gvd = (k[2] - 2 * k[1] + k[0]) / h**2
    assert 10e-30 < gas_gvd < 20e-30  # about 14 fs^2/m at 1 bar (Borzsonyi/Peck & Fisher)
    assert report["fiber.beta2_s2_per_m"] == pytest.approx(-40e-30 + gas_gvd, rel=1e-4)
    assert report["fiber.dispersion_model"] == "measured_gvd"


@pytest.mark.parametrize(("extra", "files", "fragment"), [
    ('loss_db_per_m = 0.1\nloss_csv = "l.csv"', {"l.csv": "wavelength_nm,loss_db_per_m\n1,2\n"},
     r"fiber\.loss_db_per_m and fiber\.loss_csv: give one"),
    ('loss_csv = "l.csv"', {"l.csv": "wavelength_nm,loss_db_per_m\n900,0.1\n1100,-0.2\n"},
     r"fiber\.loss_csv: .*l\.csv: loss -0\.2 dB/m at 1100 nm: losses must be >= 0"),
    ('gvd_csv = "g.csv"', {"g.csv": "wavelength_nm,gvd_fs2_per_m\n600,10\n900,20\n"},
     r"fiber\.gvd_csv: .*g\.csv covers 600-900 nm; it must contain the pump"),
    ('gvd_csv = "g.csv"', {"g.csv": "wavelength_nm,gdd_fs2\n600,10\n900,20\n"},
     r"fiber\.gvd_csv: .*g\.csv:1: header .* lacks column"),
    ('loss_csv = "l.csv"', {"l.csv": "frequency_thz,loss_db_per_m\n290,0.1\n300,0.2\n"},
     r"fiber\.loss_csv: .*l\.csv:1: column 'frequency_thz' looks like frequency in THz"),
])
def test_bad_measured_fiber_data_is_one_line_naming_the_key_and_file(tmp_path, extra, files,
                                                                      fragment):
    with pytest.raises(ConfigError, match=fragment):
        _config(tmp_path, extra, files)


def test_light_outside_a_measured_curve_is_a_warning(tmp_path):
    """The model's loss is used where the measured curve ends, and the report says so."""
    from hcfplan.planning.reports.fiber import fiber_report

    files = {"l.csv": "wavelength_nm,loss_db_per_m\n600,0.1\n900,0.2\n"}
    report = fiber_report(_config(tmp_path, 'loss_csv = "l.csv"', files))
    assert any("fiber.loss_csv (l.csv) covers 600-900 nm; the pump (1030 nm) leaves it: the "
               "model's loss is used outside" in w for w in report["warnings"]), report["warnings"]
    assert report["fiber.power_loss_db_per_m"] == pytest.approx(9.2, abs=0.1)  # the model's
