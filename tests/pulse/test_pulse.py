"""Pulse shapes (hcfplan.pulse.shapes), input pulses (hcfplan.pulse.fields) and grid selection
(hcfplan.numerics.grid.choose_grid).

Kinds: analytic (closed-form integrals of sech^2 and Gaussian pulses, linear chirp of a
Gaussian, Agrawal, Nonlinear Fiber Optics, 6th ed., 2019, ch. 3 [from memory]) and error tests.
"""

from __future__ import annotations

import warnings

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.errors import ConfigError, ValidityWarning
from hcfplan.numerics.grid import Grid, choose_grid
from hcfplan.pulse.fields import (
    field_from_measured_spectrum,
    peak_power_from_energy,
    pulse_field,
    shape_t0_factor,
)
from hcfplan.pulse.metrics import fwhm, rms_width
from hcfplan.pulse.shapes import PULSE_SHAPES, intensity_envelope, pulse_shape

OMEGA0 = 2 * np.pi * c / 800e-9


@pytest.fixture(scope="module")
def grid() -> Grid:
    return Grid(points=2**12, dt=1.6e-15, omega0=OMEGA0)


# analytic: P0 = ln(1+sqrt2) E/tau (sech^2), 2 sqrt(ln2/pi) E/tau (Gaussian); printed 4 digits
@pytest.mark.parametrize(("shape", "factor"), [("sech2", 0.8814), ("gaussian", 0.9394)])
def test_peak_power_factor(shape, factor):
    assert peak_power_from_energy(1e-3, 1e-13, shape) == pytest.approx(factor * 1e10, rel=6e-5)


# analytic: FWHM/T0 = 2 ln(1+sqrt2) = 1.7627 and 2 sqrt(ln2) = 1.6651 (Agrawal ch. 3)
@pytest.mark.parametrize(("shape", "factor"), [("sech2", 1.7627), ("gaussian", 1.6651)])
def test_t0_factor(shape, factor):
    assert shape_t0_factor(shape) == pytest.approx(factor, abs=6e-5)


@pytest.mark.parametrize("shape", ["sech2", "gaussian"])
def test_pulse_field_energy_fwhm_peak(grid, shape):
    # analytic: the sampled pulse has the requested energy, FWHM and peak power
    field = pulse_field(grid, shape, 30e-15, 2e-6)
    power = np.abs(field) ** 2
    assert grid.energy_t(field) == pytest.approx(2e-6, rel=1e-12)
    assert fwhm(grid.time, power) == pytest.approx(30e-15, rel=1e-3)
    assert power.max() == pytest.approx(peak_power_from_energy(2e-6, 30e-15, shape), rel=1e-4)


def test_gdd_broadens_gaussian_as_linear_dispersion(grid):
    # analytic: T(GDD)/T0 = sqrt(1 + (GDD/T0^2)^2) for the rms width of a Gaussian (Agrawal 3.2)
    t0 = 20e-15 / shape_t0_factor("gaussian")
    gdd = 2.0 * t0**2
    sigma0 = rms_width(grid.time, np.abs(pulse_field(grid, "gaussian", 20e-15, 1e-6)) ** 2)
    sigma = rms_width(grid.time, np.abs(pulse_field(grid, "gaussian", 20e-15, 1e-6, gdd)) ** 2)
    assert sigma / sigma0 == pytest.approx(np.sqrt(5.0), rel=1e-8)


@pytest.mark.parametrize(("gdd", "red_first"), [(500e-30, True), (-500e-30, False)])
def test_gdd_sign_normal_dispersion_puts_red_first(grid, gdd, red_first):
    # convention 4 of hcfplan.numerics.grid: positive GDD = normal material, red components lead
    spectrum = grid.to_spectrum(pulse_field(grid, "gaussian", 20e-15, 1e-6, gdd))
    centroid = {}
    for name, part in (("red", grid.domega < 0), ("blue", grid.domega > 0)):
        power = np.abs(grid.to_time(np.where(part, spectrum, 0))) ** 2
        centroid[name] = np.sum(grid.time * power) / np.sum(power)
    assert (centroid["red"] < centroid["blue"]) == red_first


def test_measured_spectrum_round_trip(grid):
    # analytic: a Gaussian spectrum per wavelength (Jacobian lambda^2/c) gives back the pulse
    reference = pulse_field(grid, "gaussian", 25e-15, 1e-6)
    s_nu = grid.shifted(np.abs(grid.to_spectrum(reference)) ** 2)
    nu = grid.shifted(grid.frequency)
    wavelength = (c / nu)[::-1]
    s_lambda = (s_nu * c / (c / nu) ** 2)[::-1]
    field = field_from_measured_spectrum(grid, wavelength, s_lambda, 1e-6)
    error = np.max(np.abs(np.abs(field) ** 2 - np.abs(reference) ** 2))
    assert error < 1e-6 * np.max(np.abs(reference) ** 2)


