"""The switch-band join of a combined gas record evaluated once per distinct set of nodes
(hcfplan.materials.gas_dispersion._join via combined_term) gives, bit for bit, the term of the
plain construction that evaluates the quadrature nodes of every wavelength on its own.

Contract test of a numerical construction (module docstring of gas_dispersion); no external
source is needed: the reference below is the construction written out point by point.
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
def test_join_matches_the_point_by_point_construction(gas, wavelength):
    record = load_gas_table(gas).dispersion
    if not isinstance(record, CombinedDispersion):
        pytest.skip(f"{gas}: one fit, no switch band")
    densities = tuple(2.5e25 * (1 + 0.01 * i) for i in range(len(record.fits)))
    with np.errstate(invalid="ignore"):
        fast = combined_term(record, wavelength, densities)
        plain = _combined_per_point(record, wavelength, densities)
    assert np.array_equal(fast, plain, equal_nan=True)
    assert gas_dispersion.QUADRATURE_NODES == _GL_X.size
