"""Tests of the tube-type anti-resonant fiber model (hcfplan.fibers.antiresonant)."""

import numpy as np
import pytest
from fiber_cases import Vacuum, constant_glass, omega_of
from scipy import optimize

from hcfplan.errors import ConfigError
from hcfplan.fibers import AntiresonantFiber, CapillaryFiber, derived
from hcfplan.fibers.antiresonant import arf_wall_index_zeisberger2017
from hcfplan.fibers.modes import U11
from hcfplan.materials.solids import refractive_index
from hcfplan.numerics.derivatives import derivative

C = 299792458.0


class DiluteGas:
    """Index 1 + 1e-4 with a Kerr coefficient, enough for the interface."""

    n2 = 1e-23

    def refractive_index(self, omega):
        return np.full(np.shape(omega), 1.0001)


GLASS = constant_glass(1.45)


@pytest.mark.parametrize(("m", "window"), [(1, (1.0e-6, 1.1e-6)), (2, (0.5e-6, 0.55e-6))])
def test_loss_peaks_at_arrow_resonances(m, window):
    # analytic: ARROW resonances lambda_m = (2d/m) sqrt(n^2 - 1) (Litchinitser et al., Opt. Lett.
    # 27, 1592 (2002) [from memory]); d = 0.5 um, n = 1.45: 1.0500 um and 0.5250 um. The loss of
    # the model has its maximum there; grid step 0.01-0.02 nm, required within 1 nm
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 1.0, Vacuum(), GLASS)
    lam = np.linspace(*window, 5001)
    peak = lam[np.argmax(fiber.attenuation(omega_of(lam)))]
    expected = 2 * 0.5e-6 / m * np.sqrt(1.45**2 - 1)
    assert peak == pytest.approx(expected, abs=1e-9)
    assert fiber.resonance_wavelengths(2)[m - 1] == pytest.approx(expected, rel=1e-12)


def test_wall_index_of_real_glass_is_the_complex_formula():
    # consistency: real indices take the real-valued forms of the Notes; they give the complex
    # formula's value (a glass index with a zero imaginary part takes the complex one)
    omega = omega_of(np.linspace(0.6e-6, 2.0e-6, 3001))
    n_glass = refractive_index("fused_silica", omega)
    n_gas = np.full(omega.shape, 1.0003)
    real = arf_wall_index_zeisberger2017(omega, 25e-6, 0.7e-6, n_glass, n_gas)
    complex_form = arf_wall_index_zeisberger2017(omega, 25e-6, 0.7e-6, n_glass + 0j, n_gas)
    assert real.dtype == complex and np.all(real.imag > 0)
    np.testing.assert_allclose(real, complex_form, rtol=1e-14, atol=0)


@pytest.mark.filterwarnings("ignore::hcfplan.errors.ValidityWarning")  # orders below 210 nm
def test_resonances_do_not_depend_on_how_many_are_asked_and_are_kept(monkeypatch):
    # contract: lambda_m is the same whatever m_max; an equal fiber reuses the solved orders
    # (no index evaluated again); the caller gets a copy
    from hcfplan.fibers import antiresonant

    gas = DiluteGas()
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 1.0, gas)
    eight = fiber.resonance_wavelengths(8)
    antiresonant._KNOWN_RESONANCES.clear()
    three = fiber.resonance_wavelengths(3)
    np.testing.assert_array_equal(three, eight[:3])
    calls = []
    real = antiresonant.solid_index
    monkeypatch.setattr(antiresonant, "solid_index", lambda *a: calls.append(1) or real(*a))
    equal = AntiresonantFiber(15e-6, 0.5e-6, 1.0, gas)
    kept = equal.resonance_wavelengths(2)
    np.testing.assert_array_equal(kept, eight[:2])
    assert calls == []
    kept[0] = 0.0
    assert equal.resonance_wavelengths(2)[0] == eight[0]
    equal.resonance_wavelengths(9)  # more orders than kept: solved again
    assert calls


