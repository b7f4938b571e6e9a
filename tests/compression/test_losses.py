"""Window and mirror losses after the fiber (hcfplan.compression.losses)."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.compression import elements as el
from hcfplan.compression.compressor import optimize_bounces
from hcfplan.compression.losses import (
    fresnel_reflectance,
    mirror_throughput,
    window_transmission,
    with_throughput,
)
from hcfplan.constants import c
from hcfplan.errors import ConfigError
from hcfplan.numerics.grid import Grid

TAU = 30e-15


def test_fresnel_fused_silica_800nm():
    """Analytic (Born & Wolf, Principles of Optics, Sec. 1.5.3 [section from memory]):
    R = ((n-1)/(n+1))^2 at normal incidence; fused silica n(800 nm) = 1.453317 (Malitson 1965
    Sellmeier, J. Opt. Soc. Am. 55, 1205) gives R = 0.03414 and T = (1-R)/(1+R) for both
    surfaces with the incoherent multiple reflections."""
    n = 1.453317
    r = ((n - 1) / (n + 1)) ** 2
    assert fresnel_reflectance(n) == pytest.approx(r, rel=1e-15)
    assert r == pytest.approx(0.03414, abs=5e-6)
    assert window_transmission(n, 1e-3) == pytest.approx((1 - r) / (1 + r), rel=1e-14)
    assert window_transmission(n, 1e-3, coated=True) == 1.0


def test_absorbing_window_is_geometric_series():
    """Analytic: the incoherent sum over multiple passes, summed term by term."""
    n, d, alpha = 1.5, 2e-3, 50.0
    r, a = fresnel_reflectance(n), np.exp(-alpha * d)
    series = sum((1 - r) ** 2 * a * (r * a) ** (2 * k) for k in range(40))
    assert window_transmission(n, d, absorption=alpha) == pytest.approx(series, rel=1e-12)


def test_mirror_throughput_and_bad_inputs():
    """Definition R^n; bad reflectivity names the config key."""
    assert mirror_throughput(0.99, 10) == pytest.approx(0.99**10, rel=1e-15)
    with pytest.raises(ConfigError, match="compressor.mirror_reflectivity = 1.2"):
        mirror_throughput(1.2, 3)
    with pytest.raises(ConfigError, match="refractive index = 0.5"):
        fresnel_reflectance(0.5)


def test_with_throughput_scales_energy_keeps_shape():
    """Invariant: the losses scale energy and peak power by T_window R^n and leave durations
    and the chosen count; the per-count curve carries R^k."""
    grid = Grid(2**12, 2e-15, 2 * np.pi * c / 1030e-9)
    field = 3e4 * np.exp(-2 * np.log(2) * grid.time**2 / TAU**2)
    spectrum = grid.to_spectrum(field.astype(complex)) * np.exp(
        1j * el.mirror_phase(grid.omega, grid.omega0, 1000e-30))
    mirror = el.mirror_phase(grid.omega, grid.omega0, -200e-30)
    lossless = optimize_bounces(grid, spectrum, np.zeros(grid.points), mirror, max_bounces=8)
    lossy = with_throughput(lossless, 0.93, 0.99)
    total = 0.93 * 0.99**lossless.bounces
    assert lossy.bounces == lossless.bounces
    assert grid.energy_t(lossy.field_t) == pytest.approx(total * grid.energy_t(lossless.field_t),
                                                         rel=1e-12)
    assert lossy.metrics.energy == pytest.approx(total * lossless.metrics.energy, rel=1e-12)
    assert lossy.metrics.peak_power == pytest.approx(total * lossless.metrics.peak_power,
                                                     rel=1e-12)
    assert lossy.metrics.fwhm == lossless.metrics.fwhm
    assert lossy.input_energy == lossless.input_energy
    expected = lossless.peak_power_vs_bounces * 0.93 * 0.99 ** lossless.bounce_counts
    assert np.allclose(lossy.peak_power_vs_bounces, expected, rtol=1e-12)
    assert lossy.transform_limit.metrics.energy == pytest.approx(
        total * lossless.transform_limit.metrics.energy, rel=1e-12)
