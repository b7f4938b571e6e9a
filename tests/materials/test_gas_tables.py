"""Tests of the shipped gas tables and of their loader (hcfplan.materials.gas_tables)."""

from __future__ import annotations

import csv
import functools
import importlib.resources
import math
import os
import shutil
import sys
import warnings
from pathlib import Path

import numpy as np
import pytest

from hcfplan.constants import P_1ATM, c, eV
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials import gas_table_schema, gas_tables
from hcfplan.materials.gas_density import number_density
from hcfplan.materials.gases import (
    available_gases,
    gas_search_dirs,
    load_gas_table,
    refractive_index,
    refractive_index_reference,
)

DATA = Path(__file__).resolve().parents[1] / "data"
REPO_GASES = Path(__file__).resolve().parents[2] / "gases"
GASES = ["He", "Ne", "Ar", "Kr", "Xe", "N2", "air"]


def _csv_rows(name: str) -> dict[str, dict[str, str]]:
    with (DATA / name).open() as handle:
        lines = [line for line in handle if not line.startswith("#")]
    return {row[next(iter(row))]: row for row in csv.DictReader(lines)}


BORZSONYI = _csv_rows("borzsonyi2008_sellmeier.csv")
IONIZATION = _csv_rows("nist_ionization_energies.csv")


def _omega(wavelength_um: float) -> float:
    return 2 * np.pi * c / (wavelength_um * 1e-6)


def _borzsonyi_n_minus_1(gas: str, wavelength_um: float, c1_column: str = "c1_um2") -> float:
    """Sellmeier form of Borzsonyi et al., Appl. Opt. 47, 4856 (2008), written again here."""
    row = BORZSONYI[gas]
    b1, c1, b2, c2 = (float(row[k]) for k in ("b1", c1_column, "b2", "c2_um2"))
    lam2 = wavelength_um**2
    return math.sqrt(1 + b1 * lam2 / (lam2 - c1) + b2 * lam2 / (lam2 - c2)) - 1


def _scale_lorentz_lorenz(n_minus_1: float, ratio: float) -> float:
    """(n^2-1)/(n^2+2) proportional to density (Lorentz-Lorenz), written again here."""
    n = 1 + n_minus_1
    term = (n * n - 1) / (n * n + 2) * ratio
    return math.sqrt((1 + 2 * term) / (1 - term)) - 1


# --- dispersion records -------------------------------------------------------------------------


@pytest.mark.parametrize("wavelength_um", [0.6, 0.8])
@pytest.mark.parametrize("gas", GASES)
def test_borzsonyi_fit_at_reference_state(gas, wavelength_um):
    """Analytic: the table reproduces the paper's printed coefficients at 0 degC, 1000 mbar.

    Borzsonyi et al., Appl. Opt. 47, 4856 (2008), Sellmeier table (tests/data CSV).
    """
    table = load_gas_table(gas)
    record = table.dispersion
    if record.key == "combined":  # Borzsonyi is the anchor, used exactly from 500 to 800 nm
        record = record.fits[record.anchor]
    assert record.key == "borzsonyi2008"
    assert record.reference_pressure == 1.0e5
    assert record.reference_temperature == pytest.approx(273.15)
    n = refractive_index_reference(table, _omega(wavelength_um))
    assert n - 1 == pytest.approx(_borzsonyi_n_minus_1(gas, wavelength_um), rel=1e-12)
    # The density-scaled index at the fit's own reference density is the fit itself.
    density = number_density(table, 1.0e5, 273.15)
    scaled = refractive_index(table, _omega(wavelength_um), density)
    assert scaled - 1 == pytest.approx(n - 1, rel=1e-12)


