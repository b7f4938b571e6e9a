"""The chain's optional inputs: measured input spectrum, measured mirror GDD curve, wedge trim,
and the fixed compressor elements (exit window, air path) against their published GVD.

Kinds: invariant (a constant-GDD curve equals the constant per-bounce GDD), published value
(fused-silica and air GVD), contract (the options are honoured).
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from test_simulate_cli import FAST

from hcfplan.constants import c
from hcfplan.io.config import load_config
from hcfplan.numerics.grid import Grid
from hcfplan.planning.chain import fixed_phase, run_chain

ROOT = Path(__file__).resolve().parents[1]


def _config(tmp_path, text, overrides=()):
    path = tmp_path / "c.toml"
    path.write_text(text)
    return load_config(path, overrides=overrides)


def _gdd_at_pump(grid, phase):
    from hcfplan.compression.elements import phase_derivatives_at

    return phase_derivatives_at(grid.omega, grid.omega0, phase)[2]


def test_window_gdd_is_thickness_times_malitson_gvd(tmp_path):
    # published value: fused silica GVD at 800 nm = 36.16 fs^2/mm from the Sellmeier fit of
    # I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965) (36.2 fs^2/mm to the digits usually
    # quoted); a 1 mm window with no air path must give that GDD
    cfg = _config(tmp_path, FAST, ["compressor.air_path_m=0.0"])
    grid = Grid(4096, 2e-15, 2 * math.pi * c / 800e-9)
    gdd = _gdd_at_pump(grid, fixed_phase(cfg, grid))
    assert gdd / 1e-30 == pytest.approx(36.16, abs=0.05)


def test_air_path_gvd_near_20_fs2_per_m(tmp_path):
    # published value: standard-air dispersion of P. E. Ciddor, Appl. Opt. 35, 1566 (1996),
    # scaled to 20 degC and 1 atm, gives a GVD of about 20 fs^2/m at 800 nm (common figure;
    # the Borzsonyi 2008 air fit at 0 degC, 1 bar gives 21.5 fs^2/m). Tolerance 5 %.
    cfg = _config(tmp_path, FAST, ["cell.window_thickness_mm=0.0", "compressor.air_path_m=2.0"])
    grid = Grid(4096, 2e-15, 2 * math.pi * c / 800e-9)
    gdd_per_m = _gdd_at_pump(grid, fixed_phase(cfg, grid)) / 2.0
    assert gdd_per_m / 1e-30 == pytest.approx(20.0, rel=0.05)


def test_constant_gdd_curve_equals_constant_mirrors(tmp_path):
    # invariant: a measured curve that is flat at -40 fs^2 per bounce compresses exactly like
    # compressor.mirror_gdd_fs2 = -40
    curve = tmp_path / "mirror.csv"
    wl = np.linspace(500.0, 1300.0, 161)
    curve.write_text("wavelength_nm,gdd_fs2\n" + "\n".join(f"{w:.2f},-40.0" for w in wl))
    base = _config(tmp_path, FAST, ["grid.points=1024"])
    text = FAST.replace("mirror_gdd_fs2 = -40.0", f'mirror_gdd_csv = "{curve}"')
    measured = _config(tmp_path, text, ["grid.points=1024"])
    a, b = run_chain(base), run_chain(measured)
    assert b.compression.bounces == a.compression.bounces
    assert b.compression.metrics.peak_power == pytest.approx(a.compression.metrics.peak_power,
                                                             rel=1e-6)


def test_measured_input_spectrum_sets_the_launched_energy(tmp_path):
    # contract: laser.spectrum_csv replaces the analytic shape; the launched energy is the
    # configured energy times the coupling efficiency
    csv = ROOT / "configs" / "demo_broadened_spectrum.csv"
    text = FAST.replace('shape = "gaussian"', f'spectrum_csv = "{csv}"').replace(
        "wavelength_nm = 800.0", "wavelength_nm = 1030.0")
    cfg = _config(tmp_path, text, ["grid.points=2048", "fiber.length_m=0.05"])
    chain = run_chain(cfg)
    assert chain.propagation.success
    assert chain.propagation.energy_z[0] == pytest.approx(chain.launched_energy, rel=1e-6)
    assert chain.launched_energy == pytest.approx(cfg.laser.energy * chain.coupling_efficiency)


def test_wedge_trim_is_used(tmp_path):
    # contract: with a wedge pair configured the trim insertion is chosen within its bounds
    text = FAST.replace("bounces_in_pairs = true", 'bounces_in_pairs = true\n'
                        'wedge_material = "fused_silica"\nwedge_max_insertion_mm = 3.0')
    chain = run_chain(_config(tmp_path, text, ["grid.points=1024"]))
    assert 0.0 <= chain.compression.trim_insertion <= 3e-3
