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