@pytest.mark.parametrize(
    ("wavelength_nm", "weber_n"),
    # Weber, Handbook of Optical Materials (CRC, 2003), Sec. 6.3, helium at 273 K:
    # 1.00003474 at 826.452 nm, 1.00003470 at 1013.979 nm (pressure taken as 1 atm).
    [(826.452, 1.00003474), (1013.979, 1.00003470)],
)
def test_helium_vs_weber_handbook(wavelength_nm, weber_n):
    """Published value: Borzsonyi He scaled from 1000 mbar to 1 atm vs Weber's table.

    Tolerance 1e-8 = one unit of the last printed digit (the 1014 nm point is 14 nm outside
    the fit range; the fit is smooth there).
    """
    table = load_gas_table("He")
    density = number_density(table, P_1ATM, 273.15)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)  # 1014 nm is just outside 0.4-1.0 um
        n = refractive_index(table, 2 * np.pi * c / (wavelength_nm * 1e-9), density)
    assert float(n) == pytest.approx(weber_n, abs=1e-8)


@pytest.mark.parametrize("wavelength_um", [0.5, 0.8])
def test_argon_vs_peck_fisher_1964(wavelength_um):
    """Published value: Borzsonyi Ar scaled to 15 degC, 1 atm vs Peck & Fisher.

    E. R. Peck, D. J. Fisher, J. Opt. Soc. Am. 54, 1362 (1964): at 15 degC, 101325 Pa,
    n - 1 = 6.432135e-5 + 2.8606021e-2/(144 - l^-2), l in um (0.47-2.06 um). Two independent
    measurements; agreement to 1e-3 relative is the accuracy expected of the fits.
    """
    table = load_gas_table("Ar")
    n = refractive_index(table, _omega(wavelength_um), number_density(table, P_1ATM, 288.15))
    peck = 6.432135e-5 + 2.8606021e-2 / (144 - wavelength_um**-2)
    assert float(n) - 1 == pytest.approx(peck, rel=1e-3)


def test_xenon_c1_correction_gives_the_measured_dispersion():
    """Published value: slope of Xe n - 1 between 0.45 and 0.55 um vs Bideau-Mehu et al.

    A. Bideau-Mehu, Y. Guern, R. Abjean, A. Johannin-Gilles, J. Quant. Spectrosc. Radiat.
    Transfer 25, 395 (1981), 0 degC, 101325 Pa: n - 1 = 0.00322869/(46.301 - l^-2)
    + 0.00355393/(59.578 - l^-2) + 0.0606764/(112.74 - l^-2). With the corrected C1 the slope
    agrees to 15 % (different experiments); the misprinted C1 gives almost no slope.
    """
    table = load_gas_table("Xe")
    ratio = number_density(table, P_1ATM, 273.15) / number_density(table, 1e5, 273.15)

    def bideau(l_um):
        s = l_um**-2
        return 0.00322869 / (46.301 - s) + 0.00355393 / (59.578 - s) + 0.0606764 / (112.74 - s)

    def table_value(l_um):
        return float(refractive_index_reference(table, _omega(l_um))) - 1

    slope_reference = bideau(0.45) - bideau(0.55)
    slope_table = _scale_lorentz_lorenz(table_value(0.45), ratio) - _scale_lorentz_lorenz(
        table_value(0.55), ratio
    )
    printed = [_borzsonyi_n_minus_1("Xe", l_um, "c1_printed_um2") for l_um in (0.45, 0.55)]
    assert slope_table == pytest.approx(slope_reference, rel=0.15)
    assert abs(printed[0] - printed[1]) < 0.1 * slope_reference


@pytest.mark.parametrize(
    ("wavelength_um", "expected"),
    # Ciddor, Appl. Opt. 35, 1566 (1996), Eq. (1): standard air (15 degC, 101325 Pa, 450 ppm CO2)
    # n - 1 = 0.05792105/(238.0185 - l^-2) + 0.00167917/(57.362 - l^-2); printed check value
    # at 633 nm: 2.7653e-4 (5 digits).
    [(0.633, 2.7653e-4)],
)
def test_air_ciddor_standard_air(wavelength_um, expected):
    """Published value: the air table's ciddor1996 record at standard air."""
    table = load_gas_table("air")
    n = refractive_index_reference(table, _omega(wavelength_um), fit="ciddor1996")
    formula = 0.05792105 / (238.0185 - wavelength_um**-2) + 0.00167917 / (
        57.362 - wavelength_um**-2
    )
    assert float(n) - 1 == pytest.approx(formula, rel=1e-12)
    assert float(n) - 1 == pytest.approx(expected, abs=0.5e-8)
    # The same fit through the density-scaling path at its own reference state.
    density = number_density(table, 101325.0, 288.15)
    assert float(refractive_index(table, _omega(0.633), density, fit="ciddor1996")) == float(n)


