"""The numpy twin of the THz mixing kernel (hcfplan.thz.kernels_numpy.mixing_sums against the
compiled hcfplan.thz.kernels.mixing_sums): the same sums to rounding, with terms in each of the
kernel's three branches (product form, series, exponential), edge counts and NaN."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.thz import kernels as compiled
from hcfplan.thz import kernels_numpy as twin
from hcfplan.thz.detection import SERIES_LIMIT


def _case(size, seed, thickness=5e-4):
    """A band, a real optical k and a complex THz k with terms in every branch: q = k_opt[k +
    m] - k_opt[k] close to Re k_thz[m] (series and exponential branches) for some pairs and far
    from it for the others."""
    rng = np.random.default_rng(seed)
    band = rng.standard_normal(size) + 1j * rng.standard_normal(size)
    step = 1.0 / thickness  # |delta_k L| ~ 1 per index step
    k_opt = 1e7 + step * np.cumsum(rng.uniform(0.01, 2.0, size))
    k_thz = step * np.arange(size) * 0.9 + 1j * rng.uniform(0, 0.2 * step, size)
    matched = np.arange(0, size, 5)  # phase matched at k = 0: series terms
    k_thz[matched] = k_opt[matched] - k_opt[0]
    return band, k_opt, k_thz, thickness


def _both(band, k_opt, k_thz, thickness, count):
    a = np.zeros(count, complex)
    b = np.zeros(count, complex)
    compiled.mixing_sums(band, k_opt, k_thz, thickness, count, a)
    twin.mixing_sums(band, k_opt, k_thz, thickness, count, b)
    return a, b


@pytest.mark.parametrize("size", [1, 2, 5, 40, 300])
def test_mixing_sums_match(size):
    band, k_opt, k_thz, thickness = _case(size, seed=size)
    for count in sorted({1, size // 2 or 1, size}):
        a, b = _both(band, k_opt, k_thz, thickness, count)
        scale = np.max(np.abs(a))
        assert np.max(np.abs(a - b)) <= 1e-12 * scale


def test_every_branch_is_taken():
    # the check above is not void: terms fall in each branch of the kernel
    band, k_opt, k_thz, thickness = _case(300, seed=300)
    kinds = set()
    for m in range(300):
        d = (k_opt[m:] - k_opt[:300 - m]) - k_thz[m].real
        d2 = d * d + k_thz[m].imag ** 2
        kinds |= {"product" if v >= (twin.PRODUCT_LIMIT / thickness) ** 2 else
                  "series" if v < (SERIES_LIMIT / thickness) ** 2 else "exp" for v in d2}
    assert kinds == {"product", "series", "exp"}


def test_a_nan_reaches_the_same_sums():
    band, k_opt, k_thz, thickness = _case(40, seed=1)
    band = band.copy()
    band[7] = np.nan
    k_thz = k_thz.copy()
    k_thz[3] = np.nan
    a, b = _both(band, k_opt, k_thz, thickness, 40)
    np.testing.assert_array_equal(np.isnan(a), np.isnan(b))
    assert np.isnan(a).any() and not np.isnan(a).all()
    finite = ~np.isnan(a)
    np.testing.assert_allclose(b[finite], a[finite], rtol=1e-10)


def test_the_full_mixing_sum_is_the_same_on_both_policies(monkeypatch):
    from hcfplan.constants import c
    from hcfplan.materials.crystal_tables import load_crystal
    from hcfplan.numerics import kernel_choice
    from hcfplan.thz.mixing import mixing_sum_full

    crystal = load_crystal("GaP")
    omega = 2 * np.pi * c / np.linspace(1100e-9, 950e-9, 200)
    band = np.exp(-((omega - omega.mean()) / (0.02 * omega.mean())) ** 2) + 0j
    dnu = (omega[1] - omega[0]) / (2 * np.pi)
    Omega = 2 * np.pi * dnu * np.arange(150)
    found = {}
    for policy in ("numba", "numpy"):
        monkeypatch.setenv(kernel_choice.VARIABLE, policy)
        found[policy] = mixing_sum_full(band, omega, dnu, Omega, crystal, 5e-4, omega.mean())
    scale = np.max(np.abs(found["numba"]))
    assert scale > 0
    assert np.max(np.abs(found["numpy"] - found["numba"])) <= 1e-12 * scale
