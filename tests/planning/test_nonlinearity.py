"""The hint for a config that gives no nonlinearity (planning/reports/nonlinearity.py).

Kinds of test: analytic (gamma P0 L_eff of a Taylor fiber with given gamma, no loss, and the
peak power of a sech^2 pulse, P0 = 0.8814 E / FWHM), consistency with the fiber report, and
error-free hints (a warning, never an error).
"""

from __future__ import annotations

import math

import pytest

from hcfplan.io.config import config_from_mapping
from hcfplan.planning.reports.fiber import fiber_report
from hcfplan.planning.reports.nonlinearity import (
    LOW_NONLINEAR_PHASE,
    low_nonlinearity_notes,
    nonlinear_phase_estimate,
)

CAPILLARY = {"laser": {"wavelength_nm": 800.0, "fwhm_fs": 40.0, "energy_uj": 200.0},
             "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 0.5},
             "gas": {"species": "Ar", "pressure_bar": 1.0}}


def _taylor(energy_uj: float, gamma: float = 0.01) -> dict:
    return {"laser": {"wavelength_nm": 1030.0, "fwhm_fs": 100.0, "energy_uj": energy_uj},
            "fiber": {"kind": "taylor", "length_m": 0.2, "betas_fs_n_per_mm": [-20.0],
                      "gamma_per_w_per_m": gamma}}


def test_taylor_phase_is_gamma_p0_l():
    # analytic: sech^2 peak power P0 = 2 arccosh(sqrt 2) / 2 x E / FWHM = 0.8814 E / FWHM
    # (Agrawal, Nonlinear Fiber Optics, 6th ed. (2019), ch. 3 [from memory]); no loss, L_eff = L
    cfg = config_from_mapping(_taylor(1.0))
    p0 = math.acosh(math.sqrt(2)) * 1e-6 / 100e-15
    assert nonlinear_phase_estimate(cfg) == pytest.approx(0.01 * p0 * 0.2, rel=1e-9)


def test_estimate_agrees_with_the_fiber_report():
    cfg = config_from_mapping(CAPILLARY)
    phi = nonlinear_phase_estimate(cfg)
    assert phi == pytest.approx(fiber_report(cfg)["estimate.nonlinear_phase_rad"], rel=1e-12)
    assert phi > LOW_NONLINEAR_PHASE
    assert low_nonlinearity_notes(cfg, phi) == []


def test_low_phase_warns_and_names_the_keys():
    low = {**CAPILLARY, "laser": {**CAPILLARY["laser"], "energy_uj": 0.2}}
    cfg = config_from_mapping(low)
    phi = nonlinear_phase_estimate(cfg)
    (note,) = low_nonlinearity_notes(cfg, phi)
    assert note.startswith(f"peak nonlinear phase gamma P0 L_eff = {phi:.3g} rad: below 0.1 rad "
                           "nothing will broaden")
    assert "laser.energy_uj = 0.2, gas.pressure_bar = 1, fiber.length_m = 0.5" in note
    # 1000 times the energy gives a phase above the threshold: the mJ hint
    assert note.endswith("did you mean mJ (laser.energy_uj = 200)?")
    assert note in fiber_report(cfg)["warnings"]


def test_no_unit_hint_when_a_thousand_times_is_still_linear():
    # analytic: 8.8 W x 1e-6 /(W m) x 0.2 m = 1.8e-6 rad, x 1000 still below 0.1 rad
    cfg = config_from_mapping(_taylor(1e-6, gamma=1e-6))
    (note,) = low_nonlinearity_notes(cfg, nonlinear_phase_estimate(cfg))
    assert "fiber.gamma_per_w_per_m = 1e-06" in note
    assert "did you mean" not in note
