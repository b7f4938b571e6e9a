"""Circular polarisation, average power, heat, entrance window and compressor losses through
the limits report, the envelope and the chain.

Kinds: published value (fused-silica GVD, Kerr ratio), invariant (scalings), contract (keys
present, options honoured).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from fast_cases import FAST, TINY

from hcfplan.io.config import load_config
from hcfplan.planning.chain import run_chain, summary_dict
from hcfplan.planning.envelope import envelope_map
from hcfplan.planning.hardware import entrance_window_phase, with_entrance_window
from hcfplan.planning.reports.limits import limits_report


def _config(tmp_path, text, overrides=()):
    path = tmp_path / "c.toml"
    path.write_text(text)
    return load_config(path, overrides=overrides)


def _check(report, name):
    return next(c for c in report["limits.checks"] if c["name"] == name)


def test_circular_raises_critical_power_and_lowers_ionisation(tmp_path):
    """Published value (R. W. Boyd, Nonlinear Optics, Sec. 4.2 [from memory]): argon's
    electronic n2 is 2/3 for circular polarisation, so P_cr is 3/2 of the linear one; the
    circular tunnelling rate ionises less at equal intensity; barrier suppression needs twice
    the intensity (same field)."""
    lin = limits_report(_config(tmp_path, FAST))
    circ = limits_report(_config(tmp_path, FAST, ['laser.polarization="circular"']))
    assert circ["limits.self_focusing.critical_power_w"] == pytest.approx(
        1.5 * lin["limits.self_focusing.critical_power_w"], rel=1e-12)
    assert circ["limits.ionization.model"] == "adk_circular"
    assert circ["limits.ionization.fraction_input"] < lin["limits.ionization.fraction_input"]
    assert circ["limits.ionization.barrier_suppression_intensity_w_per_m2"] == pytest.approx(
        2 * lin["limits.ionization.barrier_suppression_intensity_w_per_m2"], rel=1e-12)
    assert circ["limits.self_focusing.polarization"] == "circular"


def test_circular_envelope_follows(tmp_path):
    """Invariant: the envelope's self-focusing energy scales with P_cr (x 3/2 for argon)."""
    axes = dict(energies=np.array([1e-4, 3e-4]), pressures=np.array([3e4, 6e4]))
    lin = envelope_map(_config(tmp_path, FAST), **axes)
    circ = envelope_map(_config(tmp_path, FAST, ['laser.polarization="circular"']), **axes)
    assert np.allclose(circ.self_focusing_max_energy, 1.5 * lin.self_focusing_max_energy,
                       rtol=1e-9)
    assert np.all(circ.ionization_max_energy > lin.ionization_max_energy)


def test_molecular_fill_critical_power_includes_rotation(tmp_path):
    """Invariant: for N2 the report's n2 exceeds the electronic n2 (60 fs pulse: part of the
    rotational response), and P_cr is computed from it."""
    report = limits_report(_config(tmp_path, FAST, ['gas.species="N2"']))
    n2, electronic = (report["limits.self_focusing.n2_m2_per_w"],
                      report["limits.self_focusing.electronic_n2_m2_per_w"])
    assert n2 > 1.2 * electronic
    argon = limits_report(_config(tmp_path, FAST))
    assert argon["limits.self_focusing.n2_m2_per_w"] == argon[
        "limits.self_focusing.electronic_n2_m2_per_w"]


def test_average_power_and_relaxation(tmp_path):
    """Definitions: entrance power E f, fiber exit E eta T f; the relaxation check flips with
    the repetition rate; without a rate no power keys appear."""
    cfg = _config(tmp_path, FAST, ["laser.repetition_khz=1"])
    report = limits_report(cfg)
    assert report["limits.power.entrance_w"] == pytest.approx(300e-6 * 1e3, rel=1e-12)
    exit_w = report["limits.power.fiber_exit_w"]
    assert 0 < exit_w < report["limits.power.entrance_w"]
    assert report["limits.power.thz_crystal_w"] < exit_w  # exit window Fresnel loss
    tau = report["limits.gas.thermal_relaxation_time_s"]
    a = 125e-6
    assert tau == pytest.approx(a**2 / (2.404825557695773**2
                                        * report["limits.gas.thermal_diffusivity_m2_per_s"]),
                                rel=1e-12)
    assert report["limits.gas.relaxes_between_pulses"] is (3 * tau <= 1e-3)
    fast = limits_report(_config(tmp_path, FAST, [f"laser.repetition_khz={1 / tau:.6g}"]))
    assert fast["limits.gas.relaxes_between_pulses"] is False
    assert _check(fast, "gas.thermal_relaxation")["status"] == "exceeds"
    assert report["limits.gas.heat_per_pulse_j"] >= 0
    assert "limits.power.entrance_w" not in limits_report(_config(tmp_path, FAST))


