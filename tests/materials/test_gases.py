"""Tests of the gas physics: density, phase, Lorentz-Lorenz scaling, n2, mixtures."""

from __future__ import annotations

import ast
import pathlib
import warnings

import numpy as np
import pytest

from hcfplan.constants import P_1ATM, c, k_B
from hcfplan.errors import ConfigError, GasPhaseError, ValidityWarning
from hcfplan.fibers.base import GasLike
from hcfplan.materials.gas_density import amagat_density, dalton_density, number_density
from hcfplan.materials.gas_phase import check_fill, coolprop_phase, fill_phase
from hcfplan.materials.gases import (
    GasFill,
    gas_medium,
    kerr_coefficient,
    load_gas_table,
    refractive_index,
)

OMEGA_800 = 2 * np.pi * c / 800e-9
OMEGA_IN_RANGE = 2 * np.pi * c / np.linspace(450e-9, 950e-9, 64)


def _compressibility(gas: str, pressure: float, temperature: float) -> float:
    return pressure / (
        number_density(load_gas_table(gas), pressure, temperature) * k_B * temperature
    )


# --- number density -----------------------------------------------------------------------------


@pytest.mark.parametrize("gas", ["He", "Ne", "Ar", "N2", "air"])
def test_coolprop_close_to_ideal_at_1_bar(gas):
    """Analytic limit: |Z - 1| < 1e-3 at 1 bar, 293 K (second virial |B| < 24 cm^3/mol for
    these gases at room temperature, common practice, no source)."""
    assert _compressibility(gas, 1e5, 293.15) == pytest.approx(1.0, abs=1e-3)


@pytest.mark.parametrize(
    ("gas", "low", "high"),
    # Second virial coefficients at 293 K [from memory, J. H. Dymond, E. B. Smith, The Virial
    # Coefficients of Pure Gases and Mixtures (Oxford, 1980)]: Kr about -51, Xe about -130
    # cm^3/mol, i.e. 1 - Z = -B p/(RT) of about 0.2 % and 0.5 % at 1 bar.
    [("Kr", 1e-3, 3e-3), ("Xe", 3e-3, 8e-3)],
)
def test_heavy_noble_gases_deviate_at_1_bar(gas, low, high):
    """Published value (from memory): sign and size of 1 - Z at 1 bar, 293 K."""
    assert low < 1 - _compressibility(gas, 1e5, 293.15) < high


@pytest.mark.parametrize(
    ("gas", "z_expected"),
    # Compressibility at 50 bar, 293 K from the reference EOS: Ar Tegeler, Span, Wagner,
    # J. Phys. Chem. Ref. Data 28, 779 (1999); Kr, Xe Lemmon & Span, J. Chem. Eng. Data 51, 785
    # (2006). The two-digit values 0.97 / 0.89 / 0.62 are from memory (NIST WebBook fluid data,
    # same EOS); tolerance +-0.005 from the printed digits.
    [("Ar", 0.97), ("Kr", 0.89), ("Xe", 0.62)],
)
def test_compressibility_at_50_bar(gas, z_expected):
    """Published value (from memory): real-gas Z at 50 bar, 293 K."""
    assert _compressibility(gas, 50e5, 293.0) == pytest.approx(z_expected, abs=0.005)


def test_ideal_eos_and_zero_pressure():
    """Analytic: ideal N = p/(k_B T); zero pressure gives zero density for both EOS."""
    table = load_gas_table("Ar")
    assert number_density(table, 2e5, 300.0, eos="ideal") == 2e5 / (k_B * 300.0)
    assert number_density(table, 0.0, 300.0) == 0.0
    assert number_density(table, 0.0, 300.0, eos="ideal") == 0.0


@pytest.mark.parametrize(
    ("kwargs", "message"),
    [
        ({"pressure": -1.0, "temperature": 293.0}, r"pressure = -1\.0 Pa"),
        ({"pressure": 1e5, "temperature": 0.0}, r"temperature = 0\.0 K"),
        ({"pressure": 1e5, "temperature": 293.0, "eos": "vdw"}, r"'vdw'.*coolprop, ideal"),
    ],
)
def test_number_density_rejects_bad_input(kwargs, message):
    with pytest.raises(ConfigError, match=message):
        number_density(load_gas_table("Ar"), **kwargs)