def test_self_consistent_resonance_with_malitson_silica():
    # analytic: independent root of lambda = 2 d sqrt(n(lambda)^2 - 1) with the Malitson 1965 fit
    # (d = 0.5 um, empty fiber); about 1.0497 um, a few nm below the fixed-index 1.0500 um
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 1.0, Vacuum())

    def mismatch(lam):
        return lam - 1e-6 * np.sqrt(refractive_index("fused_silica", omega_of(lam)) ** 2 - 1)

    root = optimize.brentq(mismatch, 0.9e-6, 1.2e-6, xtol=1e-16)
    lam1 = fiber.resonance_wavelengths(3)[0]
    assert lam1 == pytest.approx(root, rel=1e-10)
    assert lam1 == pytest.approx(1.0497e-6, abs=5e-11)
    lam_grid = np.linspace(1.03e-6, 1.07e-6, 4001)
    peak = lam_grid[np.argmax(fiber.attenuation(omega_of(lam_grid)))]
    assert peak == pytest.approx(root, abs=1e-9)


def test_thick_absorbing_wall_gives_marcatili():
    # analytic limit: for a thick lossy wall cot(phi) -> -i and the wall term becomes Marcatili's
    # i u^2/(k^3 a^3) (eps+1)/(2 sqrt(eps-1)) (E. A. J. Marcatili, R. A. Schmeltzer, Bell Syst.
    # Tech. J. 43, 1783 (1964)); the thickness is chosen so that exp(-2 Im phi) ~ 1e-30
    w, a = omega_of(800e-9), 50e-6
    n_glass = 1.45 + 1e-3j
    delta = arf_wall_index_zeisberger2017(w, a, 1e-2, n_glass, 1.0)
    eps = n_glass**2
    marcatili = 1j * U11**2 / ((w / C) ** 3 * a**3) * (eps + 1) / (2 * np.sqrt(eps - 1))
    assert delta == pytest.approx(marcatili, rel=1e-6)


def test_loss_formula_closed_form():
    # analytic: Im n = j01^3/(k^4 n_g^3 R^4) (1 + cot^2 phi)(eps^2+1)/(2(eps-1)) evaluated directly
    r, d, lam, n_g = 20e-6, 0.6e-6, 900e-9, 1.0001
    fiber = AntiresonantFiber(r, d, 1.0, DiluteGas(), GLASS)
    k = 2 * np.pi / lam
    eps = 1.45**2 / n_g**2
    phi = k * d * np.sqrt(1.45**2 - n_g**2)
    im_n = U11**3 / (k**4 * n_g**3 * r**4) * (1 + 1 / np.tan(phi) ** 2)
    im_n *= (eps**2 + 1) / (2 * (eps - 1))
    assert fiber.attenuation(omega_of(lam)) == pytest.approx(k * im_n, rel=1e-12)


@pytest.mark.parametrize("core_radius", [10e-6, 20e-6, 40e-6])
def test_dispersion_approaches_capillary_away_from_resonance(core_radius):
    # analytic: at the window centre (phi = 3 pi/2, so cot = cot'' = 0; fixed indices, empty
    # fiber) the Re wall term g(w) cot(phi(w)) of Zeisberger & Schmidt, Sci. Rep. 7, 11761 (2017),
    # with g = -j01^2 c^2 F/(w^2 R^3), F = (eps+1)/(2 sqrt(eps-1)), phi ~ w, adds exactly
    # d^2/dw^2 (g cot phi) = 4 g phi / w^2 to the capillary beta2. Relative to the waveguide beta2
    # this is 4 F phi/(k0 R) to leading order: it vanishes as 1/R, the qualitative statement of
    # Bache et al., JOSA B 36, 69 (2019) that the capillary model describes the dispersion away
    # from resonances.
    d, n = 0.5e-6, 1.45
    lam_c = 2 * d * np.sqrt(n**2 - 1) / 1.5
    w = omega_of(lam_c)
    arf = AntiresonantFiber(core_radius, d, 1.0, Vacuum(), GLASS)
    cap = CapillaryFiber(core_radius, 1.0, Vacuum(), GLASS)
    b2_arf = derived.group_velocity_dispersion(arf, w)
    b2_cap = derived.group_velocity_dispersion(cap, w)
    f = (n**2 + 1) / (2 * np.sqrt(n**2 - 1))
    phi = 1.5 * np.pi
    g = -(U11**2) * C**2 * f / (w**2 * core_radius**3)
    # tolerance: derivative accuracy (~1e-8 of beta2) on a 3-30 % difference
    assert b2_arf - b2_cap == pytest.approx(4 * g * phi / w**2, rel=1e-6)
    k0r = w / C * core_radius
    leading = 4 * f * phi / k0r
    # next order is (u/(k0 R))^2 relative (the square-root form of the capillary beta)
    assert (b2_arf - b2_cap) / b2_cap == pytest.approx(leading, rel=2 * (U11 / k0r) ** 2)
    # and at the centre the phase index itself equals the capillary one (cot phi = 0)
    assert arf.propagation_constant(w) == pytest.approx(cap.propagation_constant(w), rel=1e-14)


