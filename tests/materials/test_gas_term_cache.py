"""The per-molecule dispersion terms kept between calls (hcfplan.materials.gases): the same
numbers as computed afresh, read-only, bounded, and distinct for distinct inputs.

Contract tests of a cache; the physics of the terms is checked in test_gases.py and
test_gas_dispersion*.py against their published sources.
"""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.materials import gases


def _omega(start_nm: float, stop_nm: float, points: int = 257) -> np.ndarray:
    return 2 * np.pi * c / np.linspace(start_nm, stop_nm, points)[::-1] / 1e-9


@pytest.mark.parametrize("gas", ["argon", "helium", "nitrogen"])
def test_kept_terms_equal_fresh_ones(gas, monkeypatch):
    omega = _omega(600.0, 1500.0)
    table = gases.load_gas_table(gas)
    first = gases.refractive_index(table, omega, 5e25)
    again = gases.refractive_index(table, omega, 5e25)
    monkeypatch.setattr(gases, "_TERMS", type(gases._TERMS)())  # empty: computed afresh
    fresh = gases.refractive_index(table, omega, 5e25)
    np.testing.assert_array_equal(first, fresh)
    np.testing.assert_array_equal(again, fresh)


def test_kept_terms_are_read_only_and_bounded():
    table = gases.load_gas_table("argon")
    record = gases._fit(table, None)
    wavelength = 2 * np.pi * c / _omega(700.0, 1300.0)
    term = gases._term_per_molecule(table, record, wavelength, "coolprop")
    assert not term.flags.writeable
    for k in range(gases.TERM_CACHE_SIZE + 5):
        gases._term_per_molecule(table, record, wavelength * (1 + 1e-6 * (k + 1)), "coolprop")
    assert len(gases._TERMS) <= gases.TERM_CACHE_SIZE


def test_other_wavelengths_get_other_terms():
    table = gases.load_gas_table("argon")
    record = gases._fit(table, None)
    a = 2 * np.pi * c / _omega(700.0, 1300.0)
    b = a.copy()
    b[3] *= 1.01
    ta = gases._term_per_molecule(table, record, a, "coolprop")
    tb = gases._term_per_molecule(table, record, b, "coolprop")
    assert ta[3] != tb[3]
    np.testing.assert_array_equal(np.delete(ta, 3), np.delete(tb, 3))
