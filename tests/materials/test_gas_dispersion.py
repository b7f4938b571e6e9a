"""UV and IR gas dispersion fits and their combination (hcfplan.materials.gas_dispersion)."""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from hcfplan.constants import P_1ATM, c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.materials import gas_tables
from hcfplan.materials.gas_density import number_density
from hcfplan.materials.gases import load_gas_table, refractive_index, refractive_index_reference

REPO_GASES = gas_tables.shipped_gas_dir()


def _omega(wavelength_um):
    return 2 * np.pi * c / (np.asarray(wavelength_um, dtype=float) * 1e-6)


def _quiet_reference(gas, fit, wavelength_um):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        return float(refractive_index_reference(load_gas_table(gas), _omega(wavelength_um),
                                                fit=fit)) - 1


@pytest.mark.parametrize(("gas", "fit", "wavelength_um", "expected_1e6"), [
    # Bideau-Mehu, Guern, Abjean, Johannin-Gilles, J. Quant. Spectrosc. Radiat. Transfer 25,
    # 395 (1981), 0 degC, 101325 Pa: n - 1 = sum A_i/(B_i - l^-2) (Ar, Kr)
    ("Ar", "bideau_mehu1981", 0.2, 322.191), ("Ar", "bideau_mehu1981", 0.4, 287.043),
    ("Kr", "bideau_mehu1981", 0.2, 516.605), ("Kr", "bideau_mehu1981", 0.4, 438.487),
    # Peck & Fisher, J. Opt. Soc. Am. 54, 1362 (1964), Ar at 0 degC, 760 torr
    ("Ar", "peck_fisher1964", 0.8, 279.770), ("Ar", "peck_fisher1964", 1.8, 277.921),
    # Peck & Khanna, J. Opt. Soc. Am. 56, 1059 (1966), N2 at 0 degC, 760 torr
    ("N2", "peck_khanna1966", 0.8, 296.242), ("N2", "peck_khanna1966", 1.8, 294.255),
    # Ermolov et al., Phys. Rev. A 92, 033821 (2015), He at 0 degC, 101325 Pa
    ("He", "ermolov2015", 0.2, 36.573), ("He", "ermolov2015", 0.8, 34.791),
    # Mansfield & Peck, J. Opt. Soc. Am. 59, 199 (1969), He at 0 degC, 101325 Pa
    ("He", "mansfield1969", 0.8, 34.802), ("He", "mansfield1969", 1.8, 34.699),
])
def test_added_fits_reproduce_their_formulas(gas, fit, wavelength_um, expected_1e6):
    """Published formulas: each record gives the paper's formula (coefficients as in the open
    refractive-index database), evaluated independently to 6 digits (last digit +-1)."""
    assert _quiet_reference(gas, fit, wavelength_um) * 1e6 == pytest.approx(expected_1e6,
                                                                             abs=1.5e-3)


def test_peck_fisher_0c_scaled_matches_their_15c_formula():
    """Published value: the 0 degC Ar record scaled by density to 15 degC, 1 atm agrees with
    the 15 degC formula of the same paper, n - 1 = 6.432135e-5 + 2.8606021e-2/(144 - l^-2)
    (Peck & Fisher, J. Opt. Soc. Am. 54, 1362 (1964)), to 2e-4 relative at 1.03 and 1.8 um."""
    table = load_gas_table("Ar")
    density = number_density(table, P_1ATM, 288.15)
    for l_um in (1.03, 1.8):
        n = refractive_index(table, _omega(l_um), density, fit="peck_fisher1964")
        expected = 6.432135e-5 + 2.8606021e-2 / (144 - l_um**-2)
        assert float(n) - 1 == pytest.approx(expected, rel=2e-4)


def _gvd(gas, fit, wavelength_um, order=2):
    """d^order k/d omega^order of the gas at 1 bar, 293.15 K by central differences [s^n/m]."""
    table = load_gas_table(gas)
    density = number_density(table, 1e5, 293.15)
    w0 = float(_omega(wavelength_um))
    h = 2e-3 * w0
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        k = np.array([w / c * float(refractive_index(table, np.array([w]), density, fit=fit)[0])
                      for w in (w0 - h, w0, w0 + h)])
    return (k[2] - 2 * k[1] + k[0]) / h**2


COMBINED = {
    "He": ("ermolov2015", "borzsonyi2008", "mansfield1969"),
    "Ar": ("bideau_mehu1981", "borzsonyi2008", "peck_fisher1964"),
    "N2": (None, "borzsonyi2008", "peck_khanna1966"),
    "Kr": ("bideau_mehu1981", "borzsonyi2008", None),
}