@pytest.mark.parametrize("fraction", [0.95, 0.99])
def test_beta2_near_resonance_converged(fraction):
    # convergence: just below lambda_1 the adaptive derivative agrees with narrow fixed-width ones
    # (half-widths 1e-3 and 3e-4 of omega, which agree with each other to 1e-7), and beta2 is
    # strongly anomalous there (the wall term -cot(phi) pushes the index down on that side)
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 1.0, Vacuum(), GLASS)
    w = omega_of(fraction * 2 * 0.5e-6 * np.sqrt(1.45**2 - 1))
    narrow = [derivative(fiber.propagation_constant, w, 2, rel_width=r) for r in (1e-3, 3e-4)]
    assert narrow[0] == pytest.approx(narrow[1], rel=1e-6)
    assert derived.group_velocity_dispersion(fiber, w) == pytest.approx(narrow[0], rel=1e-6)
    cap = CapillaryFiber(15e-6, 1.0, Vacuum(), GLASS)
    assert narrow[0] < 10 * derived.group_velocity_dispersion(cap, w) < 0


def test_resonance_band():
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 1.0, Vacuum(), GLASS)
    lam1 = 2 * 0.5e-6 * np.sqrt(1.45**2 - 1)
    lam = np.array([lam1, 1.01 * lam1, 1.04 * lam1, lam1 / 1.5, lam1 / 2])
    assert fiber.in_resonance_band(omega_of(lam), 0.05).tolist() == [True, True, False, False, True]


def test_areas_and_describe():
    fiber = AntiresonantFiber(15e-6, 0.5e-6, 2.0, DiluteGas(), GLASS)
    w = omega_of(np.array([700e-9]))
    # analytic: gamma = n2 w / (c A_eff), A_eff = 1.4972 R^2 (J0 mode of radius R)
    assert fiber.effective_area(w)[0] / 15e-6**2 == pytest.approx(1.4972, abs=5e-5)
    assert fiber.nonlinear_coefficient(w)[0] == pytest.approx(
        1e-23 * w[0] / (C * fiber.effective_area(w)[0]), rel=1e-14
    )
    info = fiber.describe()
    assert info["model"] == "antiresonant" and info["wall_thickness"] == 0.5e-6


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"wall_thickness": 0.0}, "wall_thickness = 0.0"),
        ({"wall_thickness": 20e-6}, "wall_thickness = 2e-05"),
        ({"core_radius": -1.0}, "core_radius = -1.0"),
        ({"cladding": "bk7"}, "'bk7'"),
    ],
)
def test_bad_inputs(kwargs, match):
    args = {"core_radius": 15e-6, "wall_thickness": 0.5e-6, "length": 1.0, "gas": Vacuum()} | kwargs
    with pytest.raises(ConfigError, match=match):
        AntiresonantFiber(**args)
    with pytest.raises(ConfigError, match="m_max = 0"):
        AntiresonantFiber(15e-6, 0.5e-6, 1.0, Vacuum()).resonance_wavelengths(0)
