"""Delayed responses of hcfplan.propagation.raman.

Kinds (plus error tests: bad times and temperatures are ConfigErrors naming the parameter):
* analytic: unit area of the Blow & Wood response (IEEE J. Quantum Electron. 25, 2665, 1989);
  the cos^2 matrix-element sum S_J checked against direct quadrature of spherical harmonics;
  the classical (k_B T >> hcB) collision-free limit int chi dt = 1/(15 k_B T) derived in the
  module docstring (isothermal 4/(45 k_B T), Langevin-Debye, minus the rotation-averaged part);
  exact revival of a rigid rotor at T_rev = 1/(2 B c).
* published value: the N2 revival period of about 8.4 ps (Chen, Varma, York & Milchberg,
  Opt. Express 15, 11341 (2007) [from memory]); tolerance from the two printed digits.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.special import sph_harm_y

from hcfplan.constants import c, h, k_B
from hcfplan.errors import ConfigError
from hcfplan.propagation.raman import (
    raman_response_blowwood1989,
    rotational_kerr_n2,
    rotational_lines,
    rotational_raman_response,
)


@dataclass(frozen=True)
class Species:
    """Test-local stand-in with the fields of RotationalRamanSpecies."""

    molecule: str = "N2"
    mole_fraction: float = 1.0
    rotational_constant: float = 198.96  # B of N2 [1/m] (NIST webbook [from memory])
    centrifugal_constant: float = 5.76e-4  # D of N2 [1/m] [from memory]
    polarizability_anisotropy: float = 0.70e-30  # [m^3] [from memory]
    spin_weights: tuple[float, float] = (6.0, 3.0)  # 14N2: ortho/para 2:1
    dephasing_time: float = np.inf


def test_blowwood_unit_area():
    area, _ = quad(lambda t: raman_response_blowwood1989(t, 12.2e-15, 32e-15), 0, 2e-12,
                   limit=400)
    assert area == pytest.approx(1.0, abs=1e-9)
    assert raman_response_blowwood1989(np.array([-1e-15]), 12.2e-15, 32e-15)[0] == 0.0


def _matrix_element(j2: int, j: int, m: int) -> float:
    def integrand(theta):
        y2 = np.conj(sph_harm_y(j2, m, theta, 0.0))
        return (y2 * sph_harm_y(j, m, theta, 0.0)).real * np.cos(theta) ** 2 * np.sin(theta)
    return 2 * np.pi * quad(integrand, 0, np.pi, limit=200)[0]


@pytest.mark.parametrize("j", [0, 1, 3, 6])
def test_line_strength_matches_quadrature(j):
    # the amplitude of line J is (2/hbar)(p_J - p_J+2) S_J: recover S_J with one populated level
    s_quadrature = sum(_matrix_element(j + 2, j, m) ** 2 for m in range(-j, j + 1))
    assert s_quadrature == pytest.approx(2 * (j + 1) * (j + 2) / (15 * (2 * j + 3)), rel=1e-9)


@pytest.mark.parametrize("temperature", [293.15, 3000.0, 30000.0])
def test_classical_limit_of_static_response(temperature):
    # the quantum sum tends to the classical value with a deviation of order x = hcB/(k_B T);
    # the bound 5 x allows for the slowly varying (logarithmic) coefficient of that order
    species = Species(centrifugal_constant=0.0, spin_weights=(1.0, 1.0))
    omega, amplitude = rotational_lines(species, temperature)
    static = np.sum(amplitude / omega)  # int_0^inf chi dt without dephasing
    x = h * c * species.rotational_constant / (k_B * temperature)
    assert abs(static * 15 * k_B * temperature - 1.0) < 5 * x


def test_rigid_rotor_revival_is_exact():
    species = Species(centrifugal_constant=0.0, dephasing_time=50e-12)
    t_rev = 1.0 / (2 * species.rotational_constant * c)
    t = np.linspace(0.1e-12, 2e-12, 50)
    r0 = rotational_raman_response(t, species, 2.5e25, 293.15)
    r1 = rotational_raman_response(t + t_rev, species, 2.5e25, 293.15)
    expected = r0 * np.exp(-t_rev / 50e-12)
    np.testing.assert_allclose(r1, expected, rtol=1e-8, atol=1e-12 * abs(r0).max())


def test_n2_revival_period_published():
    t_rev = 1.0 / (2 * Species().rotational_constant * c)
    assert t_rev == pytest.approx(8.4e-12, abs=0.05e-12)  # "8.4 ps", two digits [from memory]


def test_static_n2_equals_response_integral():
    # analytic: closed-form integral with dephasing vs quadrature of the sampled response
    species = replace(Species(), dephasing_time=5e-12)
    t = np.linspace(0, 100e-12, 100_001)
    numeric = np.trapezoid(rotational_raman_response(t, species, 2.5e25, 293.15), t)
    assert rotational_kerr_n2(species, 2.5e25, 293.15) == pytest.approx(numeric, rel=1e-4)


@pytest.mark.parametrize(("tau1", "tau2", "pattern"), [
    (0.0, 32e-15, r"^raman_tau1 = 0\.0 s: must be finite and > 0"),
    (12.2e-15, -1e-15, r"^raman_tau2 = -1e-15 s: must be finite and > 0"),
    (float("nan"), 32e-15, r"^raman_tau1 = nan s"),
    (12.2e-15, float("inf"), r"^raman_tau2 = inf s"),
])
def test_blowwood_rejects_bad_times(tau1, tau2, pattern):
    with pytest.raises(ConfigError, match=pattern):
        raman_response_blowwood1989(np.zeros(3), tau1, tau2)


@pytest.mark.parametrize("temperature", [0.0, -10.0, float("nan"), None])
def test_rotational_response_rejects_bad_temperature(temperature):
    with pytest.raises(ConfigError, match=r"^temperature = .* K: must be finite and > 0"):
        rotational_raman_response(np.zeros(3), Species(), 2.5e25, temperature)
    with pytest.raises(ConfigError, match="^temperature = "):
        rotational_kerr_n2(Species(), 2.5e25, temperature)
