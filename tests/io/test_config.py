"""Config loading: the key-set contract, SI conversion, defaults, --set and bad input.

Kinds of test here: contract (key names and units are the documented interface) and error
tests (one line naming the key, exit code 2). Unit factors are exact SI definitions (BIPM SI
brochure, 9th ed., 2019), so those checks are analytic.
"""

from __future__ import annotations

import math
import textwrap
from pathlib import Path

import pytest

from hcfplan.errors import ConfigError
from hcfplan.io.config import config_from_mapping, load_config, parse_override
from hcfplan.io.schema import SCHEMA

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "configs").glob("*.toml"))

BASE = """
[laser]
wavelength_nm = 1030.0
fwhm_fs = 200.0
energy_uj = 20.0

[fiber]
kind = "capillary"
core_diameter_um = 100.0
length_m = 0.5

[gas]
species = "Ar"
pressure_bar = 2.0
"""


def write(tmp_path: Path, text: str, name: str = "c.toml") -> Path:
    path = tmp_path / name
    path.write_text(textwrap.dedent(text))
    return path


@pytest.mark.parametrize("path", DEMOS, ids=[p.name for p in DEMOS])
def test_demo_configs_load(path):
    cfg = load_config(path)
    assert cfg.laser.wavelength > 0 and cfg.fiber.length > 0


def test_si_conversion_exact(tmp_path):
    # analytic: unit definitions (1 nm = 1e-9 m, 1 fs = 1e-15 s, 1 uJ = 1e-6 J, 1 bar = 1e5 Pa)
    cfg = load_config(write(tmp_path, BASE))
    assert cfg.laser.wavelength == pytest.approx(1030e-9, rel=1e-15)
    assert cfg.laser.duration_fwhm == pytest.approx(200e-15, rel=1e-15)
    assert cfg.laser.energy == pytest.approx(20e-6, rel=1e-15)
    assert cfg.fiber.core_radius == pytest.approx(50e-6, rel=1e-15)
    assert cfg.gas.pressure == pytest.approx(2e5, rel=1e-15)
    assert cfg.gas.temperature == 293.15  # documented default


def test_defaults_filled(tmp_path):
    cfg = load_config(write(tmp_path, BASE))
    assert cfg.resolved["laser"]["shape"] == "sech2"
    assert cfg.resolved["fiber"]["cladding"] == "fused_silica"
    assert cfg.resolved["gas"]["equation_of_state"] == "coolprop"
    assert cfg.grid.z_samples == 100


def test_taylor_betas_to_si(tmp_path):
    # analytic: 1 fs^2/mm = 1e-30 s^2 / 1e-3 m = 1e-27 s^2/m; 1 fs^3/mm = 1e-42 s^3/m
    text = """
    [laser]
    wavelength_nm = 835.0
    fwhm_fs = 50.0
    energy_uj = 1e-3
    [fiber]
    kind = "taylor"
    length_m = 0.1
    betas_fs_n_per_mm = [-11.83, 81.038]
    gamma_per_w_per_m = 0.11
    loss_db_per_m = 10.0
    """
    cfg = load_config(write(tmp_path, text))
    assert cfg.gas is None
    assert cfg.fiber.betas[0] == pytest.approx(-11.83e-27)
    assert cfg.fiber.betas[1] == pytest.approx(81.038e-42)
    # 10 dB/m of power is a field attenuation of 10 ln(10)/20 per metre (exp(-2 alpha z))
    assert cfg.fiber.loss == pytest.approx(10 * math.log(10) / 20)


def test_override_applies_and_converts(tmp_path):
    cfg = load_config(write(tmp_path, BASE), overrides=["gas.pressure_bar=3.5",
                                                        "laser.shape=gaussian"])
    assert cfg.gas.pressure == pytest.approx(3.5e5)
    assert cfg.laser.shape == "gaussian"


def test_override_mixture_replaces_species(tmp_path):
    cfg = load_config(write(tmp_path, BASE), overrides=["gas.mixture={ He = 0.7, Ar = 0.3 }"])
    assert dict(cfg.gas.components) == {"He": 0.7, "Ar": 0.3}


def test_parse_override_types():
    assert parse_override("grid.points=4096") == ("grid", "points", 4096)
    assert parse_override("gas.species=Kr") == ("gas", "species", "Kr")
    assert parse_override("compressor.mirror_band_nm=[900, 1200]")[2] == [900, 1200]


