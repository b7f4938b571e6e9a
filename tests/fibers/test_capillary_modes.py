"""Tests of hcfplan.fibers.capillary_modes (Gaussian launch on EH11...EH1N, the mode models)."""

import numpy as np
import pytest
from scipy import integrate, special

from hcfplan.errors import ConfigError
from hcfplan.fibers import CapillaryFiber, capillary_modes, modes


def _overlap_amplitude(w0: float, a: float, m: int) -> float:
    """Signed overlap of exp(-r^2/w0^2) with J0(u_1m r/a) (core only), both normalised to unit
    power, by adaptive quadrature (independent of the package's Gauss-Legendre nodes)."""
    u = special.jn_zeros(0, m)[-1]
    overlap = integrate.quad(lambda r: np.exp(-(r / w0) ** 2) * special.j0(u * r / a) * r,
                             0, a, limit=200)[0] * 2 * np.pi
    gauss = np.pi * w0**2 / 2  # int exp(-2 r^2/w0^2) dA over the plane (analytic)
    mode = integrate.quad(lambda r: special.j0(u * r / a) ** 2 * r, 0, a, limit=200)[0] \
        * 2 * np.pi
    return overlap / np.sqrt(gauss * mode)


@pytest.mark.parametrize("ratio", [0.3, 0.45, 0.6436, 0.9])
def test_launch_amplitudes_match_overlap_integrals(ratio):
    # analytic: the overlap integrals of the Gaussian with EH11...EH14, computed here by
    # scipy.integrate.quad; amplitudes and signs agree to the quadrature accuracy
    a = 75e-6
    amplitudes = capillary_modes.eh_launch_amplitudes(ratio * a, a, 4)
    expected = [_overlap_amplitude(ratio * a, a, m) for m in range(1, 5)]
    np.testing.assert_allclose(amplitudes, expected, rtol=1e-7, atol=1e-9)
    fractions = amplitudes**2
    assert fractions.sum() <= 1.0  # invariant: orthogonal modes take at most the whole beam
    assert amplitudes[0] > 0


def test_optimum_launch_puts_98_percent_into_eh11():
    # published value: w0 = 0.64 a couples about 98 % into EH11, R. L. Abrams, IEEE J. Quantum
    # Electron. QE-8, 838 (1972) [from memory]; of the rest, exp(-2 a^2/w0^2) = 0.76 % of the
    # power lies outside the core (analytic) and the higher modes take part of what is left
    a = 50e-6
    fractions = capillary_modes.eh_launch_amplitudes(0.64 * a, a, 4) ** 2
    assert fractions[0] == pytest.approx(0.98, abs=0.005)
    assert fractions[0] == pytest.approx(float(modes.gaussian_coupling_efficiency(0.64 * a, a)),
                                         rel=1e-12)
    outside = np.exp(-2 / 0.64**2)
    assert fractions.sum() <= 1.0 - outside
    assert fractions.sum() > 1.0 - outside - 0.005
    assert fractions[1] < 0.01


def test_small_beam_spreads_over_many_modes():
    # analytic: a beam much smaller than the core has a flat-topped angular spectrum; the
    # fractions of the higher modes grow and the sum over 8 modes approaches 1 from below
    a = 100e-6
    fractions = capillary_modes.eh_launch_amplitudes(0.25 * a, a, 8) ** 2
    assert fractions[0] < 0.5 and fractions[1] > 0.1
    assert np.all(np.cumsum(fractions) <= 1.0)


def test_mode_waveguides_are_the_eh1m_of_one_tube():
    class Gas:  # GasLike: unit index, some n2
        n2 = 1e-23

        def refractive_index(self, omega):
            return np.ones_like(np.asarray(omega, dtype=float))

    fiber = CapillaryFiber(core_radius=50e-6, length=0.5, gas=Gas())
    guides = capillary_modes.mode_waveguides(fiber, 3)
    assert [g.mode for g in guides] == [(1, 1), (1, 2), (1, 3)]
    assert all(g.core_radius == fiber.core_radius and g.length == fiber.length for g in guides)
    omega = np.array([2.0e15])
    # Marcatili: higher modes have a smaller phase constant and a larger loss
    betas = [float(g.propagation_constant(omega)[0]) for g in guides]
    losses = [float(g.attenuation(omega)[0]) for g in guides]
    assert betas[0] > betas[1] > betas[2] and losses[0] < losses[1] < losses[2]


@pytest.mark.parametrize("bad", [0, -1, 1.5, True])
def test_mode_count_is_checked(bad):
    with pytest.raises(ConfigError, match=f"n_modes = {bad!r}"):
        capillary_modes.eh_launch_amplitudes(30e-6, 50e-6, bad)