def test_unknown_fit_key_lists_allowed():
    """Error: unknown dispersion record key."""
    with pytest.raises(ConfigError, match=r"'nope'.*ciddor1996"):
        refractive_index_reference(load_gas_table("air"), _omega(0.8), fit="nope")


# --- other records ------------------------------------------------------------------------------

ATOMS = ["He", "Ne", "Ar", "Kr", "Xe"]


@functools.cache
def _mendeleev_element(symbol: str) -> tuple[float, float]:
    """(first ionization energy [eV], atomic weight [g/mol]) from mendeleev (slow: cached)."""
    mendeleev = pytest.importorskip("mendeleev")
    element = mendeleev.element(symbol)
    return element.ionenergies[1], element.atomic_weight


@pytest.mark.parametrize("gas", ATOMS)
def test_ionization_potential_vs_mendeleev(gas):
    """Published value: first ionization energy vs mendeleev (NIST ASD values), 1e-4 eV."""
    table = load_gas_table(gas)
    expected = _mendeleev_element(gas)[0]  # [eV]
    assert table.ionization.potential / eV == pytest.approx(expected, abs=1e-4)


@pytest.mark.parametrize(
    ("gas", "species"), [(g, g) for g in ATOMS] + [("N2", "N2"), ("air", "O2")]
)
def test_ionization_potential_vs_nist(gas, species):
    """Published value: NIST ASD / WebBook digits in tests/data/nist_ionization_energies.csv."""
    table = load_gas_table(gas)
    assert table.ionization.species == species
    expected = float(IONIZATION[species]["potential_ev"])
    assert table.ionization.potential == pytest.approx(expected * eV, rel=1e-12)


@pytest.mark.parametrize(("gas", "l_expected"), [("He", 0), ("Ne", 1), ("Ar", 1), ("Kr", 1)])
def test_orbital_quantum_numbers(gas, l_expected):
    """Published value: outer shell of the ground state (He 1s, Ne..Kr np), NIST ASD."""
    ion = load_gas_table(gas).ionization
    assert (ion.l, ion.m, ion.charge) == (l_expected, 0, 1)


@pytest.mark.parametrize("gas", ATOMS)
def test_molar_mass_vs_mendeleev(gas):
    """Published value: standard atomic weights as given by mendeleev (IUPAC), 1e-3 g/mol."""
    expected = _mendeleev_element(gas)[1] * 1e-3  # [kg/mol]
    assert load_gas_table(gas).molar_mass == pytest.approx(expected, abs=1e-6)


@pytest.mark.parametrize(
    ("gas", "n2"),
    # Wahlstrand, Cheng, Milchberg, Phys. Rev. A 85, 043820 (2012): Ar 9.7e-24, N2 7.4e-24 m^2/W.
    [("Ar", 9.7e-24), ("N2", 7.4e-24)],
)
def test_kerr_records_wahlstrand(gas, n2):
    """Published value: electronic n2 at 1 atm, 800 nm."""
    kerr = load_gas_table(gas).kerr
    assert (kerr.n2, kerr.kind, kerr.reference_pressure) == (n2, "electronic", P_1ATM)
    assert kerr.wavelength == pytest.approx(800e-9)


def test_raman_records_of_air():
    """Published value: N2 / O2 constants (Huber & Herzberg 1979, from memory) in SI."""
    raman = {r.molecule: r for r in load_gas_table("air").raman}
    assert set(raman) == {"N2", "O2"}
    assert raman["N2"].rotational_constant == pytest.approx(198.957)  # 1.98957 cm^-1
    assert raman["O2"].rotational_constant == pytest.approx(143.77)  # 1.4377 cm^-1
    assert raman["N2"].spin_weights == (6.0, 3.0)
    assert raman["O2"].spin_weights == (0.0, 1.0)
    assert raman["N2"].polarizability_anisotropy == pytest.approx(0.69e-30)
    assert not load_gas_table("Ar").raman


