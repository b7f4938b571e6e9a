"""The switch-band join of a combined gas record (hcfplan.materials.gas_dispersion._join via
combined_term): its Chebyshev series agrees with the plain construction that evaluates
Gauss-Legendre nodes for every wavelength on its own, and with scipy.integrate.quad of the
integral of the module docstring; its quadrature fallback is that construction bit for bit.

Contract tests of a numerical construction (module docstring of gas_dispersion); the
references are the construction written out point by point and scipy.integrate.quad
(QUADPACK, R. Piessens et al., Springer 1983) as reference library.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.materials import gas_dispersion
from hcfplan.materials.gas_dispersion import (
    _GL_W,
    _GL_X,
    CombinedDispersion,
    combined_term,
    fit_term,
    switch_weight,
)
from hcfplan.materials.gases import load_gas_table


def _join_per_point(delta, band, wavelength, upward):
    """The join D(lambda) with the nodes of each wavelength built and evaluated separately."""
    lo, hi = band
    if not upward:
        return _join_per_point(lambda x: delta(-x), (-hi, -lo), -wavelength, True)
    out = np.zeros_like(wavelength)
    beyond = wavelength > lo
    if not np.any(beyond):
        return out
    lam = wavelength[beyond]
    top = np.minimum(lam, hi)
    half = 0.5 * (top - lo)
    s = lo + half[:, None] * (1.0 + _GL_X[None, :])
    values = delta(s.ravel()).reshape(s.shape)
    kernel = (lam[:, None] - s) * switch_weight(s, band, 2) - 2.0 * switch_weight(s, band, 1)
    integral = half * np.sum(_GL_W[None, :] * kernel * values, axis=1)
    out[beyond] = switch_weight(lam, band) * delta(lam) + integral
    return out


def _combined_per_point(record, wavelength, densities):
    def term(i):
        return lambda lam: fit_term(record.fits[i], lam, densities[i])

    total = term(record.anchor)(wavelength)
    for k, band in enumerate(record.switches):
        if k >= record.anchor:
            total = total + _join_per_point(lambda lam, k=k: term(k + 1)(lam) - term(k)(lam),
                                            band, wavelength, True)
        else:
            total = total + _join_per_point(lambda lam, k=k: term(k)(lam) - term(k + 1)(lam),
                                            band, wavelength, False)
    return total


@pytest.mark.parametrize("gas", ["Ar", "He", "N2"])
@pytest.mark.parametrize("wavelength", [
    np.geomspace(1.2e-7, 4e-6, 3001),  # below, inside and beyond every band
    np.array([4.5e-7]), np.array([9e-7]), np.array([3e-6]), np.array([2e-7]),
    np.array([9e-7, 2e-6, 3e-7, 4.2e-7, 1e-6, 8e-7]),  # band edges included
])
def test_join_matches_the_point_by_point_construction(gas, wavelength, monkeypatch):
    record = load_gas_table(gas).dispersion
    if not isinstance(record, CombinedDispersion):
        pytest.skip(f"{gas}: one fit, no switch band")
    densities = tuple(2.5e25 * (1 + 0.01 * i) for i in range(len(record.fits)))
    with np.errstate(invalid="ignore"):
        fast = combined_term(record, wavelength, densities)
        plain = _combined_per_point(record, wavelength, densities)
        # the terms keep ~3e-13 of themselves ((n^2 - 1) of n - 1 ~ 3e-4), so the slope of the
        # join (the integral of w'' Delta over the band, ~1e-4 of term / band width) is known to
        # ~1e-8 of itself by either construction (seen: 2e-8 between 32-node Gauss-Legendre and
        # scipy's quad); beyond a band it is multiplied by (lambda - centre), up to 30 half-widths
        # at 4 um: 1e-10 of the largest term (seen: 7e-11 for He)
        assert np.allclose(fast, plain, rtol=0.0, atol=1e-10 * np.nanmax(np.abs(plain)),
                           equal_nan=True)
        # no series converges to a tail of 0: every band takes the quadrature, bit for bit
        monkeypatch.setattr(gas_dispersion, "TAIL_LEVEL", 0.0)
        fallback = combined_term(record, wavelength, densities)
    assert np.array_equal(fallback, plain, equal_nan=True)
    assert gas_dispersion.QUADRATURE_NODES == _GL_X.size


@pytest.mark.parametrize("gas", ["Ar", "He"])
def test_join_integral_against_quad(gas):
    from scipy.integrate import quad

    record = load_gas_table(gas).dispersion
    densities = tuple(2.5e25 for _ in record.fits)
    k = record.anchor  # the band above the anchor: fits k (inner) and k + 1 (outer)
    lo, hi = record.switches[k]

    def delta(lam):
        lam = np.asarray(lam, dtype=float)
        return (fit_term(record.fits[k + 1], lam, densities[k + 1])
                - fit_term(record.fits[k], lam, densities[k]))

    size = float(np.max(np.abs(fit_term(record.fits[k], np.array([lo, hi]), densities[k]))))
    lam = np.array([lo + 0.1 * (hi - lo), 0.5 * (lo + hi), lo + 0.93 * (hi - lo), 1.2 * hi])
    got = gas_dispersion._join(delta, (lo, hi), lam, True, size)
    for value, x in zip(got, lam, strict=True):
        def integrand(s, x=x):
            return (((x - s) * switch_weight(s, (lo, hi), 2) - 2.0 * switch_weight(s, (lo, hi), 1))
                    * float(delta(np.array([s]))[0]))

        integral, _ = quad(integrand, lo, min(x, hi), epsabs=1e-14 * size, epsrel=1e-10, limit=200)
        expected = float(switch_weight(np.array([x]), (lo, hi))[0] * delta(np.array([x]))[0])
        assert value == pytest.approx(expected + integral, rel=0.0, abs=1e-11 * size)
