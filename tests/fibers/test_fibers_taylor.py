"""Tests of the Taylor-coefficient waveguide (hcfplan.fibers.taylor)."""

import dataclasses
import math

import numpy as np
import pytest

from hcfplan.errors import ConfigError
from hcfplan.fibers import TaylorFiber, derived

C = 299792458.0
OMEGA0 = 2 * np.pi * C / 835e-9
# Taylor coefficients of the supercontinuum benchmark of J. M. Dudley, G. Genty, S. Coen,
# Rev. Mod. Phys. 78, 1135 (2006) [from memory], ps^n/km -> s^n/m; used here only as input data
BETAS_PS_KM = (-11.830, 8.1038e-2, -9.5205e-5, 2.0737e-7, -5.3943e-10)
BETAS = tuple(b * 1e-12 ** (n + 2) / 1e3 for n, b in enumerate(BETAS_PS_KM))


def test_dispersion_coefficients_reproduce_betas():
    # analytic: the series differentiated back at omega0 gives beta0 = beta1 = 0 and the betas
    fiber = TaylorFiber(OMEGA0, BETAS, gamma=0.11, length=0.15)
    coeffs = derived.dispersion_coefficients(fiber, OMEGA0, order=6)
    # beta0 and beta1 vanish up to rounding; natural scales beta2 w0^2 [rad/m], |beta2| w0 [s/m]
    assert abs(coeffs[0]) < 1e-10 * abs(BETAS[0]) * OMEGA0**2
    assert abs(coeffs[1]) < 1e-10 * abs(BETAS[0]) * OMEGA0
    # tolerances: 1e-7 (beta2) and 1e-5 (beta3..) relative, the derivative accuracy required
    np.testing.assert_allclose(coeffs[2], BETAS[0], rtol=1e-7)
    np.testing.assert_allclose(coeffs[3:], BETAS[1:], rtol=1e-5)


def test_series_value():
    # analytic: two-term series at a chosen detuning
    fiber = TaylorFiber(2e15, (2e-26, 3e-41), gamma=0.0, length=1.0)
    dw = 1e13
    expected = 2e-26 * dw**2 / 2 + 3e-41 * dw**3 / 6
    beta = fiber.propagation_constant(np.array([2e15 + dw]))[0]
    assert beta == pytest.approx(expected, rel=1e-14)
    assert fiber.propagation_constant(2e15) == 0.0


def test_nonlinearity_loss_and_area():
    fiber = TaylorFiber(OMEGA0, BETAS, gamma=0.11, length=0.15, loss=0.02, mode_area=2e-12)
    w = OMEGA0 * np.array([0.8, 1.0, 1.3])
    np.testing.assert_array_equal(fiber.nonlinear_coefficient(w), 0.11)  # constant, no w/w0
    np.testing.assert_array_equal(fiber.attenuation(w), 0.02)
    np.testing.assert_array_equal(fiber.effective_area(w), 2e-12)
    # analytic: n2 = gamma c A / omega0; power transmission exp(-2 loss L)
    assert fiber.kerr_n2 == pytest.approx(0.11 * C * 2e-12 / OMEGA0, rel=1e-14)
    assert derived.transmission(fiber, OMEGA0) == pytest.approx(math.exp(-2 * 0.02 * 0.15))
    assert fiber.peak_intensity_area == 2e-12


def test_without_area_intensity_quantities_are_nan():
    fiber = TaylorFiber(OMEGA0, [BETAS[0]], gamma=0.11, length=0.15)
    assert fiber.betas == (BETAS[0],)
    assert math.isnan(fiber.kerr_n2) and math.isnan(fiber.peak_intensity_area)
    assert np.isnan(fiber.effective_area(np.array([OMEGA0]))).all()
    assert fiber.self_steepening and fiber.raman_fraction == 0.0
    assert fiber.describe()["model"] == "taylor"
    with pytest.raises(dataclasses.FrozenInstanceError):
        fiber.gamma = 1.0


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"gamma": -1.0}, "gamma = -1.0"),
        ({"omega0": 0.0}, "omega0 = 0.0"),
        ({"length": -2.0}, "length = -2.0"),
        ({"loss": -0.1}, "loss = -0.1"),
        ({"raman_fraction": 1.0}, "raman_fraction = 1.0"),
        ({"raman_tau1": 0.0}, "raman_tau1 = 0.0"),
        ({"mode_area": -1e-12}, "mode_area = -1e-12"),
        ({"betas": (float("nan"),)}, "betas = \\(nan,\\)"),
    ],
)
def test_bad_inputs(kwargs, match):
    args = {"omega0": OMEGA0, "betas": BETAS, "gamma": 0.11, "length": 0.15} | kwargs
    with pytest.raises(ConfigError, match=match):
        TaylorFiber(**args)