# --- loader: lookup, search path, shipped directory --------------------------------------------


@pytest.mark.parametrize("name", ["Ar", "ar", "AR", "argon", " Ar "])
def test_lookup_is_case_insensitive_on_stem_symbol_and_name(name):
    assert load_gas_table(name).symbol == "Ar"


def test_available_gases_lists_the_shipped_tables():
    assert sorted(available_gases(), key=str.lower) == sorted(GASES, key=str.lower)


def test_unknown_gas_lists_available():
    with pytest.raises(ConfigError, match=r"'H2'.*available gases: air, Ar, He"):
        load_gas_table("H2")


def test_shipped_dir_fallback_in_source_checkout():
    """From a PYTHONPATH checkout hcfplan._gases is not importable; the fallback is gases/."""
    assert gas_tables.shipped_gas_dir() == REPO_GASES
    assert (gas_tables.shipped_gas_dir() / "Ar.toml").is_file()


def test_shipped_dir_via_importlib_resources(tmp_path, monkeypatch):
    """An installed data package is found through importlib.resources."""
    package = tmp_path / "fake_gas_pkg"
    package.mkdir()
    (package / "__init__.py").write_text("")
    monkeypatch.syspath_prepend(str(tmp_path))
    assert importlib.resources.files("fake_gas_pkg") is not None
    assert gas_tables.shipped_gas_dir("fake_gas_pkg") == package
    sys.modules.pop("fake_gas_pkg", None)


def _user_table(directory: Path, symbol: str = "Zz", stem: str = "custom") -> Path:
    text = (REPO_GASES / "Ar.toml").read_text()
    text = text.replace('symbol = "Ar"', f'symbol = "{symbol}"').replace('"argon"', '"custom"')
    text = text.replace("n2_m2_per_w = 9.7e-24", "n2_m2_per_w = 1.0e-23")
    path = directory / f"{stem}.toml"
    path.write_text(text)
    return path


def test_user_directory_is_searched_first(tmp_path):
    _user_table(tmp_path, symbol="Ar", stem="Ar")
    assert load_gas_table("Ar", [tmp_path]).kerr.n2 == 1.0e-23
    assert load_gas_table("Ar").kerr.n2 == 9.7e-24
    assert load_gas_table("argon", [tmp_path]).path == str(REPO_GASES / "Ar.toml")


def test_user_table_found_by_symbol(tmp_path):
    _user_table(tmp_path, symbol="Zz")
    table = load_gas_table("ZZ", [tmp_path])
    assert table.name == "custom" and table.path == str(tmp_path / "custom.toml")
    assert "custom" in available_gases([tmp_path])


def test_gas_search_dirs_reads_only_the_given_environment(tmp_path):
    first, second = tmp_path / "a", tmp_path / "b"
    first.mkdir()
    second.mkdir()
    environ = {"HCFPLAN_GAS_PATH": f"{first}{os.pathsep}{second}"}
    assert gas_search_dirs(environ=environ) == [first, second]
    assert gas_search_dirs(extra=[second], environ=environ) == [second, first, second]
    assert gas_search_dirs() == []
    _user_table(second, symbol="Qq", stem="qgas")
    assert load_gas_table("qq", gas_search_dirs(environ=environ)).name == "custom"


def test_missing_search_dir_is_an_error(tmp_path):
    with pytest.raises(ConfigError, match="nowhere"):
        load_gas_table("Ar", [tmp_path / "nowhere"])


# --- loader: validation -------------------------------------------------------------------------


def _broken_copy(tmp_path: Path, old: str, new: str, stem: str = "Ar") -> Path:
    text = (REPO_GASES / "Ar.toml").read_text()
    assert old in text
    path = tmp_path / f"{stem}.toml"
    path.write_text(text.replace(old, new, 1))
    return path


