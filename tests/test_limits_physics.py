"""Tests of the ionisation, beam and B-integral limits of hcfplan.limits.beam."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import trapezoid

from hcfplan.constants import eV
from hcfplan.errors import ConfigError
from hcfplan.ionization import tables
from hcfplan.limits import beam as limits
from hcfplan.materials.gases import GasFill, gas_medium, load_gas_table
from hcfplan.planning.reports.limits_gas import lowest_barrier_suppression, weighted_rates

W_CM2 = 1e4  # W/cm^2 -> W/m^2


@pytest.fixture(scope="module")
def argon_rates():
    medium = gas_medium(GasFill((("Ar", 1.0),), 1e5, 293.15))
    return weighted_rates(medium, 800e-9, "ppt")


@pytest.fixture(scope="module")
def argon_onsets(argon_rates):
    return {fwhm: limits.peak_intensity_for_fraction(1e-4, fwhm, "gaussian", argon_rates)
            for fwhm in (30e-15, 100e-15, 300e-15)}


@pytest.mark.parametrize("fwhm", [30e-15, 100e-15, 300e-15])
def test_argon_onset_in_published_range(fwhm, argon_onsets):
    """Published (order of magnitude): Ar ion yields at 0.8-1 um become measurable in the high
    1e13 to ~1e14 W/cm^2 range, S. Augst et al., Phys. Rev. Lett. 63, 2212 (1989) (1 um, 1 ps)
    and S. Larochelle, A. Talebpour, S. L. Chin, J. Phys. B 31, 1201 (1998) (800 nm) [ranges
    from memory]. A 1e-4 fraction must lie between 3e13 and 2e14 W/cm^2."""
    assert 3e13 < argon_onsets[fwhm] / W_CM2 < 2e14


@pytest.mark.parametrize("fwhm", [30e-15, 300e-15])
def test_onset_matches_ionization_module(fwhm, argon_onsets):
    """Invariant: the same crossing as hcfplan.ionization.tables.intensity_for_fraction (its own
    1e-3 table and time grid); our 1 % table moves the intensity by well under 1 %."""
    ip = load_gas_table("Ar").ionization.potential
    reference = tables.intensity_for_fraction(1e-4, fwhm, "gaussian", 800e-9, ip, 1)
    assert argon_onsets[fwhm] == pytest.approx(reference, rel=5e-3)


def test_fraction_at_onset_is_the_limit(argon_rates, argon_onsets):
    """Invariant: the fraction at the returned intensity is the requested one."""
    rho = limits.pulse_ionization_fraction(argon_onsets[100e-15], 100e-15, "gaussian",
                                           argon_rates)
    assert rho == pytest.approx(1e-4, rel=1e-8)


def test_mixture_weighting(argon_rates):
    """Analytic: each component contributes its mole fraction times its pure-gas fraction, so
    Ne0.8Ar0.2 gives 0.2 rho_Ar + 0.8 rho_Ne."""
    mix = gas_medium(GasFill((("Ne", 0.8), ("Ar", 0.2)), 1e5, 293.15))
    neon = gas_medium(GasFill((("Ne", 1.0),), 1e5, 293.15))
    intensity = 8e13 * W_CM2

    def rho(rates):
        return limits.pulse_ionization_fraction(intensity, 50e-15, "gaussian", rates)

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


def test_intensity_out_of_range(argon_rates):
    """The fraction never reaches 1e-4 below 1e11 W/cm^2 (inf); it is above 1e-9 at 1e16."""
    assert math.isinf(limits.peak_intensity_for_fraction(1e-4, 30e-15, "gaussian", argon_rates,
                                                         (1e13, 1e15)))
    assert math.isnan(limits.peak_intensity_for_fraction(1e-9, 30e-15, "gaussian", argon_rates,
                                                         (1e19, 1e20)))
    with pytest.raises(ConfigError, match=r"limit = 2"):
        limits.peak_intensity_for_fraction(2.0, 30e-15, "gaussian", argon_rates)


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