# --- phase --------------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("gas", "temperature", "pressure", "raw", "phase"),
    # CoolProp's phase strings for (T, p) inputs and how hcfplan maps them; the Xe critical
    # point is 289.73 K, 58.42 bar (Lemmon & Span 2006 [from memory]).
    [
        ("Xe", 288.0, 10e5, "gas", "gas"),
        ("Xe", 300.0, 10e5, "supercritical_gas", "gas"),
        ("Ar", 293.0, 50e5, "supercritical", "supercritical"),
        ("Xe", 288.0, 57e5, "liquid", "liquid"),
        ("Xe", 288.0, 60e5, "supercritical_liquid", "liquid"),
    ],
)
def test_coolprop_phase_strings(gas, temperature, pressure, raw, phase):
    """Contract with CoolProp: raw PhaseSI strings and their mapping."""
    table = load_gas_table(gas)
    assert coolprop_phase(table.coolprop_name, pressure, temperature) == raw
    assert fill_phase(table, pressure, temperature) == phase


def test_xenon_liquid_fill_is_refused():
    """Published value: Xe condenses near 57 bar at 15 degC (critical point 289.7 K, 58.4 bar;
    Lemmon & Span 2006 [from memory]): 60 bar at 288 K is refused, the message names it."""
    with pytest.raises(GasPhaseError, match=r"Xe at 60 bar and 288 K would be liquid"):
        check_fill(load_gas_table("Xe"), 60e5, 288.0)


@pytest.mark.parametrize(
    ("pressure", "refused"),
    # Xe saturation pressure at 15 degC is near 57 bar [from memory]: 55 bar gas, 58 bar liquid.
    [(55e5, False), (58e5, True)],
)
def test_xenon_saturation_at_15_celsius(pressure, refused):
    """Published value (from memory): which side of the saturation curve."""
    table = load_gas_table("Xe")
    if refused:
        with pytest.raises(GasPhaseError, match=r"saturation pressure at 288\.15 K is 5[67]\.\d"):
            check_fill(table, pressure, 288.15)
    else:
        assert any("saturation pressure" in w for w in check_fill(table, pressure, 288.15))


def test_xenon_near_critical_warning():
    """Criterion (common practice, no source): |T/Tc - 1| < 0.1 and p > 0.7 pc warns."""
    found = check_fill(load_gas_table("Xe"), 50e5, 293.0)
    assert len(found) == 1 and "near the critical point" in found[0] and "50 bar" in found[0]


@pytest.mark.parametrize(("gas", "pressure"), [("Ar", 50e5), ("Kr", 50e5), ("Xe", 20e5)])
def test_fills_far_from_condensation_have_no_warning(gas, pressure):
    assert check_fill(load_gas_table(gas), pressure, 293.0) == []


@pytest.mark.parametrize(("gas", "temperature"), [("Xe", 150.0), ("air", 80.0)])
def test_unknown_phase_is_refused(gas, temperature):
    """Below the triple point (Xe) or inside the pseudo-pure dome (air) CoolProp cannot tell."""
    with pytest.raises(GasPhaseError, match=rf"at 1 bar and {temperature:g} K would be unknown"):
        check_fill(load_gas_table(gas), 1e5, temperature)


# --- Lorentz-Lorenz scaling ---------------------------------------------------------------------


def test_zero_density_gives_unity_exactly():
    """Analytic limit: no gas, no dispersion."""
    n = refractive_index(load_gas_table("Xe"), OMEGA_IN_RANGE, 0.0)
    assert np.all(n == 1.0)


@pytest.mark.parametrize("gas", ["He", "Ar", "Xe"])
def test_doubling_density_doubles_n_minus_1(gas):
    """Analytic: n - 1 is linear in N up to the Lorentz-Lorenz curvature.

    With L = (n^2-1)/(n^2+2), n - 1 = 3L/2 + 3L^2/8 + 15L^3/16 + O(L^4) (series of
    n = sqrt((1+2L)/(1-L))), so doubling N multiplies n - 1 by 2 (1 + L/4 + 29L^2/16 + O(L^3)):
    an excess of about (n - 1)/6 (< 1.2e-4 at 1 bar). The O(L^3) remainder, relative ~L^2,
    sets the tolerance.
    """
    table = load_gas_table(gas)
    density = number_density(table, 1e5, 293.15)
    single = refractive_index(table, OMEGA_IN_RANGE, density) - 1
    double = refractive_index(table, OMEGA_IN_RANGE, 2 * density) - 1
    excess = double / (2 * single) - 1
    term = _lorentz_lorenz(1 + single)
    np.testing.assert_allclose(excess, term / 4 + 29 * term**2 / 16, rtol=1e-5)