def test_every_key_has_unit_or_is_dimensionless():
    # contract: keys carry their unit as a suffix (common practice, no source; house rule)
    from hcfplan.units import suffix_of

    dimensionless = {"shape", "kind", "cladding", "mode", "self_steepening", "raman_fraction",
                     "species", "mixture", "equation_of_state", "ionization_model", "table_dir",
                     "window_material", "max_bounces", "bounces_in_pairs", "objective",
                     "wedge_material", "crystal", "cutoff_quantity", "detector_crystal", "points",
                     "z_samples", "rtol", "stop_ionization_fraction", "spectrum_csv",
                     "mirror_gdd_csv", "loss_csv", "gvd_csv", "cutoff_db", "self_focusing_margin",
                     "ionization_fraction_limit", "window_safety_factor", "window_mounting",
                     "rating_fraction", "polarization", "entrance_window_material",
                     "window_coating", "mirror_reflectivity", "geometry", "focus_f_number",
                     "field_csv", "density_scale", "n2_scale", "modes"}
    for section, keys in SCHEMA.items():
        for key in keys:
            assert key in dimensionless or suffix_of(key) is not None, f"{section}.{key}"


BAD = [
    # (edit of BASE as (section, key, toml value) or raw text, expected message fragment)
    ({"laser": {"wavelenght_nm": "1030.0"}}, "laser.wavelenght_nm: unknown key; did you mean "
     "'wavelength_nm'"),
    ({"lazer": {"x": "1"}}, "[lazer]: unknown section; did you mean 'laser'"),
    ({"laser": {"energy_uj": '"ten"'}}, "laser.energy_uj = 'ten': must be a number"),
    ({"fiber": {"core_diameter_um": "-50"}}, "fiber.core_diameter_um = -50: must be > 1"),
    ({"laser": {"energy_uj": "nan"}}, "laser.energy_uj = nan: must be a finite number"),
    ({"laser": {"fwhm_fs": "inf"}}, "laser.fwhm_fs = inf: must be a finite number"),
    ({"gas": {"pressure_bar": "0"}}, "gas.pressure_bar = 0: must be >= 1e-09"),
    ({"gas": {"pressure_bar": "1e9"}}, "gas.pressure_bar = 1000000000.0: must be <= 1000"),
    ({"gas": {"species": '"Unobtainium"'}}, "gas.species = 'Unobtainium': unknown gas"),
    ({"gas": {"mixture": "{ He = 0.7, Ar = 0.3 }"}}, "gas.species and gas.mixture: give one"),
    ({"fiber": {"cladding": '"unobtainium"'}}, "fiber.cladding = 'unobtainium': unknown "
     "material"),
    ({"laser": {"shape": '"square"'}}, "laser.shape = 'square': must be one of sech2, gaussian"),
    ({"grid": {"points": "100.5"}}, "grid.points = 100.5: must be an integer"),
    ({"compressor": {"mirror_band_nm": "[1200.0, 900.0]"}}, "compressor.mirror_band_nm = "
     "[1200.0, 900.0]: must be [low, high] with 0 < low < high"),
    ({"fiber": {"self_steepening": '"yes"'}}, "fiber.self_steepening = 'yes': must be true or "
     "false"),
    ({"fiber": {"kind": '"antiresonant"'}}, "fiber.wall_thickness_um: required for kind = "
     "'antiresonant'"),
    ({"fiber": {"betas_fs_n_per_mm": "[1.0]"}}, "fiber.betas_fs_n_per_mm: does not apply to "
     "fiber.kind = 'capillary' (only to taylor)"),
    ({"fiber": {"mode": '"TE01"'}}, "fiber.mode = 'TE01': must be EH1m"),
    ({"thz": {"crystal": '"quartz"'}}, "thz.crystal = 'quartz': unknown crystal"),
    ({"thz": {"detector_crystal": '"ZnTe"'}}, "thz.detector_crystal and "
     "thz.detector_thickness_mm: give both or neither"),
    ({"laser": {"spectrum_csv": '"missing.csv"'}}, "laser.spectrum_csv = 'missing.csv': file "
     "not found"),
]


