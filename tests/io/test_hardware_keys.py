"""Config keys of the lab hardware: polarisation, entrance window, window coating, mirror
reflectivity (contract and error tests)."""

from __future__ import annotations

import pytest
from fast_cases import FAST

from hcfplan.errors import ConfigError
from hcfplan.io.config import load_config


def _load(tmp_path, overrides=()):
    path = tmp_path / "c.toml"
    path.write_text(FAST)
    return load_config(path, overrides=overrides)


def test_defaults_and_si(tmp_path):
    """Contract: defaults linear / no entrance window / uncoated / 0.99; mm -> m once."""
    cfg = _load(tmp_path)
    assert cfg.laser.polarization == "linear"
    assert cfg.cell.entrance_window_thickness is None
    assert cfg.cell.window_coating == "uncoated"
    assert cfg.compressor.mirror_reflectivity == 0.99
    cfg = _load(tmp_path, ["cell.entrance_window_thickness_mm=2.5",
                           'cell.entrance_window_material="caf2"'])
    assert cfg.cell.entrance_window_thickness == pytest.approx(2.5e-3, rel=1e-15)
    assert cfg.cell.entrance_window_material == "caf2"


@pytest.mark.parametrize(("override", "message"), [
    ('laser.polarization="elliptic"', r"laser.polarization.*elliptic"),
    ("compressor.mirror_reflectivity=1.5", r"compressor.mirror_reflectivity.*1.5"),
    ("compressor.mirror_reflectivity=0", r"compressor.mirror_reflectivity.*0"),
    ('cell.entrance_window_material="unobtainium"',
     r"cell.entrance_window_material = 'unobtainium': unknown material"),
    ('cell.window_coating="gold"', r"cell.window_coating.*gold"),
    ("cell.entrance_window_thickness_mm=-1", r"cell.entrance_window_thickness_mm.*-1"),
])
def test_bad_values_name_the_key(tmp_path, override, message):
    """Error test: one line naming the key and the value."""
    with pytest.raises(ConfigError, match=message):
        _load(tmp_path, [override])
