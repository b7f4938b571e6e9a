"""Tests of hcfplan.pulse.metrics (widths, transform limit, main lobe, time-bandwidth product)."""

from __future__ import annotations

import numpy as np
import pytest
from scipy.special import erf, erfc

from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid
from hcfplan.pulse import lobes, metrics
from hcfplan.pulse.fields import pulse_field
from hcfplan.pulse.shapes import pulse_shape

LN2 = np.log(2.0)


def _gaussian_power(t: np.ndarray, fwhm: float, centre: float = 0.0) -> np.ndarray:
    """Gaussian intensity of the given FWHM."""
    return np.exp(-4.0 * LN2 * (t - centre) ** 2 / fwhm**2)


def _grid(points: int = 2**12, dt: float = 2e-15, wavelength: float = 800e-9) -> Grid:
    return Grid(points, dt, 2 * np.pi * c / wavelength)


# Leading-order error of linear interpolation at the half-maximum crossings of a Gaussian,
# derived here (analytic): the chord lies above the convex flank by at most dx^2 y''/8, with
# y'' = (8 ln^2 2 - 4 ln 2)/tau^2 and |y'| = 2 ln 2 / tau at half maximum; two crossings give
# a relative error <= 0.1931 (dx/tau)^2 (the chord overestimates the width).
_INTERP_COEFF = 2 * (8 * LN2**2 - 4 * LN2) / (8 * 2 * LN2)


@pytest.mark.parametrize("offset", [0.0, 0.13, 0.37, 0.5, 0.81])
@pytest.mark.parametrize("samples_per_fwhm", [20, 50])
def test_fwhm_interpolation_gaussian(samples_per_fwhm: int, offset: float) -> None:
    # analytic: FWHM of a sampled Gaussian vs its exact width, within the interpolation bound
    dx = 1.0
    x = np.arange(-200, 201) * dx
    tau = samples_per_fwhm * dx
    measured = metrics.fwhm(x, _gaussian_power(x, tau, centre=offset * dx))
    error = measured / tau - 1.0
    bound = _INTERP_COEFF * (dx / tau) ** 2
    # 5 % allowance: y'' varies by a few percent over one sample at >= 20 samples per FWHM,
    # plus the higher-order error of the three-point peak estimate
    assert -1e-12 <= error <= 1.05 * bound
    if samples_per_fwhm >= 50:
        assert abs(error) < 1e-4


def test_fwhm_interpolation_converges_second_order() -> None:
    # convergence: halving the sample spacing (same relative offset) lowers the error ~4x
    errors = []
    for spacing in (1.0, 0.5, 0.25):
        x = np.arange(-4000, 4001) * spacing
        errors.append(metrics.fwhm(x, _gaussian_power(x, 20.0, centre=0.3 * spacing)) / 20 - 1)
    ratios = np.array(errors[:-1]) / np.array(errors[1:])
    np.testing.assert_allclose(ratios, 4.0, rtol=0.05)


@pytest.mark.parametrize("centre", [-100.0, 100.0])
def test_fwhm_peak_at_edge_is_nan(centre: float) -> None:
    x = np.linspace(-100, 100, 201)
    assert np.isnan(metrics.fwhm(x, _gaussian_power(x, 20.0, centre)))


def test_fwhm_accepts_fft_order() -> None:
    # invariant: the result does not depend on the order of the samples
    grid = _grid()
    spectrum = np.exp(-((grid.domega / 2e13) ** 2))
    shifted = metrics.fwhm(grid.shifted(grid.domega), grid.shifted(spectrum))
    assert metrics.fwhm(grid.domega, spectrum) == pytest.approx(shifted, rel=1e-14)


def _two_peaks(x: np.ndarray) -> np.ndarray:
    return _gaussian_power(x, 10.0, -30.0) + 0.6 * _gaussian_power(x, 10.0, 30.0)


