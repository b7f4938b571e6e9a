"""Tests of hcfplan.materials.solids (Sellmeier fits, dispersion, n2, table checks)."""

import dataclasses
import warnings

import numpy as np
import pytest

from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials import solids

C = 299792458.0


def omega_of(wavelength):
    return 2 * np.pi * C / wavelength


# analytic: the published fit evaluated at one wavelength, rounded to the 7 digits quoted.
# Fused silica: I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965), Sellmeier of the paper.
# CaF2: I. H. Malitson, Appl. Opt. 2, 1103 (1963), Sellmeier of the paper.
# The 6-decimal values are our evaluation of those fits (tolerance half a unit of the last digit).
@pytest.mark.parametrize(
    ("name", "wavelength", "n_expected"),
    [
        ("fused_silica", 800e-9, 1.453317),
        ("fused_silica", 1030e-9, 1.450044),
        ("caf2", 800e-9, 1.430529),
        ("caf2", 1030e-9, 1.428688),
    ],
)
def test_refractive_index_of_published_fits(name, wavelength, n_expected):
    n = solids.refractive_index(name, omega_of(wavelength))
    assert n == pytest.approx(n_expected, abs=5e-7)


# published value (from memory): n_o at 632.8 nm, sapphire 1.7659 and MgF2 1.3770 are the handbook
# values usually quoted for the ordinary ray; they test our (from memory) coefficients of
# Malitson & Dodge, J. Opt. Soc. Am. 62, 1405 (1972) and Dodge, Appl. Opt. 23, 1980 (1984).
@pytest.mark.parametrize(
    ("name", "n_expected"), [("sapphire_ordinary", 1.7659), ("mgf2_ordinary", 1.3770)]
)
def test_ordinary_ray_index_at_hene(name, n_expected):
    assert solids.refractive_index(name, omega_of(632.8e-9)) == pytest.approx(n_expected, abs=1e-4)


# Fused-silica GVD of the Malitson 1965 fit: 36.16 fs^2/mm at 800 nm and 18.97 fs^2/mm at 1030 nm
# (our evaluation of the fit; the "about 36 fs^2/mm" at 800 nm is the value quoted in practice,
# common practice, no source). CaF2 (Malitson 1963 fit) 27.87 fs^2/mm at 800 nm. Tolerance: half a
# unit of the last digit.
@pytest.mark.parametrize(
    ("name", "wavelength", "gvd_fs2_per_mm"),
    [("fused_silica", 800e-9, 36.16), ("fused_silica", 1030e-9, 18.97), ("caf2", 800e-9, 27.87)],
)
def test_group_velocity_dispersion(name, wavelength, gvd_fs2_per_mm):
    gvd = solids.group_velocity_dispersion(name, omega_of(wavelength))
    assert gvd * 1e30 * 1e-3 == pytest.approx(gvd_fs2_per_mm, abs=0.005)


def test_group_index_and_tod_of_fused_silica():
    # analytic: derivatives of the Malitson 1965 fit at 800 nm (our evaluation: n_g = 1.467145,
    # TOD = 27.50 fs^3/mm); tolerance half a unit of the last digit
    omega = omega_of(800e-9)
    assert solids.group_index("fused_silica", omega) == pytest.approx(1.467145, abs=5e-7)
    tod = solids.third_order_dispersion("fused_silica", omega, 1e-3)
    assert tod * 1e45 == pytest.approx(27.50, abs=0.005)


def test_gdd_of_a_plate_scales_with_thickness():
    # invariant: GDD = GVD * thickness
    omega = omega_of(1030e-9)
    gvd = solids.group_velocity_dispersion("caf2", omega)
    gdd = solids.group_delay_dispersion("caf2", omega, 2e-3)
    assert gdd == pytest.approx(2e-3 * gvd, rel=1e-12)


def test_vectorised_over_omega():
    omega = omega_of(np.array([[600e-9, 800e-9], [1000e-9, 1200e-9]]))
    assert solids.group_velocity_dispersion("fused_silica", omega).shape == (2, 2)
    assert solids.refractive_index("fused_silica", omega).shape == (2, 2)


@pytest.mark.parametrize(
    ("name", "n2", "wavelength"),
    [("fused_silica", 2.19e-20, 1030e-9), ("caf2", 1.71e-20, 1030e-9)],
)
def test_kerr_values_as_published(name, n2, wavelength):
    # published value: T. Kabacinski et al., Opt. Express 27, 11018 (2019), 1030 nm, 210 fs
    material = solids.load_material(name)
    assert material.n2.value == pytest.approx(n2, rel=1e-12)
    assert material.n2.wavelength == pytest.approx(wavelength)
    assert not material.n2.from_memory


