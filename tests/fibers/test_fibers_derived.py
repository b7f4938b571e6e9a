"""Tests of hcfplan.fibers.derived (pulse scales and quantities derived from a Waveguide)."""


import numpy as np
import pytest
from fiber_cases import BorzsonyiArgon, omega_of

from hcfplan.errors import ConfigError
from hcfplan.fibers import CapillaryFiber, TaylorFiber, derived

C = 299792458.0


# Benchmark of J. M. Dudley, G. Genty, S. Coen, Rev. Mod. Phys. 78, 1135 (2006) [from memory]:
# sech 50 fs FWHM, P0 = 10 kW, gamma = 0.11 /W/m, beta2 = -11.830 ps^2/km.
T0 = 50e-15 / (2 * np.log(1 + np.sqrt(2)))
BETA2 = -11.830e-27
GAMMA, P0 = 0.11, 1e4


def test_dudley_benchmark_scales():
    # analytic from the inputs above: T0 = 28.36 fs, L_D = 6.801 cm, L_NL = 0.909 mm, N = 8.65,
    # L_fiss = L_D/N = 7.86 mm (our evaluation, digits as printed)
    assert derived.t0_from_fwhm(50e-15, "sech2") == pytest.approx(28.36e-15, abs=0.005e-15)
    ld = derived.dispersion_length(T0, BETA2)
    lnl = derived.nonlinear_length(GAMMA, P0)
    assert ld == pytest.approx(6.801e-2, abs=5e-6)
    assert lnl == pytest.approx(0.909e-3, abs=5e-7)
    assert derived.soliton_order(T0, BETA2, GAMMA, P0) == pytest.approx(8.65, abs=0.005)
    assert derived.fission_length(T0, BETA2, GAMMA, P0) == pytest.approx(7.86e-3, abs=5e-6)


@pytest.mark.parametrize(
    ("t0", "beta2", "gamma", "p0"), [(20e-15, -3e-28, 1e-4, 5e9), (1e-13, 2e-26, 2e-3, 1e6)]
)
def test_soliton_identities(t0, beta2, gamma, p0):
    # invariant: N^2 = L_D / L_NL and L_fiss = L_D / N
    n = derived.soliton_order(t0, beta2, gamma, p0)
    ld = derived.dispersion_length(t0, beta2)
    assert n**2 == pytest.approx(ld / derived.nonlinear_length(gamma, p0), rel=1e-14)
    assert derived.fission_length(t0, beta2, gamma, p0) == pytest.approx(ld / n, rel=1e-14)


def test_t0_of_gaussian():
    # analytic: FWHM = 2 sqrt(ln 2) T0 = 1.6651 T0
    assert derived.t0_from_fwhm(1.6651e-15, "gaussian") == pytest.approx(1e-15, rel=5e-5)
    with pytest.raises(ConfigError, match="'square'"):
        derived.t0_from_fwhm(1e-15, "square")


def test_spm_factor():
    # analytic: factor 1 without SPM; sqrt(1 + 4/(3 sqrt 3) phi^2) (Pinault & Potasek, JOSA B 2,
    # 1318 (1985) [from memory]) -> slope 0.8774 at large phi
    assert derived.spm_broadening_factor(0.0) == 1.0
    assert derived.spm_broadening_factor(1e4) / 1e4 == pytest.approx(np.sqrt(4 / (3 * np.sqrt(3))))
    assert np.sqrt(4 / (3 * np.sqrt(3))) == pytest.approx(0.8774, abs=5e-5)


def test_effective_length_limits():
    # analytic: L_eff = L without loss, (1 - e^{-2 a L})/(2 a), -> 1/(2 a) for a long fiber
    assert derived.effective_length(3.0, 0.0) == 3.0
    assert derived.effective_length(1.0, 0.1) == pytest.approx((1 - np.exp(-0.2)) / 0.2, rel=1e-14)
    assert derived.effective_length(1e3, 0.5) == pytest.approx(1.0, rel=1e-12)
    np.testing.assert_allclose(derived.effective_length(2.0, np.array([0.0, 1e-12])), 2.0)
    assert derived.nonlinear_phase(2e-4, 1e9, 0.5) == pytest.approx(1e5)


def test_zdw_of_taylor_fiber():
    # analytic: beta2(w) = beta2 + beta3 (w - w0) vanishes at w = w0 - beta2/beta3
    w0 = omega_of(800e-9)
    fiber = TaylorFiber(w0, (-2e-27, 4e-41), gamma=0.0, length=1.0)
    expected = 2 * np.pi * C / (w0 + 2e-27 / 4e-41)
    (zdw,) = derived.zero_dispersion_wavelengths(fiber, (500e-9, 1500e-9))
    assert zdw == pytest.approx(expected, rel=1e-9)
    assert derived.group_velocity_dispersion(fiber, w0) == pytest.approx(-2e-27, rel=1e-7)
    assert derived.zero_dispersion_wavelengths(fiber, (1000e-9, 1500e-9)) == []
    with pytest.raises(ConfigError, match="wavelength_range"):
        derived.zero_dispersion_wavelengths(fiber, (1e-6, 0.5e-6))


