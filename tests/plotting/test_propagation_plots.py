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
