"""The generation geometry (thz.geometry) in the maps: the phase-matching map of a tilted front
is that of the run's tilt, and the envelope map says that its thin-crystal THz contours have
no geometry."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from hcfplan.constants import c
from hcfplan.io.config import load_config
from hcfplan.materials.crystals import load_crystal, optical_group_index, thz_index
from hcfplan.planning.chain import phase_matching_output
from hcfplan.planning.envelope import TILTED_FRONT_NOTE, envelope_json, envelope_map
from hcfplan.thz.generation import thz_estimate
from hcfplan.thz.setup import ThzSetup
from hcfplan.thz.tilted import DESIGN_FREQUENCY, tilt_angle
from tests.thz.test_thz import gaussian_pulse

CONFIG = Path(__file__).resolve().parents[2] / "configs" / "yb_capillary_mixture.toml"


def _linbo3_config(geometry):
    config = load_config(CONFIG)
    thz = dataclasses.replace(config.thz, crystal="LiNbO3", geometry=geometry)
    return dataclasses.replace(config, thz=thz)


def test_envelope_map_says_its_thz_contours_have_no_geometry():
    """Invariant: the thin-crystal contours are the same for either geometry; the tilted front
    is named in the notes, the JSON and the legend."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting.envelope import plot_envelope

    tilted = envelope_map(_linbo3_config("tilted_front"), points=(12, 12))
    collinear = envelope_map(_linbo3_config("collinear"), points=(12, 12))
    np.testing.assert_array_equal(tilted.thz_cutoff, collinear.thz_cutoff)
    assert TILTED_FRONT_NOTE in tilted.notes and TILTED_FRONT_NOTE not in collinear.notes
    assert envelope_json(tilted)["envelope.thz_geometry"] == "tilted_front"
    assert envelope_json(collinear)["envelope.thz_geometry"] == "collinear"
    fig, ax = plt.subplots()
    plot_envelope(ax, tilted, contours="cutoff")
    thz = [t.get_text() for t in ax.get_legend().get_texts() if "THz cutoff" in t.get_text()]
    assert thz and all("no tilted front in it" in t for t in thz)
    plt.close(fig)


def test_phase_matching_map_of_a_tilted_front_uses_the_runs_tilt():
    """Analytic: at the pump wavelength and DESIGN_FREQUENCY the map of a tilted front is
    velocity matched (cos gamma = n_g / n_THz, J. Hebling, G. Almasi, I. Z. Kozma, J. Kuhl,
    Opt. Express 10, 1161 (2002)): its coherence length there exceeds the collinear one,
    c / (2 nu |n_g - n_THz|) ~ 55 um, by far; elsewhere it is c / (2 nu |n_g / cos gamma -
    n_THz|) with the run's gamma."""
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from hcfplan.plotting.thz import plot_phase_matching_map

    linbo3 = load_crystal("linbo3")
    grid, spectrum = gaussian_pulse(200e-15, energy=100e-6)
    result = thz_estimate(grid, spectrum, ThzSetup(linbo3, 2e-3, beam_radius=1e-3,
                                                   geometry="tilted_front"))
    config = _linbo3_config("tilted_front")
    pm = phase_matching_output(config, result)
    assert pm.geometry == "tilted_front" and pm.tilt == pytest.approx(result.tilt_angle)
    lam0 = config.laser.wavelength
    i = int(np.argmin(np.abs(pm.pump_wavelength - lam0)))
    j = int(np.argmin(np.abs(pm.frequency - DESIGN_FREQUENCY)))
    omega = 2 * np.pi * c / pm.pump_wavelength[i]
    n_g = float(optical_group_index(linbo3, omega))
    n_thz = float(thz_index(linbo3, 2 * np.pi * pm.frequency[j]).real)
    nu = pm.frequency[j]
    expected = c / (2 * nu * abs(n_g / np.cos(result.tilt_angle) - n_thz))
    assert pm.coherence_length[i, j] == pytest.approx(expected, rel=1e-9)
    collinear = c / (2 * nu * abs(n_g - n_thz))
    assert collinear == pytest.approx(55e-6, rel=0.1)
    assert pm.coherence_length[i, j] > 20 * collinear
    # the run's tilt is the one chosen at its pump centroid
    assert result.tilt_angle == pytest.approx(tilt_angle(linbo3, 2 * np.pi * result
                                                         .pump_frequency))
    fig, ax = plt.subplots()
    plot_phase_matching_map(ax, pm)
    assert f"tilted front at {np.degrees(pm.tilt):.1f} deg" in ax.get_title()
    plt.close(fig)
    # a collinear run keeps the collinear map
    collinear_run = thz_estimate(grid, spectrum, ThzSetup(linbo3, 0.1e-3))
    assert phase_matching_output(_linbo3_config("collinear"), collinear_run).geometry == (
        "collinear")