@pytest.mark.parametrize("gas", sorted(COMBINED))
def test_combined_index_is_each_fit_outside_the_switch_bands(gas):
    """Analytic: the anchor exactly between the bands; beyond a band the outer fit's GVD
    (its n - 1 shifted only by a + b lambda, at most 0.5 % here)."""
    below, anchor, above = COMBINED[gas]
    table = load_gas_table(gas)
    density = number_density(table, 1e5, 293.15)
    n_comb = refractive_index(table, _omega(0.7), density)
    n_anchor = refractive_index(table, _omega(0.7), density, fit=anchor)
    assert float(n_comb) == pytest.approx(float(n_anchor), abs=1e-15)
    for fit, l_um in ((below, 0.3), (above, 1.5)):
        if fit is None:
            continue
        assert _gvd(gas, None, l_um) == pytest.approx(_gvd(gas, fit, l_um), rel=1e-5)
        n_fit = refractive_index(table, _omega(l_um), density, fit=fit)
        n_comb = refractive_index(table, _omega(l_um), density)
        assert float(n_comb) - 1 == pytest.approx(float(n_fit) - 1, rel=5e-3)


@pytest.mark.parametrize(("gas", "inner", "outer", "band_um"), [
    ("Ar", "borzsonyi2008", "peck_fisher1964", (0.8, 1.0)),
    ("Ar", "borzsonyi2008", "bideau_mehu1981", (0.4, 0.5)),
    ("He", "borzsonyi2008", "mansfield1969", (0.8, 1.0)),
    ("He", "borzsonyi2008", "ermolov2015", (0.4, 0.5)),
    ("N2", "borzsonyi2008", "peck_khanna1966", (0.8, 1.0)),
])
def test_gvd_inside_a_switch_band_lies_between_the_two_fits(gas, inner, outer, band_um):
    """Analytic (the construction): inside a band the GVD is a weighted mean of the two fits'
    GVDs, so the switch adds no feature of its own (margin: 1 % of their difference plus the
    finite-difference error)."""
    for l_um in np.linspace(*band_um, 6)[1:-1]:
        a, b = _gvd(gas, inner, l_um), _gvd(gas, outer, l_um)
        value = _gvd(gas, None, l_um)
        margin = 0.01 * abs(a - b) + 1e-4 * abs(a)
        assert min(a, b) - margin <= value <= max(a, b) + margin, (l_um, a, value, b)


@pytest.mark.parametrize(("gas", "wavelength_nm", "warns"), [
    ("He", 1030, False), ("Ar", 1030, False), ("N2", 1030, False), ("air", 1030, False),
    ("He", 150, False), ("Ar", 200, False), ("Kr", 200, False), ("He", 1800, False),
    ("Ne", 1030, True), ("Xe", 1030, True), ("Kr", 1030, True), ("Ar", 2500, True),
])
def test_range_warning_only_where_every_fit_is_left(gas, wavelength_nm, warns):
    """A 1030 nm pump is inside a fit's range for He, Ar, N2, air; Ne, Kr, Xe have no
    published fit beyond 1.0 um (open refractive-index database, checked file by file)."""
    table = load_gas_table(gas)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        refractive_index(table, _omega(wavelength_nm / 1e3), number_density(table, 1e5, 293.15))
    assert any(issubclass(w.category, ValidityWarning) for w in caught) == warns


def _table_with(tmp_path, replace: tuple[str, str]):
    text = (REPO_GASES / "Ar.toml").read_text()
    assert replace[0] in text
    folder = tmp_path / "tables"
    folder.mkdir()
    (folder / "Ar.toml").write_text(text.replace(*replace))
    return folder


@pytest.mark.parametrize(("old", "new", "fragment"), [
    ("switch_wavelength_um = [[0.40, 0.50], [0.80, 1.00]]",
     "switch_wavelength_um = [[0.40, 0.50], [0.80, 1.20]]",
     r"Ar\.toml: dispersion_combined\.switch_wavelength band 1 \(0\.8-1\.2 um\): must lie "
     r"inside the range of fit 'borzsonyi2008'"),
    ("switch_wavelength_um = [[0.40, 0.50], [0.80, 1.00]]",
     "switch_wavelength_um = [[0.40, 0.50]]", r"3 keys need 2 switch band\(s\), got 1"),
    ('keys = ["bideau_mehu1981", "borzsonyi2008", "peck_fisher1964"]',
     'keys = ["bideau_mehu1981", "nope", "peck_fisher1964"]',
     r"'nope' is not a \[\[dispersion\]\]"),
])
def test_bad_combination_is_refused_naming_the_file(tmp_path, old, new, fragment):
    """Error: a switch band outside a fit's stated range, a band count or key that does not fit."""
    folder = _table_with(tmp_path, (old, new))
    with pytest.raises(ConfigError, match=fragment):
        load_gas_table("Ar", [folder])
