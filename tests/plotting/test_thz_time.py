"""The THz waveform figure draws into given axes and returns them."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402

from hcfplan.materials.crystals import load_crystal  # noqa: E402
from hcfplan.plotting.thz_time import (  # noqa: E402
    draw_thz_waveform,
    plot_thz_waveform,
    plot_waveform_spectra,
)
from hcfplan.thz.detection import EoDetector  # noqa: E402
from hcfplan.thz.generation import thz_estimate  # noqa: E402
from hcfplan.thz.setup import ThzSetup  # noqa: E402
from hcfplan.thz.waveforms import thz_waveforms  # noqa: E402
from tests.thz.test_thz import gaussian_pulse  # noqa: E402


def test_waveform_figure_draws_and_returns_axes():
    gap = load_crystal("gap")
    grid, spectrum = gaussian_pulse(50e-15)
    result = thz_estimate(grid, spectrum, ThzSetup(gap, 0.3e-3, beam_radius=1e-3,
                                                   detector=EoDetector(gap, 0.1e-3)))
    wf = thz_waveforms(result, beam_radius=1e-3, focus_f_number=2.0, detector=gap,
                       detector_thickness=0.1e-3)
    fig, (a, b) = plt.subplots(1, 2)
    assert plot_thz_waveform(a, wf) is a
    assert a.get_ylabel() == "THz field (kV/cm)"
    assert plot_waveform_spectra(b, result, wf) is b
    assert [t.get_text() for t in b.get_legend().get_texts()][:2] == ["field E(t)",
                                                                       "EO waveform S(tau)"]
    plt.close(fig)
    fig = plt.figure()
    assert draw_thz_waveform(fig, result, wf) is fig.axes[0]
    plt.close(fig)
