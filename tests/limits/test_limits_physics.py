"""Tests of the beam, fluence and B-integral limits of hcfplan.limits.beam, and of the ionisation
limit as the planning computes it (hcfplan.ionization.fraction with the weighted rate tables of
hcfplan.planning.reports.limits_gas)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import trapezoid

from hcfplan.constants import eV
from hcfplan.ionization import fraction, tables
from hcfplan.limits import beam as limits
from hcfplan.materials.gases import GasFill, gas_medium, load_gas_table
from hcfplan.planning.reports.limits_gas import lowest_barrier_suppression, weighted_rates

W_CM2 = 1e4  # W/cm^2 -> W/m^2


@pytest.fixture(scope="module")
def argon_rates():
    medium = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    return weighted_rates(medium, 800e-9, "ppt")


@pytest.mark.parametrize("fwhm", [30e-15, 300e-15])
def test_planning_rate_tables_give_the_fine_onset(fwhm, argon_rates):
    """Invariant: the onset with the planning's rate tables (weighted_rates, table accuracy
    RATE_TABLE_RTOL) is within 0.5 % of the onset with a PPT table to 1e-3, both through the
    one solver hcfplan.ionization.fraction.peak_intensity_for_fraction; the published range of
    that onset is checked in tests/ionization/test_ionization.py."""
    ip = load_gas_table("Ar").ionization.potential
    fine = [(1.0, tables.tabulate_rate("ppt", 800e-9, ip, 1, 0, 1, 1e16, 1e20, rtol=1e-3))]
    onset = fraction.peak_intensity_for_fraction(1e-4, fwhm, "gaussian", argon_rates)
    reference = fraction.peak_intensity_for_fraction(1e-4, fwhm, "gaussian", fine)
    assert onset == pytest.approx(reference, rel=5e-3)
    assert fraction.pulse_ionization_fraction(onset, fwhm, "gaussian", argon_rates) == (
        pytest.approx(1e-4, rel=1e-8))


def test_mixture_weighting(argon_rates):
    """Analytic: each component contributes its mole fraction times its pure-gas fraction, so
    Ne0.8Ar0.2 gives 0.2 rho_Ar + 0.8 rho_Ne."""
    mix = gas_medium(GasFill((("Ne", 0.8), ("Ar", 0.2)), 1e5, 293.15))
    neon = gas_medium(GasFill((("Ne", 1.0),), 1e5, 293.15))
    intensity = 8e13 * W_CM2

    def rho(rates):
        return fraction.pulse_ionization_fraction(intensity, 50e-15, "gaussian", rates)

    expected = 0.2 * rho(argon_rates) + 0.8 * rho(weighted_rates(neon, 800e-9, "ppt"))
    assert rho(weighted_rates(mix, 800e-9, "ppt")) == pytest.approx(expected, rel=1e-12)


def test_air_weighted_by_oxygen_fraction():
    """Analytic: the air table ionises through its O2 record, weighted by mole_fraction."""
    air = gas_medium(GasFill((("air", 1.0),), 1e5, 293.15))
    (weight, _), = weighted_rates(air, 800e-9, "ppt")
    assert weight == pytest.approx(0.2095, abs=1e-12)


def test_argon_barrier_suppression():
    """Published: BSI of Ar ~2.5e14 W/cm^2 (Augst et al., Phys. Rev. Lett. 63, 2212 (1989));
    the formula gives 2.47e14 (Ip = 15.76 eV), checked to the 2 printed digits. A Ne/Ar mixture
    is limited by its lower-Ip component."""
    ar = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    mix = gas_medium(GasFill((("Ne", 0.8), ("Ar", 0.2)), 1e5, 293.15))
    assert lowest_barrier_suppression(ar) / W_CM2 == pytest.approx(2.5e14, rel=0.02)
    assert lowest_barrier_suppression(mix) == lowest_barrier_suppression(ar)
    assert load_gas_table("Ar").ionization.potential / eV == pytest.approx(15.76, abs=0.01)


def test_energy_from_peak_intensity_inverts():
    """Analytic: E -> P = 0.9394 E / tau (Gaussian) -> I = eta P / A_I gives back I."""
    area, tau, eta = 2e-8, 40e-15, 0.95
    energy = limits.energy_from_peak_intensity(1e18, area, tau, "gaussian", eta)
    peak = 2 * math.sqrt(math.log(2) / math.pi) * energy * eta / tau
    assert peak / area == pytest.approx(1e18, rel=1e-12)


# ----------------------------------------------------------------------------- beams, B-integral
def test_beam_radius_at_rayleigh_range():
    """Analytic: w(z_R) = sqrt(2) w0 with z_R = pi w0^2 / lambda (Siegman, Lasers, ch. 17)."""
    w0, lam = 80e-6, 800e-9
    z_r = math.pi * w0**2 / lam
    assert limits.gaussian_beam_radius(w0, lam, z_r) == pytest.approx(math.sqrt(2) * w0,
                                                                      rel=1e-14)


def test_fluence_integrates_to_energy():
    """Analytic: int F(r) 2 pi r dr = E, and F(w) = F(0) / e^2."""
    energy, w = 1e-3, 80e-6
    r = np.linspace(0, 6 * w, 20001)
    total = trapezoid(limits.gaussian_fluence(energy, w, r) * 2 * np.pi * r, r)
    assert total == pytest.approx(energy, rel=1e-7)
    assert limits.gaussian_fluence(energy, w, w) == pytest.approx(
        limits.gaussian_fluence(energy, w) / math.e**2, rel=1e-14)
    assert limits.gaussian_peak_intensity(1e9, w) * 1e-13 == pytest.approx(
        limits.gaussian_fluence(1e9 * 1e-13, w), rel=1e-14)


def test_b_integral_formula():
    """Analytic: B = (2 pi / lambda) n2 I L for 1 mm fused silica (n2 2.19e-20 m^2/W,
    Kabacinski et al., Opt. Express 27, 11018 (2019)) at 1e15 W/m^2, 1030 nm: 0.1336 rad."""
    b = limits.b_integral(1e15, 2.19e-20, 1e-3, 1030e-9)
    assert b == pytest.approx(2 * math.pi / 1030e-9 * 2.19e-20 * 1e15 * 1e-3, rel=1e-14)
    assert b == pytest.approx(0.1336, abs=5e-5)
