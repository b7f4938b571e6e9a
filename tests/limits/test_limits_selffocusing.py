"""Tests of the self-focusing critical power (hcfplan.limits.beam)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.limits.beam import (
    SELF_FOCUSING_MODELS,
    max_energy_for_self_focusing,
    max_pressure_for_self_focusing,
    self_focusing_distance_marburger1975,
    self_focusing_margin,
    self_focusing_power,
)
from hcfplan.materials.gas_density import number_density
from hcfplan.materials.gases import (
    GasFill,
    gas_medium,
    kerr_coefficient,
    load_gas_table,
    refractive_index,
)
from hcfplan.pulse.fields import peak_power_from_energy

OMEGA_800 = 2 * math.pi * c / 800e-9


def _argon_n2(pressure: float, eos: str = "coolprop") -> float:
    table = load_gas_table("Ar")
    return kerr_coefficient(table, number_density(table, pressure, 293.15, eos), eos)


def test_argon_1_bar_800nm_is_about_10_gw():
    """Published value: order of magnitude for Ar at 1 bar, 800 nm.

    n2 = 9.7e-24 m^2/W at 1 atm (Wahlstrand, Cheng, Milchberg, Phys. Rev. A 85, 043820 (2012)),
    scaled to 1 bar; P_cr ~ 10 GW is the commonly quoted figure (common practice, no source),
    checked here as 5-20 GW.
    """
    table = load_gas_table("Ar")
    n0 = float(refractive_index(table, OMEGA_800, number_density(table, 1e5, 293.15)))
    power = self_focusing_power(800e-9, n0, _argon_n2(1e5))
    assert 5e9 < power < 20e9
    # Exact: Fibich & Gaeta's formula with n2 scaled from 1 atm (101325 Pa) to 1 bar.
    table_ratio = number_density(table, 1e5, 293.15) / number_density(table, 101325.0, 293.15)
    expected = 1.8962 * 800e-9**2 / (4 * math.pi * n0 * 9.7e-24 * table_ratio)
    assert power == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    ("model", "constant"),
    # Fibich & Gaeta, Opt. Lett. 25, 335 (2000): P_cr = 1.8962 l^2/(4 pi n0 n2);
    # Marburger, Prog. Quantum Electron. 4, 35 (1975): P_cr = 3.77 l^2/(8 pi n0 n2).
    [("fibich2000", 1.8962 / (4 * math.pi)), ("marburger1975", 3.77 / (8 * math.pi))],
)
def test_formula(model, constant):
    """Analytic: the printed formulas, written again here."""
    wavelength, n0, n2 = 1030e-9, 1.00028, 9.7e-24
    expected = constant * wavelength**2 / (n0 * n2)
    assert self_focusing_power(wavelength, n0, n2, model) == pytest.approx(expected, rel=1e-14)


def test_constants_differ_by_0p6_percent():
    """Published values: the Townes value is 0.6 % above Marburger's (both papers above)."""
    ratio = self_focusing_power(800e-9, 1, 1e-23) / self_focusing_power(
        800e-9, 1, 1e-23, "marburger1975"
    )
    assert ratio == pytest.approx(1.006, abs=5e-4)


@pytest.mark.parametrize("pressure", [0.5e5, 2e5, 10e5])
def test_inverse_with_pressure(pressure):
    """Analytic: with an ideal-gas density n2 is proportional to p, so P_cr goes as 1/p."""
    reference = self_focusing_power(800e-9, 1.0, _argon_n2(1e5, "ideal"))
    power = self_focusing_power(800e-9, 1.0, _argon_n2(pressure, "ideal"))
    assert power * pressure == pytest.approx(reference * 1e5, rel=1e-12)


def test_vectorised_and_zero_n2():
    powers = self_focusing_power(np.array([400e-9, 800e-9]), 1.0, np.array([1e-23, 0.0]))
    assert powers[0] > 0 and math.isinf(powers[1])


@pytest.mark.parametrize(
    ("args", "message"),
    [
        ((-800e-9, 1.0, 1e-23), r"wavelength = -8e-07 m"),
        ((800e-9, 0.5, 1e-23), r"n0 = 0\.5"),
        ((800e-9, 1.0, -1e-23), r"n2 = -1e-23 m\^2/W"),
    ],
)
def test_bad_input(args, message):
    with pytest.raises(ConfigError, match=message):
        self_focusing_power(*args)


