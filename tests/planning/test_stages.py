"""Cascaded stages: the hand-over from one stage to the next, and what a staged run reports.

Kinds: invariant (an evacuated second stage without a compressor reproduces the one-stage
result, scaled by its coupling and fiber transmission; energy is conserved across the
hand-over minus the stated loss; resampling a pulse onto another grid keeps its shape),
contract (summary keys per stage, the final stage at the top-level keys, THz from the final
stage only).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from fast_cases import FAST_CONFIG, two_stage_text

from hcfplan.constants import c
from hcfplan.io.config import config_from_mapping
from hcfplan.io.tomlio import parse_toml
from hcfplan.numerics.grid import Grid
from hcfplan.planning.chain import field_arrays, run_chain, summary_dict
from hcfplan.planning.stages import handover_field
from hcfplan.pulse.metrics import envelope_fwhm

ONE_STAGE = FAST_CONFIG.format(energy_uj=200.0, rated_bar=20.0)

#: The one-stage config as stage 0, then an evacuated stage (1e-9 bar, the lowest fill the
#: schema takes; a 1 cm, 1 mm bore capillary) with no compressor and no windows.
EVACUATED_SECOND = """
[[stage]]
[stage.fiber]
kind = "capillary"
core_diameter_um = 1000.0
length_m = 0.01
[stage.gas]
species = "He"
pressure_bar = 1e-9
"""


def _load(text):
    return config_from_mapping(parse_toml(text, "t.toml"))


@pytest.fixture(scope="module")
def runs():
    one = run_chain(_load(ONE_STAGE))
    two = run_chain(_load(two_stage_text(ONE_STAGE, EVACUATED_SECOND)))
    return one, two, summary_dict(one), summary_dict(two)


def test_evacuated_second_stage_reproduces_the_one_stage_result(runs):
    # invariant: an evacuated stage without a compressor passes the compressed pulse on,
    # scaled by its coupling efficiency and linear transmission (no nonlinearity at 1e-9 bar,
    # a 1 cm bore of 1 mm adds a negligible waveguide GDD)
    one, two, s1, s2 = runs
    final = s2["stages"]["1"]
    scale = final["input"]["coupling_efficiency"] * final["fiber"]["transmission"]
    assert 0.95 < scale < 1.0
    assert s2["compressed"]["fwhm_s"] == pytest.approx(s1["compressed"]["fwhm_s"], rel=0.02)
    assert s2["compressed"]["energy_j"] == pytest.approx(s1["compressed"]["energy_j"] * scale,
                                                         rel=1e-3)
    assert s2["compressed"]["peak_power_w"] == pytest.approx(
        s1["compressed"]["peak_power_w"] * scale, rel=0.02)
    # THz from the final stage: the same spectrum peak, the efficiency of the lower energy
    assert s2["thz"]["peak_hz"] == pytest.approx(s1["thz"]["peak_hz"], rel=0.03)
    assert "thz" not in s2["stages"]["0"]  # earlier stages carry no THz
    # stage 0 is the one-stage run itself
    assert s2["stages"]["0"]["compressed"]["fwhm_s"] == pytest.approx(
        s1["compressed"]["fwhm_s"], rel=1e-9)
    # the output spectra agree in shape (normalised overlap on a common frequency axis)
    f1, p1 = one.grid.frequency, np.abs(one.compression.spectrum) ** 2
    f2, p2 = two.grid.frequency, np.abs(two.compression.spectrum) ** 2
    o1, o2 = np.argsort(f1), np.argsort(f2)
    p2_on_1 = np.interp(f1[o1], f2[o2], p2[o2], left=0.0, right=0.0)
    overlap = np.sum(p1[o1] * p2_on_1) / math.sqrt(np.sum(p1[o1] ** 2) * np.sum(p2_on_1 ** 2))
    assert overlap > 0.999


def test_energy_is_conserved_across_the_handover(runs):
    # invariant: stage 1 receives stage 0's compressed energy and launches it times its
    # coupling efficiency, the stated hand-over loss
    _, two, _, s2 = runs
    first, second = s2["stages"]["0"], s2["stages"]["1"]
    given = first["compressed"]["energy_j"]
    assert second["input"]["energy_j"] == pytest.approx(given, rel=1e-12)
    assert second["handover"]["energy_in_j"] == pytest.approx(given, rel=1e-12)
    launched = given * (1 - second["handover"]["loss_fraction"])
    assert second["input"]["launched_energy_j"] == pytest.approx(launched, rel=1e-12)
    # the field the solver started from carries exactly that energy
    start = two.stages[1].propagation.energy_z[0]
    assert start == pytest.approx(launched, rel=1e-9)


def test_summary_and_arrays_of_a_staged_run(runs):
    # contract: stages.K.* per stage, the final stage at the top-level keys, fields per stage
    _, two, _, s2 = runs
    assert sorted(s2["stages"]) == ["0", "1"]
    assert s2["stages_run"] == s2["stages_configured"] == 2
    for part in s2["stages"].values():
        assert {"fiber", "output", "compressed", "limits", "verdict"} <= set(part)
    assert s2["output"] == s2["stages"]["1"]["output"]
    assert s2["fiber"]["length_m"] == pytest.approx(0.01)
    assert s2["verdict"]["status"] in ("valid", "caution", "invalid")
    arrays = field_arrays(two)
    for k in (0, 1):
        assert arrays[f"stage_{k}_field_compressed_t"].shape == arrays[f"stage_{k}_time_s"].shape


@pytest.mark.parametrize(("points", "dt", "centre_nm"), [(2048, 2.5e-15, 1030.0),
                                                        (1024, 3.0e-15, 1000.0)])
def test_resampled_pulse_keeps_its_shape(points, dt, centre_nm):
    # invariant: a chirped Gaussian handed to a grid of another step, size and centre keeps its
    # duration and energy (the spectrum is band-limited and the window holds the pulse)
    omega_p = 2 * math.pi * c / 1030e-9
    src = Grid(4096, 2.0e-15, omega_p)
    t = src.time
    field = np.exp(-2 * math.log(2) * (t / 30e-15) ** 2 + 1j * (t / 40e-15) ** 2)
    field *= math.sqrt(1e-4 / src.energy_t(field))
    given = handover_field(src, src.to_spectrum(field), 1e-4)
    dst = Grid(points, dt, 2 * math.pi * c / (centre_nm * 1e-9), omega_pump=omega_p)
    moved = given.on_grid(dst, 1e-4)
    assert dst.energy_t(moved) == pytest.approx(1e-4, rel=1e-9)
    assert envelope_fwhm(dst, moved) == pytest.approx(envelope_fwhm(src, field), rel=0.01)
