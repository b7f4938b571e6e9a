"""The fused multimode kernel and the batched transforms against their references
(hcfplan.propagation.multimode_kernels, multimode_fft).

Kind: consistency. :func:`~hcfplan.propagation.multimode_kernels.mode_terms` computes the Kerr,
delayed and plasma terms of all radial nodes in blocks of time samples, with the electron
density of each node carried from block to block, the rate-0 blocks done through the mode
matrix M[p, m] = sum_k w_k F_kp rho_k F_km, and the density as a running product and sum
(one exponential per sample instead of three). It must give what the per-node reference
(:func:`~hcfplan.propagation.multimode_kernels.radial_plasma_projection`, the single-mode
plasma kernel at every node) gives, to rounding (1e-12 relative here); the pyFFTW and scipy
back ends of :class:`~hcfplan.propagation.multimode_fft.ModeTransforms` must agree to rounding
too. Fields: our own test inputs (random mode mixtures of a Gaussian pulse, seeded).
"""

from __future__ import annotations

import numpy as np
import pytest
from multimode_cases import gas, grid, quiet

from hcfplan.fibers.capillary import CapillaryFiber
from hcfplan.numerics.fft import fftw_available
from hcfplan.propagation import multimode_kernels as mk
from hcfplan.propagation.ionizing import ionizing_gas
from hcfplan.propagation.multimode_terms import ModeCoupling
from hcfplan.propagation.operators import delayed_response
from hcfplan.pulse.fields import pulse_field

ROUNDING = 1e-12  # relative, against the largest value


def _coupling(species: str, modes: int, model, backend="scipy", profile="radial"):
    medium = gas(species)
    fiber = CapillaryFiber(core_radius=75e-6, length=0.2, gas=medium)
    g = grid()
    guides = [CapillaryFiber(core_radius=75e-6, length=0.2, gas=medium, mode=(1, m))
              for m in range(1, modes + 1)]
    f_inst, response, _ = quiet(delayed_response, g, fiber, medium)
    plasma = quiet(ionizing_gas, g, fiber, medium, model)
    valid = np.ones((modes, g.points), bool)
    return g, ModeCoupling(g, fiber.kerr_n2, valid, 75e-6, [w.u for w in guides], f_inst,
                           response, plasma.species, 1, profile, backend)


def _fields(g, modes: int, energy: float, seed: int = 3) -> np.ndarray:
    rng = np.random.default_rng(seed)
    weights = rng.normal(size=modes) + 1j * rng.normal(size=modes)
    weights[0] = 3.0  # mostly EH11
    weights /= np.linalg.norm(weights)
    pulse = pulse_field(g, "gaussian", 30e-15, energy)
    chirp = np.exp(1j * rng.normal() * (g.time / 30e-15) ** 2)
    return weights[:, None] * pulse[None, :] * chirp[None, :]


def _relative(a, b) -> float:
    return float(np.max(np.abs(a - b)) / max(np.max(np.abs(b)), 1e-300))


@pytest.mark.parametrize("modes", [1, 2, 4])
def test_fused_kernel_equals_the_per_node_reference(modes):
    g, nl = _coupling("Ar", modes, "ppt")
    a = nl.scale * _fields(g, modes, 300e-6)
    profiles, weighted, pair_weights = nl.nodes
    rows = tuple(np.zeros_like(r) for r in nl.rows)
    q_ref, qp_ref = np.zeros_like(nl.q), np.zeros_like(nl.q)
    ends_ref = np.zeros(profiles.shape[0])
    mk.radial_plasma_projection(a.view(np.float64), profiles, weighted, nl.pairs, pair_weights,
                                nl.instantaneous, *nl.tables, 1.0 / nl.scale**2, nl.dt,
                                nl.refraction, q_ref.view(np.float64), qp_ref.view(np.float64),
                                ends_ref, *rows)
    nl._terms(a, nl.pairs, True)
    # the case ionises at many nodes and samples, and leaves electrons behind the pulse
    assert ends_ref[0] / nl.neutral_density > 1e-7 and np.count_nonzero(ends_ref) > 3
    assert np.max(np.abs(qp_ref)) > 1e-6 * np.max(np.abs(q_ref))
    assert _relative(nl.q, q_ref) < ROUNDING
    assert _relative(nl.qp, qp_ref) < ROUNDING
    np.testing.assert_allclose(nl.ends, ends_ref, rtol=ROUNDING, atol=0)
    # the densities alone (the recorder's call) are the same numbers
    fraction, line = nl.ionization_fraction, nl.electron_line_density
    assert nl.ionization_of(a) == (fraction, line)


def test_fused_kernel_below_the_rate_tables_has_no_plasma_term():
    # a weak pulse: no node reaches the tables' first intensity, the plasma term is exactly 0
    g, nl = _coupling("Ar", 3, "ppt")
    a = nl.scale * _fields(g, 3, 1e-12)
    nl._terms(a, nl.pairs, True)
    assert not np.any(nl.qp) and not np.any(nl.ends)
    assert np.max(np.abs(nl.q)) > 0