def test_measured_spectrum_cut_warns(grid):
    wavelength = np.linspace(300e-9, 3000e-9, 500)  # reaches far beyond the grid's window
    with pytest.warns(ValidityWarning, match="outside the grid"):
        field_from_measured_spectrum(grid, wavelength, np.ones_like(wavelength), 1e-6)


def test_unknown_shape_lists_choices(grid):
    with pytest.raises(ConfigError, match="'triangle'.*gaussian"):
        pulse_field(grid, "triangle", 30e-15, 1e-6)
    with pytest.raises(ConfigError, match=r"'square'.*\['gaussian', 'sech2'\]"):
        intensity_envelope("square", 0.0)


# ----------------------------------------------------------------------------- shape registry
@pytest.mark.parametrize("shape", sorted(PULSE_SHAPES))
def test_registry_constants_follow_from_the_amplitude(shape):
    # analytic: the registry's FWHM/T0 is where its own a(x)^2 is 1/2, and energy/(P0 T0) is
    # the integral of a(x)^2 (fine trapezoid on +-40 T0; wings below 1e-34)
    entry = pulse_shape(shape)
    x = np.linspace(-40.0, 40.0, 400_001)
    intensity = entry.amplitude(x) ** 2
    assert entry.amplitude(0.0) == 1.0 and entry.name == shape
    half = entry.amplitude(np.array([-0.5, 0.5]) * entry.fwhm_per_t0) ** 2
    np.testing.assert_allclose(half, 0.5, rtol=1e-14)
    assert np.trapezoid(intensity, x) == pytest.approx(entry.energy_per_p0t0, rel=1e-12)


@pytest.mark.parametrize("shape", sorted(PULSE_SHAPES))
def test_intensity_envelope_in_fwhm_units(shape):
    # analytic: 1 at the centre, 1/2 at +-FWHM/2, and the closed forms
    # sech^2(2 ln(1+sqrt2) u) and exp(-4 ln2 u^2) (Agrawal, Nonlinear Fiber Optics, 6th ed.,
    # 2019, ch. 3 [from memory])
    u = np.array([-1.3, -0.5, 0.0, 0.5, 2.1])
    closed = {"sech2": 1 / np.cosh(2 * np.log1p(np.sqrt(2)) * u) ** 2,
              "gaussian": np.exp(-4 * np.log(2) * u**2)}[shape]
    envelope = intensity_envelope(shape, u)
    np.testing.assert_allclose(envelope, closed, rtol=1e-14)
    np.testing.assert_allclose(envelope[1:4], [0.5, 1.0, 0.5], rtol=1e-14)


@pytest.mark.parametrize("factor", [1.0, 5.0, 40.0])
def test_choose_grid_covers_pulse_and_spectrum(factor):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)  # the cap case is asserted below
        g = choose_grid(OMEGA0, 30e-15, broadening_factor=factor)
    assert g.points & (g.points - 1) == 0  # power of two
    assert g.time_window >= 40 * 30e-15
    # the window is centred on the needed band, not on the pump; it stays above a quarter of
    # the pump frequency and below six times it (LOWER_EDGE_FRACTION, UPPER_EDGE_MULTIPLE)
    assert g.omega_pump == OMEGA0 and g.omega_low < OMEGA0 < g.omega_high
    assert g.omega_low >= 0.25 * OMEGA0 * (1 - 1e-12)
    needed = 8 * factor * 2 * np.pi * (2 * np.log(2) / np.pi) / 30e-15  # Gaussian TBP
    assert g.omega_high >= min(OMEGA0 + needed, 6 * OMEGA0) * (1 - 1e-12)
    assert g.omega_low <= max(OMEGA0 - needed, 0.25 * OMEGA0) * (1 + 1e-12)
    assert g.omega_high <= 6 * OMEGA0 * (1 + 1e-12)


def test_choose_grid_overrides():
    g = choose_grid(OMEGA0, 30e-15, points=2048, time_window=4e-12)
    assert (g.points, g.time_window) == (2048, pytest.approx(4e-12))
    assert choose_grid(OMEGA0, 30e-15, time_window=3e-12).time_window == pytest.approx(3e-12)


def test_choose_grid_rejects_window_through_zero_frequency():
    with pytest.raises(ConfigError, match="points = 65536"):
        choose_grid(OMEGA0, 30e-15, points=65536, time_window=1e-12)