def test_lorentz_lorenz_quantity_is_proportional_to_density():
    """Analytic invariant: (n^2-1)/(n^2+2) scales exactly with N, also at 100 bar of Ar."""
    table = load_gas_table("Ar")
    low = refractive_index(table, OMEGA_800, number_density(table, 1e5, 293.15))
    dense = number_density(table, 100e5, 293.15)
    high = refractive_index(table, OMEGA_800, dense)
    ratio = ((high**2 - 1) / (high**2 + 2)) / ((low**2 - 1) / (low**2 + 2))
    assert ratio == pytest.approx(dense / number_density(table, 1e5, 293.15), rel=1e-12)


def test_negative_density_is_rejected():
    with pytest.raises(ConfigError, match=r"number_density = -1\.0"):
        refractive_index(load_gas_table("Ar"), OMEGA_800, -1.0)


def test_out_of_range_grid_warns_once_and_names_the_range():
    """A broad grid gives one ValidityWarning per call naming the fit's range, not one per point."""
    table = load_gas_table("Ar")
    omega = 2 * np.pi * c / np.linspace(200e-9, 3000e-9, 4096)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        refractive_index(table, omega, number_density(table, 1e5, 293.15))
    assert len(caught) == 1 and issubclass(caught[0].category, ValidityWarning)
    assert "140-2059 nm" in str(caught[0].message)  # the combined Ar fits


def test_in_range_grid_does_not_warn():
    table = load_gas_table("Ar")
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        refractive_index(table, OMEGA_IN_RANGE, number_density(table, 1e5, 293.15))


# --- Kerr coefficient ---------------------------------------------------------------------------


def test_kerr_at_reference_density_and_scaling():
    """Published value at the record's state (Wahlstrand 2012: Ar 9.7e-24 m^2/W at 1 atm),
    and the analytic density scaling."""
    table = load_gas_table("Ar")
    density = number_density(table, P_1ATM, table.kerr.reference_temperature)
    assert kerr_coefficient(table, density) == pytest.approx(9.7e-24, rel=1e-12)
    assert kerr_coefficient(table, 3 * density) == pytest.approx(3 * 9.7e-24, rel=1e-12)
    assert kerr_coefficient(table, 0.0) == 0.0


# --- mixtures -----------------------------------------------------------------------------------


def _lorentz_lorenz(n):
    return (n**2 - 1) / (n**2 + 2)


def test_mixture_lorentz_lorenz_is_density_weighted_sum():
    """Analytic invariant: L_mix = L_He(N_He) + L_Ar(N_Ar), and n2 adds likewise."""
    medium = gas_medium(GasFill((("He", 0.5), ("Ar", 0.5)), 5e5, 293.15))
    he, ar = medium.components
    assert he.number_density == ar.number_density == pytest.approx(0.5 * medium.number_density)
    expected = _lorentz_lorenz(
        refractive_index(he.table, OMEGA_IN_RANGE, he.number_density)
    ) + _lorentz_lorenz(refractive_index(ar.table, OMEGA_IN_RANGE, ar.number_density))
    np.testing.assert_allclose(
        _lorentz_lorenz(medium.refractive_index(OMEGA_IN_RANGE)), expected, rtol=1e-12
    )
    n2 = kerr_coefficient(he.table, he.number_density) + kerr_coefficient(
        ar.table, ar.number_density
    )
    assert medium.n2 == pytest.approx(n2, rel=1e-12)
    assert isinstance(medium, GasLike)


def test_mixture_density_near_ideal_at_1_bar():
    """Analytic limit: a He/Ar mixture at 1 bar, 293 K is ideal to 1e-3."""
    medium = gas_medium(GasFill((("He", 0.5), ("Ar", 0.5)), 1e5, 293.15))
    assert medium.number_density == pytest.approx(1e5 / (k_B * 293.15), rel=1e-3)


def test_pure_fill_matches_pure_gas_functions():
    medium = gas_medium(GasFill((("Ar", 1.0),), 10e5, 293.15))
    table = load_gas_table("Ar")
    density = number_density(table, 10e5, 293.15)
    assert medium.number_density == density and medium.warnings == ()
    np.testing.assert_array_equal(
        medium.refractive_index(OMEGA_IN_RANGE), refractive_index(table, OMEGA_IN_RANGE, density)
    )


def test_mixture_without_coolprop_parameters_falls_back_with_warning():
    """CoolProp has no Ar-Xe binary parameters: Amagat's law, said in the warnings."""
    medium = gas_medium(GasFill((("Ar", 0.5), ("Xe", 0.5)), 10e5, 293.15))
    assert any("Amagat" in w for w in medium.warnings)
    pure = [number_density(load_gas_table(g), 10e5, 293.15) for g in ("Ar", "Xe")]
    assert medium.number_density == pytest.approx(1 / (0.5 / pure[0] + 0.5 / pure[1]), rel=1e-12)