@pytest.mark.parametrize("energy", [1e-9, 300e-6], ids=["below_tables", "ionising"])
def test_evaluation_without_electrons_skips_the_plasma_transform(energy):
    # the nonlinear term N = i gain raw with and without the ionising species: equal (to
    # rounding: the plasma path's node set holds the axis with weight 0) when nothing ionises,
    # different when the pulse ionises (the check is not void)
    g, ionising = _coupling("Ar", 3, "ppt")
    _, kerr_only = _coupling("Ar", 3, None)
    u = np.array([g.to_spectrum(f) for f in _fields(g, 3, energy)]).reshape(-1)
    with_plasma = ionising(u, ionising.new_work())
    without = kerr_only(u, kerr_only.new_work())
    difference = _relative(with_plasma, without)
    if energy < 1e-6:
        assert not ionising.ends.any()
        assert difference < 1e-14
    else:
        assert ionising.ends.any()
        assert difference > 1e-6


@pytest.mark.skipif(not fftw_available(), reason="pyFFTW is not installed")
@pytest.mark.parametrize(("species", "model"), [("Ar", "ppt"), ("N2", None)],
                         ids=["plasma", "raman"])
def test_fftw_and_scipy_back_ends_agree(species, model):
    out = []
    for backend in ("scipy", "fftw"):
        g, nl = _coupling(species, 3, model, backend)
        u = np.array([g.to_spectrum(f) for f in _fields(g, 3, 150e-6)]).reshape(-1)
        result = nl.new_work()
        nl(u, result)
        out.append(result)
        assert nl.fft.name == backend
    assert np.max(np.abs(out[0])) > 0
    assert _relative(out[1], out[0]) < ROUNDING


def _scanned_peak(g, a: np.ndarray, at: int, r: int) -> float:
    """Reference: the band-limited summed power at all 2 r + 1 offsets within one step of
    sample ``at`` (direct sums over the spectrum, convention 2 of hcfplan.numerics.grid), and
    the parabola through the highest three."""
    c = np.fft.ifft(a, axis=-1)
    offsets = at + np.arange(-r, r + 1) / r
    phases = np.exp(-1j * np.outer(offsets * g.dt, g.domega))
    power = np.sum(np.abs(c @ phases.T) ** 2, axis=0)
    i = int(np.argmax(power))
    if not 0 < i < power.size - 1:
        return float(power[i])
    left, mid, right = power[i - 1], power[i], power[i + 1]
    return float(mid + (right - left) ** 2 / (8.0 * (2.0 * mid - left - right)))


@pytest.mark.parametrize("seed", [1, 2, 3, 4])
def test_whole_beam_peak_search_equals_the_full_offset_scan(seed):
    # the halving search (6 evaluations) finds what the scan of all offsets finds
    from hcfplan.propagation.multimode_record import BEAM_PEAK_OVERSAMPLING, ModeRecorder

    g, nl = _coupling("Ar", 3, None)
    rng = np.random.default_rng(seed)
    a = _fields(g, 3, 1e-6, seed) * np.exp(1j * rng.normal(size=(3, 1)))
    a[1:] = np.roll(a[1:], rng.integers(-3, 4), axis=-1)  # the modes' peaks apart
    band = np.abs(g.domega) < 0.3 * np.max(g.domega)  # band-limited well inside the window
    shift = np.exp(-1j * g.domega * 0.37 * g.dt)  # and delayed by 0.37 steps (off the samples)
    a = np.fft.fft(np.fft.ifft(a, axis=-1) * band * shift, axis=-1)
    at = int(np.argmax(np.sum(np.abs(a) ** 2, axis=0)))
    recorder = ModeRecorder(g, 2, nl)
    found = recorder._beam_peak(a, at)
    reference = _scanned_peak(g, a, at, BEAM_PEAK_OVERSAMPLING)
    assert found == pytest.approx(reference, rel=1e-12)
    assert found > np.sum(np.abs(a[:, at]) ** 2)  # between the samples (not void)


def test_trimmed_rate_tables_change_the_terms_below_the_tolerance():
    # the entries with W dt < 1e-20 dropped: the same nonlinear terms to 1e-13 (derived: the
    # electrons dropped are < 1e-20 of the neutral density per sample)
    from hcfplan.propagation.multimode_terms import NEGLIGIBLE_IONIZATION, trimmed_tables
    from hcfplan.propagation.operators import packed_tables

    g, nl = _coupling("Ar", 3, "ppt")
    full = packed_tables(nl.species)
    trimmed = nl.tables
    assert trimmed[0].size < full[0].size  # entries were dropped (not void)
    first = full[1][full[0] < trimmed[0][0]]
    assert np.all(first + np.log(g.dt) < np.log(NEGLIGIBLE_IONIZATION))
    assert trimmed[1][0] + np.log(g.dt) >= np.log(NEGLIGIBLE_IONIZATION)
    u = np.array([g.to_spectrum(f) for f in _fields(g, 3, 300e-6)]).reshape(-1)
    out_trimmed = nl(u, nl.new_work())
    ends_trimmed = nl.ends.copy()
    nl.tables = full
    out_full = nl(u, nl.new_work())
    assert nl.ends[0] / nl.neutral_density > 1e-8  # it ionises
    assert _relative(out_trimmed, out_full) < 1e-13
    np.testing.assert_allclose(ends_trimmed[0], nl.ends[0], rtol=1e-13)
    assert trimmed_tables(full, g.dt, 0.0)[0].size == full[0].size  # nothing below W dt = 0
