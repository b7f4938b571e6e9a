"""Configs with cascaded stages (``[[stage]]``): parsing, stage keys in overrides, refusals.

Kinds: contract (a staged config is one single-stage config per stage; stage keys reach their
stage only; both forms in one file, unknown stage sections and stage keys of a missing stage
are refused with one line naming the key).
"""

from __future__ import annotations

import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.config import config_from_mapping, load_config, parse_override
from hcfplan.io.tomlio import dump_toml, parse_toml

#: Test scenario (invented): an argon capillary, then an evacuated one (1e-9 bar, the lowest
#: fill the schema takes) without a compressor.
STAGED = """
[laser]
wavelength_nm = 1030.0
fwhm_fs = 200.0
energy_uj = 200.0

[[stage]]
[stage.fiber]
kind = "capillary"
core_diameter_um = 150.0
length_m = 0.2
[stage.gas]
species = "Ar"
pressure_bar = 2.0
[stage.compressor]
mirror_gdd_fs2 = -100.0

[[stage]]
[stage.fiber]
kind = "capillary"
core_diameter_um = 250.0
length_m = 0.1
[stage.gas]
species = "He"
pressure_bar = 1e-9
[stage.cell]
window_thickness_mm = 0.5

[grid]
points = 1024
"""


def _load(text: str, overrides=()):
    return config_from_mapping(parse_toml(text, "t.toml"), overrides=overrides)


def test_each_stage_is_a_single_stage_config():
    cfg = _load(STAGED)
    assert len(cfg.stages) == 2
    first, second = cfg.stages
    assert first.stages == () and second.stages == ()
    assert first.fiber.core_radius == pytest.approx(75e-6)
    assert second.fiber.core_radius == pytest.approx(125e-6)
    assert first.gas.pressure == pytest.approx(2e5)
    assert second.gas.pressure == pytest.approx(1e-4)  # evacuated: 1e-9 bar
    assert second.compressor.mirror_gdd is None  # no compressor: the defaults
    assert second.cell.window_thickness == pytest.approx(0.5e-3)
    # the shared sections hold for every stage
    assert first.laser == second.laser and first.grid == second.grid
    # the config itself is stage 0's, with the whole staged table resolved
    assert cfg.fiber == first.fiber
    assert [sorted(s) for s in cfg.resolved["stage"]] == [
        ["compressor", "fiber", "gas"], ["cell", "fiber", "gas"]]  # the sections given


def test_resolved_table_reloads_to_the_same_config(tmp_path):
    cfg = _load(STAGED)
    path = tmp_path / "resolved.toml"
    path.write_text(dump_toml(cfg.resolved))
    again = load_config(path)
    assert again.resolved == cfg.resolved
    assert len(again.stages) == 2


def test_stage_override_reaches_its_stage_only():
    cfg = _load(STAGED, ["stage.1.fiber.length_m=0.3", "stage.0.gas.species=Ne"])
    assert cfg.stages[1].fiber.length == pytest.approx(0.3)
    assert cfg.stages[0].fiber.length == pytest.approx(0.2)
    assert cfg.stages[0].gas.components == (("Ne", 1.0),)
    assert parse_override("stage.1.gas.pressure_bar=3") == ("stage.1.gas", "pressure_bar", 3)


def test_override_of_a_shared_section_reaches_every_stage():
    cfg = _load(STAGED, ["laser.energy_uj=100"])
    assert all(s.laser.energy == pytest.approx(100e-6) for s in cfg.stages)


@pytest.mark.parametrize(("text", "overrides", "message"), [
    (STAGED + "\n[fiber]\nkind = \"capillary\"\ncore_diameter_um = 100.0\nlength_m = 1.0\n", (),
     "[fiber]: the config has [[stage]] tables too"),
    (STAGED, ["gas.pressure_bar=1"], "--set gas.pressure_bar: the config has [[stage]] tables"),
    (STAGED, ["stage.2.gas.pressure_bar=1"], "the config has 2 stages"),
    (STAGED, ["stage.x.gas.pressure_bar=1"], "stage.K.section.key"),
    (STAGED, ["stage.0.laser.energy_uj=1"], "a stage holds the sections"),
    (STAGED, ["stage.0.gas.presure_bar=1"], "--set stage.0.gas.presure_bar: unknown key"),
    (STAGED.replace("length_m = 0.1", "length_m = -0.1"), (), "stage.1.fiber.length_m"),
    (STAGED.replace("[stage.cell]", "[stage.thz]"), (), "stage.1.thz: unknown stage section"),
    (STAGED.replace("species = \"He\"\n", ""), (), "stage.1."),
    ("[laser]\nwavelength_nm = 800.0\nfwhm_fs = 30.0\nenergy_uj = 1.0\n"
     "[fiber]\nkind = \"capillary\"\ncore_diameter_um = 100.0\nlength_m = 1.0\n",
     ["stage.0.gas.pressure_bar=1"], "the config has no [[stage]] tables"),
    ("[laser]\nwavelength_nm = 800.0\nfwhm_fs = 30.0\nenergy_uj = 1.0\nstage = 3\n", (),
     "stage"),
])
def test_refused_with_one_line(text, overrides, message):
    with pytest.raises(ConfigError) as err:
        _load(text, overrides)
    assert message in str(err.value)
    assert "\n" not in str(err.value)


def test_missing_fiber_names_the_stage():
    text = STAGED + "\n[[stage]]\n[stage.cell]\nwindow_coating = \"ar\"\n"
    with pytest.raises(ConfigError, match=r"^\[stage\.2\.fiber\]: required section is missing"):
        _load(text)