@pytest.mark.parametrize(
    ("old", "new", "message"),
    [
        (
            "n2_m2_per_w = 9.7e-24",
            "n2_m2_per_w = -1e-23",
            r"kerr\.n2_m2_per_w = -1e-23: must be > 0",
        ),
        (
            "valid_wavelength_um = [0.4, 1.0]",
            "valid_wavelength_um = [1.0, 0.4]",
            r"dispersion\[0\]\.valid_wavelength_um = \[1\.0, 0\.4\]: must satisfy 0 < lo < hi",
        ),
        ('source = "NIST Atomic', 'origin = "NIST Atomic', r"ionization\.source: missing"),
        ("potential_ev = 15.7596112\n", "", r"ionization\.potential_ev: missing"),
        ("l = 1\n", 'l = "p"\n', r"ionization\.l = 'p': must be an integer"),
        ('kind = "electronic"', 'kind = "total"', r"kerr\.kind = 'total'"),
        ('form = "n2_minus_1_sellmeier"', 'form = "cauchy"', r"dispersion\[0\]\.form = 'cauchy'"),
        (
            "reference_pressure_pa = 100000.0",
            "reference_pressure_psi = 14.5",
            r"dispersion\[0\]\.reference_pressure_pa \(or reference_pressure_bar\): missing",
        ),
        (
            "c_um2 = [206.12e-6, 8.066e-3]",
            "c_um2 = [206.12e-6]",
            r"dispersion\[0\]\.b and dispersion\[0\]\.c_um2",
        ),
        ('coolprop_name = "Argon"', 'coolprop = "Argon"', r"eos\.coolprop_name: missing"),
        (
            "molar_mass_g_per_mol = 39.948",
            "molar_mass_g_per_mol = 0",
            r"gas\.molar_mass_g_per_mol = 0",
        ),
        ("[kerr]", "[kerrr]", r"kerrr: unknown block"),
        ("l = 1\n", "l = 1\nextra = 2\n", r"ionization\.extra: unknown key"),
        ("m = 0\n", "m = 2\n", r"ionization\.m = 2: must satisfy \|m\| <= l"),
    ],
)
def test_malformed_table_names_file_and_key(tmp_path, old, new, message):
    """Error: a broken copy of Ar.toml raises ConfigError naming the file and the key."""
    _broken_copy(tmp_path, old, new)
    with pytest.raises(ConfigError, match=r"Ar\.toml: " + message):
        load_gas_table("Ar", [tmp_path])


def test_invalid_toml_syntax(tmp_path):
    _broken_copy(tmp_path, "[kerr]", "[kerr")
    with pytest.raises(ConfigError, match=r"Ar\.toml: not valid TOML"):
        load_gas_table("Ar", [tmp_path])


def test_two_dispersion_defaults_are_an_error(tmp_path):
    source = tmp_path / "src"
    source.mkdir()
    shutil.copy(REPO_GASES / "air.toml", source / "air.toml")
    text = (source / "air.toml").read_text().replace("default = false", "default = true")
    (tmp_path / "air.toml").write_text(text)
    with pytest.raises(ConfigError, match=r"air\.toml: dispersion\.default: exactly one.*found 2"):
        load_gas_table("air", [tmp_path])


def test_every_dispersion_form_has_an_evaluator_and_coefficient_keys():
    """Contract between the schema and the evaluators: the same set of form names."""
    assert set(gas_tables.DISPERSION_FORMS) == set(gas_table_schema.DISPERSION_FORM_KEYS)


@pytest.mark.parametrize(("gas", "label"), [("Ar", "Ar"), ("air", "air"), ("N2", "N2")])
def test_table_label_is_the_symbol(gas, label):
    assert load_gas_table(gas).label == label


def test_schema_version_other_than_the_one_read_is_an_error(tmp_path):
    """Error: a table written for another layout version names the version this one reads."""
    _broken_copy(tmp_path, "schema_version = 1", "schema_version = 2")
    with pytest.raises(ConfigError, match=r"Ar\.toml: schema_version = 2: .*schema_version = 1"):
        load_gas_table("Ar", [tmp_path])
