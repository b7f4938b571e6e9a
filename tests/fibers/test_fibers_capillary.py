"""Tests of the Marcatili-Schmeltzer capillary model (hcfplan.fibers.capillary)."""

import warnings

import numpy as np
import pytest
from fiber_cases import BorzsonyiArgon, Vacuum, constant_glass, omega_of

from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.fibers import CapillaryFiber, derived
from hcfplan.fibers.modes import U11, eh_eigenvalue
from hcfplan.materials.solids import refractive_index

C = 299792458.0


@pytest.mark.parametrize(("wavelength", "a"), [(800e-9, 125e-6), (1030e-9, 50e-6), (2e-6, 250e-6)])
def test_attenuation_is_marcatili_closed_form(wavelength, a):
    # analytic: alpha = (u/2pi)^2 lambda^2/a^3 (nu^2+1)/(2 sqrt(nu^2-1)), nu = n_silica, EH11,
    # Marcatili & Schmeltzer, Bell Syst. Tech. J. 43, 1783 (1964), empty tube
    fiber = CapillaryFiber(a, 1.0, Vacuum())
    nu = refractive_index("fused_silica", omega_of(wavelength))
    wall = (nu**2 + 1) / (2 * np.sqrt(nu**2 - 1))
    expected = (U11 / (2 * np.pi)) ** 2 * wavelength**2 / a**3 * wall
    assert fiber.attenuation(omega_of(wavelength)) == pytest.approx(expected, rel=1e-12)


def test_attenuation_scales_as_lambda2_over_a3():
    # analytic: with a fixed wall index, alpha ~ lambda^2 / a^3
    glass = constant_glass(1.45)
    a1 = CapillaryFiber(100e-6, 1.0, Vacuum(), glass).attenuation(omega_of(1e-6))
    a2 = CapillaryFiber(200e-6, 1.0, Vacuum(), glass).attenuation(omega_of(3e-6))
    assert a2 / a1 == pytest.approx(9.0 / 8.0, rel=1e-12)


def test_field_attenuation_convention():
    # analytic: alpha is the FIELD attenuation, transmission = exp(-2 alpha L). For a = 125 um,
    # 800 nm, 1 m: alpha = 0.0708 /m, so T = 0.868 (a power-loss reading would give 0.932)
    fiber = CapillaryFiber(125e-6, 1.0, Vacuum())
    w = omega_of(800e-9)
    alpha = fiber.attenuation(w)
    assert derived.transmission(fiber, w) == pytest.approx(np.exp(-2 * alpha * fiber.length))
    assert derived.transmission(fiber, w) == pytest.approx(0.868, abs=5e-4)
    assert "exp(-2 alpha z)" in fiber.describe()["attenuation"]


def test_higher_mode_loss_ratio():
    # analytic: alpha_1m / alpha_11 = (u_1m / u_11)^2 at fixed wavelength
    w = omega_of(800e-9)
    eh11 = CapillaryFiber(100e-6, 1.0, Vacuum()).attenuation(w)
    eh12 = CapillaryFiber(100e-6, 1.0, Vacuum(), mode=(1, 2)).attenuation(w)
    assert eh12 / eh11 == pytest.approx((eh_eigenvalue(2) / U11) ** 2, rel=1e-12)


@pytest.mark.parametrize("bend_radius", [2.0, 10.0])
def test_bend_term_ratio(bend_radius):
    # analytic identity of the curvature term written from memory (Marcatili & Schmeltzer 1964):
    # alpha_bend / alpha_straight = (4/3) (2 pi a/(u lambda))^4 (a/R)^2 (1 + 1/u^2)
    a, lam = 125e-6, 800e-9
    w = omega_of(lam)
    straight = CapillaryFiber(a, 1.0, Vacuum()).attenuation(w)
    bent = CapillaryFiber(a, 1.0, Vacuum(), bend_radius=bend_radius).attenuation(w)
    ratio = (4 / 3) * (2 * np.pi * a / (U11 * lam)) ** 4 * (a / bend_radius) ** 2 * (1 + 1 / U11**2)
    assert (bent - straight) / straight == pytest.approx(ratio, rel=1e-12)