def test_width_at_level_contiguous_vs_outermost() -> None:
    # analytic: two separated Gaussians (overlap < 1e-30 at the crossings used)
    x = np.linspace(-100, 100, 20001)
    y = _two_peaks(x)
    contiguous = metrics.width_at_level(x, y, 0.5)
    half_width_at = 10.0 / 2 * np.sqrt(np.log(0.6 / 0.5) / LN2)  # second peak at level 0.5
    outermost = metrics.width_at_level(x, y, 0.5, extent="outermost")
    assert contiguous == pytest.approx(10.0, rel=1e-6)
    assert outermost == pytest.approx(60.0 + 5.0 + half_width_at, rel=1e-6)


def test_spectral_width_outermost_at_minus_20_db() -> None:
    # analytic: outer -20 dB crossings of two Gaussians at +-d, sigma s: d + s sqrt(2 ln 100)
    nu = np.linspace(-1e14, 1e14, 40001)
    sigma, d = 4e12, 2e13
    power = np.exp(-((nu - d) ** 2) / (2 * sigma**2)) + np.exp(-((nu + d) ** 2) / (2 * sigma**2))
    expected = 2 * (d + sigma * np.sqrt(2 * np.log(100.0)))
    assert metrics.spectral_width(nu, power, -20.0) == pytest.approx(expected, rel=1e-6)


def test_rms_width_gaussian() -> None:
    # analytic: the standard deviation of exp(-x^2 / (2 s^2)) is s
    x = np.linspace(-50, 50, 10001)
    assert metrics.rms_width(x, np.exp(-((x - 3.0) ** 2) / (2 * 4.0**2))) == pytest.approx(
        4.0, rel=1e-9
    )


@pytest.mark.parametrize(
    ("shape", "published"),
    [
        # Table of pulse shapes in ch. 1 of J.-C. Diels, W. Rudolph, Ultrashort Laser Pulse
        # Phenomena, 2nd ed., Academic Press 2006 (time-bandwidth products printed to 3 digits)
        # [from memory: table number]
        ("gaussian", 0.441),
        ("sech2", 0.315),
    ],
)
def test_time_bandwidth_product_published(shape: str, published: float) -> None:
    # published value: TBP of transform-limited pulses, tolerance half a unit of the 3rd digit
    grid = _grid(points=2**12, dt=2e-15)
    tau = 80e-15  # 40 samples per FWHM in time, ~45 in frequency
    fields = {
        "gaussian": np.sqrt(_gaussian_power(grid.time, tau)),
        "sech2": 1.0 / np.cosh(grid.time * 2 * np.log(1 + np.sqrt(2)) / tau),
    }
    assert metrics.time_bandwidth_product_of(grid, fields[shape]) == pytest.approx(
        published, abs=5e-4
    )


@pytest.mark.parametrize(("shape", "published"), [("gaussian", 0.441), ("sech2", 0.315)])
def test_tbp_of_the_shape_registry(shape: str, published: float) -> None:
    # published value (Diels & Rudolph 2006, ch. 1, from memory), 3 printed digits
    assert pulse_shape(shape).time_bandwidth_product == pytest.approx(published, abs=5e-4)


@pytest.mark.parametrize("shape", ["gaussian", "sech2"])
def test_tbp_of_a_registry_pulse_matches_the_registry(shape: str) -> None:
    # invariant: a pulse built from the registry's amplitude has the registry's TBP (the
    # tolerance is the interpolation error of the two FWHMs at ~40 samples per FWHM)
    grid = _grid(points=2**12, dt=2e-15)
    field = pulse_field(grid, shape, 80e-15, 1e-6)
    assert metrics.time_bandwidth_product_of(grid, field) == pytest.approx(
        pulse_shape(shape).time_bandwidth_product, rel=5e-4
    )