def test_strength_in_pascal_and_marked():
    silica = solids.load_material("fused_silica")
    # published value: modulus of rupture 7,000 psi = 48.3 MPa (fused-quartz maker design data,
    # h-baumbachglass.co.uk quartz-properties page), the lowest of the published values read
    # (48.3-67 MPa). Moved from 49 MPa (from memory) by the data correction: the conservative
    # verified value is used for window thickness, so the table no longer flags it from memory.
    # Tolerance: half a unit of the printed last digit (0.05 MPa).
    assert silica.modulus_of_rupture.value == pytest.approx(48.3e6, abs=0.05e6)
    assert not silica.modulus_of_rupture.from_memory
    assert "48.3" in silica.modulus_of_rupture.source


def test_strength_is_not_above_the_published_values():
    # published values: 48.3 MPa (7,000 psi, fused-quartz maker design data) and 48.9 MPa
    # (P. J. MacQueen, "Windows thickness", CCD-world mailing list, 1996), flexural strength
    # 67 MPa (materials compilation, makeitfrom.com): the window check uses the lowest
    strength = solids.load_material("fused_silica").modulus_of_rupture.value
    assert strength <= min(48.3e6, 48.9e6, 67e6)


@pytest.mark.parametrize(
    ("name", "n2", "tolerance"),
    [("mgf2_ordinary", 7.6e-21, 0.05e-21), ("sapphire_ordinary", 2.9e-20, 0.05e-20)],
)
def test_crystal_window_kerr_values_as_published(name, n2, tolerance):
    # published value: R. Adair, L. L. Chase, S. A. Payne, Phys. Rev. B 39, 3337 (1989),
    # ordinary ray, 1.064 um, 3 ns, three-wave mixing: MgF2 7.6e-21, sapphire 2.9e-20 m^2/W
    # (two printed digits: tolerance half a unit of the last digit)
    material = solids.load_material(name)
    assert material.n2.value == pytest.approx(n2, abs=tolerance)
    assert material.n2.wavelength == pytest.approx(1064e-9)
    assert material.n2.pulse_duration == pytest.approx(3e-9)
    assert not material.n2.from_memory


def test_names_and_records():
    names = solids.material_names()
    assert names == ["caf2", "fused_silica", "mgf2_ordinary", "sapphire_ordinary"]
    for name in names:
        material = solids.load_material(name)
        assert material.dispersion.wavelength_min < material.dispersion.wavelength_max
        assert material.dispersion.source
    with pytest.raises(dataclasses.FrozenInstanceError):
        solids.load_material("caf2").name = "x"


def test_unknown_material_lists_valid_names():
    with pytest.raises(ConfigError, match=r"'glass'.*fused_silica"):
        solids.load_material("glass")


def test_warns_outside_fit_range_only():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        solids.refractive_index("fused_silica", omega_of(np.array([0.3e-6, 3.0e-6])))
    with pytest.warns(ValidityWarning, match="fused_silica"):
        solids.refractive_index("fused_silica", omega_of(5e-6))


GOOD_RECORD = """
[glass]
[glass.dispersion]
form = "sellmeier_wavelength_um"
b = [1.0]
resonance_um = [0.1]
wavelength_min_um = 0.3
wavelength_max_um = 2.0
temperature_k = 293.15
source = "test record"
[glass.kerr]
n2_m2_per_w = 2e-20
source = "test record"
[glass.strength]
modulus_of_rupture_mpa = 50
source = "test record"
"""


def test_read_good_table(tmp_path):
    path = tmp_path / "solids.toml"
    path.write_text(GOOD_RECORD)
    glass = solids.read_solid_table(path)["glass"]
    # analytic: n^2 = 1 + lam^2/(lam^2 - 0.01) at lam = 1 um
    assert solids.refractive_index(glass, omega_of(1e-6)) == pytest.approx(np.sqrt(1 + 1 / 0.99))
    assert glass.modulus_of_rupture.value == pytest.approx(50e6)
    assert np.isnan(glass.n2.wavelength)


@pytest.mark.parametrize(
    ("old", "new", "match"),
    [
        ('n2_m2_per_w = 2e-20\nsource = "test record"', "n2_m2_per_w = 2e-20",
         r"kerr: missing key 'source'"),
        ("wavelength_max_um = 2.0", "wavelength_max_um = 0.2",
         r"wavelength_min_um = 0.3 >= .* = 0.2"),
        ("modulus_of_rupture_mpa = 50", "modulus_of_rupture_mpa = -5",
         r"modulus_of_rupture_mpa = -5"),
        ('form = "sellmeier_wavelength_um"', 'form = "cauchy"', r"form = 'cauchy'"),
        ("b = [1.0]", "b = [1.0, 2.0]", r"'b' \(2 values\)"),
        ("[glass.strength]", "[glass.other]", r"missing key 'strength'"),
    ],
)
def test_bad_table_names_file_and_key(tmp_path, old, new, match):
    path = tmp_path / "bad_solids.toml"
    assert old in GOOD_RECORD
    path.write_text(GOOD_RECORD.replace(old, new))
    with pytest.raises(ConfigError, match=match) as info:
        solids.read_solid_table(path)
    assert "bad_solids.toml" in str(info.value)
