"""The numpy twin of the compiled band-limited peak search (hcfplan.pulse.bandlimited_numpy
against hcfplan.pulse.bandlimited_compiled): each function gives the compiled one's result to
rounding, on random fields, several peaks, more candidates than are refined, edge sizes, NaN."""

from __future__ import annotations

import numpy as np
import pytest

from hcfplan.pulse import bandlimited
from hcfplan.pulse import bandlimited_compiled as compiled
from hcfplan.pulse import bandlimited_numpy as twin

F = bandlimited.PEAK_OVERSAMPLING


def _field(n, peaks, seed):
    """A band-limited-looking random field of ``n`` samples with ``peaks`` bumps."""
    rng = np.random.default_rng(seed)
    t = np.arange(n)
    field = np.zeros(n, complex)
    for _ in range(peaks):
        centre, width = rng.uniform(0, n), rng.uniform(1.0, max(1.5, n / 20))
        field += rng.uniform(0.5, 1.0) * np.exp(-((t - centre) / width) ** 2
                                                + 1j * rng.uniform(0, 6))
    return field + 1e-3 * (rng.standard_normal(n) + 1j * rng.standard_normal(n))


def _search_args(field):
    field = np.ascontiguousarray(field, complex)
    power = field.real**2 + field.imag**2
    return (field, power, bandlimited._peak_kernels(field.size), F, bandlimited.CANDIDATE_LEVEL,
            bandlimited.MAX_CANDIDATES)


@pytest.mark.parametrize("n", [3, 4, 17, 256, 2048])
@pytest.mark.parametrize("peaks", [1, 3, 9])
def test_refine_peak_matches(n, peaks):
    args = _search_args(_field(n, peaks, seed=n + peaks))
    found = twin.refine_peak(*args)
    expected = compiled.refine_peak(*args)
    assert found[0] == pytest.approx(expected[0], rel=1e-12)
    assert found[1] == pytest.approx(expected[1], rel=1e-12, abs=1e-9)


@pytest.mark.parametrize("n", [3, 16, 300])
def test_candidates_vertex_and_fine_power_match(n):
    rng = np.random.default_rng(n)
    power = rng.random(n)
    power[0] = power[-1] = power.max() * 1.01  # a maximum at both ends (circular neighbours)
    for level, most in ((0.4, 4), (0.1, 2), (0.0, 1000)):
        np.testing.assert_array_equal(np.sort(twin.peak_candidates(power, level, most)),
                                      np.sort(compiled.peak_candidates(power, level, most)))
    for values in ((1.0, 2.0, 1.5), (1.0, 1.0, 1.0), (0.0, 3.0, 2.99), (np.nan, 1.0, 0.5)):
        found, expected = twin.parabola_vertex(*values), compiled.parabola_vertex(*values)
        np.testing.assert_allclose(found, expected, rtol=1e-15, equal_nan=True)
    field = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    row = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    for centre in (0, 1, n - 1):
        assert twin.fine_power(field, centre, row) == pytest.approx(
            compiled.fine_power(field, centre, row), rel=1e-12)
    field[n // 2] = np.nan
    assert np.isnan(twin.fine_power(field, 1, row)) and np.isnan(
        compiled.fine_power(field, 1, row))


def test_the_most_highest_candidates_are_refined_on_both():
    # more local maxima above the level than MAX_CANDIDATES: both refine the same highest ones
    n = 512
    t = np.arange(n)
    heights = [1.0, 0.95, 0.9, 0.85, 0.8, 0.75, 0.7]
    field = sum(h * np.exp(-((t - 40 - 60 * k - 0.37) / 3.0) ** 2) for k, h in enumerate(heights))
    args = _search_args(field + 0j)
    assert compiled.peak_candidates(args[1], args[4], 1000).size > bandlimited.MAX_CANDIDATES
    assert twin.refine_peak(*args) == pytest.approx(compiled.refine_peak(*args), rel=1e-12)


def test_peak_location_is_the_same_on_both_policies(monkeypatch):
    from hcfplan.numerics import kernel_choice

    field = _field(1024, 4, seed=3)
    found = {}
    for policy in ("numba", "numpy"):
        monkeypatch.setenv(kernel_choice.VARIABLE, policy)
        found[policy] = bandlimited.peak_location(field)
    assert found["numpy"] == pytest.approx(found["numba"], rel=1e-12)
    assert found["numpy"][0] >= np.max(np.abs(field) ** 2)


@pytest.mark.parametrize("n", [3, 17, 2048])
def test_field_peak_is_the_search_of_the_field_power(n):
    # field_peak forms |field|^2 itself: on both sets it is refine_peak of that power (the
    # compiled one bit for bit), (nan, nan) with any non-finite sample, (0, 0) for zeros
    field = _field(n, 3, seed=7 * n)
    args = _search_args(field)
    rest = args[2:]
    assert compiled.field_peak(args[0], *rest) == compiled.refine_peak(*args)
    assert twin.field_peak(args[0], *rest) == twin.refine_peak(*args)
    for value in (np.nan, np.inf, complex(0.0, -np.inf), 1e200):  # 1e200: |.|^2 overflows
        broken = args[0].copy()
        broken[n // 2] = value
        for module in (compiled, twin):
            with np.errstate(over="ignore"):  # the twin's square overflows, as it should
                found = module.field_peak(broken, *rest)
            assert all(np.isnan(found)), (module.__name__, value)
    zero = np.zeros(n, complex)
    assert compiled.field_peak(zero, *rest) == twin.field_peak(zero, *rest) == (0.0, 0.0)