def test_transform_limit_restores_chirped_gaussian() -> None:
    # invariant: a flat phase returns the unchirped pulse exactly, centred at t = 0
    grid = _grid()
    field = np.sqrt(_gaussian_power(grid.time, 60e-15)).astype(complex)
    chirped = grid.to_spectrum(field) * np.exp(1j * 0.5 * 800e-30 * grid.domega**2)
    tl = metrics.transform_limit(grid, chirped)
    np.testing.assert_allclose(tl, field, atol=1e-12)
    assert int(np.argmax(np.abs(tl))) == grid.points // 2
    assert metrics.transform_limited_fwhm(grid, chirped) == pytest.approx(
        metrics.fwhm(grid.time, np.abs(field) ** 2), rel=1e-12
    )


def test_main_lobe_clean_gaussian() -> None:
    # analytic: the lobe ends at the 1e-3 floor, leaving erfc(sqrt(ln 1000)) outside
    grid = _grid()
    power = _gaussian_power(grid.time, 60e-15)
    t_lo, t_hi, fraction = lobes.main_lobe(grid.time, power)
    assert fraction > 0.999
    # one boundary sample at <= 1e-3 of the peak: tolerance floor * dt / energy per side
    sample_bound = 2 * lobes.MAIN_LOBE_FLOOR * grid.dt / (np.sum(power) * grid.dt)
    assert abs(fraction - erf(np.sqrt(np.log(1000.0)))) <= sample_bound
    assert t_lo == pytest.approx(-t_hi, abs=grid.dt / 2)


def test_main_lobe_with_satellite() -> None:
    # analytic: main Gaussian + post-pulse of power share 0.2 (well separated)
    grid = _grid()
    tau = 60e-15
    main = 1e9 * _gaussian_power(grid.time, tau)
    satellite = 0.25e9 * _gaussian_power(grid.time, tau, centre=400e-15)
    power = main + satellite
    energy_main = np.sum(main) * grid.dt
    energy_total = np.sum(power) * grid.dt
    inside = erf(np.sqrt(np.log(1000.0)))
    _, _, fraction = lobes.main_lobe(grid.time, power)
    pre, post = lobes.pre_post_pulse_energy(grid.time, power)
    # tolerance: one boundary sample at <= floor * peak on each side
    tol = lobes.MAIN_LOBE_FLOOR * 1e9 * grid.dt
    assert fraction * energy_total == pytest.approx(inside * energy_main, abs=2 * tol)
    assert pre == pytest.approx(0.5 * erfc(np.sqrt(np.log(1000.0))) * energy_main, abs=tol)
    expected_post = 0.5 * erfc(np.sqrt(np.log(1000.0))) * energy_main + np.sum(satellite) * grid.dt
    assert post == pytest.approx(expected_post, abs=tol)
    # invariant: pre + lobe + post = total
    assert pre + fraction * energy_total + post == pytest.approx(energy_total, rel=1e-12)


def test_main_lobe_stops_at_minimum() -> None:
    # invariant: overlapping peaks, the lobe ends at the sample of the local minimum between them
    x = np.linspace(-100, 100, 2001)
    y = _gaussian_power(x, 20.0, -10.0) + 0.5 * _gaussian_power(x, 20.0, 15.0)
    _, t_hi, _ = lobes.main_lobe(x, y)
    i_min = 900 + int(np.argmin(y[900:1150]))
    assert t_hi == pytest.approx(x[i_min])


def test_peak_power() -> None:
    assert metrics.peak_power(np.array([1.0, 3.0j, -2.0])) == pytest.approx(9.0)


@pytest.mark.parametrize("level", [0.0, 1.5, -0.2])
def test_width_at_level_rejects_level(level: float) -> None:
    x = np.linspace(-1, 1, 11)
    with pytest.raises(ConfigError, match=f"level = {level}"):
        metrics.width_at_level(x, 1 - x**2, level)


def test_spectral_width_rejects_positive_db() -> None:
    x = np.linspace(-1, 1, 11)
    with pytest.raises(ConfigError, match="level_db = 3.0 dB"):
        metrics.spectral_width(x, 1 - x**2, 3.0)


def test_width_rejects_unknown_extent() -> None:
    x = np.linspace(-1, 1, 11)
    with pytest.raises(ConfigError, match="'widest'"):
        metrics.width_at_level(x, 1 - x**2, 0.5, extent="widest")