def test_relaxation_not_checked_for_neon(tmp_path):
    """Contract: no conductivity model for Ne: the check says so, the keys are null."""
    report = limits_report(_config(tmp_path, FAST, ['gas.species="Ne"',
                                                    "laser.repetition_khz=1"]))
    assert _check(report, "gas.thermal_relaxation")["status"] == "not checked"
    assert report["limits.gas.relaxes_between_pulses"] is None


def test_entrance_window_gdd_and_b_integral(tmp_path):
    """Published value: fused-silica GVD at 800 nm 36.16 fs^2/mm from the Sellmeier fit of
    I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965); B = (2 pi/lambda) n2 I L by hand."""
    report = limits_report(_config(tmp_path, FAST, ["cell.entrance_window_thickness_mm=3"]))
    assert report["limits.entrance_window.gdd_s2"] / 1e-30 == pytest.approx(3 * 36.16,
                                                                             abs=0.15)
    b = (2 * math.pi / 800e-9 * report["limits.entrance_window.n2_m2_per_w"]
         * report["limits.entrance_window.peak_intensity_w_per_m2"] * 3e-3)
    assert report["limits.entrance_window.b_integral_rad"] == pytest.approx(b, rel=1e-12)
    assert _check(report, "entrance_window.b_integral")["status"] in ("within", "exceeds")
    assert "limits.entrance_window.gdd_s2" not in limits_report(_config(tmp_path, FAST))


def test_entrance_window_stretches_input(tmp_path):
    """Analytic (G. P. Agrawal, Nonlinear Fiber Optics, ch. 3 [from memory]): a Gaussian of
    FWHM tau after a GDD phi2 has FWHM tau sqrt(1 + (4 ln2 phi2/tau^2)^2); TOD of the window
    adds less than 2 % here; the energy is unchanged."""
    from hcfplan.numerics.grid import Grid
    from hcfplan.pulse.fields import pulse_field
    from hcfplan.pulse.metrics import envelope_fwhm

    cfg = _config(tmp_path, FAST, ["cell.entrance_window_thickness_mm=10",
                                   "laser.fwhm_fs=30"])
    grid = Grid(2**12, 2e-15, 2 * math.pi * 299792458.0 / 800e-9)
    field = pulse_field(grid, "gaussian", 30e-15, 1e-4)
    after = with_entrance_window(cfg, grid, field)
    from hcfplan.compression.elements import phase_derivatives_at

    gdd = phase_derivatives_at(grid.omega, grid.omega0, entrance_window_phase(cfg, grid))[2]
    expected = 30e-15 * math.sqrt(1 + (4 * math.log(2) * gdd / (30e-15) ** 2) ** 2)
    assert envelope_fwhm(grid, after) == pytest.approx(expected, rel=0.02)
    assert grid.energy_t(after) == pytest.approx(grid.energy_t(field), rel=1e-12)


def test_chain_compressed_energy_below_fiber_output(tmp_path):
    """Invariant: with the exit window's Fresnel loss and the mirror reflectivity the
    compressed energy is the fiber output times T_window R^n."""
    cfg = _config(tmp_path, TINY, ["cell.window_thickness_mm=1",
                                   "compressor.mirror_gdd_fs2=-40", "compressor.max_bounces=8",
                                   "compressor.mirror_reflectivity=0.98",
                                   "laser.repetition_khz=1"])
    summary = summary_dict(run_chain(cfg))
    comp = summary["compressor"]
    n = summary["compressed"]["bounces"]
    assert comp["throughput"] == pytest.approx(comp["exit_window_transmission"] * 0.98**n,
                                               rel=1e-12)
    assert comp["exit_window_transmission"] < 0.94
    band = 1 - summary["compressed"]["band_loss_fraction"]
    assert summary["compressed"]["energy_j"] == pytest.approx(
        summary["output"]["energy_j"] * band * comp["throughput"], rel=1e-6)
    assert summary["limits"]["power.after_compressor_w"] == pytest.approx(
        summary["compressed"]["energy_j"] * 1e3, rel=1e-9)
