"""Cascaded stages through the Python API: stage keys in overrides, mappings with ``stage``
lists, and a loaded staged config taking further overrides. Contract tests (no run)."""

from __future__ import annotations

import pytest

import hcfplan

#: Test scenario (invented): two capillaries in a row, as a mapping of TOML tables.
MAPPING = {
    "laser": {"wavelength_nm": 1030.0, "fwhm_fs": 200.0, "energy_uj": 200.0},
    "stage": [
        {"fiber": {"kind": "capillary", "core_diameter_um": 150.0, "length_m": 0.2},
         "gas": {"species": "Ar", "pressure_bar": 2.0}},
        {"fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 0.1},
         "gas": {"species": "He", "pressure_bar": 3.0}},
    ],
}


def test_stage_overrides_from_a_mapping_and_again_on_the_loaded_config():
    cfg = hcfplan.load_config(MAPPING, {"stage.1.gas.pressure_bar": 4.0})
    assert [s.gas.pressure for s in cfg.stages] == pytest.approx([2e5, 4e5])
    again = hcfplan.load_config(cfg, {"stage.0.fiber.length_m": 0.3})
    assert again.stages[0].fiber.length == pytest.approx(0.3)
    assert again.stages[1].gas.pressure == pytest.approx(4e5)  # kept from the first load


def test_stage_key_without_a_stage_is_a_config_error():
    with pytest.raises(hcfplan.ConfigError, match="name the stage"):
        hcfplan.load_config(MAPPING, {"gas.pressure_bar": 1.0})
