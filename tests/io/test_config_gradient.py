"""Gradient fills in the config: gas.entrance_pressure_bar and gas.exit_pressure_bar.

Kinds of test: contract (keys, SI conversion, the mean pressure of the profile, derived
analytically in hcfplan.propagation.profile) and error tests (one line naming the keys).
"""

from __future__ import annotations

import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.config import config_from_mapping


def _raw(**gas):
    return {"laser": {"wavelength_nm": 1030.0, "fwhm_fs": 200.0, "energy_uj": 20.0},
            "fiber": {"kind": "capillary", "core_diameter_um": 100.0, "length_m": 0.5},
            "gas": {"species": "Ar", **gas}}


def test_gradient_loads_in_si_with_the_mean_as_pressure():
    gas = config_from_mapping(_raw(entrance_pressure_bar=0.0, exit_pressure_bar=3.0)).gas
    assert gas.is_gradient and gas.entrance_pressure == 0.0 and gas.exit_pressure == 3e5
    assert gas.pressure == pytest.approx(2e5, rel=1e-14)  # (2/3) pL for p0 = 0
    assert gas.highest_pressure == 3e5 and gas.entrance_side_pressure == 0.0
    falling = config_from_mapping(_raw(entrance_pressure_bar=2.0, exit_pressure_bar=0.0)).gas
    assert falling.highest_pressure == 2e5 and falling.entrance_side_pressure == 2e5


def test_static_fill_is_unchanged():
    gas = config_from_mapping(_raw(pressure_bar=2.0)).gas
    assert not gas.is_gradient and gas.pressure == 2e5 and gas.highest_pressure == 2e5
    assert gas.entrance_pressure is None and gas.exit_pressure is None


def test_with_pressure_moves_the_exit_of_a_gradient():
    gas = config_from_mapping(_raw(entrance_pressure_bar=1.0, exit_pressure_bar=3.0)).gas
    moved = gas.with_pressure(2e5)
    assert moved.entrance_pressure == 1e5 and moved.exit_pressure == 2e5
    assert moved.pressure == pytest.approx(2 / 3 * (1 + 2 + 4) / 3 * 1e5, rel=1e-14)


@pytest.mark.parametrize("gas, match", [
    ({"pressure_bar": 2.0, "exit_pressure_bar": 3.0},
     r"gas\.pressure_bar and gas\.exit_pressure_bar: give a static fill"),
    ({"pressure_bar": 2.0, "entrance_pressure_bar": 0.0, "exit_pressure_bar": 3.0},
     r"gas\.pressure_bar and gas\.entrance_pressure_bar and gas\.exit_pressure_bar"),
    ({"entrance_pressure_bar": 0.0}, r"gas\.exit_pressure_bar: required with "
                                     r"gas\.entrance_pressure_bar"),
    ({"exit_pressure_bar": 1.0}, r"gas\.entrance_pressure_bar: required with "
                                 r"gas\.exit_pressure_bar"),
    ({"entrance_pressure_bar": 0.0, "exit_pressure_bar": 0}, r"exit_pressure_bar = 0: a "
                                                             r"gradient fill needs gas"),
    ({}, r"gas\.pressure_bar: required key is missing \(or give gas\.entrance_pressure_bar"),
    ({"entrance_pressure_bar": -1.0, "exit_pressure_bar": 1.0},
     r"gas\.entrance_pressure_bar = -1\.0: must be >= 0"),
])
def test_fill_pressure_errors_name_the_keys(gas, match):
    with pytest.raises(ConfigError, match=match):
        config_from_mapping(_raw(**gas))


def test_set_of_an_exit_pressure_on_a_static_fill_is_refused():
    with pytest.raises(ConfigError, match=r"gas\.pressure_bar and gas\.exit_pressure_bar"):
        config_from_mapping(_raw(pressure_bar=2.0), overrides=["gas.exit_pressure_bar=3"])