def test_zero_dispersion_pressure():
    # invariant: beta2 = 0 at the returned pressure, anomalous below, normal above;
    # analytic estimate: p = -beta2_wg / (beta2_gas per Pa), exact to the small cross term
    w = omega_of(800e-9)

    def fiber_at(p):
        return CapillaryFiber(75e-6, 1.0, BorzsonyiArgon(p))

    p_zd = derived.zero_dispersion_pressure(fiber_at, w, (1e3, 20e5))
    assert derived.group_velocity_dispersion(fiber_at(0.9 * p_zd), w) < 0
    assert derived.group_velocity_dispersion(fiber_at(1.1 * p_zd), w) > 0
    b2_wg = derived.group_velocity_dispersion(fiber_at(0.0), w)
    b2_gas = derived.group_velocity_dispersion(fiber_at(1e5), w) - b2_wg
    assert p_zd == pytest.approx(-b2_wg / b2_gas * 1e5, rel=1e-3)
    assert np.isnan(derived.zero_dispersion_pressure(fiber_at, w, (1e3, 2e3)))


def test_dispersion_coefficients_order_checked():
    fiber = TaylorFiber(2e15, (1e-27,), gamma=0.0, length=1.0)
    with pytest.raises(ConfigError, match="order = 9"):
        derived.dispersion_coefficients(fiber, 2e15, order=9)


def test_zdws_refined_together_equal_brent_one_by_one():
    # reference library: scipy.optimize.brentq (Brent's method, R. P. Brent, Algorithms for
    # Minimization without Derivatives, 1973, ch. 4) on each sign change of the same 400
    # samples, against the brackets refined together by Chandrupatla's method (T. R.
    # Chandrupatla, Adv. Eng. Softw. 28, 145 (1997) [from memory]), for an anti-resonant fiber
    # with many zeros: the same wavelengths within their tolerance
    from scipy.optimize import brentq

    from hcfplan.fibers import AntiresonantFiber
    from hcfplan.materials.gases import GasFill, gas_medium

    gas = gas_medium(GasFill((("Ar", 1.0),), 3e5, 293.15))
    fiber = AntiresonantFiber(17.5e-6, 0.7e-6, 0.8, gas)
    with pytest.warns(Warning):  # the gas fits are extrapolated beyond 2 um
        together = derived.zero_dispersion_wavelengths(fiber, (300e-9, 3000e-9))
        wavelength = np.geomspace(300e-9, 3000e-9, derived.ZDW_SEARCH_POINTS)
        beta2 = derived.group_velocity_dispersion(fiber, 2 * np.pi * C / wavelength)
        where = np.flatnonzero(np.sign(beta2[:-1]) * np.sign(beta2[1:]) < 0)
        one_by_one = [brentq(lambda lam: float(derived.group_velocity_dispersion(
            fiber, 2 * np.pi * C / lam)), wavelength[i], wavelength[i + 1],
            xtol=derived.ZDW_XTOL) for i in where]
    assert len(together) == len(one_by_one) >= 4
    np.testing.assert_allclose(together, one_by_one, rtol=0, atol=3 * derived.ZDW_XTOL)
    assert list(together) == sorted(together)


def test_zdw_brackets_left_open_are_refined_alone(monkeypatch):
    # contract: a bracket the joint search does not close is refined by Brent's method alone,
    # to the same wavelength within the tolerance (here every bracket is declared open)
    from hcfplan.fibers import AntiresonantFiber
    from hcfplan.materials.gases import GasFill, gas_medium

    gas = gas_medium(GasFill((("Ar", 1.0),), 3e5, 293.15))
    fiber = AntiresonantFiber(17.5e-6, 0.7e-6, 0.8, gas)
    together = derived.zero_dispersion_wavelengths(fiber, (300e-9, 1500e-9))
    joint = derived.roots_bracketed

    def none_closed(*args, **kwargs):
        roots, ok = joint(*args, **kwargs)
        return np.full_like(roots, np.nan), np.zeros_like(ok)

    monkeypatch.setattr(derived, "roots_bracketed", none_closed)
    alone = derived.zero_dispersion_wavelengths(fiber, (300e-9, 1500e-9))
    assert len(alone) == len(together) >= 2
    np.testing.assert_allclose(alone, together, rtol=0, atol=3 * derived.ZDW_XTOL)