def _edited(edits: dict) -> str:
    lines = BASE.strip().splitlines()
    out: list[str] = []
    section = None
    pending = {s: dict(kv) for s, kv in edits.items()}
    for line in lines + ["[__end__]"]:
        stripped = line.strip()
        if stripped.startswith("["):
            if section in pending:
                out += [f"{k} = {v}" for k, v in pending.pop(section).items()]
            section = stripped.strip("[]")
            if section == "__end__":
                break
            out.append(line)
            continue
        key = stripped.split("=")[0].strip()
        if section in pending and key in pending[section]:
            out.append(f"{key} = {pending[section].pop(key)}")
        else:
            out.append(line)
    for sec, kv in pending.items():
        out.append(f"[{sec}]")
        out += [f"{k} = {v}" for k, v in kv.items()]
    return "\n".join(out) + "\n"


@pytest.mark.parametrize("edits,fragment", BAD, ids=[b[1][:40] for b in BAD])
def test_bad_config_names_key(tmp_path, edits, fragment):
    path = write(tmp_path, _edited(edits))
    with pytest.raises(ConfigError) as info:
        load_config(path)
    assert fragment in str(info.value)
    assert "\n" not in str(info.value)


def test_missing_required_key(tmp_path):
    text = BASE.replace("fwhm_fs = 200.0\n", "")
    with pytest.raises(ConfigError, match=r"laser\.fwhm_fs: required key is missing"):
        load_config(write(tmp_path, text))


def test_missing_gas_section_for_capillary(tmp_path):
    text = BASE.split("[gas]")[0]
    with pytest.raises(ConfigError, match=r"\[gas\]: required section is missing"):
        load_config(write(tmp_path, text))


def test_toml_syntax_error_names_file(tmp_path):
    path = write(tmp_path, BASE + "\nbroken = [1, 2\n")
    with pytest.raises(ConfigError, match=r"c\.toml: TOML syntax error"):
        load_config(path)


def test_missing_file():
    with pytest.raises(ConfigError, match=r"nope\.toml: file not found"):
        load_config("nope.toml")


@pytest.mark.parametrize("override,fragment", [
    ("laser=3", "the key path must be section.key"),
    ("laser.nokey=3", "laser.nokey: unknown key"),
    ("gas.pressure_bar=[1,", "gas.pressure_bar: cannot parse"),
    ("novalue", "expected section.key=value"),
    ("gas.pressure_bar=-2", "gas.pressure_bar = -2: must be >= 1e-09"),
])
def test_bad_override(tmp_path, override, fragment):
    with pytest.raises(ConfigError) as info:
        load_config(write(tmp_path, BASE), overrides=[override])
    assert fragment in str(info.value)


def test_liquid_xenon_fill_refused(tmp_path):
    # Xe at 70 bar and 288 K is a (supercritical-)liquid-density state: the critical point is
    # 289.7 K, 58.4 bar (CoolProp Xe reference EOS, Lemmon & Span, J. Chem. Eng. Data 51, 785
    # (2006)); the fill is refused with the pressure key named.
    from hcfplan.planning.build import build_medium

    text = BASE.replace('species = "Ar"', 'species = "Xe"').replace(
        "pressure_bar = 2.0", "pressure_bar = 70.0\ntemperature_k = 288.0")
    cfg = load_config(write(tmp_path, text))
    with pytest.raises(ConfigError, match=r"gas\.pressure_bar = 70"):
        build_medium(cfg.gas)


def test_mapping_fractions_must_sum_to_one():
    raw = {"laser": {"wavelength_nm": 800.0, "fwhm_fs": 30.0, "energy_uj": 100.0},
           "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 1.0},
           "gas": {"mixture": {"He": 0.5, "Ar": 0.3}, "pressure_bar": 1.0}}
    with pytest.raises(ConfigError, match=r"gas\.mixture: mole fractions sum to 0\.8"):
        config_from_mapping(raw)