def test_beta2_of_empty_tube_is_waveguide_term():
    # analytic: beta = sqrt(w^2/c^2 - K^2), K = u/a, gives beta2 = -K^2/(c^2 beta^3) exactly,
    # -u^2 c/(w^3 a^2) to leading order (anomalous)
    a = 50e-6
    fiber = CapillaryFiber(a, 1.0, Vacuum())
    w = omega_of(np.array([600e-9, 800e-9, 1500e-9]))
    beta = fiber.propagation_constant(w)
    exact = -((U11 / a) ** 2) / (C**2 * beta**3)
    # (rtol: the dispersive part of beta is 4e-5 of beta, rounding limits beta2 to ~1e-8)
    np.testing.assert_allclose(derived.group_velocity_dispersion(fiber, w), exact, rtol=5e-8)
    np.testing.assert_allclose(exact, -(U11**2) * C / (w**3 * a**2), rtol=1e-3)


def test_low_pressure_anomalous_with_zdw():
    # invariant: at 0.1 bar Ar the 50 um bore is anomalous at 800 nm and beta2 changes sign once
    # at shorter wavelength, where beta2 is zero
    fiber = CapillaryFiber(50e-6, 1.0, BorzsonyiArgon(0.1e5))
    assert derived.group_velocity_dispersion(fiber, omega_of(800e-9)) < 0
    zdw = derived.zero_dispersion_wavelengths(fiber, (150e-9, 2e-6))
    assert len(zdw) == 1 and zdw[0] < 800e-9
    beta2_scale = abs(derived.group_velocity_dispersion(fiber, omega_of(800e-9)))
    assert abs(derived.group_velocity_dispersion(fiber, omega_of(zdw[0]))) < 1e-6 * beta2_scale


def test_zdw_moves_red_with_pressure():
    # invariant: more gas adds normal dispersion, so the ZDW moves to longer wavelength
    pressures = [0.5e5, 1e5, 2e5, 4e5]
    zdws = []
    for p in pressures:
        fiber = CapillaryFiber(50e-6, 1.0, BorzsonyiArgon(p))
        (zdw,) = derived.zero_dispersion_wavelengths(fiber, (300e-9, 2e-6))
        zdws.append(zdw)
    assert np.all(np.diff(zdws) > 0)


def test_areas_and_gamma():
    # analytic: gamma = n2 w/(c A_eff); A_eff = 1.4972 a^2; A_I = pi a^2 J1(u11)^2 = 0.8467 a^2
    a = 75e-6
    gas = BorzsonyiArgon(2e5)
    fiber = CapillaryFiber(a, 1.0, gas)
    w = omega_of(np.array([800e-9, 1030e-9]))
    area = fiber.effective_area(w)
    np.testing.assert_allclose(area / a**2, 1.4972, atol=5e-5)
    np.testing.assert_allclose(fiber.nonlinear_coefficient(w), gas.n2 * w / (C * area), rtol=1e-14)
    assert fiber.peak_intensity_area / a**2 == pytest.approx(0.8467, abs=5e-5)
    assert fiber.kerr_n2 == gas.n2


def test_warns_when_wavelength_not_small():
    fiber = CapillaryFiber(5e-6, 1.0, Vacuum(), constant_glass(1.45))
    with pytest.warns(ValidityWarning, match="Marcatili"):
        fiber.attenuation(omega_of(5e-6))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        fiber.attenuation(omega_of(0.8e-6))


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"core_radius": -1e-6}, "core_radius = -1e-06"),
        ({"length": 0.0}, "length = 0.0"),
        ({"mode": (2, 1)}, r"mode = \(2, 1\)"),
        ({"mode": (1, 0)}, "m = 0"),
        ({"bend_radius": -3.0}, "bend_radius = -3.0"),
        ({"cladding": "quartz"}, "'quartz'"),
        ({"gas": object()}, "gas = <object"),
    ],
)
def test_bad_inputs(kwargs, match):
    args = {"core_radius": 50e-6, "length": 1.0, "gas": Vacuum()} | kwargs
    with pytest.raises(ConfigError, match=match):
        CapillaryFiber(**args)
