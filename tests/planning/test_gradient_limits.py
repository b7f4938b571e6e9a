"""Which pressure each limit, the envelope and recommend use for a gradient fill.

Kinds of test: invariants against the static-fill report at the pressure that should apply
(entrance pressure for the launch and the gas before the fiber, the highest pressure for the
cell rating and the window load, the local pressure along z inside the fiber). The critical
power itself is checked against Fibich & Gaeta in tests/limits.
"""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest
import tomllib
from fast_cases import FAST_CONFIG

from hcfplan.constants import P_1ATM
from hcfplan.errors import ConfigError
from hcfplan.io.config import config_from_mapping
from hcfplan.planning.envelope import envelope_map
from hcfplan.planning.recommend import default_key, default_range, parse_range, parse_ranges
from hcfplan.planning.reports.limits import limits_report

EXTRA = {"cell": {"rated_pressure_bar": 20.0, "window_clear_aperture_mm": 10.0,
                  "window_thickness_mm": 3.0}}


def _config(**gas):
    raw = tomllib.loads(FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0))
    raw["gas"] = {"species": "Ar", "ionization_model": "adk", **gas}
    raw["cell"].update(EXTRA["cell"])
    return config_from_mapping(raw)


def _check(report, name):
    return next(c for c in report["limits.checks"] if c["name"] == name)


@pytest.fixture(scope="module")
def reports():
    return {"rising": limits_report(_config(entrance_pressure_bar=1.0, exit_pressure_bar=3.0)),
            "evacuated": limits_report(_config(entrance_pressure_bar=0.0,
                                               exit_pressure_bar=3.0)),
            "static1": limits_report(_config(pressure_bar=1.0)),
            "static3": limits_report(_config(pressure_bar=3.0))}


def test_cell_and_window_carry_the_highest_pressure(reports):
    r, top = reports["rising"], reports["static3"]
    assert r["limits.cell.pressure_pa"] == 3e5
    assert r["limits.window.pressure_difference_pa"] == pytest.approx(3e5 - P_1ATM)
    assert r["limits.window.min_thickness_m"] == top["limits.window.min_thickness_m"]
    assert _check(r, "cell.rating")["margin"] == _check(top, "cell.rating")["margin"]


def test_launch_and_gas_before_the_fiber_use_the_entrance_pressure(reports):
    r, low = reports["rising"], reports["static1"]
    assert r["limits.self_focusing.margin_input"] == pytest.approx(
        low["limits.self_focusing.margin_input"], rel=1e-12)
    assert r["limits.static_fill.self_focusing_margin"] == pytest.approx(
        low["limits.static_fill.self_focusing_margin"], rel=1e-12)
    assert r["limits.static_fill.pressure_pa"] == 1e5


def test_evacuated_entrance_has_no_gas_before_the_fiber(reports):
    r = reports["evacuated"]
    for name in ("self_focusing.input", "static_fill.self_focusing", "static_fill.ionization"):
        check = _check(r, name)
        assert check["status"] == "not checked" and "evacuated" in check["assumption"]


def test_without_a_run_the_fiber_is_checked_at_its_highest_pressure(reports):
    r, top = reports["evacuated"], reports["static3"]
    check = _check(r, "self_focusing.highest_pressure")
    assert check["limit"] == pytest.approx(top["limits.self_focusing.critical_power_w"],
                                           rel=1e-12)
    assert check["margin"] == pytest.approx(top["limits.self_focusing.margin_input"], rel=1e-12)
    assert r["limits.self_focusing.max_energy_j"] == pytest.approx(
        top["limits.self_focusing.max_energy_j"], rel=1e-12)


def test_with_a_run_the_fiber_is_checked_at_the_local_pressure():
    """A run whose peak power doubles half-way: the tightest point is where P(z)/P_cr(p(z)) is
    largest, here at z = L/2 (p = sqrt(0.5) pL) against the exit (p = pL)."""
    config = _config(entrance_pressure_bar=0.0, exit_pressure_bar=3.0)
    z = np.linspace(0.0, 0.2, 5)
    power = np.array([1e8, 1e8, 1e9 * 1.2, 1e8, 1e8])
    run = SimpleNamespace(max_peak_power=1.2e9, max_peak_intensity=None,
                          output_peak_power=1e8, z=z, peak_power_z=power)
    r = limits_report(config, run=run)
    assert r["limits.self_focusing.in_fiber_position_m"] == pytest.approx(0.1)
    assert r["limits.self_focusing.in_fiber_pressure_pa"] == pytest.approx(3e5 * np.sqrt(0.5))
    at = limits_report(_config(pressure_bar=3.0 * np.sqrt(0.5)))
    assert r["limits.self_focusing.margin_in_fiber"] == pytest.approx(
        at["limits.self_focusing.critical_power_w"] / 1.2e9, rel=1e-9)


def test_envelope_of_a_gradient_varies_the_exit_pressure():
    """Axis = exit pressure (entrance 0): the self-focusing line is that of a static fill at
    the axis value (the highest pressure), beta2 that of a static fill at 2/3 of it (the mean)."""
    axis = np.array([1e5, 2e5, 3e5])
    energies = np.array([1e-4, 2e-4])
    grad = envelope_map(_config(entrance_pressure_bar=0.0, exit_pressure_bar=3.0),
                        energies=energies, pressures=axis)
    top = envelope_map(_config(pressure_bar=3.0), energies=energies, pressures=axis)
    mean = envelope_map(_config(pressure_bar=3.0), energies=energies, pressures=axis * 2 / 3)
    np.testing.assert_allclose(grad.self_focusing_max_energy, top.self_focusing_max_energy,
                               rtol=1e-12)
    np.testing.assert_allclose(grad.beta2, mean.beta2, rtol=1e-4)  # stencil noise < 1e-5
    assert grad.config_pressure == 3e5 and grad.pressure_axis.startswith("exit pressure")


def test_recommend_searches_a_gradient_by_its_exit_pressure():
    config = _config(entrance_pressure_bar=0.0, exit_pressure_bar=3.0)
    assert default_key(config) == "gas.exit_pressure_bar"
    assert default_range(config) == pytest.approx((0.3, 20.0))
    assert parse_range("gas.exit_pressure_bar=1:4") == ("gas.exit_pressure_bar", (1.0, 4.0))
    with pytest.raises(ConfigError, match=r"give one pressure range and one energy range"):
        parse_ranges(["gas.exit_pressure_bar=1:4", "gas.pressure_bar=1:4"])