# Values that pass a plain range check but that no model can use, and keys that depend on each
# other: one ConfigError naming the keys as written (error tests; the bounds are common
# practice, no source, see hcfplan.io.schema.Key).
CROSS = [
    ("laser.energy_uj=0.0", "laser.energy_uj = 0.0: must be >= 1e-06"),
    ("laser.beam_waist_um=0.001", "laser.beam_waist_um = 0.001: must be >= 1"),
    ("fiber.bend_radius_m=1e-300", "fiber.bend_radius_m = 1e-300: must be >= 0.001"),
    ("fiber.raman_fraction=1.0", "fiber.raman_fraction = 1.0: must be < 1"),
    ("fiber.raman_tau1_fs=1e-300", "fiber.raman_tau1_fs = 1e-300: must be >= 0.1"),
    ("fiber.raman_tau2_fs=0.0", "fiber.raman_tau2_fs = 0.0: must be >= 0.1"),
    ("thz.cutoff_db=0.0", "thz.cutoff_db = 0.0: must be < 0"),
    ("thz.thickness_mm=1e-300", "thz.thickness_mm = 1e-300: must be >= 0.001"),
    ("thz.beam_waist_um=1e-300", "thz.beam_waist_um = 1e-300: must be >= 1"),
    ("thz.probe_fwhm_fs=0.5", "thz.probe_fwhm_fs = 0.5: must be > 1"),
    ("limits.ionization_fraction_limit=1.0",
     "limits.ionization_fraction_limit = 1.0: must be < 1"),
    ("grid.points=4097", "grid.points = 4097: must be an even number"),
    ("grid.time_window_fs=5.0", "grid.time_window_fs = 5.0: the frequency window is wider "
     "than the grid may span at laser.wavelength_nm = 1030.0 (0 to 6 times the pump "
     "frequency); 16 points need a time window > 9.162 fs"),
    (["grid.points=65536", "grid.time_window_fs=1000.0"], "grid.points = 65536, "
     "grid.time_window_fs = 1000.0: the frequency window is wider than the grid may span at "
     "laser.wavelength_nm = 1030.0"),
    ("compressor.mirror_band_nm=[600.0, 1000.0]", "compressor.mirror_band_nm = [600.0, 1000.0]: "
     "must contain the pump, laser.wavelength_nm = 1030.0"),
    (["fiber.kind=antiresonant", "fiber.wall_thickness_um=50.0"], "fiber.wall_thickness_um = "
     "50.0: must be smaller than the core radius, half of fiber.core_diameter_um = 100.0"),
]


@pytest.mark.parametrize("overrides,fragment", CROSS, ids=[c[1][:36] for c in CROSS])
def test_unusable_value_names_the_key(tmp_path, overrides, fragment):
    overrides = [overrides] if isinstance(overrides, str) else overrides
    with pytest.raises(ConfigError) as info:
        load_config(write(tmp_path, BASE), overrides=overrides)
    assert fragment in str(info.value)
    assert "\n" not in str(info.value)


def test_grid_limits_at_the_edge_are_accepted(tmp_path):
    # analytic: 16 points over T need T > 16 lambda / (2 c) = 27.487 fs at 1030 nm, and
    # 65536 points need 112.6 ps; just above both the config loads
    cfg = load_config(write(tmp_path, BASE), overrides=["grid.time_window_fs=27.5"])
    assert cfg.grid.time_window == pytest.approx(27.5e-15)
    cfg = load_config(write(tmp_path, BASE), overrides=["grid.points=65536",
                                                        "grid.time_window_fs=112600.0"])
    assert cfg.grid.points == 65536


def test_taylor_gamma_zero_is_refused(tmp_path):
    text = (ROOT / "configs" / "taylor_pcf_check.toml").read_text()
    with pytest.raises(ConfigError, match=r"^fiber\.gamma_per_w_per_m = 0\.0: must be > 0$"):
        load_config(write(tmp_path, text), overrides=["fiber.gamma_per_w_per_m=0.0"])


def test_measured_spectrum_must_hold_the_pump(tmp_path):
    spectrum = tmp_path / "s.csv"
    spectrum.write_text("wavelength_nm,intensity\n1000,0.2\n1030,1.0\n1060,0.2\n")
    text = BASE.replace("energy_uj = 20.0", 'energy_uj = 20.0\nspectrum_csv = "s.csv"')
    cfg = load_config(write(tmp_path, text))  # 1030 nm lies inside 1000-1060 nm
    assert cfg.laser.spectrum.wavelength == pytest.approx([1000e-9, 1030e-9, 1060e-9])
    with pytest.raises(ConfigError, match=r"^laser\.wavelength_nm = 800\.0: outside the "
                       r"measured spectrum of laser\.spectrum_csv \(1000-1060 nm\)"):
        load_config(write(tmp_path, text), overrides=["laser.wavelength_nm=800.0"])
