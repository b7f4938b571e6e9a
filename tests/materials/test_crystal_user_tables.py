"""User crystal tables: search order, validation of every file, the check-only material."""

from __future__ import annotations

from pathlib import Path

import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.config import config_from_mapping
from hcfplan.materials.crystal_tables import (
    CRYSTAL_PATH_VARIABLE,
    crystal_search_dirs,
    listed_crystal_names,
    load_crystal,
    validate_crystal_dirs,
)

GOOD = """
name = "MyCrystal"
[optical_index]
model = "sellmeier_pole_um2"
constant = 4.27
b = [3.01]
pole_um2 = [0.142]
source = "test copy of Marple (1964)"
valid_min_um = 0.58
valid_max_um = 2.5
range_source = "test"
[thz_permittivity]
model = "lorentz"
eps_inf = 7.284
source = "test"
valid_max_thz = 4.5
range_source = "test"
[[thz_permittivity.oscillators]]
frequency_thz = 5.306
strength = 2.636
damping_thz = 0.05
source = "test"
[properties]
r41_pm_per_v = { value = 4.0, source = "test" }
"""


def _write(folder: Path, name: str, text: str) -> Path:
    path = folder / f"{name}.toml"
    path.write_text(text, encoding="utf-8")
    return path


@pytest.mark.parametrize(
    ("old", "new", "pattern"),
    [('source = "test copy of Marple (1964)"\n', "",
      r"bad\.toml: optical_index\.source is missing"),
     ("valid_max_thz = 4.5", "valid_max_ghz = 4500",
      r"bad\.toml: thz_permittivity\.valid_max_ghz is not a known key"),
     ("r41_pm_per_v = { value = 4.0", "r41_pm_per_v = { value = 4.0e3",
      r"bad\.toml: properties\.r41_pm_per_v\.value = 4000\.0: outside the plausible range"),
     ("constant = 4.27", "constant = 4270.0",
      r"bad\.toml: optical_index gives n = 6[0-9.]+ at 0\.58 um: outside 1-30"),
     ("eps_inf = 7.284", "eps_inf = 7284.0", r"bad\.toml: thz_permittivity gives n = 8"),
     ("damping_thz = 0.05", "damping_thz = -0.05",
      r"bad\.toml: thz_permittivity\.oscillators\[0\]\.damping_thz = -0\.05: must be >= 0"),
     ("r41_pm_per_v", "r41", r"bad\.toml: properties\.r41 is not a known property")],
)
def test_malformed_user_table_is_refused_naming_file_and_key(tmp_path, old, new, pattern):
    assert old in GOOD
    _write(tmp_path, "bad", GOOD.replace(old, new))
    with pytest.raises(ConfigError, match=pattern):
        validate_crystal_dirs([tmp_path])


def test_user_folder_is_searched_first_and_listed(tmp_path):
    _write(tmp_path, "mycrystal", GOOD)
    _write(tmp_path, "znte", GOOD.replace('"MyCrystal"', '"my ZnTe"'))
    assert validate_crystal_dirs([tmp_path]) == ["mycrystal", "znte"]
    assert load_crystal("ZnTe", [tmp_path]).name == "my ZnTe"
    assert load_crystal("ZnTe").name == "ZnTe"
    names = listed_crystal_names([tmp_path])
    assert "mycrystal" in names and "linbo3" in names and "thin" not in names


def test_environment_variable_adds_folders(tmp_path):
    other = tmp_path / "other"
    other.mkdir()
    dirs = crystal_search_dirs([tmp_path], {CRYSTAL_PATH_VARIABLE: str(other)})
    assert dirs == [tmp_path, other]
    with pytest.raises(ConfigError, match=r"'/nowhere'.*does not exist.*HCFPLAN_CRYSTAL_PATH"):
        crystal_search_dirs([], {CRYSTAL_PATH_VARIABLE: "/nowhere"})


RAW = {"laser": {"wavelength_nm": 800.0, "fwhm_fs": 30.0, "energy_uj": 100.0},
       "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 0.5},
       "gas": {"species": "Ar", "pressure_bar": 1.0}}


def test_config_table_dir(tmp_path, monkeypatch):
    monkeypatch.delenv(CRYSTAL_PATH_VARIABLE, raising=False)
    folder = tmp_path / "crystals"
    folder.mkdir()
    _write(folder, "mycrystal", GOOD)
    raw = dict(RAW, thz={"crystal": "MyCrystal", "table_dir": "crystals"})
    config = config_from_mapping(raw, base_dir=tmp_path)
    assert config.thz.table_dirs == (folder,)
    raw = dict(RAW, thz={"crystal": "MyCrystal"})
    with pytest.raises(ConfigError, match=r"thz\.crystal = 'MyCrystal': unknown crystal"
                                          r"(?!.*thin).*linbo3"):
        config_from_mapping(raw, base_dir=tmp_path)
    monkeypatch.setenv(CRYSTAL_PATH_VARIABLE, str(folder))
    assert config_from_mapping(raw, base_dir=tmp_path).thz.crystal == "MyCrystal"
    _write(folder, "broken", GOOD.replace("eps_inf = 7.284", "eps_inf = -1.0"))
    with pytest.raises(ConfigError, match=r"broken\.toml: thz_permittivity\.eps_inf = -1\.0"):
        config_from_mapping(raw, base_dir=tmp_path)


def test_check_only_material_still_loads_for_checks():
    assert load_crystal("thin").check_only
    assert not load_crystal("gap").check_only


def test_a_loaded_table_is_kept_until_its_file_changes(tmp_path):
    # contract: an unchanged file gives the table built before (tables are immutable), as an
    # object of its own per load; a changed file (here: another size) is read and validated
    # again
    path = _write(tmp_path, "kept", GOOD)
    first = load_crystal("kept", [tmp_path])
    again = load_crystal("KEPT", [tmp_path])
    assert again == first and again is not first and again.optical is first.optical
    path.write_text(GOOD.replace('"MyCrystal"', '"MyCrystal, second cut"'), encoding="utf-8")
    second = load_crystal("kept", [tmp_path])
    assert second.name == "MyCrystal, second cut" and first.name == "MyCrystal"
    path.write_text(GOOD.replace("eps_inf = 7.284", "eps_inf = 7284.0"), encoding="utf-8")
    with pytest.raises(ConfigError, match=r"kept\.toml: thz_permittivity gives n = 8"):
        load_crystal("kept", [tmp_path])
