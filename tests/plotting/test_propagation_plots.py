"""Smoke test of hcfplan.plotting.propagation: every function draws into the given Axes and
returns it (contract test; no numbers checked). No external source is needed for these checks."""

from __future__ import annotations

import pytest
from propagation_cases import Z0, soliton, taylor, textbook_grid

from hcfplan.propagation.options import SolverOptions
from hcfplan.propagation.solve import propagate

matplotlib = pytest.importorskip("matplotlib")
matplotlib.use("Agg")


@pytest.mark.parametrize(
    "name",
    ["plot_spectra_in_out", "plot_spectral_evolution", "plot_temporal_in_out",
     "plot_energy_and_ionization"],
)
def test_plot_returns_axes(name):
    import matplotlib.pyplot as plt

    from hcfplan.plotting import propagation as plots

    grid = textbook_grid()
    result = propagate(soliton(grid, 2.0), grid, taylor(Z0 / 4),
                       options=SolverOptions(rtol=1e-5, z_samples=5))
    fig, ax = plt.subplots()
    try:
        assert getattr(plots, name)(ax, result) is ax
    finally:
        plt.close(fig)


def _widening(share_at_tenth: float):
    """A result-like object whose spectrum widens along z, reaching ``share_at_tenth`` of its
    final growth at z = L/10 (synthetic, for the z-scale choice only)."""
    from types import SimpleNamespace

    import numpy as np

    z = np.linspace(0.0, 1.0, 21)
    x = np.linspace(-1.0, 1.0, 401)
    growth = np.where(z <= 0.1, share_at_tenth * z / 0.1,
                      share_at_tenth + (1 - share_at_tenth) * (z - 0.1) / 0.9)
    width = 0.05 + 0.5 * growth
    spectrum = np.exp(-((x[None, :] / width[:, None]) ** 2))
    return SimpleNamespace(z=z, spectrum_z=spectrum)


@pytest.mark.parametrize(("share", "early"), [(0.95, True), (0.5, False), (0.1, False)])
def test_log_z_is_taken_where_the_dynamics_are_early(share, early):
    # analytic: the -20 dB width of exp(-(x/w)^2) grows in proportion to w
    from hcfplan.plotting.propagation import dynamics_are_early

    assert dynamics_are_early(_widening(share)) is early