def test_mixture_ideal_eos():
    medium = gas_medium(GasFill((("He", 0.3), ("Ne", 0.7)), 2e5, 300.0, eos="ideal"))
    assert medium.number_density == pytest.approx(2e5 / (k_B * 300.0), rel=1e-15)


def test_mixture_component_checked_at_partial_pressure():
    """Xe at 90 % of 70 bar (63 bar partial) at 288 K is above its saturation pressure."""
    with pytest.raises(GasPhaseError, match=r"Xe at 63 bar"):
        gas_medium(GasFill((("He", 0.1), ("Xe", 0.9)), 70e5, 288.0))
    medium = gas_medium(GasFill((("He", 0.5), ("Xe", 0.5)), 100e5, 288.0))
    assert any(w.startswith("component Xe at 50 bar") for w in medium.warnings)


@pytest.mark.parametrize(
    ("components", "pressure", "message"),
    [
        ((("He", 0.5), ("Ar", 0.6)), 1e5, r"He: 0\.5, Ar: 0\.6\) sum to 1\.1"),
        ((("He", 0.0), ("Ar", 0.0)), 1e5, r"He: 0, Ar: 0\): each must be > 0"),
        ((("He", -0.5), ("Ar", 1.5)), 1e5, r"He: -0\.5, Ar: 1\.5\): each must be > 0"),
        ((("Ar", 0.5), ("ar", 0.5)), 1e5, r"each only once"),
        ((), 1e5, r"components \(none\)"),
        ((("Ar", 1.0),), 0.0, r"pressure = 0\.0 Pa"),
        ((("Ar", 1.0),), -2e5, r"pressure = -200000\.0 Pa"),
    ],
)
def test_bad_fills_are_rejected(components, pressure, message):
    with pytest.raises(ConfigError, match=message):
        GasFill(components, pressure, 293.15)


def test_unknown_component_lists_gases():
    with pytest.raises(ConfigError, match=r"'H2'.*available gases"):
        gas_medium(GasFill((("H2", 1.0),), 1e5, 293.15))


@pytest.mark.parametrize("gas", ["Ar", "Xe"])
def test_mixing_rules_of_one_component_give_the_pure_density(gas):
    """Analytic identity: with a single component (x = 1) Amagat's and Dalton's laws both
    reduce to the pure-fluid EOS density (Dalton to the root tolerance 1e-12)."""
    table = load_gas_table(gas)
    pure = number_density(table, 20e5, 293.15)
    assert amagat_density([table], [1.0], 20e5, 293.15) == pytest.approx(pure, rel=1e-14)
    assert dalton_density([table], [1.0], 20e5, 293.15) == pytest.approx(pure, rel=1e-10)


def test_mixing_rules_agree_near_the_ideal_limit():
    """Analytic limit: at 0.1 bar, 293 K both rules give p/(k_B T) to 1e-3 for Ar/Xe."""
    tables = [load_gas_table("Ar"), load_gas_table("Xe")]
    ideal = 1e4 / (k_B * 293.15)
    assert amagat_density(tables, [0.5, 0.5], 1e4, 293.15) == pytest.approx(ideal, rel=1e-3)
    assert dalton_density(tables, [0.5, 0.5], 1e4, 293.15) == pytest.approx(ideal, rel=1e-3)


# --- docstrings of the materials layer ---------------------------------------------------------

MATERIALS = pathlib.Path(__file__).resolve().parents[2] / "hcfplan" / "materials"


def _public_functions() -> list[tuple[str, str, str]]:
    """(module file, name, docstring) of every public module function and public method
    (properties excluded)."""
    found = []
    for path in sorted(MATERIALS.glob("*.py")):
        tree = ast.parse(path.read_text())
        classes = [node for node in tree.body if isinstance(node, ast.ClassDef)]
        members = [("", n) for n in tree.body]
        members += [(f"{k.name}.", n) for k in classes for n in k.body]
        for owner, node in members:
            public = isinstance(node, ast.FunctionDef) and not node.name.startswith("_")
            if public and not any(getattr(d, "id", "") == "property" for d in node.decorator_list):
                found.append((path.name, owner + node.name, ast.get_docstring(node) or ""))
    return found


@pytest.mark.parametrize(
    ("module", "name", "doc"), _public_functions(), ids=lambda v: v if len(v) < 40 else "doc"
)
def test_public_materials_function_has_references(module, name, doc):
    """House rule (common practice, no source): a References section with content."""
    lines = doc.splitlines()
    assert "References" in lines, f"{module}: {name} has no References section"
    start = lines.index("References") + 2  # after the underline
    assert lines[start - 1].startswith("---") and any(x.strip() for x in lines[start:])