def test_unknown_model_lists_registry():
    with pytest.raises(ConfigError, match=r"'townes'.*" + ", ".join(SELF_FOCUSING_MODELS)):
        self_focusing_power(800e-9, 1.0, 1e-23, "townes")


# ----------------------------------------------------------------------------- margins and maxima


def _argon_critical_power(pressure: float) -> float:
    medium = gas_medium(GasFill((("Ar", 1.0),), pressure, 293.15))
    n0 = float(medium.refractive_index(np.array([OMEGA_800]))[0])
    return self_focusing_power(800e-9, n0, medium.n2)


@pytest.mark.parametrize("pressure", [1e5, 10e5, 50e5, 150e5])
def test_critical_power_inverse_to_real_gas_density(pressure):
    """Analytic: n2 is proportional to the real-gas number density N (CoolProp), so
    P_cr n0 N is the same at every pressure, also where N departs from p/(k_B T)."""
    table = load_gas_table("Ar")
    medium = gas_medium(GasFill((("Ar", 1.0),), pressure, 293.15))
    n0 = float(medium.refractive_index(np.array([OMEGA_800]))[0])
    invariant = self_focusing_power(800e-9, n0, medium.n2) * n0 * medium.number_density
    medium_1 = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    n0_1 = float(medium_1.refractive_index(np.array([OMEGA_800]))[0])
    reference = self_focusing_power(800e-9, n0_1, medium_1.n2) * n0_1 * medium_1.number_density
    assert invariant == pytest.approx(reference, rel=1e-12)
    if pressure >= 50e5:  # where the real gas departs from p/(k_B T) by more than 1 %
        ideal = number_density(table, pressure, 293.15, "ideal")
        assert abs(medium.number_density / ideal - 1) > 0.01


@pytest.mark.parametrize("margin", [1.0, 2.0, 5.0])
def test_max_pressure_gives_requested_margin(margin):
    """Invariant: at the returned pressure P_cr(p) / P equals the requested margin."""
    peak = 2e9
    p_max = max_pressure_for_self_focusing(peak, _argon_critical_power, margin=margin,
                                           pressure_range=(1e3, 1e7))
    assert self_focusing_margin(_argon_critical_power(p_max), peak) == pytest.approx(
        margin, rel=1e-9)


def test_max_pressure_out_of_range():
    """Analytic: tiny power never reaches the limit (inf); huge power already beyond (nan)."""
    assert math.isinf(max_pressure_for_self_focusing(1.0, _argon_critical_power,
                                                     pressure_range=(1e3, 1e6)))
    assert math.isnan(max_pressure_for_self_focusing(1e15, _argon_critical_power,
                                                     pressure_range=(1e3, 1e6)))


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
def test_max_energy_gives_requested_margin(shape):
    """Invariant: the coupled peak power of the returned energy is P_cr / margin."""
    critical, margin, efficiency = 1.2e10, 2.0, 0.9
    energy = max_energy_for_self_focusing(critical, 30e-15, shape, margin=margin,
                                          coupling_efficiency=efficiency)
    peak = peak_power_from_energy(energy * efficiency, 30e-15, shape)
    assert peak == pytest.approx(critical / margin, rel=1e-12)


def test_margin_rejects_below_one():
    with pytest.raises(ConfigError, match=r"margin = 0\.5"):
        max_energy_for_self_focusing(1e10, 30e-15, "gaussian", margin=0.5)


def test_marburger_distance():
    """Analytic: the printed fit 0.367 k w^2 / sqrt((sqrt(P/Pcr) - 0.852)^2 - 0.0219) for a
    collimated beam (Marburger 1975, from memory), no collapse at P <= P_cr, and a converging
    wavefront shortens the distance as 1/z' = 1/z + 1/R."""
    n0, n2, w, lam = 1.0003, 1e-23, 1e-3, 800e-9
    p_cr = 3.77 * lam**2 / (8 * math.pi * n0 * n2)
    assert math.isinf(self_focusing_distance_marburger1975(0.99 * p_cr, lam, n0, n2, w))
    z = self_focusing_distance_marburger1975(4 * p_cr, lam, n0, n2, w)
    k = 2 * math.pi * n0 / lam
    assert z == pytest.approx(0.367 * k * w**2 / math.sqrt((2 - 0.852) ** 2 - 0.0219), rel=1e-12)
    focused = self_focusing_distance_marburger1975(4 * p_cr, lam, n0, n2, w, wavefront_radius=z)
    assert focused == pytest.approx(z / 2, rel=1e-12)
