"""Checks between keys and against the tables: which keys apply to which fiber kind, the
mirror band against the input spectrum, crystals against the pump, the fixed grid window, the
triple point of the fill, and the gas fit over the band the run needs.

Kinds of test: contract (the applicability table in hcfplan/io/schema.py drives the refusals),
analytic (band shares of Gaussian and sech^2 spectra, window edges), published value (triple
points of the ITS-90), and error tests (one line naming the key and the value).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest

from hcfplan.constants import c, eV, h
from hcfplan.errors import ConfigError
from hcfplan.io import crosschecks
from hcfplan.io.config import config_from_mapping, load_config
from hcfplan.io.schema import SCHEMA
from hcfplan.io.tomlio import dump_toml, parse_toml

ROOT = Path(__file__).resolve().parents[2]
BAD = ROOT / "tests" / "bad_inputs"
DEMOS = sorted((ROOT / "configs").glob("*.toml"))
KINDS = SCHEMA["fiber"]["kind"].choices

BASE = {"laser": {"wavelength_nm": 800.0, "fwhm_fs": 40.0, "energy_uj": 200.0},
        "fiber": {"kind": "capillary", "core_diameter_um": 250.0, "length_m": 0.5},
        "gas": {"species": "Ar", "pressure_bar": 1.0}}
#: Keys that make each kind loadable (the values are invented test values).
KIND_KEYS = {"capillary": {"core_diameter_um": 250.0},
             "antiresonant": {"core_diameter_um": 40.0, "wall_thickness_um": 0.7},
             "taylor": {"betas_fs_n_per_mm": [-20.0], "gamma_per_w_per_m": 0.01}}
#: A valid value for each key that applies to some kinds only.
VALUES = {"core_diameter_um": 40.0, "wall_thickness_um": 0.7, "bend_radius_m": 1.0,
          "mode": "EH11", "betas_fs_n_per_mm": [-20.0], "gamma_per_w_per_m": 0.01,
          "self_steepening": False, "raman_fraction": 0.18, "raman_tau1_fs": 12.2,
          "raman_tau2_fs": 32.0, "effective_area_um2": 20.0, "modes": 2}
LIMITED = [(section, key, spec.fiber_kinds) for section, table in SCHEMA.items()
           for key, spec in table.items() if spec.fiber_kinds]


def _mapping(kind: str, extra: dict | None = None) -> dict:
    fiber = {"kind": kind, "length_m": 0.5, **KIND_KEYS[kind], **(extra or {})}
    return {**BASE, "fiber": fiber}


# ---------------------------------------------------------------------------------------------
# Keys that apply to some fiber kinds only (contract: the schema table decides)


def test_every_limited_key_has_a_test_value():
    assert {key for _, key, _ in LIMITED} <= set(VALUES)
    assert {"wall_thickness_um", "mode", "betas_fs_n_per_mm", "core_diameter_um"} <= set(VALUES)


@pytest.mark.parametrize("section,key,kinds", LIMITED, ids=[k for _, k, _ in LIMITED])
def test_limited_key_refused_on_other_kinds(section, key, kinds):
    for kind in KINDS:
        mapping = _mapping(kind)
        mapping[section] = {**mapping[section], key: VALUES[key]}
        if kind in kinds:
            config_from_mapping(mapping)  # applies: loads
            continue
        with pytest.raises(ConfigError) as info:
            config_from_mapping(mapping)
        message = str(info.value)
        assert message.startswith(f"{section}.{key}: does not apply to fiber.kind = {kind!r} "
                                  f"(only to {' and '.join(kinds)})"), message


def test_defaults_of_limited_keys_are_not_given_keys():
    # mode, self_steepening and the Raman times have defaults: they never count as given
    for kind in KINDS:
        config_from_mapping(_mapping(kind))


def test_set_counts_as_given():
    with pytest.raises(ConfigError, match=r"^fiber\.mode: does not apply to fiber\.kind = "
                                          r"'antiresonant'"):
        config_from_mapping(_mapping("antiresonant"), overrides=['fiber.mode="EH12"'])


@pytest.mark.parametrize("kind", KINDS)
def test_resolved_table_holds_only_keys_of_the_kind(kind):
    fiber = config_from_mapping(_mapping(kind)).resolved["fiber"]
    for key, spec in SCHEMA["fiber"].items():
        assert (key in fiber) == spec.applies_to(kind), key


@pytest.mark.parametrize("path", DEMOS, ids=[p.stem for p in DEMOS])
def test_demo_resolved_config_loads_again(path, tmp_path):
    # a run folder's config.resolved.toml (dump of cfg.resolved) is itself a valid config
    cfg = load_config(path)
    again = tmp_path / "config.resolved.toml"
    again.write_text(dump_toml(cfg.resolved), encoding="utf-8")
    data = parse_toml(again.read_text(encoding="utf-8"), str(again))
    for section in ("laser", "compressor"):  # CSV paths are relative to the demo folder
        for key in ("spectrum_csv", "mirror_gdd_csv"):
            if isinstance(data.get(section, {}).get(key), str):
                data[section][key] = str(path.parent / data[section][key])
    reloaded = config_from_mapping(data, base_dir=path.parent)
    assert reloaded.resolved == cfg.resolved


# ---------------------------------------------------------------------------------------------
# The mirror band against the input spectrum (analytic shares)


def _band_nm(f0: float, low: float, high: float) -> list[float]:
    """Band [nm] between the frequencies f0 + low and f0 + high [Hz]."""
    return [c / (f0 + high) * 1e9, c / (f0 + low) * 1e9]


@pytest.mark.parametrize("shape,share", [
    # analytic: a Gaussian spectrum holds erf(sqrt(ln 2)) within +-FWHM/2, a sech^2 spectrum
    # tanh(arccosh(sqrt 2)) = 1/sqrt(2)
    ("gaussian", math.erf(math.sqrt(math.log(2)))),
    ("sech2", 1 / math.sqrt(2)),
])
def test_band_share_within_the_fwhm(shape, share):
    laser = {"wavelength_nm": 800.0, "fwhm_fs": 40.0, "shape": shape}
    tbp = {"gaussian": 2 * math.log(2) / math.pi,
           "sech2": 4 * math.acosh(math.sqrt(2)) ** 2 / math.pi**2}[shape]
    f0, width = c / 800e-9, tbp / 40e-15
    band = _band_nm(f0, -width / 2, width / 2)
    assert crosschecks.band_share_analytic(band, laser) == pytest.approx(share, rel=1e-12)
    # one half of the spectrum lies above the centre frequency
    assert crosschecks.band_share_analytic(_band_nm(f0, 0.0, 1e3 * width), laser) == \
        pytest.approx(0.5, rel=1e-12)


def test_band_share_of_a_measured_triangle():
    # analytic: the triangle 760-800-840 nm holds 1/2 above 800 nm and 1 - 2 (1/2)^2 / 2 = 3/4
    # within 780-820 nm (linear between the samples)
    wavelength = np.array([760.0, 800.0, 840.0]) * 1e-9
    intensity = np.array([0.0, 1.0, 0.0])
    assert crosschecks.band_share_measured([800.0, 900.0], wavelength, intensity) == \
        pytest.approx(0.5)
    assert crosschecks.band_share_measured([780.0, 820.0], wavelength, intensity) == \
        pytest.approx(0.75)
    assert crosschecks.band_share_measured([100.0, 200.0], wavelength, intensity) == 0.0


def test_band_that_keeps_half_the_spectrum_is_accepted_and_less_refused():
    f0 = c / 800e-9
    width = 4 * math.acosh(math.sqrt(2)) ** 2 / math.pi**2 / 40e-15
    wide = _band_nm(f0, -width, width)  # about 0.87 of a sech^2 spectrum
    narrow = _band_nm(f0, -width / 8, width / 8)
    config_from_mapping({**BASE, "compressor": {"mirror_band_nm": wide}})
    # analytic: +-FWHM/8 of a sech^2 spectrum holds tanh(2 arccosh(sqrt 2) / 8)
    share = math.tanh(2 * math.acosh(math.sqrt(2)) / 8)
    with pytest.raises(ConfigError, match=rf"^compressor\.mirror_band_nm = \[.*\]: holds "
                                          rf"{100 * share:.2f}% of the energy of the input "
                                          r"spectrum"):
        config_from_mapping({**BASE, "compressor": {"mirror_band_nm": narrow}})


# ---------------------------------------------------------------------------------------------
# THz crystals against the pump photon energy (band gaps of the crystal tables)


@pytest.mark.parametrize("key", ["crystal", "detector_crystal"])
def test_crystal_absorbing_the_pump_is_refused_at_the_gap(key):
    # analytic: the GaAs table's direct gap 1.42 eV lies at h c / 1.42 eV = 873.1 nm
    edge_nm = h * c / (1.42 * eV) * 1e9
    thz = {key: "GaAs"}
    if key == "detector_crystal":
        thz["detector_thickness_mm"] = 0.5
    above = {**BASE, "laser": {**BASE["laser"], "wavelength_nm": edge_nm * 1.001}, "thz": thz}
    config_from_mapping(above)
    below = {**above, "laser": {**above["laser"], "wavelength_nm": edge_nm * 0.999}}
    with pytest.raises(ConfigError, match=rf"^thz\.{key} = 'GaAs' with laser\.wavelength_nm = "
                                          r"872\.2\d*: the photon energy 1\.42 eV exceeds the "
                                          r"direct band gap of GaAs, 1\.42 eV"):
        config_from_mapping(below)


def test_crystals_are_not_checked_without_a_thz_section():
    config_from_mapping({**BASE, "laser": {**BASE["laser"], "wavelength_nm": 400.0}})


# ---------------------------------------------------------------------------------------------
# A fixed grid window and the measured mirror curve against the pump


def test_fixed_window_edges():
    # analytic: the window is centre +- pi N / T in angular frequency
    grid = {"points": 1024, "time_window_fs": 2000.0, "center_wavelength_nm": 400.0}
    with pytest.raises(ConfigError) as info:
        config_from_mapping({**BASE, "grid": grid})
    centre = 2 * math.pi * c / 400e-9
    half = math.pi * 1024 / 2000e-15
    low_nm = 2 * math.pi * c / (centre + half) * 1e9
    high_nm = 2 * math.pi * c / (centre - half) * 1e9
    assert f"spans {low_nm:.5g} nm to {high_nm:.5g} nm" in str(info.value)
    config_from_mapping({**BASE, "grid": {**grid, "center_wavelength_nm": 700.0}})


def test_mirror_curve_must_cover_the_pump():
    comp = {"mirror_gdd_csv": str(BAD / "csv" / "good_gdd.csv")}
    config_from_mapping({**BASE, "compressor": comp})
    with pytest.raises(ConfigError, match=r"^compressor\.mirror_gdd_csv covers 700-900 nm: "
                                          r"laser\.wavelength_nm = 1030\.0 lies outside it"):
        config_from_mapping({**BASE, "laser": {**BASE["laser"], "wavelength_nm": 1030.0},
                             "compressor": comp})


# ---------------------------------------------------------------------------------------------
# The fill against the triple point; the gas fit over the band the run needs


@pytest.mark.parametrize("gas,triple", [
    # published value: triple points of the ITS-90 (H. Preston-Thomas, Metrologia 27, 3-10
    # (1990), Table 1): Ar 83.8058 K, Ne 24.5561 K; CoolProp's EOS state them rounded
    # (83.806 K, 24.56 K), hence the tolerance of 5 mK
    ("Ar", 83.8058),
    ("Ne", 24.5561),
])
def test_below_the_triple_point_names_the_temperature(gas, triple):
    mapping = {**BASE, "gas": {"species": gas, "pressure_bar": 1.0,
                               "temperature_k": triple - 0.01}}
    with pytest.raises(ConfigError) as info:
        config_from_mapping(mapping)
    message = str(info.value)
    assert message.startswith(f"gas.temperature_k = {triple - 0.01}: below the triple point "
                              f"of {gas}, ")
    shown = float(message.split(f"of {gas}, ")[1].split(" K")[0])
    assert shown == pytest.approx(triple, abs=5e-3)
    assert "gas.pressure_bar" not in message


def test_needed_wavelengths_follow_the_grid_estimate():
    # analytic: 16 transform-limited widths (Gaussian TBP) about the pump, 800 nm and 40 fs
    from hcfplan.numerics.grid import estimated_band

    resolved = {"laser": {"wavelength_nm": 800.0, "fwhm_fs": 40.0}}
    omega = 2 * math.pi * c / 800e-9
    low, high = estimated_band(omega, 40e-15)
    shortest, longest = crosschecks.needed_wavelengths(resolved)
    assert shortest == pytest.approx(2 * math.pi * c / high)
    assert longest == pytest.approx(2 * math.pi * c / low)
    # a measured spectrum widens the range
    wide = crosschecks.needed_wavelengths(resolved, np.array([500e-9, 1500e-9]))
    assert wide == (500e-9, 1500e-9)


def test_pole_in_the_run_band_depends_on_the_pulse():
    # the table's pole at 1000 nm lies outside its stated range (400-900 nm): a 40 fs pulse at
    # 800 nm needs 648-1046 nm and is refused, a 200 fs pulse needs less and is accepted
    gas = {"species": "testgas", "pressure_bar": 1.0,
           "table_dir": str(BAD / "gas_tables" / "pole_in_run_range")}
    with pytest.raises(ConfigError, match=r"pole_in_run_range/testgas\.toml: dispersion\[0\]"
                                          r"\.c_um2\[1\] = 1: the fit has a pole at 1000 nm"):
        config_from_mapping({**BASE, "gas": gas})
    config_from_mapping({**BASE, "gas": gas,
                         "laser": {**BASE["laser"], "fwhm_fs": 200.0}})


# ---------------------------------------------------------------------------------------------
# Keys that act only together with another key


@pytest.mark.parametrize("section,values,fragment", [
    ("compressor", {"mirror_tod_fs3": 100.0}, "compressor.mirror_tod_fs3 = 100.0: acts only with "
     "compressor.mirror_gdd_fs2, and the config has no mirrors"),
    ("compressor", {"wedge_material": "caf2"}, "compressor.wedge_material = 'caf2' with "
     "compressor.wedge_max_insertion_mm = 0: the wedge trim is off"),
    ("thz", {"probe_fwhm_fs": 30.0}, "thz.probe_fwhm_fs = 30.0: sets the probe of EO detection, "
     "and the config has no thz.detector_crystal"),
])
def test_key_without_its_companion_is_refused(section, values, fragment):
    with pytest.raises(ConfigError) as info:
        config_from_mapping({**BASE, section: values})
    assert str(info.value).startswith(fragment)


@pytest.mark.parametrize("section,values", [
    ("compressor", {"mirror_tod_fs3": 100.0, "mirror_gdd_fs2": -50.0}),
    ("compressor", {"wedge_material": "caf2", "wedge_max_insertion_mm": 2.0}),
    ("thz", {"probe_fwhm_fs": 30.0, "detector_crystal": "ZnTe", "detector_thickness_mm": 0.5}),
])
def test_key_with_its_companion_loads(section, values):
    config_from_mapping({**BASE, section: values})
